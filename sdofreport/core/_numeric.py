"""Small numerical helpers kept in numpy so that importing the core stays fast."""

from __future__ import annotations

import numpy as np


def cumulative_trapezoid(values, dx: float, axis: int = -1) -> np.ndarray:
    """
    Cumulative trapezoid-rule integral from the first sample, starting at 0.

    Same arithmetic as ``scipy.integrate.cumulative_trapezoid(values, dx=dx, axis=axis,
    initial=0)``: ``dx · (y[i] + y[i+1]) / 2`` summed cumulatively.

    Parameters
    ----------
    values : array-like
        Equally spaced samples. [any unit]
    dx : float
        Sample spacing. [unit of the integration variable]
    axis : int
        Axis along which to integrate.
    """
    y = np.moveaxis(np.asarray(values, dtype=float), axis, -1)
    steps = dx * (y[..., 1:] + y[..., :-1]) / 2.0
    out = np.concatenate([np.zeros(y.shape[:-1] + (1,)), np.cumsum(steps, axis=-1)],
                         axis=-1)
    return np.moveaxis(out, -1, axis)


def trapezoid(values, dx: float) -> float:
    """Trapezoid-rule integral of equally spaced samples (1-D)."""
    y = np.asarray(values, dtype=float)
    if y.size < 2:
        return 0.0
    return float(dx * (np.sum(y) - 0.5 * (y[0] + y[-1])))
