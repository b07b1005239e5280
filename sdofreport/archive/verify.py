"""``sdofreport verify``: a built run against its manifest, and optionally re-run.

Integrity: every file is re-hashed (SHA-256, FIPS 180-4) and compared with
``manifest.json``; files added, missing or changed are listed. Coverage: the manifest
lists every input, names the project file, covers ``data/results.json`` and its
fingerprint recomputes; every page shows that fingerprint and the project file's
SHA-256 (:mod:`sdofreport.archive._printed`). Re-run: the whole site is rebuilt from the
copies under ``inputs/`` with the installed version into a temporary folder; every value
of ``data/results.json`` is compared by JSON path, every other file byte for byte (the
build is deterministic), and installed versions that differ from the recorded ones are
named first.
"""

from __future__ import annotations

import hashlib
import json
import os
from dataclasses import dataclass, field

from sdofreport import __version__
from sdofreport.archive._printed import page_problems
from sdofreport.archive._rebuild import (
    ABSENT,
    csv_differs,
    rebuild_site,
    version_differences,
)
from sdofreport.archive._sitefiles import (
    RESULTS_PATH,
    RunFiles,
    parse_manifest,
    parse_results,
    read_run,
)
from sdofreport.errors import SdofreportError
from sdofreport.site.render import MANIFEST_NAME, fingerprint

#: Relative tolerance of the re-run when the site was built by another version. Our own
#: choice: results are written with full float64 precision (17 significant digits), so
#: 1e-9 tolerates reordered arithmetic yet catches any change an engineer would see.
DEFAULT_RTOL = 1e-9



@dataclass
class Difference:
    """One value of results.json that the re-run does not reproduce."""

    path: str                  # JSON path, e.g. systems[0].checks[1].demand
    stored: object
    recomputed: object
    relative: float | None     # |new - old| / max(|new|, |old|) for numbers, else None


@dataclass
class RerunOutcome:
    performed: bool
    reason: str = ""           # why the re-run was not performed
    tolerance: float = 0.0     # relative tolerance applied (0 = exact)
    numbers_compared: int = 0
    differences: list[Difference] = field(default_factory=list)
    #: Installed versions that differ from the recorded ones ("numpy: site 1.26.4,
    #: installed 2.0.2"); reported before anything else, they explain differences.
    versions: list[str] = field(default_factory=list)
    files_differ: list[str] = field(default_factory=list)   # bytes differ from the rebuild
    not_rebuilt: list[str] = field(default_factory=list)    # in the site, not in the rebuild
    not_in_site: list[str] = field(default_factory=list)    # made by the rebuild only

    @property
    def ok(self) -> bool:
        return self.performed and not (self.differences or self.files_differ
                                       or self.not_rebuilt or self.not_in_site)

    def lines(self) -> list[str]:
        """The re-run's findings, differing versions first (they explain the rest)."""
        out = []
        if self.versions:
            out.append("  re-run: installed versions differ from those recorded in "
                       "manifest.json, so numbers may differ within the tolerance and "
                       "files that print them may differ:")
            out += [f"  re-run: version: {item}" for item in self.versions]
        if not self.performed:
            out.append(f"  re-run: cannot re-run: {self.reason}")
        for diff in self.differences:
            rel = "" if diff.relative is None else f" (relative {diff.relative:.3g})"
            out.append(f"  re-run: {diff.path}: stored {_show(diff.stored)}, "
                       f"recomputed {_show(diff.recomputed)}{rel}")
        out += [f"  re-run: differs from the rebuild: {path}" for path in self.files_differ]
        out += [f"  re-run: not made by the rebuild: {path}" for path in self.not_rebuilt]
        out += [f"  re-run: made by the rebuild but missing: {path}"
                for path in self.not_in_site]
        return out


@dataclass
class VerifyReport:
    """Outcome of verifying one run; ``ok`` is True only when nothing differs."""

    label: str
    kind: str
    file_count: int
    fingerprint: str
    changed: list[str] = field(default_factory=list)
    missing: list[str] = field(default_factory=list)
    added: list[str] = field(default_factory=list)
    problems: list[str] = field(default_factory=list)
    pages: list[str] = field(default_factory=list)      # printed identity ≠ manifest
    rerun: RerunOutcome | None = None

    @property
    def ok(self) -> bool:
        return (not (self.changed or self.missing or self.added or self.problems
                     or self.pages)
                and (self.rerun is None or self.rerun.ok))

    def summary(self) -> str:
        """One line: ``verified: …`` or ``FAILED verification: 2 files changed, …``."""
        if self.ok:
            text = (f"verified: {self.file_count} files match {MANIFEST_NAME}; fingerprint "
                    f"{self.fingerprint} recomputes")
            if self.rerun is not None:
                how = ("exactly" if self.rerun.tolerance == 0 else
                       f"within relative tolerance {self.rerun.tolerance:g}")
                text += (f"; re-run reproduces all {self.rerun.numbers_compared} numbers "
                         f"{how} and every other file byte for byte")
                if self.rerun.versions:
                    text += f" (with other versions: {'; '.join(self.rerun.versions)})"
            return text
        parts = []
        for items, word in ((self.changed, "changed"), (self.missing, "missing"),
                            (self.added, "added")):
            if items:
                parts.append(f"{len(items)} file{'s' if len(items) != 1 else ''} {word}")
        if self.problems:
            parts.append(f"{len(self.problems)} manifest problem"
                         f"{'s' if len(self.problems) != 1 else ''}")
        if self.pages:
            parts.append(f"{len(self.pages)} page problem"
                         f"{'s' if len(self.pages) != 1 else ''}")
        rerun = self.rerun
        if rerun is not None and not rerun.performed:
            parts.append(f"cannot re-run: {rerun.reason}")
        elif rerun is not None:
            if rerun.differences:
                count = len(rerun.differences)
                parts.append(f"re-run differs in {count} value{'s' if count != 1 else ''}")
            count = len(rerun.files_differ) + len(rerun.not_rebuilt) + len(rerun.not_in_site)
            if count:
                parts.append(f"{count} file{'s' if count != 1 else ''} differ"
                             f"{'s' if count == 1 else ''} from the rebuild")
            if rerun.versions and not rerun.ok:
                parts.append("installed versions differ from the site's")
        return "FAILED verification: " + ", ".join(parts)

    def lines(self) -> list[str]:
        """The full report, one finding per line."""
        out = [f"{self.label}: {self.summary()}"]
        out += [f"  changed: {path}" for path in self.changed]
        out += [f"  missing: {path}" for path in self.missing]
        out += [f"  added (not in {MANIFEST_NAME}): {path}" for path in self.added]
        out += [f"  manifest: {problem}" for problem in self.problems]
        out += [f"  page: {problem}" for problem in self.pages]
        if self.rerun is not None:
            out += self.rerun.lines()
        return out

    def as_dict(self) -> dict:
        document = {"site": self.label, "ok": self.ok, "summary": self.summary(),
                    "fingerprint": self.fingerprint, "files": self.file_count,
                    "changed": self.changed, "missing": self.missing, "added": self.added,
                    "problems": self.problems}
        if self.rerun is not None:
            document["rerun"] = {
                "performed": self.rerun.performed, "reason": self.rerun.reason,
                "tolerance": self.rerun.tolerance,
                "numbers_compared": self.rerun.numbers_compared,
                "versions_differ": self.rerun.versions,
                "differences": [{"path": d.path, "stored": d.stored,
                                 "recomputed": d.recomputed, "relative": d.relative}
                                for d in self.rerun.differences],
                "files_differ": self.rerun.files_differ,
                "not_rebuilt": self.rerun.not_rebuilt,
                "not_in_site": self.rerun.not_in_site}
        document["pages"] = self.pages
        return document


def _show(value: object) -> str:
    if value is ABSENT:
        return ABSENT
    return json.dumps(value, ensure_ascii=False)


def _sha256(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def verify_files(run: RunFiles) -> VerifyReport:
    """Integrity and coverage of one run read into memory (no re-run)."""
    manifest = parse_manifest(run.files, run.label)
    listed: dict[str, str] = manifest["files"]
    present = {path: data for path, data in run.files.items() if path != MANIFEST_NAME}
    report = VerifyReport(run.label, run.kind, len(run.files),
                          str(manifest.get("fingerprint", "")))
    report.changed = sorted(p for p in listed if p in present
                            and _sha256(present[p]) != listed[p].lower())
    report.missing = sorted(p for p in listed if p not in present)
    report.added = sorted(p for p in present if p not in listed)
    report.problems = _coverage_problems(manifest, run.files)
    report.pages = page_problems(run.files, manifest)
    return report


def _coverage_problems(manifest: dict, files: dict[str, bytes]) -> list[str]:
    listed = manifest["files"]
    problems = []
    inputs = [str(p) for p in manifest["inputs"]]
    hashed_inputs = sorted(p for p in listed if p.startswith("inputs/"))
    for path in sorted(set(hashed_inputs) - set(inputs)):
        problems.append(f"'{path}' is hashed but not listed under 'inputs'")
    for path in sorted(set(inputs) - set(hashed_inputs)):
        problems.append(f"'inputs' lists '{path}' but 'files' gives no SHA-256 for it")
    project_file = manifest["project"].get("file")
    if not isinstance(project_file, str) or project_file not in inputs:
        problems.append(f"project file {project_file!r} is not among the listed inputs")
    elif project_file not in files:
        problems.append(f"project file '{project_file}' is not in the site")
    if RESULTS_PATH not in listed:
        problems.append(f"'{RESULTS_PATH}' is not covered by the manifest")
    recomputed = fingerprint(manifest)
    if recomputed != manifest.get("fingerprint"):
        problems.append(f"fingerprint {manifest.get('fingerprint')!r} does not recompute "
                        f"(recomputed {recomputed!r} from the manifest's versions, settings "
                        f"and input and result hashes)")
    # Cross-check: results.json names the SHA-256 of the project file it came from.
    if RESULTS_PATH in files and isinstance(project_file, str) and project_file in files:
        try:
            stated = parse_results(files[RESULTS_PATH], RESULTS_PATH)["project"]["sha256"]
        except (SdofreportError, KeyError, TypeError):
            problems.append(f"'{RESULTS_PATH}' is not a readable results document")
        else:
            actual = _sha256(files[project_file])
            if stated != actual:
                problems.append(f"'{RESULTS_PATH}' states project file SHA-256 {stated}, "
                                f"but '{project_file}' has {actual}")
    return problems


# -- re-run (the rebuild itself: sdofreport.archive._rebuild) ------------------------------

#: Manifest fields a re-run does not compare by value: versions (named by
#: :func:`version_differences`), the fingerprint (plain verify recomputes it) and the file
#: hashes (every file is compared itself).
_MANIFEST_NOT_COMPARED = ("package", "dependencies", "platform", "fingerprint", "files")


def compare_rebuild(stored: dict[str, bytes], rebuilt: dict[str, bytes], stored_manifest: dict,
                    tolerance: float, outcome: RerunOutcome) -> None:
    """Fill ``outcome`` with every file (other than results.json) that the rebuild does
    not reproduce: byte for byte, except that the rebuilt fingerprint is read as the
    stored one and, with a tolerance, CSV numbers compare within it."""
    try:
        rebuilt_manifest = json.loads(rebuilt[MANIFEST_NAME].decode("utf-8"))
    except (KeyError, UnicodeDecodeError, ValueError):
        rebuilt_manifest = {}
    old, new = (str(stored_manifest.get("fingerprint", "")),
                str(rebuilt_manifest.get("fingerprint", "")))
    for path in sorted(set(stored) | set(rebuilt)):
        if path in (RESULTS_PATH, MANIFEST_NAME):
            continue
        if path not in rebuilt:
            outcome.not_rebuilt.append(path)
        elif path not in stored:
            outcome.not_in_site.append(path)
        else:
            data = rebuilt[path]
            if old and new and old != new:
                data = data.replace(new.encode("utf-8"), old.encode("utf-8"))
            if data == stored[path]:
                continue
            if tolerance and path.endswith(".csv") and not csv_differs(stored[path], data,
                                                                        tolerance):
                continue
            outcome.files_differ.append(path)
    strip = {key: value for key, value in stored_manifest.items()
             if key not in _MANIFEST_NOT_COMPARED}
    again = {key: value for key, value in rebuilt_manifest.items()
             if key not in _MANIFEST_NOT_COMPARED}
    differences, _ = compare_documents(strip, again, 0.0)
    for diff in differences:
        diff.path = f"{MANIFEST_NAME}: {diff.path}"
    outcome.differences += differences


def _is_number(value: object) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def compare_documents(stored, recomputed, tolerance: float) -> tuple[list[Difference], int]:
    """Every value that differs (numbers beyond ``tolerance`` relative), and how many
    numbers were compared."""
    differences: list[Difference] = []
    counter = [0]

    def walk(a, b, path):
        if isinstance(a, dict) and isinstance(b, dict):
            for key in list(a) + [k for k in b if k not in a]:
                sub = f"{path}.{key}" if path else str(key)
                if key not in a or key not in b:
                    differences.append(Difference(sub, a.get(key, ABSENT),
                                                  b.get(key, ABSENT), None))
                else:
                    walk(a[key], b[key], sub)
        elif isinstance(a, list) and isinstance(b, list):
            if len(a) != len(b):
                differences.append(Difference(f"{path} (length)", len(a), len(b), None))
            for index, (x, y) in enumerate(zip(a, b)):
                walk(x, y, f"{path}[{index}]")
        elif _is_number(a) and _is_number(b):
            counter[0] += 1
            if a != b:
                scale = max(abs(a), abs(b))
                relative = abs(b - a) / scale if scale else 0.0
                if relative > tolerance:
                    differences.append(Difference(path, a, b, relative))
        elif type(a) is not type(b) or a != b:
            differences.append(Difference(path, a, b, None))

    walk(stored, recomputed, "")
    return differences, counter[0]


def rerun_check(run: RunFiles, *, rtol: float | None = None,
                jobs: int | None = 1) -> RerunOutcome:
    """
    Rebuild the site from the run's inputs; compare every value of results.json and
    every other file byte for byte.

    ``rtol=None`` means: exact when the stored results were made by the installed
    versions (package, dependencies and platform as recorded), else
    :data:`DEFAULT_RTOL`; a given ``rtol`` always applies.
    """
    manifest = parse_manifest(run.files, run.label)
    versions = version_differences(manifest)
    if RESULTS_PATH not in run.files:
        return RerunOutcome(False, f"'{RESULTS_PATH}' is missing", versions=versions)
    try:
        stored = parse_results(run.files[RESULTS_PATH], RESULTS_PATH)
    except SdofreportError as exc:
        return RerunOutcome(False, exc.message, versions=versions)
    if rtol is None:
        same_version = (stored.get("generator") == f"sdofreport {__version__}"
                        and not versions)
        tolerance = 0.0 if same_version else DEFAULT_RTOL
    else:
        tolerance = float(rtol)
    stored_date = (stored.get("project") or {}).get("date")
    try:
        rebuilt = rebuild_site(run.files, manifest, stored_date, jobs=jobs)
        recomputed = parse_results(rebuilt.get(RESULTS_PATH, b""), RESULTS_PATH)
    except SdofreportError as exc:
        return RerunOutcome(False, " ".join(exc.message.split()), tolerance,
                            versions=versions)
    differences, count = compare_documents(stored, recomputed, tolerance)
    outcome = RerunOutcome(True, "", tolerance, count, differences, versions)
    compare_rebuild(run.files, rebuilt, manifest, tolerance, outcome)
    return outcome


def verify_site(path: str | os.PathLike, *, rerun: bool = False, rtol: float | None = None,
                jobs: int | None = 1) -> VerifyReport:
    """
    Verify a site folder or a packed zip against its manifest.

    Parameters
    ----------
    path : path
        Site folder (``sdofreport build -o``) or zip (``sdofreport pack``).
    rerun : bool
        Also rebuild the site from ``inputs/``: compare ``data/results.json`` by value
        and every other file byte for byte.
    rtol : float, optional
        Relative tolerance of the re-run comparison of numbers [-]; default exact with
        the same recorded versions, else :data:`DEFAULT_RTOL`.
    jobs : int, optional
        Worker processes for the re-run.

    Raises
    ------
    ArchiveError
        When ``path`` is not a site or archive of ours (no readable manifest.json).
    """
    if rtol is not None and not (rtol >= 0):
        raise SdofreportError(f"--rtol: expected a relative tolerance >= 0, found {rtol!r}.")
    run = read_run(path)
    report = verify_files(run)
    if rerun:
        report.rerun = rerun_check(run, rtol=rtol, jobs=jobs)
    return report
