"""Content-addressed cache of job results and figures, in a format that runs no code.

Each entry is one file, ``<key[:2]>/<key>.entry``::

    sdofreport-cache\\n
    {"format": 2, "key": "<key>", "sha256": "<digest>", "structure_bytes": n}   (padded)\\n
    <structure: n bytes of JSON> <array bytes, each at a multiple of 64 bytes>

The structure is JSON made by a small typed encoder (:func:`encode`): numbers, strings,
lists, tuples, dictionaries, numeric numpy arrays (dtype and shape in the JSON, raw bytes
after it) and a fixed list of result dataclasses (:data:`DATACLASSES`); nothing else is
written, and reading builds only those types, so loading an entry cannot run code
(unlike a pickle). The SHA-256 covers the key, the format version and every byte after
the header. An entry that does not match (damaged, truncated, a different format, or
stored under another key) is discarded, reported once as a warning and recomputed;
it is never served.

Keys (:func:`cache_key`, the one function every key is built by: jobs, parsed record
files, synthetic records and figures) hash a job's inputs together with the cache format, the
package version, a fingerprint of the package's Python sources and the versions of the
numerical libraries, so a changed kernel never meets results of the old one.

A folder is used only when no other user can write it (:mod:`sdofreport._cachedir`);
otherwise the build runs without a cache and says so. Writes are atomic (temporary file,
then rename), so a build killed at any moment leaves the cache usable; a read-only cache
serves what it has and the build goes on (one warning).
"""

from __future__ import annotations

import contextlib
import dataclasses
import functools
import hashlib
import importlib
import json
import logging
import math
import os
from pathlib import Path

import numpy as np

from sdofreport._cachedir import private_folder, report_unusable, user_cache_dir
from sdofreport.fsio import write_atomically

log = logging.getLogger("sdofreport.engine.cache")

#: Version of the entry format and of the encoding; part of every key and every header.
CACHE_FORMAT = 2
MAGIC = b"sdofreport-cache\n"
SUFFIX = ".entry"
_ALIGN = 64

#: The dataclasses an entry may hold: name -> "module:class". Only these are rebuilt.
DATACLASSES = {
    "Record": "sdofreport.records.record:Record",
    "IntensityMeasures": "sdofreport.core.intensity:IntensityMeasures",
    "ResponseSpectrum": "sdofreport.core.spectra:ResponseSpectrum",
    "OscillatorPeaks": "sdofreport.core.spectra:OscillatorPeaks",
    "OscillatorHistories": "sdofreport.core.spectra:OscillatorHistories",
    "RotDSpectrum": "sdofreport.core.rotd:RotDSpectrum",
    "CompatibleRecord": "sdofreport.core.compatible:CompatibleRecord",
    "ConstantStrengthSpectrum": "sdofreport.core.inelastic_spectra:ConstantStrengthSpectrum",
    "ConstantDuctilitySpectrum":
        "sdofreport.core.inelastic_spectra:ConstantDuctilitySpectrum",
    "NonlinearResponse": "sdofreport.core.nonlinear:NonlinearResponse",
    "BiaxialResponse": "sdofreport.core.biaxial:BiaxialResponse",
}
#: numpy dtype kinds an entry may hold: booleans, integers, floats, complex numbers.
ARRAY_KINDS = frozenset("biufc")


class EntryError(ValueError):
    """A cache entry that cannot be served (damaged, foreign or of an unknown type)."""


# ---------------------------------------------------------------------------------------
# Keys


def source_fingerprint(root: str | os.PathLike) -> str:
    """SHA-256 of every Python source under ``root`` (relative path and bytes)."""
    root = Path(root)
    digest = hashlib.sha256()
    for path in sorted(root.rglob("*.py")):
        digest.update(f"|{path.relative_to(root).as_posix()}|".encode())
        digest.update(path.read_bytes())
    return digest.hexdigest()


@functools.lru_cache(maxsize=1)
def code_fingerprint() -> str:
    """
    SHA-256 of the package version, the versions of numpy, scipy, numba and matplotlib
    and :func:`source_fingerprint` of the package: what can change a cached number or
    figure.
    """
    from importlib.util import find_spec

    from sdofreport import __version__

    parts = [f"sdofreport {__version__}"]
    for library in ("numpy", "scipy", "numba", "matplotlib"):
        # The library's version file, found without importing it (importlib.metadata
        # would scan every installed distribution: tenths of a second).
        spec = find_spec(library)
        folder = Path(spec.origin).parent if spec and spec.origin else None
        for name in ("version.py", "_version.py"):
            if folder is not None and (folder / name).is_file():
                text = (folder / name).read_bytes()
                parts.append(f"{library} {hashlib.sha256(text).hexdigest()}")
                break
        else:
            parts.append(f"{library} ?")
    parts.append(source_fingerprint(Path(__file__).resolve().parents[1]))
    return hashlib.sha256("|".join(parts).encode()).hexdigest()


def array_digest(values) -> str:
    """SHA-256 (hex) of an array's values as contiguous float64 bytes: how a record's
    acceleration, or any other numeric vector, enters a cache key."""
    data = np.ascontiguousarray(values, dtype=np.float64)
    return hashlib.sha256(data.tobytes()).hexdigest()


def _canonical(value):
    """``value`` with every numpy array replaced by its digest: a one-dimensional real
    array by :func:`array_digest`, any other by its dtype, shape and bytes."""
    if isinstance(value, np.ndarray):
        if value.ndim == 1 and value.dtype.kind in "biuf":
            return array_digest(value)
        array = np.ascontiguousarray(value)
        return (f"{array.dtype.str}{array.shape}|"
                f"{hashlib.sha256(array.tobytes()).hexdigest()}")
    if isinstance(value, dict):
        return {key: _canonical(item) for key, item in value.items()}
    if isinstance(value, (list, tuple)):
        return [_canonical(item) for item in value]
    return value


def content_hash(payload: dict) -> str:
    """SHA-256 of a JSON-able payload in canonical form (sorted keys, no spaces)."""
    text = json.dumps(payload, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def cache_key(payload: dict) -> str:
    """
    The cache key of a job or figure described by ``payload`` — the one function every
    key of the result and figure cache is built by: the content hash of the payload
    (numpy arrays in it by :func:`_canonical` digests) together with the cache format
    and :func:`code_fingerprint`.
    """
    return content_hash({**_canonical(payload), "cache_format": CACHE_FORMAT,
                         "code": code_fingerprint()})


# ---------------------------------------------------------------------------------------
# Encoding


def _encode(value, arrays: list[np.ndarray]):
    if value is None or isinstance(value, (bool, str)):
        return value
    if isinstance(value, np.generic):  # numpy scalars keep their type: a 0-d array
        return {"$scalar": _encode(np.asarray(value), arrays)["$array"]}
    if isinstance(value, int):
        return value
    if isinstance(value, float):
        return value if math.isfinite(value) else {"$float": repr(value)}
    if isinstance(value, np.ndarray):
        if value.dtype.kind not in ARRAY_KINDS or value.dtype.hasobject:
            raise TypeError(f"arrays of dtype {value.dtype} are not cached")
        arrays.append(value if value.flags.c_contiguous else value.copy(order="C"))
        return {"$array": len(arrays) - 1}
    if isinstance(value, list):
        return [_encode(item, arrays) for item in value]
    if isinstance(value, tuple):
        return {"$tuple": [_encode(item, arrays) for item in value]}
    if isinstance(value, dict):
        if not all(isinstance(key, str) for key in value):
            raise TypeError("only dictionaries with text keys are cached")
        return {"$dict": {key: _encode(item, arrays) for key, item in value.items()}}
    name = type(value).__name__
    if dataclasses.is_dataclass(value) and DATACLASSES.get(name) == \
            f"{type(value).__module__}:{type(value).__qualname__}":
        return {"$dataclass": name,
                "fields": {f.name: _encode(getattr(value, f.name), arrays)
                           for f in dataclasses.fields(value) if f.init}}
    raise TypeError(f"values of type {type(value).__name__} are not cached")


def encode(value) -> tuple[bytes, list[np.ndarray], list[dict]]:
    """(structure JSON, arrays, their descriptions) of ``value``; TypeError for a type
    the cache does not hold."""
    arrays: list[np.ndarray] = []
    structure = _encode(value, arrays)
    described = [{"dtype": a.dtype.str, "shape": list(a.shape)} for a in arrays]
    text = json.dumps({"value": structure, "arrays": described}, allow_nan=False,
                      separators=(",", ":"))
    return text.encode("utf-8"), arrays, described


@functools.cache
def _dataclass(name: str):
    module, _, qualname = DATACLASSES[name].partition(":")
    return getattr(importlib.import_module(module), qualname)


def _decode(node, arrays: list[np.ndarray]):
    if node is None or isinstance(node, (bool, int, float, str)):
        return node
    if isinstance(node, list):
        return [_decode(item, arrays) for item in node]
    if not isinstance(node, dict) or len(node) not in (1, 2):
        raise EntryError("unexpected structure")
    if "$array" in node:
        return arrays[_index(node["$array"], arrays)]
    if "$scalar" in node:
        array = arrays[_index(node["$scalar"], arrays)]
        if array.ndim != 0:
            raise EntryError("a scalar that is not 0-dimensional")
        return array[()]
    if "$float" in node:
        if node["$float"] not in ("nan", "inf", "-inf"):
            raise EntryError("unexpected special number")
        return float(node["$float"])
    if "$tuple" in node and isinstance(node["$tuple"], list):
        return tuple(_decode(item, arrays) for item in node["$tuple"])
    if "$dict" in node and isinstance(node["$dict"], dict):
        return {key: _decode(item, arrays) for key, item in node["$dict"].items()}
    name = node.get("$dataclass")
    if name in DATACLASSES and isinstance(node.get("fields"), dict):
        cls = _dataclass(name)
        fields = {key: _decode(item, arrays) for key, item in node["fields"].items()}
        expected = {f.name for f in dataclasses.fields(cls) if f.init}
        if set(fields) != expected:
            raise EntryError(f"fields of {name} do not match")
        try:
            return cls(**fields)
        except (TypeError, ValueError) as exc:
            raise EntryError(f"{name} refused its fields ({exc})") from None
    raise EntryError("unexpected structure")


def _index(value, arrays: list) -> int:
    if not isinstance(value, int) or isinstance(value, bool) or not 0 <= value < len(arrays):
        raise EntryError("array reference out of range")
    return value


def _padding(offset: int) -> int:
    return -offset % _ALIGN


def _digest(key: str, payload) -> str:
    digest = hashlib.sha256(f"{MAGIC.decode().strip()}|{CACHE_FORMAT}|{key}|".encode())
    digest.update(payload)
    return digest.hexdigest()


def pack_entry(key: str, value) -> bytes:
    """The bytes of the entry that stores ``value`` under ``key``."""
    structure, arrays, _ = encode(value)
    parts = [structure]
    offset = len(structure)
    for array in arrays:
        pad = _padding(offset)
        parts.append(b"\0" * pad)
        data = array.tobytes()
        parts.append(data)
        offset += pad + len(data)
    payload = b"".join(parts)
    header = json.dumps({"format": CACHE_FORMAT, "key": key,
                         "sha256": _digest(key, payload),
                         "structure_bytes": len(structure)}).encode("ascii")
    start = len(MAGIC) + len(header) + 1
    header += b" " * _padding(start)  # the payload starts at a multiple of 64 bytes
    return MAGIC + header + b"\n" + payload


def unpack_entry(data: bytearray | bytes, key: str):
    """The value stored in ``data`` under ``key``; :class:`EntryError` when the entry is
    damaged, foreign (another key or format) or holds anything but the cached types."""
    if not data.startswith(MAGIC):
        raise EntryError("not a cache entry")
    end = data.find(b"\n", len(MAGIC))
    if end < 0:
        raise EntryError("header cut short")
    try:
        header = json.loads(bytes(data[len(MAGIC):end]))
    except ValueError:
        raise EntryError("header unreadable") from None
    if not isinstance(header, dict):
        raise EntryError("header unreadable")
    if header.get("format") != CACHE_FORMAT:
        raise EntryError(f"format {header.get('format')!r}, not {CACHE_FORMAT}")
    if header.get("key") != key:
        raise EntryError("stored under another key")
    payload = memoryview(data)[end + 1:]
    if header.get("sha256") != _digest(key, payload):
        raise EntryError("checksum mismatch")
    size = header.get("structure_bytes")
    if not isinstance(size, int) or not 0 < size <= len(payload):
        raise EntryError("structure size out of range")
    try:
        structure = json.loads(bytes(payload[:size]))
        described = structure["arrays"]
        arrays = []
        offset = size
        for item in described:
            dtype = np.dtype(item["dtype"])
            if dtype.kind not in ARRAY_KINDS or dtype.hasobject:
                raise EntryError(f"dtype {dtype} is not cached")
            shape = tuple(int(n) for n in item["shape"])
            count = math.prod(shape)
            offset += _padding(offset)
            stop = offset + count * dtype.itemsize
            if stop > len(payload) or min(shape, default=0) < 0:
                raise EntryError("array beyond the end of the entry")
            arrays.append(np.frombuffer(payload, dtype, count, offset).reshape(shape))
            offset = stop
        if offset != len(payload):
            raise EntryError("trailing bytes")
        return _decode(structure["value"], arrays)
    except EntryError:
        raise
    except (ValueError, TypeError, KeyError, IndexError, AttributeError,
            RecursionError) as exc:
        raise EntryError(f"structure unreadable ({type(exc).__name__})") from None


# ---------------------------------------------------------------------------------------
# The cache


def default_cache_dir() -> str | None:
    """The default result cache folder (per user, private); None when there is none."""
    return user_cache_dir("results")


class ResultCache:
    """
    Job results in a folder, keyed by :func:`cache_key`; a folder of ``None`` (or one
    another user could write) disables it.

    ``discarded`` counts the damaged or foreign entries found (and removed) so far.
    """

    def __init__(self, folder: str | os.PathLike | None) -> None:
        self.folder = None
        self.discarded = 0
        self._write_failed = self._read_failed = False
        if folder:  # None or "": no cache
            real, reason = private_folder(folder)
            if real is None:
                report_unusable("result cache", reason)
            else:
                self.folder = Path(real)

    def _path(self, key: str) -> Path:
        if len(key) != 64 or not all(c in "0123456789abcdef" for c in key):
            raise ValueError(f"cache key must be 64 hexadecimal digits; got {key!r}")
        return self.folder / key[:2] / f"{key}{SUFFIX}"

    def has(self, key: str) -> bool:
        """True when an entry is stored under ``key`` (without reading it)."""
        return self.folder is not None and self._path(key).is_file()

    def get(self, key: str):
        """The value stored under ``key``, or None (absent, damaged or foreign: a damaged
        or foreign entry is removed and reported)."""
        if self.folder is None:
            return None
        path = self._path(key)
        try:
            with open(path, "rb") as handle:
                data = bytearray(handle.read())  # writable buffer: writable arrays
        except FileNotFoundError:
            return None
        except OSError as exc:
            if not self._read_failed:  # once: a folder that cannot be read fails for all
                self._read_failed = True
                log.warning("cache entry %s unreadable (%s); recomputing", path,
                            exc.strerror or exc)
            return None
        try:
            return unpack_entry(data, key)
        except EntryError as exc:
            self.discarded += 1
            log.warning("cache entry %s discarded (%s); recomputing it", path, exc)
            with contextlib.suppress(OSError):
                path.unlink()
            return None

    def put(self, key: str, value) -> None:
        """Store ``value`` under ``key``; a full or read-only cache is reported once and
        never stops a build."""
        if self.folder is None:
            return
        try:
            data = pack_entry(key, value)
        except TypeError as exc:  # a programming error, but not worth a failed build
            log.warning("cache: result of key %s not stored (%s)", key[:12], exc)
            return
        path = self._path(key)
        try:
            path.parent.mkdir(mode=0o700, exist_ok=True)
            # Unflushed (durable=False): a torn entry fails its SHA-256 and is recomputed.
            write_atomically(path, data, mode=0o600, durable=False, name_errors=False)
        except OSError as exc:  # a full or read-only cache must not stop a build
            if not self._write_failed:
                self._write_failed = True
                log.warning("cache %s not written (%s); the build goes on without "
                            "storing results", self.folder, exc.strerror or exc)
