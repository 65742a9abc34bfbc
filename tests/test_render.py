"""Pictures: the drawn field puts nodes where the handbook says, files open with the asked-for
frames and size, and bad requests end in one line and exit code 2. Runs with no display."""

import re

import imageio.v3 as iio
import numpy as np
import pytest
from typer.testing import CliRunner

from membrane import load_drum, solve
from membrane.cli import app
from membrane.render import stills

# j_{m,n} to 11 significant digits, computed (mpmath.besseljzero); A&S Table 9.5
# prints them to 5 decimals (10 for m = 0): tests/test_bessel.py checks both
BESSEL_ZEROS = {
    0: (2.4048255577, 5.5200781103, 8.6537279129),
    1: (3.8317059702, 7.0155866698, 10.173468135),
    2: (5.1356223018, 8.4172441404, 11.619841172),
    3: (6.3801618959, 9.7610231300, 13.015200722),
}

runner = CliRunner(env={"DISPLAY": None})  # headless, as in CI


@pytest.fixture(autouse=True)
def no_display(monkeypatch):
    monkeypatch.delenv("DISPLAY", raising=False)


@pytest.fixture(scope="module")
def ideal():
    return solve(load_drum("kettledrum"), "ideal", m_max=3, n_max=3)


def mesh_of(ax):
    """The plotted field of one panel: (x, y, w) at the grid nodes, rows around the circle."""
    from matplotlib.collections import QuadMesh

    mesh = next(c for c in ax.collections if isinstance(c, QuadMesh))
    xy = mesh.get_coordinates()
    w = np.asarray(mesh.get_array()).reshape(xy.shape[:2])
    return xy[..., 0], xy[..., 1], w


def crossings(r, w):
    """Radii where w changes sign, by linear interpolation."""
    s = np.flatnonzero(np.sign(w[1:]) * np.sign(w[:-1]) < 0)
    return r[s] - w[s] * (r[s + 1] - r[s]) / (w[s + 1] - w[s])


def test_grid_nodal_circles_and_diameters_are_the_handbook_ones(ideal):
    fig = stills.mode_grid(ideal, count=len(ideal.modes), columns=4)
    checked = set()
    for ax in fig.axes:
        title = re.match(r"\((\d+),(\d+)\)", ax.get_title())
        if not title:
            continue  # the colour bar
        m, n = int(title[1]), int(title[2])
        x, y, w = mesh_of(ax)
        r = np.hypot(x[0], y[0])  # the row at theta = 0, where cos(m theta) = 1
        inner = r < 0.99  # the rim itself is a node of every mode
        circles = crossings(r[inner], w[0][inner])
        expected = [BESSEL_ZEROS[m][k] / BESSEL_ZEROS[m][n - 1] for k in range(n - 1)]
        assert list(circles) == pytest.approx(expected, rel=0.01), (m, n)
        # around the circle through the largest displacement: 2m sign changes
        ring = w[:-1, np.argmax(np.abs(w[0]))]  # the seam theta = 2 pi repeats theta = 0
        changes = np.count_nonzero(np.sign(ring) != np.sign(np.roll(ring, 1)))
        assert changes == 2 * m, (m, n)
        checked.add((m, n))
    assert checked == {(m, n) for m in range(4) for n in range(1, 4)}
    # sorted by frequency, as the grid promises
    freqs = [float(re.search(r"([\d.]+) Hz", ax.get_title())[1]) for ax in fig.axes if ax.get_title()]
    assert freqs == sorted(freqs)


def drawn_nodal_lines(ax):
    """The nodal lines drawn on one panel: (diameters, circles), each a list of (x, y) arrays."""
    lines = {"nodal diameter": [], "nodal circle": []}
    for line in ax.get_lines():
        if line.get_gid() in lines:
            lines[line.get_gid()].append((np.asarray(line.get_xdata()), np.asarray(line.get_ydata())))
    return lines["nodal diameter"], lines["nodal circle"]


def test_grid_draws_every_nodal_diameter_and_whole_nodal_circles():
    from scipy.special import jn_zeros  # reference library, more digits than A & S Table 9.5

    ideal = solve(load_drum("kettledrum"), "ideal", m_max=6, n_max=3)
    fig = stills.mode_grid(ideal, count=len(ideal.modes), columns=6)
    seen = set()
    for ax in fig.axes:
        title = re.match(r"\((\d+),(\d+)\)", ax.get_title())
        if not title:
            continue
        m, n = int(title[1]), int(title[2])
        diameters, circles = drawn_nodal_lines(ax)
        # m nodal diameters, at the zeros of cos(m theta), each from rim to rim through the centre
        assert len(diameters) == m, (m, n)
        angles = []
        for x, y in diameters:
            ends = np.hypot(x[[0, -1]], y[[0, -1]])
            assert np.all(ends >= 0.99), (m, n, ends)  # across the whole head
            assert x[0] == pytest.approx(-x[-1]) and y[0] == pytest.approx(-y[-1])  # through the centre
            angles.append(np.degrees(np.arctan2(y[-1], x[-1])) % 180.0)
        expected = sorted(((2 * k + 1) * 90.0 / m) % 180.0 for k in range(m))
        assert sorted(angles) == pytest.approx(expected, abs=1.0), (m, n)
        # n - 1 nodal circles at r/a = j_{m,k} / j_{m,n} (Abramowitz & Stegun Table 9.5), each whole
        zeros = jn_zeros(m, n)
        radii = []
        for x, y in circles:
            r = np.hypot(x, y)
            assert np.ptp(r) < 1e-9
            phi = np.sort(np.degrees(np.arctan2(y, x)) % 360.0)
            gaps = np.diff(np.concatenate([phi, [phi[0] + 360.0]]))
            assert 360.0 - gaps.max() >= 355.0, (m, n)  # the arc drawn covers at least 355 degrees
            radii.append(r[0])
        assert sorted(radii) == pytest.approx(list(zeros[:-1] / zeros[-1]), rel=0.01), (m, n)
        seen.add((m, n))
    assert seen == {(m, n) for m in range(7) for n in range(1, 4)}


def test_a_shell_mode_drawn_alone_has_its_diameter_and_an_unclipped_title():
    snare = solve(load_drum("snare"), "full", m_max=1, n_max=1)
    mode = next(mo for mo in snare if (mo.m, mo.n, mo.branch) == (1, 1, "opposed"))
    fig = stills.nodal_diagram(snare, mode)
    diameters, circles = drawn_nodal_lines(fig.axes[0])
    assert len(diameters) == 1 and circles == []
    from membrane.render.labels import laid_out_renderer

    renderer = laid_out_renderer(fig)
    page = fig.bbox
    for text in [fig._suptitle, *fig.texts]:
        box = text.get_window_extent(renderer)
        assert page.x0 <= box.x0 and box.x1 <= page.x1 and page.y0 <= box.y0 and box.y1 <= page.y1, text
    assert "head" in fig._suptitle.get_text()  # which head the picture shows


def test_the_default_reference_is_the_principal():
    kettle = solve(load_drum("kettledrum"), "ideal", m_max=1, n_max=1)
    snare = solve(load_drum("snare"), "ideal", m_max=1, n_max=1)
    # a kettledrum is read against its principal (1,1) (Rossing 1982), an open or shell drum against (0,1)
    assert kettle.principal == (1, 1) and snare.principal == (0, 1)
    assert "to (1,1)" in stills.mode_grid(kettle)._suptitle.get_text()
    assert "to (0,1)" in stills.mode_grid(snare)._suptitle.get_text()
    assert "to (0,1)" in stills.mode_grid(kettle, reference=(0, 1))._suptitle.get_text()


def test_a_stiff_mode_is_drawn_from_its_own_vector():
    # A slack head is plate-like: its (0,2) nodal circle moves well away from the ideal
    # 0.4357 (j01/j02, A&S Table 9.5), so a picture of the ideal Bessel function would fail here.
    drum = load_drum("kettledrum", tension="30 N/m", thickness="0.5 mm")
    stiff = solve(drum, "stiff", m_max=1, n_max=2)
    fig = stills.nodal_diagram(stiff, stiff.find(0, 2))
    x, y, w = mesh_of(fig.axes[0])
    r = np.hypot(x[0], y[0])
    mode = stiff.find(0, 2)
    assert w[0] == pytest.approx(mode.radial_shape(r * drum.head.radius), abs=1e-9)
    circle = crossings(r[r < 0.99], w[0][r < 0.99])
    assert len(circle) == 1 and abs(circle[0] - 0.4357) > 0.01, circle


def test_nodal_diagram_marks_each_region_plus_or_minus(ideal):
    fig = stills.nodal_diagram(ideal, ideal.find(2, 2))
    signs = [t.get_text() for t in fig.axes[0].texts if t.get_text() in ("+", "\u2212")]
    assert len(signs) == 2 * 2 * 2  # 2m sectors times n rings
    assert signs.count("+") == signs.count("\u2212")


def test_ratio_chart_places_modes_at_their_frequency_ratios(ideal):
    stiff = solve(load_drum("kettledrum"), "stiff", m_max=3, n_max=3)
    fig = stills.ratio_chart([ideal, stiff])
    panels = [ax for ax in fig.axes if ax.get_lines()]
    assert len(panels) == 2
    at = {line.get_gid(): (line.get_xdata()[0], line.get_ydata()[0]) for line in panels[0].get_lines()
          if line.get_gid()}
    # ideal membrane, j21/j11 and j31/j11 (A&S Table 9.5): f(2,1)/f(1,1) = 1.3403, f(3,1)/f(1,1) = 1.6651
    assert at["(2,1)"][0] / at["(1,1)"][0] == pytest.approx(1.3403, abs=1e-4)
    assert at["(3,1)"][0] / at["(1,1)"][0] == pytest.approx(1.6651, abs=1e-4)
    low, high = panels[0].get_ylim()
    for h, c in at.values():  # y is the distance in cents from the nearest harmonic
        cents = 1200 * np.log2(h / max(1, round(h)))
        if low < cents < high:
            assert c == pytest.approx(cents, abs=1e-9)
        else:  # beyond the chart: drawn on its edge, the value written beside it
            assert low < c < high and abs(c) > 0.9 * high


def test_ratio_chart_clips_outliers_and_labels_do_not_overlap():
    from membrane.render.labels import laid_out_renderer, boxes_overlap

    full = solve(load_drum("kettledrum"), "ideal")  # 6 x 3 modes: a crowded chart
    fig = stills.ratio_chart([full])
    ax = next(ax for ax in fig.axes if ax.get_lines())
    labels = [t for t in ax.texts if (t.get_gid() or "").startswith("label")]
    assert len(labels) >= 10
    assert boxes_overlap(labels, laid_out_renderer(fig)) == []
    # modes far off a harmonic (the (0,n) family) must not set the scale of the fitted (m,1) band:
    # they sit on the chart's edge with their deviation written out
    low, high = ax.get_ylim()
    assert high <= 100 + 1e-9
    texts = [t.get_text() for t in labels]
    outside = 0
    for line in ax.get_lines():
        if not line.get_gid():
            continue
        h = line.get_xdata()[0]
        cents = 1200 * np.log2(h / max(1, round(h)))
        if abs(cents) > high:
            outside += 1
            assert any(t.endswith(f"{cents:+.0f} c") for t in texts), (line.get_gid(), cents)
    assert outside >= 2


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_gif_has_the_frames_and_size_asked_for(tmp_path):
    out = tmp_path / "mode.gif"
    result = run("render", "kettledrum", "--physics", "ideal", "--mode", "2,1", "--frames", 6,
                 "--size", "96x80", "--out", out)
    assert result.exit_code == 0, result.output
    frames = iio.imread(out, index=None)
    assert frames.shape[:3] == (6, 80, 96)
    # the head swings: half a period on, the picture is not the same
    assert np.abs(frames[0].astype(int) - frames[3].astype(int)).mean() > 1.0


def test_a_gif_repeats_the_first_half_period_as_a_fresh_render_would():
    # a standing wave: cos(2 pi k / N) = cos(2 pi (N - k) / N), so the reused second half of
    # the period (HeadScene.frames with reuse) is what rendering those phases gives
    from membrane.render.animate import HeadScene, View

    modes = solve(load_drum("kettledrum"), "ideal", m_max=2, n_max=1)
    view = View(frames=6, width=64, height=64)
    scene = HeadScene(modes, modes.find(2, 1), view)
    try:
        reused = list(scene.frames(reuse=True))
        fresh = list(scene.frames())
    finally:
        scene.close()
    assert len(reused) == len(fresh) == 6
    for k in range(6):
        assert np.abs(reused[k].astype(int) - fresh[k].astype(int)).max() <= 1, k
    assert reused[5] is reused[1] and reused[4] is reused[2]  # rendered once


def test_the_see_through_body_is_drawn_as_order_independent_transparency_draws_it():
    # a kettle's translucent bowl by plain alpha blending (HeadScene) against vtk's own
    # order-independent transparency (the reference): the same picture to a few levels of 255
    from membrane.render.animate import HeadScene, View

    modes = solve(load_drum("kettledrum"), "ideal", m_max=2, n_max=1)
    frames = []
    for oit in (False, True):
        scene = HeadScene(modes, modes.find(2, 1), View(frames=2, width=96, height=96))
        try:
            scene.plotter.renderer.SetUseOIT(oit)
            frames.append(scene.frame(0.4).astype(int))
        finally:
            scene.close()
    assert np.abs(frames[0] - frames[1]).max() <= 8


def test_mp4_has_the_frames_and_size_asked_for(tmp_path):
    out = tmp_path / "mode.mp4"
    result = run("render", "kettledrum", "--physics", "ideal", "--mode", "1,1", "--frames", 5,
                 "--size", "128x96", "--out", out)
    assert result.exit_code == 0, result.output
    frames = iio.imread(out, index=None, plugin="pyav") if _has_pyav() else _ffmpeg_frames(out)
    assert len(frames) == 5 and frames[0].shape[:2] == (96, 128)


def _has_pyav():
    try:
        import av  # noqa: F401
    except ImportError:
        return False
    return True


def _ffmpeg_frames(path):
    import imageio.v2 as imageio

    with imageio.get_reader(str(path), format="FFMPEG") as reader:
        return [frame for frame in reader]


def test_png_still_and_3d_snapshot(tmp_path):
    nodal, snap = tmp_path / "nodal.png", tmp_path / "snap.png"
    assert run("render", "kettledrum", "--physics", "ideal", "--mode", "0,2", "--out", nodal).exit_code == 0
    result = run("render", "kettledrum", "--physics", "ideal", "--mode", "0,2", "--snapshot",
                 "--size", 100, "--out", snap)
    assert result.exit_code == 0, result.output
    assert iio.imread(snap).shape[:2] == (100, 100)
    assert iio.imread(nodal).ndim == 3


def test_grid_and_ratio_chart_from_the_command_line(tmp_path):
    grid, chart = tmp_path / "grid.svg", tmp_path / "chart.png"
    assert run("render", "kettledrum", "--physics", "ideal", "--grid", "--count", 4, "--m-max", 2,
               "--n-max", 1, "--out", grid).exit_code == 0
    assert "(2,1)" in grid.read_text()
    assert run("render", "kettledrum", "--ratio-chart", "--compare", "ideal,stiff", "--m-max", 3,
               "--n-max", 2, "--out", chart).exit_code == 0
    assert iio.imread(chart).ndim == 3


@pytest.mark.parametrize("args, key", [
    (["--mode", "1,0", "--out", "x.png"], "--mode"),            # n counts the rim: at least 1
    (["--mode", "60,1", "--out", "x.png"], "--mode"),           # beyond what is solved
    (["--mode", "1,1", "--branch", "opposed", "--out", "x.png"], "--branch"),  # no branches in vacuum
    (["--mode", "1,1", "--out", "x.avi"], "--out"),             # unknown format
    (["--grid", "--out", "x.gif"], "--out"),                    # a grid is a still
    (["--mode", "1,1", "--out", "no/such/folder/x.png"], "--out"),  # unwritable
    (["--mode", "1,1", "--size", "95", "--out", "x.mp4"], "--size"),  # H.264 wants even sizes
    (["--grid", "--ratio-chart", "--out", "x.png"], "picture"),
    (["--ratio-chart", "--compare", "ideal,wet", "--out", "x.png"], "--compare"),
])
def test_bad_requests_give_one_line_and_exit_2(tmp_path, monkeypatch, args, key):
    monkeypatch.chdir(tmp_path)
    result = run("render", "kettledrum", "--physics", "ideal", *args)
    assert result.exit_code == 2
    err = result.stderr.strip()
    assert len(err.splitlines()) == 1 and key in err and "Traceback" not in result.output
    assert not any(p.name.startswith("x") for p in tmp_path.iterdir())


def test_a_path_under_a_file_is_refused(tmp_path):
    blocker = tmp_path / "file"
    blocker.write_text("")
    result = run("render", "kettledrum", "--physics", "ideal", "--mode", "1,1", "--out", blocker / "x.png")
    assert result.exit_code == 2 and len(result.stderr.strip().splitlines()) == 1


def test_existing_file_is_kept_without_force(tmp_path):
    out = tmp_path / "nodal.png"
    out.write_bytes(b"keep me")
    result = run("render", "kettledrum", "--physics", "ideal", "--mode", "1,1", "--out", out)
    assert result.exit_code == 2 and "--force" in result.stderr
    assert out.read_bytes() == b"keep me"
    assert run("render", "kettledrum", "--physics", "ideal", "--mode", "1,1", "--out", out,
               "--force").exit_code == 0
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    assert [p.name for p in tmp_path.iterdir()] == ["nodal.png"]  # no temporary left behind


def test_full_physics_draws_the_air_loaded_shape():
    # Air loading mixes the in-vacuum shapes: the (0,2) circle moves off the ideal
    # 0.4357 (j01/j02, A&S Table 9.5), and the picture must follow the solver, not the Bessel function.
    full = solve(load_drum("kettledrum"), "full", m_max=2, n_max=2)
    mode = full.find(0, 2)
    x, y, w = mesh_of(stills.nodal_diagram(full, mode).axes[0])
    r = np.hypot(x[0], y[0])
    assert w[0] == pytest.approx(mode.radial_shape(r * mode.basis.radius), abs=1e-9)
    circle = crossings(r[r < 0.99], w[0][r < 0.99])
    assert len(circle) == 1 and abs(circle[0] / 0.4357 - 1) > 0.02, circle


def test_a_shell_shows_both_heads_moving_as_the_branch_says():
    from membrane.render.animate import HeadScene, View

    snare = solve(load_drum("snare"), "full", m_max=0, n_max=1)
    for mode in snare:
        scene = HeadScene(snare, mode, View(frames=2, width=64, height=64))
        try:
            (top, w_top, z_top, _), (bottom, w_bottom, z_bottom, _) = scene.heads
            assert z_top == 0 and z_bottom < 0
            # centre displacement, drawn upward-positive; outward is down for the resonant head
            up_top, up_bottom = w_top[0], w_bottom[0]
            # by definition (docs/two_heads.md): "in-phase" = the outward displacements share a sign
            same_way_up = np.sign(up_top) == np.sign(up_bottom)
            assert same_way_up == (mode.branch == "opposed"), mode.label
        finally:
            scene.close()


def test_the_readme_pictures_are_made_by_the_readme_commands():
    import importlib.util
    from pathlib import Path

    root = Path(__file__).resolve().parents[1]
    spec = importlib.util.spec_from_file_location("make_assets", root / "assets" / "make_assets.py")
    make = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(make)
    readme = (root / "README.md").read_text(encoding="utf-8")
    for name, command, extra in make.PICTURES:
        assert command in readme, command  # the README shows exactly this command
        assert f"(assets/{name})" in readme, name  # and the picture it makes
        assert not {"--reference", "--physics", "--compare"} & set(extra.split())  # only size options added


def test_one_mode_drawn_from_its_own_orders_is_the_one_of_the_whole_table(tmp_path):
    # render --mode solves only the mode's order and the reference's; the picture must be
    # the one drawn from the full default table (orders are independent eigenproblems)
    out = tmp_path / "cli.png"
    assert run("render", "kettledrum", "--mode", "2,2", "--out", out).exit_code == 0
    whole = solve(load_drum("kettledrum"), "full", m_max=6, n_max=3)
    ref = tmp_path / "whole.png"
    stills.save(stills.nodal_diagram(whole, whole.find(2, 2), reference=(1, 1)), ref)
    assert out.read_bytes() == ref.read_bytes()
