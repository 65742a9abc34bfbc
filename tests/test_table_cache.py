"""The on-disk radiation-table cache: a table read back is the table a fresh build gives.

Reference for every check: a RadiationTable built directly (radiation.py), bypassing both the
in-process and the disk cache. The cache is a speed-up only, so the checks are that it never
changes a number, never fails a solve and writes nothing when turned off.
"""

import os

import numpy as np
import pytest

from membrane.physics import operator as coupled  # the module that builds the tables
from membrane.physics import table_cache
from membrane.physics.operator import Shape as _Shape, unit_space
from membrane.physics.radiation import Quadrature, RadiationTable

# small spaces keep the builds to a fraction of a second; one ideal, one stiff
IDEAL = _Shape(m=1, count=3, rim=True, s=None, edge="clamped", nu=0.38)
STIFF = _Shape(m=0, count=3, rim=True, s=2.0e4, edge="clamped", nu=0.38)
KA = 3.0
QUAD = Quadrature()
K_TEST = np.array([0.3, 1.7 + 0.05j, 2.9 - 0.1j])


def build(shape):
    """The uncached table (through neither cache)."""
    return RadiationTable(unit_space(shape), k_max=KA, quadrature=QUAD)


def cached(shape):
    """unit_table without its lru_cache: only the disk cache in front of the build."""
    return coupled.unit_table.__wrapped__(shape, KA, QUAD)


def files(folder):
    return sorted(p for p in folder.iterdir() if p.suffix == ".npz") if folder.exists() else []


@pytest.fixture
def cache(tmp_path, monkeypatch):
    folder = tmp_path / "cache"
    monkeypatch.setenv("MEMBRANE_CACHE_DIR", str(folder))
    monkeypatch.delenv("MEMBRANE_CACHE", raising=False)
    return folder


@pytest.mark.parametrize("shape", [IDEAL, STIFF], ids=["ideal", "stiff"])
def test_table_from_disk_equals_fresh_build(cache, shape):
    fresh = build(shape)
    first = cached(shape)  # builds and writes
    assert len(files(cache)) == 1
    loaded = cached(shape)  # reads back
    assert loaded is not first
    assert vars(loaded).keys() == vars(fresh).keys()  # every attribute the constructor sets
    assert loaded.degree == fresh.degree and loaded.k_max == fresh.k_max
    assert loaded.weight == fresh.weight and loaded.t_max == fresh.t_max
    np.testing.assert_array_equal(loaded._x, fresh._x)
    np.testing.assert_array_equal(loaded._y, fresh._y)
    np.testing.assert_array_equal(loaded(K_TEST), fresh(K_TEST))


def test_a_read_back_table_is_not_rebuilt(cache, monkeypatch):
    cached(IDEAL)

    class NoBuild(RadiationTable):
        def __init__(self, *args, **kwargs):
            raise AssertionError("table rebuilt although it is on disk")

    monkeypatch.setattr(coupled, "RadiationTable", NoBuild)
    np.testing.assert_array_equal(cached(IDEAL)(K_TEST), build(IDEAL)(K_TEST))


@pytest.mark.parametrize("damage", ["garbage", "truncated", "wrong shape", "other key"])
def test_corrupt_or_mismatched_file_is_ignored_and_rewritten(cache, damage):
    cached(IDEAL)
    (path,) = files(cache)
    n = unit_space(IDEAL).size
    if damage == "garbage":
        path.write_bytes(b"not a zip file at all")
    elif damage == "truncated":
        path.write_bytes(path.read_bytes()[:200])
    elif damage == "wrong shape":
        np.savez(path, key=np.array(path.stem), x=np.zeros((5, n + 1, n + 1)),
                 y=np.zeros((5, n + 1, n + 1)), k_max=np.array(KA))
    else:  # a valid file stored under another name
        np.savez(path, key=np.array("0" * 40), x=np.zeros((5, n, n)), y=np.zeros((5, n, n)),
                 k_max=np.array(KA))
    table = cached(IDEAL)
    np.testing.assert_array_equal(table(K_TEST), build(IDEAL)(K_TEST))
    assert table_cache.load(path.stem, {"x": (None, n, n), "y": (None, n, n), "k_max": ()}) is not None  # rewritten, valid


@pytest.mark.parametrize("word", ["off", "OFF", "0"])
def test_cache_off_writes_nothing(cache, monkeypatch, word):
    monkeypatch.setenv("MEMBRANE_CACHE", word)
    np.testing.assert_array_equal(cached(IDEAL)(K_TEST), build(IDEAL)(K_TEST))
    assert not cache.exists()
    assert table_cache.cache_dir() is None


def test_unwritable_folder_falls_back_to_computing(tmp_path, monkeypatch):
    # a folder below a regular file can never be created, whoever runs the tests
    blocker = tmp_path / "a-file"
    blocker.write_text("in the way")
    monkeypatch.setenv("MEMBRANE_CACHE_DIR", str(blocker / "cache"))
    np.testing.assert_array_equal(cached(STIFF)(K_TEST), build(STIFF)(K_TEST))
    assert blocker.read_text() == "in the way"


def test_keys_are_exact_not_quantised():
    # T a^2 / D one ulp apart is another table: the cache never rounds a physics input
    s2 = np.nextafter(STIFF.s, np.inf)
    other = _Shape(STIFF.m, STIFF.count, STIFF.rim, float(s2), STIFF.edge, STIFF.nu)
    k1 = table_cache.key("radiation-table", STIFF, KA, QUAD)
    assert k1 == table_cache.key("radiation-table", STIFF, KA, QUAD)
    assert k1 != table_cache.key("radiation-table", other, KA, QUAD)
    assert k1 != table_cache.key("radiation-table", STIFF, np.nextafter(KA, 0.0), QUAD)
    assert k1 != table_cache.key("radiation-table", STIFF, KA, QUAD.refined())


def test_folder_follows_xdg_when_not_set(monkeypatch, tmp_path):
    monkeypatch.delenv("MEMBRANE_CACHE_DIR", raising=False)
    monkeypatch.delenv("MEMBRANE_CACHE", raising=False)
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert table_cache.cache_dir() == tmp_path / "membrane"
    monkeypatch.delenv("XDG_CACHE_HOME")
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert table_cache.cache_dir() == tmp_path / "home" / ".cache" / "membrane"


def test_disk_use_is_bounded_least_recently_used_first(cache, monkeypatch):
    monkeypatch.setattr(table_cache, "MAX_FILES", 3)
    names = [f"{i:040d}" for i in range(5)]
    for i, name in enumerate(names):
        assert table_cache.store(name, x=np.full((2, 1, 1), float(i)))
        path = cache / (name + ".npz")
        os.utime(path, (1000.0 + i, 1000.0 + i))  # distinct ages on any filesystem
    kept = {p.stem for p in files(cache)}
    assert kept == set(names[2:]) and len(kept) == 3
    assert not [p for p in cache.iterdir() if p.name.startswith(".tmp-")]


@pytest.mark.parametrize("extra", ["small", "huge"])
def test_unexpected_members_are_refused_before_loading_and_rewritten(cache, monkeypatch, extra):
    # The zip directory (zipfile.infolist) is the reference: a file with the right arrays
    # plus one more member is not ours; a huge one must cost nothing to refuse.
    import zipfile

    cached(IDEAL)
    (path,) = files(cache)
    n = unit_space(IDEAL).size
    with np.load(path) as data:
        good = {k: np.array(data[k]) for k in data.files}
    if extra == "small":
        np.savez(path, **good, junk=np.zeros(4))
    else:  # 100 MB of zeros, deflated to about 100 kB on disk, declared in the directory
        np.savez(path, **good)
        with zipfile.ZipFile(path, "a", compression=zipfile.ZIP_DEFLATED) as archive:
            archive.writestr("junk.npy", bytes(100_000_000))
    loads = []
    real_load = np.load
    monkeypatch.setattr(np, "load", lambda *a, **k: loads.append(a) or real_load(*a, **k))
    shapes = {"x": (None, n, n), "y": (None, n, n), "k_max": ()}
    assert table_cache.load(path.stem, shapes) is None
    assert loads == []  # refused from the directory, nothing read
    np.testing.assert_array_equal(cached(IDEAL)(K_TEST), build(IDEAL)(K_TEST))
    monkeypatch.setattr(np, "load", real_load)
    assert table_cache.load(path.stem, shapes) is not None  # rewritten as a plain table
    with zipfile.ZipFile(path) as archive:
        assert sorted(m.filename for m in archive.infolist()) == ["k_max.npy", "key.npy", "x.npy", "y.npy"]


def test_the_fingerprint_covers_every_module_that_computes_a_table():
    # the modules defining what unit_table runs (found from the objects, so a move of the
    # code to another module fails here instead of serving stale tables)
    from membrane import bessel
    from membrane.physics import operator, radiation, ritz, table_cache, vacuum

    used = {operator.unit_table.__module__, operator.unit_space.__module__,
            radiation.RadiationTable.__module__, radiation.radiation_integral.__module__,
            ritz.RitzSpace.__module__, vacuum.stiff_basis.__module__, bessel.jn_zeros.__module__}
    assert used <= set(table_cache.SOURCES), used - set(table_cache.SOURCES)
