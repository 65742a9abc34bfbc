"""``membrane examples``: list the built-in demo drums, or copy one out to edit."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from ..drum import builtin_names, builtin_text, load_drum
from .common import write_atomic
from .options import Force


def examples(
    name: Annotated[Optional[str], typer.Argument(help="Example to print or copy.")] = None,
    out: Annotated[Optional[Path], typer.Option(help="Write the example's drum file here.")] = None,
    force: Force = False,
    films: Annotated[bool, typer.Option("--films", help="List the head films and skins a drum file can "
                                        "name (film = ...), with their data and its sources.")] = False,
) -> None:
    """List the built-in example drums (invented demo data), or print or copy one."""
    if films:
        _print_films()
        return
    if name is None:
        for key in builtin_names():
            print(f"{key:12s} {load_drum(key).name}")
        return
    text = builtin_text(name)
    if out is None:
        print(text, end="")
        return
    write_atomic(out, lambda tmp: tmp.write_text(text, encoding="utf-8"), force=force)
    print(f"wrote {out}")


def _print_films() -> None:
    """The film catalogue in words: what each material is, its numbers, and where they come from."""
    from ..materials import film, film_names

    for key in film_names():
        f = film(key)
        lo, hi = f.thickness_range or (None, None)
        print(f"{key}: {f.description}")
        print(f"  density {f.density:g} kg/m^3, Young's modulus {f.youngs_modulus / 1e9:g} GPa, "
              f"Poisson's ratio {f.poisson_ratio:g}")
        strength = [f"yield {f.yield_stress / 1e6:g} MPa" if f.yield_stress else "",
                    f"breaking stress {f.tensile_strength / 1e6:g} MPa" if f.tensile_strength else ""]
        if any(strength):
            print("  " + ", ".join(x for x in strength if x))
        if f.strength_note:
            print(f"  strength: {f.strength_note}")
        if lo is not None:
            usual = ", ".join(_thickness(h) for h in f.usual_thicknesses)
            print(f"  ply thickness {lo * 1e3:.3g}-{hi * 1e3:.3g} mm (usual {usual}); "
                  f"plies {', '.join(str(p) for p in f.usual_plies)}")
        if f.humidity_note:
            print(f"  {f.humidity_note}")
        for source in f.sources:
            print(f"  source, {source}")
        print()


def _thickness(h: float) -> str:
    """A ply thickness in mm, with mil where it is a whole or half mil (1 mil = 25.4 um)."""
    mil = h / 25.4e-6
    return f"{h * 1e3:.3g} mm" + (f" ({mil:g} mil)" if abs(2 * mil - round(2 * mil)) < 1e-6 else "")
