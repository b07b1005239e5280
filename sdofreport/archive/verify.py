"""``sdofreport verify``: a built run against its manifest, and optionally re-run.

Integrity: every file is re-hashed (SHA-256, FIPS 180-4) and compared with
``manifest.json``; files added, missing or changed are listed. Coverage: the manifest
lists every input, names the project file, covers ``data/results.json`` and its
fingerprint recomputes. Re-run: every result is recomputed from the copies under
``inputs/`` with the installed version and every value of ``data/results.json`` is
compared, by JSON path.
"""

from __future__ import annotations

import contextlib
import hashlib
import json
import os
import tempfile
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

from sdofreport import __version__
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

ABSENT = "(absent)"


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

    @property
    def ok(self) -> bool:
        return self.performed and not self.differences


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
    rerun: RerunOutcome | None = None

    @property
    def ok(self) -> bool:
        return (not (self.changed or self.missing or self.added or self.problems)
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
                         f"{how}")
            return text
        parts = []
        for items, word in ((self.changed, "changed"), (self.missing, "missing"),
                            (self.added, "added")):
            if items:
                parts.append(f"{len(items)} file{'s' if len(items) != 1 else ''} {word}")
        if self.problems:
            parts.append(f"{len(self.problems)} manifest problem"
                         f"{'s' if len(self.problems) != 1 else ''}")
        if self.rerun is not None and not self.rerun.performed:
            parts.append(f"cannot re-run: {self.rerun.reason}")
        elif self.rerun is not None and self.rerun.differences:
            count = len(self.rerun.differences)
            parts.append(f"re-run differs in {count} value{'s' if count != 1 else ''}")
        return "FAILED verification: " + ", ".join(parts)

    def lines(self) -> list[str]:
        """The full report, one finding per line."""
        out = [f"{self.label}: {self.summary()}"]
        out += [f"  changed: {path}" for path in self.changed]
        out += [f"  missing: {path}" for path in self.missing]
        out += [f"  added (not in {MANIFEST_NAME}): {path}" for path in self.added]
        out += [f"  manifest: {problem}" for problem in self.problems]
        if self.rerun is not None:
            if not self.rerun.performed:
                out.append(f"  re-run: cannot re-run: {self.rerun.reason}")
            for diff in self.rerun.differences:
                rel = "" if diff.relative is None else f" (relative {diff.relative:.3g})"
                out.append(f"  re-run: {diff.path}: stored {_show(diff.stored)}, "
                           f"recomputed {_show(diff.recomputed)}{rel}")
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
                "differences": [{"path": d.path, "stored": d.stored,
                                 "recomputed": d.recomputed, "relative": d.relative}
                                for d in self.rerun.differences]}
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


# -- re-run --------------------------------------------------------------------------------

@contextlib.contextmanager
def _source_date(date: str | None):
    """Set SOURCE_DATE_EPOCH so a project file without a date gets the stored date back."""
    saved = os.environ.get("SOURCE_DATE_EPOCH")
    try:
        stamp = None
        if isinstance(date, str):
            with contextlib.suppress(ValueError):
                parsed = datetime.strptime(date, "%Y-%m-%d").replace(tzinfo=timezone.utc)
                stamp = str(int(parsed.timestamp()))
        if stamp is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = stamp
        yield
    finally:
        if saved is None:
            os.environ.pop("SOURCE_DATE_EPOCH", None)
        else:
            os.environ["SOURCE_DATE_EPOCH"] = saved


def recompute_results(files: dict[str, bytes], manifest: dict, stored_date: str | None,
                      *, jobs: int | None = 1) -> dict:
    """
    results.json recomputed from the run's ``inputs/`` with the installed version.

    The inputs are written to a temporary folder at their paths relative to the project
    file, loaded and run without the cache. Raises :class:`SdofreportError` when the
    project cannot be loaded or an input lay outside the project folder.
    """
    from sdofreport.engine import run_project
    from sdofreport.project import load_project
    from sdofreport.project.quantities import without_memo
    from sdofreport.results_json import results_document

    inputs = {path: data for path, data in files.items() if path.startswith("inputs/")}
    outside = sorted(path for path in inputs if path.startswith("inputs/_outside/"))
    if outside:
        raise SdofreportError(f"input outside project folder ({', '.join(outside)})")
    project_file = manifest["project"].get("file")
    if project_file not in inputs:
        raise SdofreportError(f"project file {project_file!r} is not in the site")
    with tempfile.TemporaryDirectory(prefix="sdofreport-rerun-") as folder:
        for path, data in inputs.items():
            target = Path(folder, *path.split("/")[1:])
            target.parent.mkdir(parents=True, exist_ok=True)
            target.write_bytes(data)
        with _source_date(stored_date), without_memo():
            project = load_project(Path(folder, *project_file.split("/")[1:]))
        results = run_project(project, jobs=jobs, use_cache=False)
        document = results_document(results)
    # Round-trip through JSON so types match the stored file (tuples → lists, ints).
    return json.loads(json.dumps(document, allow_nan=False))


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
    Recompute results.json from the run's inputs and compare every value.

    ``rtol=None`` means: exact when the stored results were made by the installed
    version, else :data:`DEFAULT_RTOL`; a given ``rtol`` always applies.
    """
    manifest = parse_manifest(run.files, run.label)
    if RESULTS_PATH not in run.files:
        return RerunOutcome(False, f"'{RESULTS_PATH}' is missing")
    try:
        stored = parse_results(run.files[RESULTS_PATH], RESULTS_PATH)
    except SdofreportError as exc:
        return RerunOutcome(False, exc.message)
    if rtol is None:
        same_version = stored.get("generator") == f"sdofreport {__version__}"
        tolerance = 0.0 if same_version else DEFAULT_RTOL
    else:
        tolerance = float(rtol)
    stored_date = (stored.get("project") or {}).get("date")
    try:
        recomputed = recompute_results(run.files, manifest, stored_date, jobs=jobs)
    except SdofreportError as exc:
        return RerunOutcome(False, " ".join(exc.message.split()), tolerance)
    differences, count = compare_documents(stored, recomputed, tolerance)
    return RerunOutcome(True, "", tolerance, count, differences)


def verify_site(path: str | os.PathLike, *, rerun: bool = False, rtol: float | None = None,
                jobs: int | None = 1) -> VerifyReport:
    """
    Verify a site folder or a packed zip against its manifest.

    Parameters
    ----------
    path : path
        Site folder (``sdofreport build -o``) or zip (``sdofreport pack``).
    rerun : bool
        Also recompute every result from ``inputs/`` and compare ``data/results.json``.
    rtol : float, optional
        Relative tolerance of the re-run comparison [-]; default exact with the same
        package version, else :data:`DEFAULT_RTOL`.
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
