"""Options several commands share, spelled and parsed in one place.

* ``--physics``, ``--m-max``, ``--n-max``, ``--format``: :data:`PhysicsOpt`, :data:`MMax`,
  :data:`NMax`, :data:`FormatOpt`.
* ``--force``: the one overwrite flag (no ``--no-force``), :data:`Force`.
* ``--target``: a pitch for a mode, ``[HEAD:]M,N=PITCH`` or a bare ``PITCH`` with ``--mode M,N``
  (:func:`parse_targets`), used by ``tune`` on one head and on two, and by ``listen``.
"""

from __future__ import annotations

from typing import Annotated

import typer

from ..notation import PHYSICS_HELP
from ..units import parse_pitch
from .common import Format, Physics, fail, parse_mode

PhysicsOpt = Annotated[Physics, typer.Option(help=PHYSICS_HELP)]
MMax = Annotated[int, typer.Option(help="Highest number of nodal diameters solved (0-50).")]
NMax = Annotated[int, typer.Option(help="Highest number of nodal circles solved, counting the rim (1-50).")]
FormatOpt = Annotated[Format, typer.Option("--format", help="Output format.")]
Force = Annotated[bool, typer.Option(
    "--force", help="Overwrite output files that exist already (a folder, device or link's target is "
    "never replaced).")]

#: The heads of a two-headed drum, as a target or interval names them (``resonant:0,1=C3``).
HEAD_WORDS = ("struck", "resonant")


def split_head(text: str, default: str, *, key: str) -> tuple[str, str]:
    """``"resonant:0,1"`` -> ("resonant", "0,1"); no prefix -> (default, text)."""
    if ":" in text:
        head, rest = text.split(":", 1)
        head = head.strip().lower()
        if head not in HEAD_WORDS:
            fail(key, text, "the head before ':' must be struck or resonant, e.g. resonant:0,1=C3")
        return head, rest
    return default, text


def parse_targets(texts: list[str], mode: str | None, *, head: str | None = None) -> list[tuple]:
    """``--target`` values (with ``--mode`` for the bare form) as (key, Hz, text).

    Parameters
    ----------
    texts : list of str
        ``M,N=PITCH`` or, with ``mode``, a bare ``PITCH``; with ``head``, also ``HEAD:M,N=PITCH``.
    mode : str or None
        ``--mode M,N``, the mode of a bare target.
    head : str or None
        None for a one-headed tuning: each key is (m, n). A head name (``"struck"``,
        ``"resonant"``) for a two-headed one: a target without a ``HEAD:`` prefix is for that
        head, and each key is (head, (m, n)).

    Returns
    -------
    list of tuple
        (key, pitch in Hz, the text as given), in order.
    """
    form = "[HEAD:]M,N=PITCH" if head is not None else "M,N=PITCH"
    out = []
    for text in texts:
        who, rest = split_head(text, head, key="--target") if head is not None else (None, text)
        if "=" in rest:
            left, pitch = rest.split("=", 1)
            m_n = parse_mode(left, key="--target")
        elif mode is None:
            fail("--target", text, f"say which mode: add --mode M,N, or write the target as {form}")
        else:
            m_n, pitch = parse_mode(mode), rest
        out.append(((who, m_n) if head is not None else m_n, parse_pitch(pitch, key="--target"), text))
    if mode is not None and texts and all("=" in t for t in texts):
        fail("--mode", mode, f"--mode goes with a bare --target PITCH; with {form} targets leave it out")
    return out
