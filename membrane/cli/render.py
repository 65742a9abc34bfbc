"""``membrane render`` and ``membrane handout``: pictures and a printable sheet of a drum's modes.

Thin: parse, solve, hand the modes to :mod:`membrane.render`, write the file whole
(through :func:`write_atomic`). matplotlib and pyvista load only when a picture is drawn.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Annotated, Optional

import typer

from .options import Force, MMax, NMax, PhysicsOpt
from .common import (HEAD_HELP, REFERENCE_HELP, DrumFile, LossChoice, LossesOpt, Physics, check_target,
                     drum_from, fail, parse_mode, parse_reference, with_drum_flags, write_atomic)

PHYSICS = tuple(p.value for p in Physics)  # the models, in order of what they add

ANIMATIONS = ("gif", "mp4")
STILLS = ("png", "svg", "pdf")

Reference = Annotated[Optional[str], typer.Option(help=REFERENCE_HELP, show_default=False)]
Count = Annotated[int, typer.Option(min=1, max=48, help="Modes in the grid (lowest first).")]


def _suffix(out: Path, allowed: tuple[str, ...], what: str, force: bool) -> str:
    check_target(out, force=force)  # before any solving; write_atomic checks again at the end
    fmt = out.suffix.lower().lstrip(".")
    if fmt not in allowed:
        fail("--out", str(out), f"{what} is written as " + ", ".join(f".{a}" for a in allowed))
    return fmt


def _physics_list(text: str | None, key: str) -> list[str]:
    if text is None or text.strip().lower() == "none":
        return []
    names = [t.strip().lower() for t in text.split(",") if t.strip()]
    for name in names:
        if name not in PHYSICS:
            fail(key, text, f"a comma-separated list of: {', '.join(PHYSICS)} (or none)")
    return list(dict.fromkeys(names))


def _size(text: str) -> tuple[int, int]:
    parts = text.lower().replace(" ", "").split("x")
    try:
        values = [int(p) for p in parts]
    except ValueError:
        values = []
    if len(values) not in (1, 2):
        fail("--size", text, "pixels as N (square) or WIDTHxHEIGHT, e.g. 480 or 640x480")
    return (values[0], values[-1])


def _progress(label: str):
    """Progress on stderr, on one rewritten line when stderr is a terminal."""
    tty = sys.stderr.isatty()

    def report(done: int, total: int) -> None:
        if tty:
            print(f"\r{label} {done}/{total}", end="" if done < total else "\n", file=sys.stderr, flush=True)
        elif done == total:
            print(f"{label} {done}/{total}", file=sys.stderr)

    return report


def _solve(drum, physics: str, m_max: int, n_max: int, need=(0, 1), losses: str = "all"):
    from ..solver import M_MAX_LIMIT, N_MAX_LIMIT, solve

    m, n = need
    if m > M_MAX_LIMIT or n > N_MAX_LIMIT:
        fail("--mode", f"{m},{n}", f"this drum's modes are solved up to m = {M_MAX_LIMIT}, n = {N_MAX_LIMIT}")
    return solve(drum, physics, m_max=max(m_max, m), n_max=max(n_max, n), losses=losses)


def _find(modeset, m: int, n: int, branch: str | None, head: str | None = None):
    """The mode (m, n) of the given branch and head (default: the struck head's, the lower one)."""
    if branch is None or head is not None:
        return modeset.find(m, n, branch, head=head)
    for mode in modeset:
        if (mode.m, mode.n, mode.branch) == (m, n, branch):
            return mode
    return modeset.find(m, n, branch)  # raises the library's one-line error


@with_drum_flags
def render(
    drum_file: DrumFile = None,
    out: Annotated[Optional[Path], typer.Option("--out", help=(
        "Output file. With --mode: .gif or .mp4 (3D animation), .png (nodal diagram; with --snapshot "
        "a 3D still). With --grid or --ratio-chart: .png, .svg or .pdf."))] = None,
    mode: Annotated[Optional[str], typer.Option(help="The mode to draw, M,N (nodal diameters, circles).")] = None,
    grid: Annotated[bool, typer.Option("--grid", help="Draw the lowest modes side by side.")] = False,
    ratio_chart: Annotated[bool, typer.Option(
        "--ratio-chart", help="Draw each mode against the best harmonic series, in cents.")] = False,
    compare: Annotated[Optional[str], typer.Option(help=(
        "With --ratio-chart: physics models side by side, e.g. ideal,stiff,full "
        "(default: --physics alone)."))] = None,
    snapshot: Annotated[bool, typer.Option("--snapshot", help="With --mode and .png: a 3D still instead of "
                                           "the nodal diagram.")] = False,
    branch: Annotated[Optional[str], typer.Option(help="For a shell: in-phase or opposed (default the lower).")] = None,
    head: Annotated[Optional[str], typer.Option(help=HEAD_HELP + " For --mode.", show_default=False)] = None,
    count: Count = 12,
    frames: Annotated[int, typer.Option(help="Frames in one period of the animation.")] = 48,
    size: Annotated[str, typer.Option(help="Animation size in pixels, N or WIDTHxHEIGHT.")] = "480",
    amplitude: Annotated[float, typer.Option(help=(
        "Peak displacement drawn, as a fraction of the radius (exaggerated: real heads move far less)."))] = 0.3,
    elevation: Annotated[float, typer.Option(help="Camera height above the head's plane, degrees.")] = 36.0,
    azimuth: Annotated[float, typer.Option(help="Camera angle around the drum's axis, degrees.")] = -60.0,
    fps: Annotated[float, typer.Option(help="Animation frames per second.")] = 24.0,
    drum_flags: dict = None,
    physics: PhysicsOpt = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: MMax = 6,
    n_max: NMax = 3,
    reference: Reference = None,
    force: Force = False,
) -> None:
    """Draw a drum's modes: a 3D animation or nodal diagram of one mode (--mode M,N), the lowest
    modes side by side (--grid), or the ratio chart (--ratio-chart). Colours: blue down, red up,
    on a colour-blind-safe diverging scale; black lines are nodes."""
    if out is None:
        fail("--out", None, "name the file to write, e.g. --out mode.gif")
    chosen = [name for name, on in (("--mode", mode is not None), ("--grid", grid),
                                    ("--ratio-chart", ratio_chart)) if on]
    if len(chosen) != 1:
        fail("picture", " and ".join(chosen) or "none", "choose exactly one of --mode M,N, --grid, --ratio-chart")
    if branch is not None and branch not in ("in-phase", "opposed"):
        fail("--branch", branch, "must be in-phase or opposed")
    if head is not None and head not in ("struck", "resonant"):
        fail("--head", head, "must be struck or resonant")
    if mode is not None:
        fmt = _suffix(out, ANIMATIONS + ("png",), "a single mode", force)
    else:
        fmt = _suffix(out, STILLS, "a grid or ratio chart", force)
    drum = drum_from(drum_file, **drum_flags)
    ref = parse_reference(reference, drum)

    if mode is not None:
        m, n = parse_mode(mode)
        width, height = _size(size)
        from ..render.animate import View, check_view

        view = View(frames=frames, width=width, height=height, amplitude=amplitude,
                    elevation=elevation, azimuth=azimuth, fps=fps)
        if fmt != "png" or snapshot:
            check_view(view, fmt)
        # One mode's picture needs its own order and the reference's (for the ratio in the
        # title): each order is solved on its own, so leaving the others out changes no number.
        from ..solver import check_orders

        check_orders(m_max, n_max)  # the options are still checked as given
        modeset = _solve(drum, physics.value, max(m, ref[0]), n_max, need=(m, n), losses=losses.value)
        if branch is not None and not any(x.branch for x in modeset):
            fail("--branch", branch, "only a shell's two heads solved together (--physics full) have branches")
        if head == "resonant" and drum.resonant_head is None:
            fail("--head", head, "this drum has no resonant head (only a shell has two heads)")
        the_mode = _find(modeset, m, n, branch, head)
        if fmt in ANIMATIONS or snapshot:
            from ..render.animate import render_mode

            def writer(tmp):
                render_mode(modeset, the_mode, tmp, view=view, reference=ref,
                            progress=_progress(f"{the_mode.label}: frame"))
        else:
            from ..render.stills import nodal_diagram, save

            def writer(tmp):
                save(nodal_diagram(modeset, the_mode, reference=ref), tmp)
    elif grid:
        modeset = _solve(drum, physics.value, m_max, n_max, losses=losses.value)
        from ..render.stills import mode_grid, save

        def writer(tmp):
            save(mode_grid(modeset, count=count, reference=ref), tmp)
    else:
        names = _physics_list(compare, "--compare") or [physics.value]
        modesets = [_solve(drum, name, m_max, n_max, losses=losses.value) for name in names]
        from ..render.ratio_chart import ratio_chart as chart
        from ..render.stills import save

        def writer(tmp):
            save(chart(modesets), tmp)

    write_atomic(out, writer, force=force)
    print(f"wrote {out}", file=sys.stderr)


@with_drum_flags
def handout(
    drum_file: DrumFile = None,
    out: Annotated[Optional[Path], typer.Option("--out", help="Output .pdf file.")] = None,
    paper: Annotated[str, typer.Option(help="Page size: a4 or letter.")] = "a4",
    compare: Annotated[Optional[str], typer.Option(help=(
        "Physics models shown beside --physics in the ratio chart, e.g. ideal,stiff, or none "
        "(default: the simpler models below --physics)."))] = None,
    count: Count = 12,
    drum_flags: dict = None,
    physics: PhysicsOpt = Physics.full,
    losses: LossesOpt = LossChoice.all,
    m_max: MMax = 6,
    n_max: NMax = 3,
    reference: Reference = None,
    force: Force = False,
) -> None:
    """Write a printable workshop handout (PDF, a few pages): the drum, its mode table with ratios
    and notes, the mode shapes, the ratio chart, where to strike, and the usual cautions."""
    if out is None:
        fail("--out", None, "name the PDF to write, e.g. --out handout.pdf")
    _suffix(out, ("pdf",), "the handout", force)
    paper = paper.strip().lower()
    if paper not in ("a4", "letter"):
        fail("--paper", paper, "must be a4 or letter")
    drum = drum_from(drum_file, **drum_flags)
    ref = parse_reference(reference, drum)
    if compare is None:
        others = list(PHYSICS[:PHYSICS.index(physics.value)])
    else:
        others = [p for p in _physics_list(compare, "--compare") if p != physics.value]
    modeset = _solve(drum, physics.value, m_max, n_max, losses=losses.value)
    modeset.reference_mode(ref)  # a clear error if the reference mode was not solved
    compared = [_solve(drum, name, m_max, n_max, losses=losses.value) for name in others]
    from ..render.handout import write_handout

    write_atomic(out, lambda tmp: write_handout(tmp, modeset, compare=compared, paper=paper,
                                                reference=ref, count=count,
                                                progress=_progress("handout: page")), force=force)
    print(f"wrote {out}", file=sys.stderr)
