"""A damaged or rearranged cache never changes a site: entries are discarded, recomputed
and reported (sdofreport.engine.cache), figures included.

Source of expected values: the byte snapshot of the good site built with a clean cache
(tests/hardening/conftest.py); a build that recomputes must give the same bytes
(DEVELOPERS.md: same inputs, same bytes). Bit positions come from a seeded
``random.Random``.
"""

from __future__ import annotations

import logging
import random
import shutil

from tests.hardening.conftest import invoke, snapshot


def _build(good_build, cache, site):
    return invoke("build", good_build["project"], "-o", site, "--cache-dir", cache,
                  "--jobs", "1", "-q")


def test_one_flipped_bit_in_any_entry_is_never_served(good_build, tmp_path, caplog):
    # Reproduction: one flipped bit in a cached record was served (a PGA of 19,660.8 g)
    # on every later build, and a damaged cached figure was published.
    cache = tmp_path / "cache"
    shutil.copytree(good_build["cache"], cache)
    entries = sorted(cache.rglob("*.entry"))
    assert any("figures" in p.parts for p in entries) and len(entries) > 5
    rng = random.Random(20261205)
    for path in entries:
        data = bytearray(path.read_bytes())
        position = rng.randrange(len(data))
        data[position] ^= 1 << rng.randrange(8)
        path.write_bytes(bytes(data))
    with caplog.at_level(logging.WARNING, logger="sdofreport.engine.cache"):
        result = _build(good_build, cache, tmp_path / "site")
    assert result.exit_code == 0, (result.output, result.exception)
    assert snapshot(tmp_path / "site") == good_build["snapshot"]
    reported = caplog.text.count("discarded")
    # Flips inside the header's padding can leave an entry intact; all others are found.
    assert reported >= len(entries) - 2, caplog.text
    caplog.clear()
    with caplog.at_level(logging.WARNING, logger="sdofreport.engine.cache"):
        again = _build(good_build, cache, tmp_path / "site")
    assert again.exit_code == 0 and "discarded" not in caplog.text  # stored afresh


def test_swapped_valid_entries_give_the_right_site(good_build, tmp_path):
    # Reproduction: two valid entries swapped gave a traceback on every build.
    cache = tmp_path / "cache"
    shutil.copytree(good_build["cache"], cache)
    results = sorted(p for p in cache.rglob("*.entry") if "figures" not in p.parts)
    figures = sorted(p for p in cache.rglob("*.entry") if "figures" in p.parts)
    for a, b in (results[:2], figures[:2]):
        data = a.read_bytes()
        a.write_bytes(b.read_bytes())
        b.write_bytes(data)
    result = _build(good_build, cache, tmp_path / "site")
    assert result.exit_code == 0, (result.output, result.exception)
    assert snapshot(tmp_path / "site") == good_build["snapshot"]
