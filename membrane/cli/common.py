"""Pieces every command shares: the input error, the physics and loss choices, the drum flags.

The output formats are :mod:`membrane.cli.output` and safe file writing
:mod:`membrane.cli.files`; their names are importable from here too, so a command module
imports what it shares from one place.
"""

from __future__ import annotations

import functools
import inspect
import sys
from enum import Enum
from typing import Annotated, Callable, Optional

import typer

from ..drum import Drum, load_drum, override_table, parse_drum
from ..errors import InputError, MembraneError
from .files import TEMP_PREFIX, check_target, write_atomic  # noqa: F401
from .output import Format, emit, num, signed, t60  # noqa: F401


class Physics(str, Enum):
    """Physics models, as in :func:`membrane.solve`."""

    ideal = "ideal"
    stiff = "stiff"
    full = "full"


class LossChoice(str, Enum):
    """Which losses damp the head in ``--physics full`` (:func:`membrane.solve`)."""

    all = "all"
    radiation = "radiation"


LossesOpt = Annotated[LossChoice, typer.Option(
    "--losses", help="With full physics: all = radiation plus the film, air boundary-layer and rim "
    "losses (the drum file's [losses], documented defaults); radiation = sound radiation only.")]


def decay_words(physics: str, losses: str) -> str:
    """For titles: which losses made the T60 column (full physics only)."""
    if physics != "full":
        return ""
    return "; T60 from radiation only" if losses == "radiation" else "; T60 with all losses"


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


REFERENCE_HELP = ("Mode the ratios are taken to, M,N (default: the drum's principal, (1,1) for a drum "
                  "with a kettle, else (0,1)); on a two-headed drum HEAD:M,N names the head, e.g. "
                  "resonant:0,1 (or use --head).")
HEAD_HELP = "Which head of a two-headed drum the named mode belongs to: struck or resonant."


def parse_reference(text: str | None, drum, head: str | None = None) -> tuple:
    """``--reference``: the mode named, or the drum's principal when none is given.

    ``HEAD:M,N`` (``resonant:0,1``) or ``head`` (from ``--head``) picks which head's mode
    on a two-headed drum; the result is then (m, n, head).
    """
    if text is None:
        from ..modes import principal_mode

        ref = principal_mode(drum)
    else:
        if ":" in text:
            head, text = text.split(":", 1)
            head = head.strip().lower()
            if head not in ("struck", "resonant"):
                fail("--reference", f"{head}:{text}", "the head before ':' must be struck or resonant")
        ref = parse_mode(text, key="--reference")
    if head is None:
        return ref
    if head == "resonant" and getattr(drum, "resonant_head", None) is None:
        fail("--head", head, "this drum has no resonant head (only a shell has two heads)")
    return (*ref, head)


# ------------------------------------------------------------------ the drum from file + flags
# click adds the brackets of an optional argument itself: the metavar is the bare name.
DrumFile = Annotated[Optional[str], typer.Argument(
    metavar="DRUM_FILE",
    help="Drum file (TOML), or a built-in example: kettledrum, snare, tom, bass_drum, frame_drum "
         "(invented demo drums; membrane examples lists them).")]
Diameter = Annotated[Optional[str], typer.Option(help="Head diameter, e.g. '26 in' or '0.65 m'.")]
Radius = Annotated[Optional[str], typer.Option(help="Head radius (instead of --diameter).")]
Tension = Annotated[Optional[str], typer.Option(help="Tension per unit length, e.g. '4 kN/m', '20 lbf/in'.")]
ArealDensity = Annotated[Optional[str], typer.Option(help="Mass per unit area, e.g. '0.26 kg/m^2'.")]
Film = Annotated[Optional[str], typer.Option(help="Film from the materials data, e.g. polyester.")]
Thickness = Annotated[Optional[str], typer.Option(help="Film thickness per ply, e.g. '0.19 mm', '7.5 mil'.")]
Body = Annotated[Optional[BodyKind], typer.Option(help="What is under the head.")]
Volume = Annotated[Optional[str], typer.Option(help="Kettle volume, e.g. '0.17 m^3', '170 L'.")]
Depth = Annotated[Optional[str], typer.Option(help="Shell depth, e.g. '14 in'.")]




class Edge(str, Enum):
    """How the rim holds a head."""

    clamped = "clamped"
    hinged = "hinged"


def _opt(help_text: str, kind=str):
    return Annotated[Optional[kind], typer.Option(help=help_text)]


# Flags beyond the basic ones: the rest of the struck head, the resonant head, the air.
# Each is one drum-file key (FILE_KEYS below), so a two-headed drum needs no file.
MORE_FLAGS = {
    "plies": _opt("Plies of film in the struck head (1-4) [head.plies].", int),
    "edge": _opt("How the rim holds the struck head [head.edge].", Edge),
    "film_density": _opt("Volume density of a custom film, with --thickness, e.g. '1390 kg/m^3' "
                         "[head.density]."),
    "youngs_modulus": _opt("Young's modulus of the film, e.g. '4.5 GPa' [head.youngs_modulus]."),
    "poisson_ratio": _opt("Poisson's ratio of the film, 0 to 0.5 [head.poisson_ratio].", float),
    "yield_stress": _opt("Yield stress of the film, for the cautions, e.g. '100 MPa' [head.yield_stress]."),
    "tensile_strength": _opt("Breaking stress of the film, e.g. '200 MPa' [head.tensile_strength]."),
    "resonant_film": _opt("Film of the resonant (far) head of a shell [resonant_head.film]."),
    "resonant_thickness": _opt("Resonant head's film thickness per ply [resonant_head.thickness]."),
    "resonant_plies": _opt("Plies in the resonant head (1-4) [resonant_head.plies].", int),
    "resonant_tension": _opt("Resonant head's tension per unit length [resonant_head.tension]."),
    "resonant_areal_density": _opt("Resonant head's mass per unit area [resonant_head.areal_density]."),
    "resonant_edge": _opt("How the rim holds the resonant head [resonant_head.edge].", Edge),
    "resonant_film_density": _opt("Volume density of the resonant head's custom film "
                                  "[resonant_head.density]."),
    "resonant_youngs_modulus": _opt("Young's modulus of the resonant head's film "
                                    "[resonant_head.youngs_modulus]."),
    "resonant_poisson_ratio": _opt("Poisson's ratio of the resonant head's film "
                                   "[resonant_head.poisson_ratio].", float),
    "resonant_yield_stress": _opt("Yield stress of the resonant head's film [resonant_head.yield_stress]."),
    "resonant_tensile_strength": _opt("Breaking stress of the resonant head's film "
                                      "[resonant_head.tensile_strength]."),
    "air_temperature": _opt("Air temperature, e.g. '20 degC' (dry air, ideal gas) [air.temperature]."),
    "air_pressure": _opt("Static air pressure, e.g. '101.325 kPa' [air.pressure]."),
    "air_density": _opt("Air density, with --air-sound-speed, e.g. '1.204 kg/m^3' [air.density]."),
    "air_sound_speed": _opt("Speed of sound, with --air-density, e.g. '343.2 m/s' [air.sound_speed]."),
}

# The drum-file key each flag stands for: (table, key). The basic flags are in
# override_table's own arguments; the others are laid over the file key by key.
FILE_KEYS = {
    "diameter": ("head", "diameter"), "radius": ("head", "radius"), "tension": ("head", "tension"),
    "areal_density": ("head", "areal_density"), "film": ("head", "film"),
    "thickness": ("head", "thickness"), "body": ("body", "kind"), "volume": ("body", "volume"),
    "depth": ("body", "depth"),
    "plies": ("head", "plies"), "edge": ("head", "edge"), "film_density": ("head", "density"),
    "youngs_modulus": ("head", "youngs_modulus"), "poisson_ratio": ("head", "poisson_ratio"),
    "yield_stress": ("head", "yield_stress"), "tensile_strength": ("head", "tensile_strength"),
    **{f"resonant_{k}": ("resonant_head", v) for k, v in (
        ("film", "film"), ("thickness", "thickness"), ("plies", "plies"), ("tension", "tension"),
        ("areal_density", "areal_density"), ("edge", "edge"), ("film_density", "density"),
        ("youngs_modulus", "youngs_modulus"), ("poisson_ratio", "poisson_ratio"),
        ("yield_stress", "yield_stress"), ("tensile_strength", "tensile_strength"))},
    "air_temperature": ("air", "temperature"), "air_pressure": ("air", "pressure"),
    "air_density": ("air", "density"), "air_sound_speed": ("air", "sound_speed"),
}

# The flags every drum-taking command offers, in the order --help lists them.
DRUM_FLAGS = {"diameter": Diameter, "radius": Radius, "tension": Tension,
              "areal_density": ArealDensity, "film": Film, "thickness": Thickness,
              "body": Body, "volume": Volume, "depth": Depth, **MORE_FLAGS}


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
    """The drum from a file (or built-in example) with command-line flags laid over it.

    Each flag stands for one drum-file key (:data:`FILE_KEYS`), and gives the same drum
    as that key in a file would.
    """
    flags = {k: (v.value if isinstance(v, Enum) else v) for k, v in flags.items()}
    keys = {FILE_KEYS[k]: flags.pop(k) for k in list(flags) if k in MORE_FLAGS}
    keys = {where: v for where, v in keys.items() if v is not None}
    if drum_file is not None:
        return load_drum(drum_file, **flags, keys=keys)
    if not any(v is not None for v in flags.values()) and not keys:
        fail("DRUM_FILE", None, "give a drum file, a built-in example (membrane examples lists them), "
             "or --diameter, --tension and --areal-density (or --film and --thickness)")
    return parse_drum(override_table(None, **flags, keys=keys))


def check_float(key: str, value: float | None, rng) -> float | None:
    """A float option checked finite and inside ``rng`` (a :class:`membrane.ranges.Range`).

    Click's own min/max let NaN through (every comparison with NaN is false), so each
    float option is checked here; None (option not given) passes.
    """
    return None if value is None else rng.check(value, key=key)


def print_error(message: str) -> None:
    """The one line a user sees for bad input."""
    try:
        print(f"membrane: error: {message}", file=sys.stderr, flush=True)
    except (OSError, ValueError):  # no stderr to write to: the exit code still says it
        pass


__all__ = ["Format", "Physics", "BodyKind", "fail", "parse_mode", "drum_from", "emit", "num",
           "signed", "t60", "check_target", "check_float", "write_atomic", "print_error",
           "MembraneError", "TEMP_PREFIX"]
