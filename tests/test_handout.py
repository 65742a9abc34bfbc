"""The workshop handout: the pages it promises, text that can be read back, the table's numbers."""

import pytest
from pypdf import PdfReader
from typer.testing import CliRunner

from membrane import load_drum, solve
from membrane.cli import app
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
    # SOURCES.md, ideal membrane: f(1,1)/f(0,1) = 1.5933, f(2,1)/f(0,1) = 2.1355, f(0,2)/f(0,1) = 2.2954
    for ratio in ("1.5933", "2.1355", "2.2954"):
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
