"""Pieces every command shares: errors, output formats, safe writing, the drum flags."""

from __future__ import annotations

import csv
import functools
import inspect
import io
import json
import math
import os
import sys
import tempfile
from enum import Enum
from pathlib import Path
from typing import Annotated, Callable, Optional

import typer

from ..drum import Drum, load_drum, override_table, parse_drum
from ..errors import InputError, MembraneError


class Format(str, Enum):
    """Output formats every table-printing command offers."""

    table = "table"
    csv = "csv"
    json = "json"
    markdown = "markdown"


class Physics(str, Enum):
    """Physics models, as in :func:`membrane.solve`."""

    ideal = "ideal"
    stiff = "stiff"
    full = "full"


class BodyKind(str, Enum):
    """What is under the head."""

    none = "none"
    kettle = "kettle"
    shell = "shell"


def fail(key: str, value, allowed: str):
    """Raise the one-line input error (the app prints it and exits with code 2)."""
    raise InputError(key, value, allowed)


def parse_mode(text: str, *, key: str = "--mode") -> tuple[int, int]:
    """``"1,1"`` -> (1, 1): m >= 0 nodal diameters, n >= 1 nodal circles."""
    parts = str(text).replace("(", "").replace(")", "").split(",")
    try:
        m, n = (int(p) for p in parts)
    except ValueError:
        fail(key, text, "expected M,N with whole numbers, e.g. 1,1 (m nodal diameters, n nodal circles)")
    if m < 0 or n < 1:
        fail(key, text, "m must be >= 0 and n >= 1 (n counts the rim)")
    return m, n


# ------------------------------------------------------------------ the drum from file + flags
DrumFile = Annotated[Optional[str], typer.Argument(
    metavar="[DRUM_FILE]",
    help="Drum file (TOML), or a built-in example: kettledrum, snare (invented demo drums).")]
Diameter = Annotated[Optional[str], typer.Option(help="Head diameter, e.g. '26 in' or '0.65 m'.")]
Radius = Annotated[Optional[str], typer.Option(help="Head radius (instead of --diameter).")]
Tension = Annotated[Optional[str], typer.Option(help="Tension per unit length, e.g. '4 kN/m', '20 lbf/in'.")]
ArealDensity = Annotated[Optional[str], typer.Option(help="Mass per unit area, e.g. '0.26 kg/m^2'.")]
Film = Annotated[Optional[str], typer.Option(help="Film from the materials data, e.g. polyester.")]
Thickness = Annotated[Optional[str], typer.Option(help="Film thickness per ply, e.g. '0.19 mm', '7.5 mil'.")]
Body = Annotated[Optional[BodyKind], typer.Option(help="What is under the head.")]
Volume = Annotated[Optional[str], typer.Option(help="Kettle volume, e.g. '0.17 m^3', '170 L'.")]
Depth = Annotated[Optional[str], typer.Option(help="Shell depth, e.g. '14 in'.")]


# The flags every drum-taking command offers, in the order --help lists them.
DRUM_FLAGS = {"diameter": Diameter, "radius": Radius, "tension": Tension,
              "areal_density": ArealDensity, "film": Film, "thickness": Thickness,
              "body": Body, "volume": Volume, "depth": Depth}


def with_drum_flags(command: Callable) -> Callable:
    """Give a command the drum flags (--diameter ... --depth) without declaring them again.

    The command declares a keyword parameter ``drum_flags: dict``; the flags take its
    place in the command-line signature, and their values reach the command in that
    dict, ready for :func:`drum_from`.
    """
    signature = inspect.signature(command, eval_str=True)
    params = list(signature.parameters.values())
    at = [p.name for p in params].index("drum_flags")
    added = [inspect.Parameter(name, inspect.Parameter.KEYWORD_ONLY if
                               params[at].kind is inspect.Parameter.KEYWORD_ONLY else
                               inspect.Parameter.POSITIONAL_OR_KEYWORD, default=None, annotation=kind)
             for name, kind in DRUM_FLAGS.items()]
    params[at:at + 1] = added

    @functools.wraps(command)
    def wrapper(*args, **kwargs):
        flags = {name: kwargs.pop(name, None) for name in DRUM_FLAGS}
        return command(*args, drum_flags=flags, **kwargs)

    wrapper.__signature__ = signature.replace(parameters=params)
    wrapper.__annotations__ = {p.name: p.annotation for p in params
                               if p.annotation is not inspect.Parameter.empty}
    return wrapper


def drum_from(drum_file: str | None, **flags) -> Drum:
    """The drum from a file (or built-in example) with command-line flags laid over it."""
    if flags.get("body") is not None:
        flags["body"] = flags["body"].value
    if drum_file is not None:
        return load_drum(drum_file, **flags)
    if not any(v is not None for v in flags.values()):
        fail("DRUM_FILE", None, "give a drum file, a built-in example (kettledrum, snare), "
             "or --diameter, --tension and --areal-density (or --film and --thickness)")
    return parse_drum(override_table(None, **flags))


def check_float(key: str, value: float | None, rng) -> float | None:
    """A float option checked finite and inside ``rng`` (a :class:`membrane.ranges.Range`).

    Click's own min/max let NaN through (every comparison with NaN is false), so each
    float option is checked here; None (option not given) passes.
    """
    return None if value is None else rng.check(value, key=key)


# ------------------------------------------------------------------ output
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
    from rich.console import Console
    from rich.table import Table

    table = Table(title=title or None, title_justify="left")
    for i, header in enumerate(headers):
        table.add_column(header, justify="left" if i == 0 else "right", no_wrap=i == 0)
    for c in cells:
        table.add_row(*c)
    console = Console(soft_wrap=False)
    if not console.is_terminal:  # piped or captured: no terminal width to respect
        console = Console(soft_wrap=False, width=160)
    console.print(table)
    for n in notes:
        console.print(f"[dim]- {n}[/dim]", highlight=False)


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


# ------------------------------------------------------------------ files
TEMP_PREFIX = ".membrane-tmp-"  # our temporary files: TEMP_PREFIX + pid + "-" + random + suffix


def check_target(path: str | Path, *, force: bool, key: str = "--out") -> Path:
    """The file to write for ``path``, after refusing what must not be replaced.

    A folder (or a link to one) is refused as a folder; an existing file needs ``force``;
    anything existing that is not a regular file (a FIFO, a device node, a socket, a link
    to nothing) is refused even with ``force``, because replacing it would destroy it.
    A link to a regular file is followed: the file it names is replaced, the link kept.
    """
    path = Path(path)
    if path.is_dir():
        fail(key, str(path), "is a folder; give a file name")
    if os.path.lexists(path):
        if not path.exists():
            fail(key, str(path), "is a link to nothing; remove it or give another file name")
        if not path.is_file():
            fail(key, str(path), "is not a regular file (a device, pipe or socket); it is never replaced")
        if not force:
            fail(key, str(path), "exists already; add --force to overwrite it")
        path = Path(os.path.realpath(path))
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        fail(key, str(path), f"folder {str(folder)!r} does not exist")
    if not os.access(folder, os.W_OK):
        fail(key, str(path), f"folder {str(folder)!r} is not writable")
    return path


def _remove_stale_temporaries(folder: Path) -> None:
    """Delete our temporary files in ``folder`` left by a process that no longer runs."""
    try:
        names = [n for n in os.listdir(folder) if n.startswith(TEMP_PREFIX)]
    except OSError:
        return
    for name in names:
        pid = name[len(TEMP_PREFIX):].split("-", 1)[0]
        if not pid.isdigit() or _alive(int(pid)):
            continue
        try:
            (folder / name).unlink()
        except OSError:
            pass


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OverflowError, OSError):
        return True  # someone else's process, or not ours to judge: leave its files alone
    return True


def write_atomic(path: str | Path, writer: Callable[[Path], None], *, force: bool,
                 key: str = "--out") -> Path:
    """Write a file whole or not at all.

    ``writer(tmp_path)`` writes the content to a temporary file in the target's folder
    (with the target's suffix, so format-sniffing writers behave); it is then moved
    over the target in one step. What :func:`check_target` refuses is refused here.
    A temporary file left by a killed run (its process gone) is removed on the next
    write to that folder.
    """
    shown = Path(path)
    path = check_target(path, force=force, key=key)
    folder = path.parent if str(path.parent) else Path(".")
    _remove_stale_temporaries(folder)
    try:
        fd, tmp = tempfile.mkstemp(prefix=f"{TEMP_PREFIX}{os.getpid()}-", suffix=path.suffix, dir=folder)
    except OSError as exc:
        fail(key, str(shown), f"cannot be written ({exc.strerror or exc})")
    os.close(fd)
    tmp = Path(tmp)
    try:
        writer(tmp)
        umask = os.umask(0)  # mkstemp makes 0600 files; give the usual permissions instead
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)
        os.replace(tmp, path)
    except OSError as exc:
        tmp.unlink(missing_ok=True)
        fail(key, str(shown), f"cannot be written ({exc.strerror or exc})")
    except BaseException:
        tmp.unlink(missing_ok=True)
        raise
    return shown


def print_error(message: str) -> None:
    """The one line a user sees for bad input."""
    try:
        print(f"membrane: error: {message}", file=sys.stderr, flush=True)
    except (OSError, ValueError):  # no stderr to write to: the exit code still says it
        pass


__all__ = ["Format", "Physics", "BodyKind", "fail", "parse_mode", "drum_from", "emit", "num",
           "signed", "t60", "check_target", "check_float", "write_atomic", "print_error",
           "MembraneError"]
