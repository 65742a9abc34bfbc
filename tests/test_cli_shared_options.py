"""Options several commands share: one spelling of --force, one parser of --target."""

import pytest
from conftest import one_line_error

from membrane.cli.options import parse_targets
from membrane.errors import InputError

# the commands that write files (common practice, no source: every one overwrites only with --force)
WRITERS = ["examples", "strike", "listen", "lugs", "render", "handout"]


@pytest.mark.parametrize("command", WRITERS)
def test_force_spelled_once(command, cli):
    # a plain flag: no --no-force twin (click's bool options grow one unless named)
    result = cli(*command.split(), "--help")
    assert result.exit_code == 0, result.output
    assert "--force" in result.output
    assert "--no-force" not in result.output


def test_targets_one_head():
    # A4 = 440 Hz (ISO 16), C3 three octaves and a sixth below
    got = parse_targets(["1,1=A4", "2,1=440"], None)
    assert [(k, round(hz, 6)) for k, hz, _ in got] == [((1, 1), 440.0), ((2, 1), 440.0)]
    bare = parse_targets(["A4"], "1,1")
    assert bare[0][0] == (1, 1) and bare[0][1] == pytest.approx(440.0)


def test_targets_two_heads():
    got = parse_targets(["resonant:0,1=A4", "1,1=A4"], None, head="struck")
    assert [k for k, _, _ in got] == [("resonant", (0, 1)), ("struck", (1, 1))]


@pytest.mark.parametrize("texts, mode, head, key", [
    (["A4"], None, None, "--target"),                 # bare pitch without --mode
    (["1,1=A4"], "1,1", None, "--mode"),               # --mode with M,N=PITCH targets
    (["top:1,1=A4"], None, "struck", "--target"),      # not a head
    (["1,1=Z9"], None, None, "--target"),              # not a pitch
])
def test_targets_refused(texts, mode, head, key):
    with pytest.raises(InputError) as err:
        parse_targets(texts, mode, head=head)
    assert err.value.key == key

