"""A command's result printed: JSON, CSV, Markdown or a terminal table, and the cell formatters.

Keys and columns carry their unit (``frequency_hz``, ``decay_s``; docs/physics.md, "Notation").
"""

from __future__ import annotations

import io
import json
import math
import sys
from enum import Enum
from typing import Callable


class Format(str, Enum):
    """Output formats every table-printing command offers."""

    table = "table"
    csv = "csv"
    json = "json"
    markdown = "markdown"


def _clean(value):
    """JSON-safe: NaN and infinities become null, numpy scalars plain numbers."""
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_clean(v) for v in value]
    if hasattr(value, "item") and not isinstance(value, (str, bytes)):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def emit(fmt: Format, *, payload: dict, rows: list[dict], columns: list[tuple[str, str, Callable]],
         title: str = "", notes: tuple[str, ...] | list[str] = ()) -> None:
    """Print a result in the chosen format.

    Parameters
    ----------
    fmt : Format
        ``json`` prints ``payload``; the others print ``rows`` through ``columns``,
        a list of (key, header, formatter) with formatter(value) -> str.
    title, notes
        Shown above and below the table (table and markdown formats).
    """
    if fmt is Format.json:
        print(json.dumps(_clean(payload), indent=2))
        return
    cells = [[fmtr(row.get(key)) if row.get(key) is not None else "" for key, _, fmtr in columns]
             for row in rows]
    headers = [header for _, header, _ in columns]
    if fmt is Format.csv:
        import csv  # only here: 9 ms of every command's start for the one format that needs it

        out = io.StringIO()
        writer = csv.writer(out, lineterminator="\n")
        writer.writerow([key for key, _, _ in columns])
        for row in rows:
            writer.writerow(["" if row.get(k) is None else _clean(row.get(k)) for k, _, _ in columns])
        sys.stdout.write(out.getvalue())
        return
    if fmt is Format.markdown:
        lines = [f"**{title}**", ""] if title else []
        lines.append("| " + " | ".join(headers) + " |")
        lines.append("|" + "|".join("---:" if i else "---" for i in range(len(headers))) + "|")
        lines.extend("| " + " | ".join(c) + " |" for c in cells)
        if notes:
            lines.append("")
            lines.extend(f"- {n}" for n in notes)
        print("\n".join(lines))
        return
    from .table import print_table

    print_table(headers, cells, title=title, notes=notes)


def num(digits: int) -> Callable:
    """Formatter: a float with a fixed number of decimals."""
    return lambda v: f"{v:.{digits}f}"


def t60(value) -> str:
    """Formatter for T60 columns (see :func:`membrane.modes.t60_text`)."""
    from ..modes import t60_text

    return t60_text(value)


def signed(digits: int) -> Callable:
    """Formatter: a float with a sign and a fixed number of decimals."""
    return lambda v: f"{v:+.{digits}f}"
