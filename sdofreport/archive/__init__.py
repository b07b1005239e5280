"""Archival and revisions: verify a run against its manifest, compare two runs, pack a
run into a deterministic zip and build a register over many archived runs.

Public API::

    verify_site(path, rerun=False, rtol=None, jobs=1) -> VerifyReport
    compare_paths(old, new) -> (comparison document, old Run, new Run)
    compare_results(old_results_doc, new_results_doc) -> comparison document
    revision_page(old_results_doc, new_results_doc) -> {site path: bytes}
    pack_site(site, output=None) -> Path of the zip
    build_register(folder, output) -> RegisterOutcome
    register_commands(click_group)

Submodules are imported on first use, so importing this package stays cheap.
"""

from __future__ import annotations

import importlib

_EXPORTS = {
    "verify_site": "verify", "VerifyReport": "verify",
    "compare_paths": "compare", "compare_results": "compare", "revision_page": "compare",
    "comparison_text": "compare", "comparison_json": "compare", "comparison_html": "compare",
    "pack_site": "pack", "zip_bytes": "pack", "archive_name": "pack",
    "build_register": "register",
    "register_commands": "commands",
    "ArchiveError": "_sitefiles", "TamperedArchive": "_sitefiles",
}

__all__ = sorted(_EXPORTS)


def __getattr__(name: str):
    if name in _EXPORTS:
        module = importlib.import_module(f"{__name__}.{_EXPORTS[name]}")
        return getattr(module, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
