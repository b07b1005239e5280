"""The suite statistics the pages summarise, computed once from the engine's results.

Spectra: the arithmetic mean across records and the log-normal band (geometric mean
and exp(mean ± 1σ) of ln, σ the sample standard deviation), as is usual for ground-motion
suites (e.g. Baker & Cornell 2006, doi:10.1002/eqe.571). Peaks: mean and maximum over a
system's records, and the suite statistic the checks use. Inelastic spectra: the mean
over records, skipping periods a record could not resolve (NaN).
"""

from __future__ import annotations

import numpy as np

from sdofreport.core.units import G
from sdofreport.engine.results_types import (
    InelasticMeans,
    PeakStatistics,
    SpectrumBand,
    SuiteStatistics,
    SystemStatistics,
)

#: Damping ratio of the suite's spectra on the pages: the row nearest to it. [-]
SUITE_DAMPING = 0.05

#: PeakStatistics field -> (ResponseResult attribute, of absolute values).
_PEAKS = {"displacement_m": ("peak_displacement_m", False),
          "drift_ratio": ("peak_drift_ratio", False),
          "base_shear_n": ("peak_base_shear_n", False),
          "total_accel_m_s2": ("peak_total_accel_m_s2", False),
          "ductility": ("ductility", False),
          "residual_displacement_abs_m": ("residual_displacement_m", True)}


def spectrum_band(stack: np.ndarray) -> SpectrumBand:
    """
    Mean and log-normal band across the rows (records) of ``stack``.

    Parameters
    ----------
    stack : ndarray, shape (records, periods)
        One spectral ordinate of each record. [unit]

    Returns
    -------
    SpectrumBand
        Arithmetic mean, geometric mean and exp(mean ± σ) of ln [unit]; σ is the sample
        standard deviation (n − 1), zero for a single record.
    """
    with np.errstate(divide="ignore"):
        logs = np.log(np.maximum(stack, 1e-300))
    mean = logs.mean(axis=0)
    std = logs.std(axis=0, ddof=1) if stack.shape[0] > 1 else np.zeros_like(mean)
    return SpectrumBand(np.mean(stack, axis=0), np.exp(mean), np.exp(mean - std),
                        np.exp(mean + std))


def _peak_statistics(responses: list, reducer) -> PeakStatistics:
    values = {}
    for name, (attribute, absolute) in _PEAKS.items():
        peaks = [getattr(r, attribute) for r in responses]
        if any(p is None for p in peaks):
            values[name] = None
            continue
        values[name] = float(reducer([abs(p) for p in peaks] if absolute else peaks))
    return PeakStatistics(**values)


def _reducer(statistic: str):
    return np.mean if statistic == "mean" else np.max


def suite_statistics(project, records: list, responses: dict, bounds: dict, scaling,
                     inelastic: dict, statistic: str) -> SuiteStatistics:
    """
    The statistics of a run's results (:class:`sdofreport.engine.Results` fields).

    Parameters
    ----------
    project : Project
    records : list of RecordResult
        The records as used (scaled).
    responses : dict
        (system id, record id) -> ResponseResult (nominal runs).
    bounds : dict
        (system id, record id) -> the bound runs, indexed by run name.
    scaling : SuiteScaling or None
    inelastic : dict
        Record id -> InelasticSpectra.
    statistic : {"mean", "max"}
        The suite statistic of the checks.
    """
    damping = np.asarray(records[0].spectrum.damping)
    index = int(np.argmin(np.abs(damping - SUITE_DAMPING)))
    psa = np.array([r.spectrum.psa_m_s2[index] * (1.0 / G) for r in records])
    sd = np.array([r.spectrum.sd_m[index] for r in records])
    criterion = vertical = None
    if scaling is not None and scaling.criterion_spectra_g is not None:
        criterion = spectrum_band(scaling.criterion_spectra_g)
    if scaling is not None and scaling.vertical is not None:
        vertical = spectrum_band(np.asarray(scaling.vertical.spectra_g))
    systems = {}
    for system in project.systems:
        runs = [responses[(system.id, r.id)] for r in project.records_for(system)]
        mean = _peak_statistics(runs, np.mean)
        maximum = _peak_statistics(runs, np.max)
        bound = {}
        if (system.model or {}).get("property_factors"):
            for run in ("lower", "upper"):
                values = [bounds[(system.id, r.id)][run].peak_displacement_m
                          for r in project.records_for(system)]
                bound[run] = float(_reducer(statistic)(values))
        systems[system.id] = SystemStatistics(
            mean, maximum, mean.displacement_m if statistic == "mean"
            else maximum.displacement_m, bound)
    means = None
    if inelastic:
        outs = list(inelastic.values())
        r_stack = np.array([o.ductility.strength_reduction_factor for o in outs])
        mu_stack = np.array([o.strength.ductility for o in outs])
        with np.errstate(invalid="ignore"):
            means = InelasticMeans(np.nanmean(r_stack, axis=0), np.nanmean(mu_stack, axis=0))
    return SuiteStatistics(statistic, index, float(damping[index]), spectrum_band(psa),
                           spectrum_band(sd), criterion, vertical, systems, means)


__all__ = ["SUITE_DAMPING", "spectrum_band", "suite_statistics"]
