"""Batch engine: plan every job of a project, run them, cache them, assemble the results.

Phases (each a batch of independent jobs, see :mod:`sdofreport.jobs`):

1. per record: intensity measures, ground velocity and displacement, Fourier amplitude,
   response spectra; per horizontal pair: RotD spectra (Boore 2010);
2. suite scaling against the design spectrum (:mod:`sdofreport.suite`; fast, in this
   process) — the records are then scaled, their spectra multiplied by the factor
   (exact: a linear oscillator's response is proportional to its excitation);
3. per system × record: the response history of the system to the scaled record.

Each job's result is cached under a content hash of its inputs, its settings, the
package version and a fingerprint of its sources (:func:`sdofreport.cache.cache_key`),
so a rebuild with nothing changed recomputes nothing. Outputs are
assembled in plan order, never completion order, so the same inputs give the same results.

The package is split by reason to change: :mod:`~sdofreport.engine.plan` (records read
and checked, models and the jobs of each phase), :mod:`~sdofreport.engine.warmup`
(kernels loaded or compiled before the jobs), :mod:`~sdofreport.engine.run` (the phases
run, in this process or in workers) and :mod:`~sdofreport.engine.results` (the typed
results, verdicts and checks); beside them the job functions (:mod:`.jobs`), where they
run (:mod:`.executors`), the result cache (:mod:`.cache`), suite scaling (:mod:`.suite`,
:mod:`.vertical_suite`, :mod:`.isolation_bounds`), record amplitude checks
(:mod:`.amplitude`) and the typed parts and statistics of the results
(:mod:`.results_types`, :mod:`.suite_statistics`).
"""

from sdofreport.core.units import G
from sdofreport.engine.cache import ResultCache, default_cache_dir
from sdofreport.engine.plan import load_records, synthetic_record, system_model
from sdofreport.engine.results import (
    CHECK_ATTRIBUTES,
    SIGNED_QUANTITIES,
    VERDICT_EXCEEDS,
    VERDICT_UNSTABLE,
    VERDICT_WITHIN,
    Check,
    FragilityResult,
    PairResult,
    RecordResult,
    ResponseResult,
    Results,
    run_exceeds,
)
from sdofreport.engine.run import Progress, run_project
from sdofreport.engine.warmup import later_shares, warm_kernels, warm_later_kernels

__all__ = ["Check", "FragilityResult", "PairResult", "RecordResult", "ResponseResult",
           "Results", "Progress",
           "run_project", "load_records", "synthetic_record", "system_model",
           "default_cache_dir", "ResultCache", "run_exceeds",
           "warm_kernels", "warm_later_kernels", "later_shares",
           "VERDICT_WITHIN", "VERDICT_EXCEEDS", "VERDICT_UNSTABLE", "CHECK_ATTRIBUTES",
           "SIGNED_QUANTITIES", "G"]
