"""Checks that stop a build on amplitudes that cannot be right.

Three checks, each naming the record by its id, what was found and how to go on:

- the file's header states a unit other than the declared ``units`` (see
  :mod:`sdofreport.records.header_units`);
- the PGA after every scale factor is above :data:`PGA_RANGE_G`'s upper bound or below
  its lower one (a cm/s² file declared as g shows a PGA near 300 g);
- any number a page would show is not finite, or a significant duration is zero (an
  overflowed or empty motion).

The first two may be acknowledged with ``amplitude_ok = true`` on the record's entry; the
third may not.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from sdofreport.core.units import ACCELERATION_UNITS, G
from sdofreport.errors import RecordError
from sdofreport.records.header_units import disagreement

#: PGA range [g] of a plausible scaled ground motion. Our choice (no published source):
#: the strongest PGAs recorded so far are a few g (from memory), and 0.001 g is below
#: what an analysis for design would use; outside it the units or the scale are wrong.
PGA_RANGE_G = (0.001, 4.0)

_ACKNOWLEDGE = "add amplitude_ok = true to this [[records]] entry"


def _name(spec) -> str:
    return f"records[{spec.id}]"


def header_unit_problem(spec, record) -> str | None:
    """A problem text when ``record``'s header states a unit other than ``spec.units``
    and the entry does not say ``amplitude_ok = true``; else None."""
    found = disagreement(spec.units, getattr(record, "stated_units", ()))
    if found is None or spec.amplitude_ok:
        return None
    unit, line, text = found
    return (f"{_name(spec)}: record file '{spec.file}' line {line} states the values are "
            f"in {unit} ({text!r}), but the project declares units = \"{spec.units}\"; "
            f"write units = \"{unit}\" if the header is right, or, if the values really "
            f"are in {spec.units}, {_ACKNOWLEDGE}")


def _other_units(pga_g: float, declared: str) -> str:
    """Declared units that would bring ``pga_g`` into a plausible range, as text."""
    size = ACCELERATION_UNITS[declared]
    seen, options = set(), []
    for unit, factor in ACCELERATION_UNITS.items():
        candidate = pga_g * factor / size
        if factor == size or factor in seen:
            continue
        seen.add(factor)
        if 0.01 <= candidate <= PGA_RANGE_G[1]:
            options.append(f"in {unit} it would be {candidate:.3g} g")
    return f" ({'; '.join(options)})" if options else ""


def pga_problem(spec, pga_m_s2: float, suite_factor: float) -> str | None:
    """A problem text when the PGA after scaling is outside :data:`PGA_RANGE_G` and the
    entry does not say ``amplitude_ok = true``; else None."""
    pga_g = pga_m_s2 / G
    low, high = PGA_RANGE_G
    if spec.amplitude_ok or not math.isfinite(pga_g) or low <= pga_g <= high:
        return None
    side = f"above {high:g} g" if pga_g > high else f"below {low:g} g"
    return (f"{_name(spec)}: the PGA after scaling is {pga_g:.4g} g, {side} (record file "
            f"'{spec.file}' declared in {spec.units}{_other_units(pga_g, spec.units)}, "
            f"scale {spec.scale:g}, suite factor {suite_factor:.4g}); check the units and "
            f"the scale factors, or, if the motion really is this strong or weak, "
            f"{_ACKNOWLEDGE}")


def _bad_values(item) -> list[str]:
    """Names of the fields of a result dataclass holding a value that is not finite."""
    bad = []
    for field in dataclasses.fields(item):
        value = getattr(item, field.name)
        if isinstance(value, dict):
            value = [v for v in value.values() if isinstance(v, (int, float))]
        if isinstance(value, bool) or value is None or isinstance(value, str):
            continue
        if isinstance(value, (int, float, list, np.ndarray)):
            array = np.asarray(value)
            if array.dtype.kind in "fi" and not np.all(np.isfinite(array)):
                bad.append(field.name)
    return bad


def record_problems(result) -> list[str]:
    """Problems of one record as used (engine.RecordResult): PGA out of range, values
    that are not finite, a zero significant duration."""
    spec, intensity = result.spec, result.intensity
    problems = []
    pga = pga_problem(spec, intensity.pga_m_s2, result.scale_factor)
    if pga:
        problems.append(pga)
    bad = _bad_values(intensity) + [f"spectrum {name}" for name in
                                    _bad_values(result.spectrum)]
    bad += [name for name in ("velocity_m_s", "displacement_m", "fourier_amplitude_m_s")
            if not np.all(np.isfinite(getattr(result, name)))]
    if bad:
        problems.append(f"{_name(spec)}: {', '.join(bad)} of the scaled record "
                        f"'{spec.file}' are not finite numbers (overflow, or an empty "
                        f"motion); check its values, units and scale factors")
    elif not intensity.d5_95_s > 0.0:
        problems.append(f"{_name(spec)}: the significant duration D5-95 of '{spec.file}' "
                        f"is {intensity.d5_95_s:g} s: its energy arrives within one time "
                        f"step, which is not a ground motion; check the record")
    return problems


def response_problems(response) -> list[str]:
    """Problems of one response (engine.ResponseResult): values that are not finite."""
    bad = _bad_values(response)
    if not bad:
        return []
    return [(f"system {response.system_id!r} under record {response.record_id!r}: "
             f"{', '.join(bad)} are not finite numbers (the integration overflowed); "
             f"check the record's amplitude and the system's properties")]


def pair_problems(pair) -> list[str]:
    """Problems of one pair's RotD spectra (engine.PairResult): values not finite."""
    bad = _bad_values(pair.rotd)
    if not bad:
        return []
    return [(f"pair {pair.name!r} ({pair.h1}, {pair.h2}): RotD {', '.join(bad)} are "
             f"not finite numbers (overflow); check the records' values, units and scale")]


def check_results(project_name: str, records, responses=(), pairs=()) -> None:
    """
    Stop the build when any record or response fails the checks above.

    Parameters
    ----------
    project_name : str
        The project file's name, for the message.
    records : iterable of engine.RecordResult
        The records as used (processed and scaled).
    responses : iterable of engine.ResponseResult, optional
    pairs : iterable of engine.PairResult, optional

    Raises
    ------
    RecordError
        Listing every problem, each naming the record (and system) by id.
    """
    problems = [text for result in records for text in record_problems(result)]
    problems += [text for pair in pairs for text in pair_problems(pair)]
    problems += [text for response in responses for text in response_problems(response)]
    if problems:
        count = len(problems)
        raise RecordError(f"{project_name} has {count} amplitude problem"
                          f"{'s' if count > 1 else ''}:\n  " + "\n  ".join(problems))
