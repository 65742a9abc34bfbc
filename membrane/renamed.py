"""Names that were renamed: the old spelling still resolves, with a DeprecationWarning.

One spelling per concept in the API (British -ise, ``SoundingMode`` for a mode as heard, a
strike's ``radius_fraction``); code written against the old names keeps running and is told
the new one.
"""

from __future__ import annotations

import sys
import warnings


def warn_renamed(old: str, new: str, *, stacklevel: int = 3) -> None:
    """Warn that ``old`` is now called ``new``."""
    warnings.warn(f"{old} is now {new}; the old name will go in a later release",
                  DeprecationWarning, stacklevel=stacklevel)


def old_names(module_name: str, renamed: dict[str, str]):
    """A module ``__getattr__`` (PEP 562) resolving each old name in ``renamed`` to its new one.

    Parameters
    ----------
    module_name : str
        The module whose old names these are (``__name__``).
    renamed : dict
        Old attribute name -> new attribute name in the same module.
    """
    def __getattr__(name: str):
        if name in renamed:
            warn_renamed(f"{module_name}.{name}", f"{module_name}.{renamed[name]}")
            return getattr(sys.modules[module_name], renamed[name])
        raise AttributeError(f"module {module_name!r} has no attribute {name!r}")

    return __getattr__


def renamed_attribute(old: str, new: str) -> property:
    """A read-only property under an old attribute name that returns ``new``, with a warning.

    ``old`` is the qualified old name shown to the user (``"Split.low_hz"``).
    """
    def get(self):
        warn_renamed(old, f"{type(self).__name__}.{new}")
        return getattr(self, new)

    return property(get, doc=f"The older name of :attr:`{new}`.")
