"""``membrane examples``: list the built-in demo drums, or copy one out to edit."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from ..drum import builtin_names, builtin_text, load_drum
from .common import write_atomic


def examples(
    name: Annotated[Optional[str], typer.Argument(help="Example to print or copy.")] = None,
    out: Annotated[Optional[Path], typer.Option(help="Write the example's drum file here.")] = None,
    force: Annotated[bool, typer.Option(help="Overwrite --out if it exists.")] = False,
) -> None:
    """List the built-in example drums (invented demo data), or print or copy one."""
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
