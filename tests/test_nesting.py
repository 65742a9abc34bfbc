"""Deeply nested drum files are refused in one line before the TOML reader recurses into them.

Reference: Python's own tomllib, the reader the scan guards. Below the limit the scan must
let through what tomllib reads (and measure its depth right); far above it, where tomllib
and copy.deepcopy raise RecursionError, the drum loader must refuse with an InputError.
"""

import sys
import tomllib

import pytest

from membrane.drum import load_drum, override_table
from membrane.errors import InputError
from membrane.nesting import MAX_DEPTH, nesting_depth

HEAD = '[head]\ndiameter = "26 in"\nareal_density = 0.26\ntension = 4000\n'


@pytest.mark.parametrize("text, depth", [
    ("a = 1", 1),
    ("a.b.c = 1", 3),
    ("[x]\na = [[1, 2], [3]]", 3),
    ("[x.y]\nz = 1", 3),
    ("a = {b = {c = 1}}", 3),
    ('a = "[[[[{{{{"', 1),                     # brackets inside strings do not count
    ("a = '''[[[[\n]]]]'''", 1),
    ('a = """x\\"""[[[["""', 1),
    ("a = 1 # [[[[[[", 1),
    ('"a.b.c" = 1', 1),                       # a quoted key with dots is one part
    ("[[lugs]]\npitches = [1, 2]", 2),
])
def test_depth_is_measured_like_tomllib_reads_it(text, depth):
    tomllib.loads(text)  # every case is valid TOML
    assert nesting_depth(text) == depth


def deep(kind: str, levels: int) -> str:
    if kind == "arrays":
        return HEAD + "[lugs]\npitches = " + "[" * levels + "1" + "]" * levels + "\n"
    if kind == "inline tables":
        return HEAD + "[body]\nkind = " + "{a = " * levels + "1" + "}" * levels + "\n"
    if kind == "dotted keys":
        return HEAD + "[air]\n" + ".".join(["k"] * levels) + " = 1\n"
    return HEAD + "[" + ".".join(["t"] * levels) + "]\n"  # a dotted table header


@pytest.mark.parametrize("kind", ["arrays", "inline tables", "dotted keys", "header"])
@pytest.mark.parametrize("levels", [MAX_DEPTH + 1, 500])
def test_deep_files_are_refused_in_one_line(tmp_path, kind, levels):
    path = tmp_path / "deep.toml"
    path.write_text(deep(kind, levels))
    with pytest.raises(InputError) as info:
        load_drum(path)
    assert info.value.key == "drum file" and f"deeper than {MAX_DEPTH}" in info.value.allowed


def test_the_guarded_failures_are_real():
    # what the scan refuses would otherwise be a RecursionError, in the reader or the copy
    limit = sys.getrecursionlimit()
    with pytest.raises(RecursionError):
        tomllib.loads(deep("arrays", 2 * limit))
    table = tomllib.loads(deep("dotted keys", limit))
    # the override step no longer deep-copies, so even such a table does not recurse there
    assert override_table(table, tension="3000 N/m")["head"]["tension"] == "3000 N/m"
    assert table["head"]["tension"] == 4000  # and the caller's table is untouched


def test_files_at_the_limit_still_reach_the_drum_checks(tmp_path):
    path = tmp_path / "ok.toml"
    path.write_text(deep("dotted keys", MAX_DEPTH - 1))
    with pytest.raises(InputError) as info:
        load_drum(path)
    assert info.value.key.startswith("air.")  # the unknown key, not the depth


def test_huge_files_are_refused_before_reading(tmp_path):
    path = tmp_path / "huge.toml"
    with open(path, "wb") as f:
        f.truncate(50_000_000)  # sparse: costs no disk
    with pytest.raises(InputError, match="larger than"):
        load_drum(path)
