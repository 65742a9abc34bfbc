"""The workshop handout: the pages it promises, text that can be read back, the table's numbers."""

import re

import pytest
from pypdf import PdfReader
from typer.testing import CliRunner

from membrane import load_drum, solve
from membrane.cli import app
from membrane.modes import T60_SHOWN_MAX
from membrane.render.handout import PAGES, cautions

runner = CliRunner()
SMALL = ["--m-max", "3", "--n-max", "2", "--count", "6"]


@pytest.fixture(autouse=True)
def no_display(monkeypatch):
    monkeypatch.delenv("DISPLAY", raising=False)


@pytest.fixture(scope="module")
def a4(tmp_path_factory):
    out = tmp_path_factory.mktemp("handout") / "kettledrum.pdf"
    result = runner.invoke(app, ["handout", "kettledrum", "--physics", "ideal", *SMALL, "--out", str(out)])
    assert result.exit_code == 0, result.output
    return PdfReader(out)


def words(page) -> str:
    return " ".join(page.extract_text().split())


def test_pages_and_paper(a4, tmp_path):
    assert len(a4.pages) == PAGES == 4
    box = a4.pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (595, 842)  # ISO 216 A4 in points
    out = tmp_path / "letter.pdf"
    result = runner.invoke(app, ["handout", "snare", "--physics", "ideal", *SMALL, "--paper", "letter",
                                 "--out", str(out)])
    assert result.exit_code == 0, result.output
    box = PdfReader(out).pages[0].mediabox
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)  # US Letter, 8.5 x 11 in


def test_the_mode_table_is_text_with_the_solved_numbers(a4):
    table = words(a4.pages[1])
    modes = solve(load_drum("kettledrum"), "ideal", m_max=3, n_max=2)
    for row in modes.table():
        assert f"{row['frequency_hz']:.2f}" in table
        assert f"{row['ratio']:.4f}" in table
        assert row["note"] in table
    # a kettledrum's ratios are to its principal (1,1) by default
    # ideal membrane, j21/j11 and j31/j11 (A&S Table 9.5): f(2,1)/f(1,1) = 1.3403, f(3,1)/f(1,1) = 1.6651
    assert "ratio to (1,1)" in table
    for ratio in ("1.3403", "1.6651"):
        assert ratio in table
    # text and lines, no picture of a table: the page draws no image (the PDF "Do" operator);
    # only the mode grid's six colour fills and its colour bar are small images
    draws = [page.get_contents().get_data().count(b" Do") for page in a4.pages]
    assert draws[0] == draws[1] == draws[3] == 0 and draws[2] == 6 + 1


def test_first_page_describes_the_drum_and_cautions(a4):
    first = words(a4.pages[0])
    assert "26-inch kettledrum prototype (invented demo)" in first
    assert "66.0 cm" in first and "4000 N/m" in first
    for caution in cautions():
        assert " ".join(caution.split()[:6]) in first
    assert "strike at r/a =" in first


def test_pictures_keep_their_labels_as_text(a4):
    grid, chart = words(a4.pages[2]), words(a4.pages[3])
    for label in ("(0,1)", "(1,1)", "(2,1)", "(0,2)"):
        assert label in grid
    assert "cents from nearest harmonic" in chart


@pytest.mark.parametrize("args, key", [
    (["--out", "x.png"], "--out"),
    (["--out", "x.pdf", "--paper", "a3"], "--paper"),
    (["--out", "x.pdf", "--compare", "dry"], "--compare"),
    (["--out", "x.pdf", "--reference", "5,3"], "mode"),
    (["--out", "missing/x.pdf"], "--out"),
])
def test_bad_requests_give_one_line_and_exit_2(tmp_path, monkeypatch, args, key):
    monkeypatch.chdir(tmp_path)
    result = runner.invoke(app, ["handout", "kettledrum", "--physics", "ideal", *SMALL, *args])
    assert result.exit_code == 2
    err = result.stderr.strip()
    assert len(err.splitlines()) == 1 and key in err
    assert list(tmp_path.iterdir()) == []


def test_existing_pdf_is_kept_without_force(tmp_path):
    out = tmp_path / "h.pdf"
    out.write_text("old")
    result = runner.invoke(app, ["handout", "kettledrum", "--physics", "ideal", *SMALL, "--out", str(out)])
    assert result.exit_code == 2 and out.read_text() == "old"


@pytest.fixture(scope="module")
def full(tmp_path_factory):
    # m up to 6: the (5,1) and (6,1) modes radiate so little that their T60 runs past 100 s
    out = tmp_path_factory.mktemp("handout") / "full.pdf"
    # radiation-only decay: with all losses no mode rings past 100 s, and this checks the "> 100" cells
    result = runner.invoke(app, ["handout", "kettledrum", "--m-max", "6", "--n-max", "1", "--count", "6",
                                 "--compare", "none", "--paper", "letter", "--losses", "radiation",
                                 "--out", str(out)])
    assert result.exit_code == 0, result.output
    return PdfReader(out)


def test_units_are_typeset(a4, full):
    for reader in (a4, full):
        for page in reader.pages:
            assert "^" not in page.extract_text()
    first = words(a4.pages[0])
    assert "kg/m\u00b2" in first and "m\u00b3" in first


def test_no_t60_above_the_shown_maximum_is_printed_in_digits(full):
    modes = solve(load_drum("kettledrum"), "full", m_max=6, n_max=1, losses="radiation")
    long = [mo for mo in modes if mo.decay is not None and mo.decay > T60_SHOWN_MAX]
    assert len(long) >= 2  # the check below must have something to check
    rows = [line for line in full.pages[1].extract_text().splitlines() if re.match(r"\(\d+,\d+\)( hybrid)? \d+\.\d\d ", line)]
    assert len(rows) == len(modes)
    for line in rows:  # the last cell of a row is its T60
        if line.endswith(f"> {T60_SHOWN_MAX:g}"):
            continue
        assert float(line.split()[-1]) <= T60_SHOWN_MAX, line
    assert sum(line.endswith(f"> {T60_SHOWN_MAX:g}") for line in rows) == len(long)


def text_runs(page):
    """Each piece of text on a page: (text, x, y, font size, direction) in PDF points."""
    runs = []

    def visit(text, cm, tm, font, size):
        if text.strip():
            x = tm[4] * cm[0] + tm[5] * cm[2] + cm[4]
            y = tm[4] * cm[1] + tm[5] * cm[3] + cm[5]
            scale = (cm[0] ** 2 + cm[1] ** 2) ** 0.5 or 1.0
            runs.append((text, x, y, size * scale, (cm[0] / scale, cm[1] / scale)))

    page.extract_text(visitor_text=visit)
    return runs


@pytest.fixture(scope="module")
def two_heads(tmp_path_factory):
    # many modes with long labels (branch and head): the table must stop where the page does
    out = tmp_path_factory.mktemp("handout") / "snare.pdf"
    result = runner.invoke(app, ["handout", "snare", "--physics", "stiff", "--m-max", "6", "--n-max", "3",
                                 "--paper", "letter", "--out", str(out)])
    assert result.exit_code == 0, result.output
    return PdfReader(out)


def test_every_page_keeps_its_text_inside_the_page(a4, full, two_heads):
    assert "resonant head" in words(two_heads.pages[2])  # the grid says which head each disc shows
    for reader in (a4, full, two_heads):
        for number, page in enumerate(reader.pages, 1):
            box = page.mediabox
            w, h = float(box.width), float(box.height)
            runs = text_runs(page)
            assert runs, number
            for text, x, y, size, (dx, dy) in runs:
                length = 0.6 * size * len(text.strip())  # a generous average glyph width
                end_x, end_y = x + dx * length, y + dy * length
                for px, py in ((x, y), (end_x, end_y)):
                    assert 0 <= px <= w and 0 <= py <= h - 0.5 * size, (number, text, px, py)
