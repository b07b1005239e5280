"""Apply the optional processing steps of :mod:`sdofreport.core.processing` to a Record."""

from __future__ import annotations

import dataclasses

from sdofreport.core.processing import (
    bandpass,
    baseline_correction,
    cosine_taper,
    pad_length_s,
    pad_samples,
    usable_period_max_s,
)
from sdofreport.errors import RecordError
from sdofreport.records.record import Record


def _fail(record: Record, step: str, exc: Exception) -> RecordError:
    where = f"record '{record.id}'"
    if record.source_path:
        where += f" (file '{record.source_path}')"
    return RecordError(f"{where}: {step}: {exc}")


def process_record(record: Record, *, baseline_order=None, bandpass_hz=None, filter_order=4,
                   taper_s=None) -> Record:
    """
    Baseline-correct, taper and band-pass a record; every step is off unless asked for.

    The steps run in this order, each appending one line to ``Record.history``:

    1. **baseline** (``baseline_order``): a polynomial is removed first, so that a
       constant or slowly varying offset is gone before the taper would otherwise
       turn it into ramps at the ends that no low-order polynomial can remove.
    2. **taper** (``taper_s``): half-cosine ramps bring both ends to zero, so the zero
       pads of the filter join the record without a step (which would ring).
    3. **band-pass** (``bandpass_hz``): acausal Butterworth, applied last so the final
       record keeps the stated pass band; the filtered pads are kept (Boore 2005), so
       the record grows by the pad at each end and its time 0 is the start of the
       front pad.

    This is the sequence discussed by Boore and Bommer (2005), doi:10.1016/j.soildyn.2004.10.007:
    remove offsets, taper, pad and filter.

    Parameters
    ----------
    record : Record
        The record to process; it is not changed.
    baseline_order : int or None, optional
        Order 0-3 of the polynomial removed (see
        :func:`sdofreport.core.processing.baseline_correction`); None skips it. [-]
    bandpass_hz : tuple of (float or None, float or None) or None, optional
        (low-cut, high-cut) corner frequencies; either may be None; None skips it. [Hz]
    filter_order : int, optional
        Butterworth order of each filter pass. [-]
    taper_s : float or None, optional
        Length of each half-cosine ramp; None skips it. [s]

    Returns
    -------
    Record
        A new record with the processed acceleration and extended history; ``sha256``
        still identifies the source file.

    Raises
    ------
    sdofreport.errors.RecordError
        If a parameter is not allowed for this record, naming the record and the step.
    """
    acc = record.acceleration_m_s2
    dt = record.dt_s
    history = list(record.history)
    if baseline_order is not None:
        try:
            acc = baseline_correction(acc, dt, baseline_order)
        except ValueError as exc:
            raise _fail(record, "baseline", exc) from None
        history.append(f"baseline: order-{baseline_order} polynomial removed (least-squares "
                       "fit to the ground velocity)")
    if taper_s is not None:
        try:
            acc = cosine_taper(acc, dt, taper_s)
        except ValueError as exc:
            raise _fail(record, "taper", exc) from None
        history.append(f"taper: half-cosine ramps of {float(taper_s):g} s at both ends")
    if bandpass_hz is not None:
        try:
            low_hz, high_hz = bandpass_hz
        except (TypeError, ValueError):
            raise _fail(record, "band-pass", ValueError(
                f"bandpass_hz must be a pair (low_hz, high_hz), either may be None [Hz]; "
                f"got {bandpass_hz!r}")) from None
        try:
            acc = bandpass(acc, dt, low_hz, high_hz, order=filter_order, keep_pads=True)
        except ValueError as exc:
            raise _fail(record, "band-pass", exc) from None
        corner = low_hz if low_hz is not None else high_hz
        pad_s = pad_length_s(corner, filter_order)
        end_s = pad_samples(corner, filter_order, dt) * dt
        low_text = "none" if low_hz is None else f"{float(low_hz):g} Hz"
        high_text = "none" if high_hz is None else f"{float(high_hz):g} Hz"
        usable = ("" if low_hz is None else
                  f"; usable periods up to {usable_period_max_s(low_hz):.4g} s = "
                  f"1/(1.25 × low-cut) (NGA-West2 rule, Ancheta et al. 2014, from memory)")
        history.append(
            f"band-pass: acausal Butterworth order {filter_order}, low-cut {low_text}, "
            f"high-cut {high_text}, run forward and backward over {pad_s:g} s of zero pads "
            f"in total; the filtered pads are kept (Boore 2005): {end_s:g} s added at each "
            f"end, time 0 is the start of the front pad{usable}"
        )
    return dataclasses.replace(record, acceleration_m_s2=acc, history=tuple(history))
