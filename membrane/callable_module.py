"""A module that may also be called as its main function (``membrane.identify(...)``).

``membrane.identify`` is both a submodule and the function a user calls; ``membrane.strike``
likewise (its call is :func:`membrane.strike.strike_partials`). Python sets a package's
attribute to the submodule whenever the submodule is imported, so a function of the same name
at the top level would be replaced by the module depending on what was imported first. Making
the module callable (a documented use of a module's ``__class__``, Python reference,
"Customizing module attribute access") gives the same result either way.
"""

from __future__ import annotations

import sys
import types


def make_callable(module_name: str, function_name: str) -> None:
    """Let the module ``module_name`` be called as its function ``function_name``."""

    class CallableModule(types.ModuleType):
        def __call__(self, *args, **kwargs):
            return getattr(self, function_name)(*args, **kwargs)

    CallableModule.__call__.__doc__ = f"Call :func:`{module_name}.{function_name}`."
    sys.modules[module_name].__class__ = CallableModule
