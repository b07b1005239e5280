"""The result cache cannot lie or run code (sdofreport.engine.cache, sdofreport._cachedir).

Sources of expected values: the values put into the cache are the reference for what
comes out (numpy.testing.assert_array_equal, bit for bit); SHA-256 per FIPS 180-4 through
hashlib; POSIX permission bits (S_IWOTH, S_ISVTX) per the os and stat modules. Every
damaged case must read as a miss: a single flipped bit is one of the error classes a
SHA-256 always detects (FIPS 180-4 digest; a collision is not a practical concern).
"""

from __future__ import annotations

import hashlib
import logging
import os
import pickle
import shutil
import stat

import numpy as np
import pytest

from sdofreport import _cachedir
from sdofreport.engine import cache
from sdofreport.engine.cache import ResultCache
from sdofreport.core.intensity import IntensityMeasures
from sdofreport.core.spectra import ResponseSpectrum
from sdofreport.records import record_from_array
from tests.conftest import read_only_folder

KEY_A = "a" * 64
KEY_B = "b" * 64


def _spectrum() -> ResponseSpectrum:
    rng = np.random.default_rng(20261205)
    grid = rng.random((2, 5))
    return ResponseSpectrum(np.geomspace(0.1, 2.0, 5), np.array([0.02, 0.05]), grid,
                            grid * 2, grid * 3, grid * 4, grid * 5, "exact", 1.25)


def _values() -> list:
    """Every kind of value the engine and the figure writer cache."""
    record = record_from_array(np.sin(np.arange(50) * 0.3), 0.01, record_id="r1")
    return [
        "<svg>text with ünïcode</svg>",  # a figure
        {"spectrum": _spectrum(), "intensity": IntensityMeasures(
            1.0, 0.2, 0.05, 0.3, float("nan"), 4.0, float("inf"), 0.4),
         "velocity_m_s": np.arange(7, dtype=float)},
        [{"model": "linear", "peak_displacement_m": 0.0125,
          "displacement_m": np.linspace(0, 1, 9)}, {"energy": None, "n": 3,
                                                   "flag": np.bool_(True)}],
        record,
        (1, 2.5, "x", np.float64(0.1), np.int32(7), np.zeros((0, 3))),
    ]


def _same(a, b) -> None:
    """Bit-for-bit equality, types included (numpy.testing for arrays)."""
    assert type(a) is type(b), (type(a), type(b))
    if isinstance(a, np.ndarray):
        assert a.dtype == b.dtype
        np.testing.assert_array_equal(a, b)
    elif isinstance(a, (list, tuple)):
        assert len(a) == len(b)
        for x, y in zip(a, b):
            _same(x, y)
    elif isinstance(a, dict):
        assert list(a) == list(b)
        for key in a:
            _same(a[key], b[key])
    elif hasattr(a, "__dataclass_fields__"):
        for name in a.__dataclass_fields__:
            _same(getattr(a, name), getattr(b, name))
    elif isinstance(a, float) and np.isnan(a):
        assert np.isnan(b)
    else:
        assert a == b


@pytest.mark.parametrize("index", range(len(_values())))
def test_values_come_back_unchanged(tmp_path, index):
    value = _values()[index]
    store = ResultCache(tmp_path / "cache")
    store.put(KEY_A, value)
    _same(value, ResultCache(tmp_path / "cache").get(KEY_A))


def test_every_single_bit_flip_is_discarded_never_served():
    # Reproduction: one flipped bit in a pickled entry was served as a PGA of 19,660.8 g.
    value = {"intensity": IntensityMeasures(1.0, 0.2, 0.05, 0.3, 5.0, 4.0, 2.0, 0.4)}
    data = cache.pack_entry(KEY_A, value)
    assert cache.unpack_entry(bytearray(data), KEY_A) == value
    served = []
    for position in range(len(data)):
        for bit in range(8):
            damaged = bytearray(data)
            damaged[position] ^= 1 << bit
            try:
                served.append((position, bit, cache.unpack_entry(damaged, KEY_A)))
            except cache.EntryError:
                pass
    # Every flip is detected (header fields checked, the rest under the SHA-256), except
    # flips inside the header's padding spaces or JSON whitespace that change no field.
    assert all(got == value for _, _, got in served), served[:3]


def test_truncated_and_foreign_entries_are_discarded(tmp_path, caplog):
    store = ResultCache(tmp_path)
    store.put(KEY_A, "value a")
    store.put(KEY_B, "value b")
    path_a, path_b = store._path(KEY_A), store._path(KEY_B)
    # Reproduction: two valid entries swapped gave a traceback on every build.
    swapped = path_a.read_bytes()
    path_a.write_bytes(path_b.read_bytes())
    path_b.write_bytes(swapped)
    with caplog.at_level(logging.WARNING, logger="sdofreport.engine.cache"):
        assert store.get(KEY_A) is None and store.get(KEY_B) is None
    assert store.discarded == 2 and "another key" in caplog.text
    assert not path_a.exists() and not path_b.exists()  # removed, so reported once
    store.put(KEY_A, "value a")
    path_a.write_bytes(path_a.read_bytes()[:-3])
    assert store.get(KEY_A) is None
    # An entry of another format version is not read either.
    data = cache.pack_entry(KEY_A, "value a").replace(
        f'"format": {cache.CACHE_FORMAT}'.encode(), b'"format": 1')
    path_a.write_bytes(data)
    assert store.get(KEY_A) is None


class _Planted:
    """Runs a command when unpickled (the attack on a pickle cache)."""

    def __init__(self, marker: str) -> None:
        self.marker = marker

    def __reduce__(self):
        return (shutil.copyfile, (__file__, self.marker))


def test_a_planted_pickle_is_never_loaded(tmp_path):
    store = ResultCache(tmp_path / "cache")
    marker = tmp_path / "ran"
    path = store._path(KEY_A)
    path.parent.mkdir(parents=True)
    path.write_bytes(pickle.dumps(_Planted(str(marker))))
    assert store.get(KEY_A) is None
    # The same payload wrapped in a well-formed header: still no code runs.
    structure = pickle.dumps(_Planted(str(marker)))
    entry = cache.pack_entry(KEY_A, "x")
    path.write_bytes(entry[:entry.index(b"\n", len(cache.MAGIC)) + 1] + structure)
    assert store.get(KEY_A) is None
    assert not marker.exists()


def test_object_arrays_and_unknown_types_are_not_stored(tmp_path):
    store = ResultCache(tmp_path)
    for value in (np.array([object()]), {"x": _Planted("never")}, {1: 2}):
        store.put(KEY_A, value)
        assert not store.has(KEY_A)


def test_keys_change_with_the_format_and_the_sources(tmp_path, monkeypatch):
    payload = {"job": "record", "sha": "0" * 64}
    key = cache.cache_key(payload)
    monkeypatch.setattr(cache, "CACHE_FORMAT", cache.CACHE_FORMAT + 1)
    assert cache.cache_key(payload) != key
    # A copy of the package with one byte of one kernel changed has another fingerprint.
    import sdofreport

    package = os.path.dirname(sdofreport.__file__)  # the fingerprint covers the whole package
    shutil.copytree(package, tmp_path / "pkg", ignore=shutil.ignore_patterns("__pycache__"))
    first = cache.source_fingerprint(tmp_path / "pkg")
    exact = tmp_path / "pkg" / "core" / "exact.py"
    exact.write_bytes(exact.read_bytes().replace(b"1.0", b"1.1", 1))
    assert cache.source_fingerprint(tmp_path / "pkg") != first


# ---------------------------------------------------------------------------------------
# Folders other users can write


def _shared(path):
    """A folder anyone may write (what another user could have created first)."""
    path.mkdir(parents=True, exist_ok=True)
    path.chmod(0o777)  # no sticky bit: S_IWOTH without S_ISVTX
    return path


def test_a_folder_others_can_write_is_not_used(tmp_path, caplog):
    shared = _shared(tmp_path / "shared")
    (shared / "cache").mkdir(mode=0o700)
    with caplog.at_level(logging.WARNING, logger="sdofreport.engine.cache"):
        store = ResultCache(shared / "cache")  # safe itself, but inside a shared folder
        assert store.folder is None
        assert ResultCache(_shared(tmp_path / "open")).folder is None
    assert "may be written by other users" in caplog.text
    assert "running without it" in caplog.text
    # Nothing was created inside the shared folder either.
    assert ResultCache(shared / "new").folder is None
    assert not (shared / "new").exists()


@pytest.mark.skipif(not hasattr(os, "chown") or os.getuid() != 0,
                    reason="giving a folder to another user needs root")
def test_a_folder_of_another_user_is_not_used(tmp_path):
    other = tmp_path / "theirs"
    other.mkdir(mode=0o700)
    os.chown(other, 65534, 65534)  # nobody: another user created it first
    assert ResultCache(other).folder is None
    assert "another user" in _cachedir.unsafe_reason(other)


def test_the_temporary_fallback_planted_by_another_user_is_refused(tmp_path, monkeypatch):
    # Reproduction: with HOME unwritable the cache fell back to <tmp>/sdofreport-<uid>,
    # which another user could create first and fill with pickles.
    unusable = _shared(tmp_path / "home")
    temporary = tmp_path / "tmp"
    temporary.mkdir()
    temporary.chmod(0o1777)  # like /tmp: anyone may add, the sticky bit protects entries
    planted = _shared(temporary / f"sdofreport-{os.getuid()}" / "results")
    monkeypatch.setenv("XDG_CACHE_HOME", str(unusable / "xdg"))
    monkeypatch.setenv("HOME", str(unusable))
    monkeypatch.setattr(_cachedir.tempfile, "gettempdir", lambda: str(temporary))
    assert _cachedir.user_cache_dir("results") is None
    # A symbolic link planted there instead points elsewhere: its target is judged.
    shutil.rmtree(temporary / f"sdofreport-{os.getuid()}")
    (temporary / f"sdofreport-{os.getuid()}").symlink_to(planted.parent)
    assert _cachedir.user_cache_dir("results") is None
    # When this user makes it, it is private and used.
    (temporary / f"sdofreport-{os.getuid()}").unlink()
    folder = _cachedir.user_cache_dir("results")
    assert folder is not None and stat.S_IMODE(os.stat(folder).st_mode) == 0o700


def test_numba_and_pint_caches_follow_the_same_rule(tmp_path, monkeypatch):
    from sdofreport import runtime
    from sdofreport.core import _jit

    monkeypatch.setenv("NUMBA_CACHE_DIR", str(_shared(tmp_path / "numba")))
    assert runtime._choose_cache_folder() is False
    monkeypatch.setattr(_jit, "_DISK_CACHE", False)
    assert _jit._with_cache_choice({"cache": True, "nogil": True}) == \
        {"cache": False, "nogil": True}
    monkeypatch.setenv("NUMBA_CACHE_DIR", str(tmp_path / "private-numba"))
    assert runtime._choose_cache_folder() is True
    # pint's cache folder is a user_cache_dir folder, tested above; a shared XDG root
    # is passed over for the next candidate.
    monkeypatch.setenv("XDG_CACHE_HOME", str(_shared(tmp_path / "xdg")))
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert _cachedir.user_cache_dir("pint") == \
        os.path.realpath(tmp_path / "home" / ".cache" / "sdofreport" / "pint")


def test_a_read_only_cache_serves_and_does_not_stop(tmp_path, caplog):
    store = ResultCache(tmp_path / "cache")
    store.put(KEY_A, "kept")
    with read_only_folder(tmp_path / "cache"):
        read_only = ResultCache(tmp_path / "cache")
        assert read_only.get(KEY_A) == "kept"
        with caplog.at_level(logging.WARNING, logger="sdofreport.engine.cache"):
            read_only.put(KEY_B, "lost")
            read_only.put("c" * 64, "lost")
        assert read_only.get(KEY_B) is None
        assert caplog.text.count("not written") == 1


def test_arrays_in_a_key_are_hashed_by_their_values_dtype_and_shape():
    # Reference: hashlib's SHA-256 of the float64 bytes, the digest the record jobs'
    # keys have always carried, so those keys did not change when arrays moved in.
    acceleration = np.linspace(-1.0, 1.0, 11)
    digest = hashlib.sha256(acceleration.astype(np.float64).tobytes()).hexdigest()
    assert cache.array_digest(acceleration) == digest
    assert cache.cache_key({"job": "record", "sha": acceleration}) == \
        cache.cache_key({"job": "record", "sha": digest})
    # Same bytes, other shape: another key (numpy reshape keeps the bytes).
    block = np.arange(6.0)
    assert cache.cache_key({"x": block.reshape(2, 3)}) != \
        cache.cache_key({"x": block.reshape(3, 2)})
    assert cache.cache_key({"x": [block]}) != cache.cache_key({"x": [block + 1e-12]})


def test_the_code_fingerprint_covers_the_whole_package(monkeypatch):
    # A cached number depends on every module of the package (core kernels, project
    # loading, the engine), so the fingerprint must read the package root, not only the
    # folder of the cache module (sdofreport/engine/).
    import sdofreport

    seen = []
    monkeypatch.setattr(cache, "source_fingerprint", lambda root: seen.append(root) or "x")
    cache.code_fingerprint.cache_clear()
    try:
        cache.code_fingerprint()
    finally:
        cache.code_fingerprint.cache_clear()
    assert [os.path.realpath(r) for r in seen] == \
        [os.path.realpath(os.path.dirname(sdofreport.__file__))]
