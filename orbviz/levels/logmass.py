"""A distribution tabulated on a uniform grid of log density, and quadrature helpers.

The enclosed probability P(c) is the mass of the distribution of log |psi|^2 above log c, under
the probability measure |psi|^2 dV. Each quadrature sample's mass is spread over the range of
log density its cell spans (cloud in cell), which keeps the tabulated P(c) second-order accurate
in the sample spacing; P between nodes is interpolated linearly.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["MAX_HALF", "SPAN", "LogMass", "cell_intervals", "midpoints", "spread"]

SPAN = 90.0  # e-folds of density kept below the maximum; lower mass is pooled at the bottom


class LogMass:
    """Mass binned by log value on a uniform grid: node k sits at top - (size - 1 - k) * step."""

    def __init__(self, top: float, step: float, span: float = SPAN) -> None:
        self.step = step
        self.size = int(math.ceil(span / step)) + 2
        self.bottom = top - (self.size - 1) * step
        self.mass = np.zeros(self.size)

    def add(self, low: np.ndarray, high: np.ndarray, masses: np.ndarray) -> None:
        """Add masses each spread uniformly over the log-value interval [low, high].

        Binning into the cells between half-node edges is exact: the cumulative mass is piecewise
        linear with slope changes at the interval ends, accumulated by a double cumulative sum.
        Intervals are clipped to the table, so give it a top above the highest ``high``.
        """
        slope = masses / (high - low)
        ends = np.concatenate([low, high])
        kinks = np.concatenate([slope, -slope])
        pos = (ends - (self.bottom - 0.5 * self.step)) / self.step  # in edge units
        pos = np.clip(pos, 0.0, self.size + 0.0)
        q = np.minimum(pos.astype(np.int64), self.size)
        frac = (pos - q) * self.step
        S = np.bincount(q, kinks, minlength=self.size + 1)
        D = np.bincount(q, kinks * frac, minlength=self.size + 1)
        # mass below edge k: sum over kinks in earlier bins of slope * (edge_k - position)
        below = np.zeros(self.size + 1)
        below[1:] = self.step * np.cumsum(np.cumsum(S))[:-1] - np.cumsum(D)[:-1]
        self.mass += np.diff(below)

    @classmethod
    def of_samples(cls, values: np.ndarray, masses: np.ndarray, step: float) -> LogMass:
        """Table of samples on a grid of any dimension; spreads come from neighbour differences."""
        keep = (values > 0) & (masses > 0)
        low, high = cell_intervals(values, step)
        table = cls(float(high[keep].max()), step)
        table.add(low[keep], high[keep], masses[keep])
        return table

    def trimmed(self, negligible: float = 1e-17) -> LogMass:
        """Return this table with its low tail (below ``negligible`` of the mass) at one node."""
        first = int(np.searchsorted(np.cumsum(self.mass), negligible * self.mass.sum()))
        if first <= 1:
            return self
        out = LogMass.__new__(LogMass)
        out.step, out.size = self.step, self.size - first
        out.bottom = self.bottom + first * self.step
        out.mass = self.mass[first:].copy()
        out.mass[0] += self.mass[:first].sum()
        return out

    def convolve(self, other: LogMass) -> LogMass:
        """Distribution of the sum of the two log values (product of the values)."""
        a, b = self.trimmed(), other.trimmed()
        length = a.size + b.size - 1
        nfft = 1 << (length - 1).bit_length()
        mass = np.fft.irfft(np.fft.rfft(a.mass, nfft) * np.fft.rfft(b.mass, nfft), nfft)
        mass = np.maximum(mass[:length], 0.0)
        out = LogMass.__new__(LogMass)
        out.step, out.size = self.step, length
        out.bottom = a.bottom + b.bottom
        out.mass = mass
        drop = max(0, length - int(math.ceil(SPAN / self.step)) - 2)
        if drop:  # pool the far tail into the new bottom node
            out.mass = np.concatenate([[mass[: drop + 1].sum()], mass[drop + 1 :]])
            out.bottom += drop * self.step
            out.size -= drop
        return out

    def above(self, log_levels: np.ndarray) -> np.ndarray:
        """Mass with log value >= each level; node k's mass is spread over its half-cells."""
        tail = np.concatenate([np.cumsum(self.mass[::-1])[::-1], [0.0]])
        edges = self.bottom + (np.arange(self.size + 1) - 0.5) * self.step
        return np.interp(log_levels, edges, tail, left=tail[0], right=0.0)

    def level_above(self, fraction: float) -> float:
        """Log level whose mass above is ``fraction`` (inverse of :meth:`above`)."""
        tail = np.concatenate([np.cumsum(self.mass[::-1])[::-1], [0.0]])
        edges = self.bottom + (np.arange(self.size + 1) - 0.5) * self.step
        return float(np.interp(-fraction, -tail, edges))


def cell_intervals(values: np.ndarray, step: float) -> tuple[np.ndarray, np.ndarray]:
    """Interval of log density that stands for each gridded sample's quadrature cell.

    For a field linear across a cell, log values spread with variance sum_k g_k^2 / 12 (g_k the
    change per cell along axis k); a uniform of half-width h = sqrt(sum g_k^2) / 2 matches it.
    The mass in the cell grows as exp(log value), so the interval is centred h^2 / 3 above the
    sample (its centre of mass, to fourth order). This keeps the table second order even where
    neighbouring samples lie many log steps apart. Half-widths are kept within [step/2, 8];
    cells spread wider than 1 hold almost no mass (they straddle a node).
    """
    logs = np.log(np.maximum(values, np.finfo(np.float64).tiny))
    sq = np.zeros_like(logs)
    for axis in range(logs.ndim):
        if logs.shape[axis] > 1:
            sq += np.gradient(logs, axis=axis) ** 2
    half = 0.5 * np.sqrt(sq)
    return spread(logs, half, step)


MAX_HALF = 8.0  # widest half-interval of log density one sample is spread over


def spread(logs: np.ndarray, half: np.ndarray, step: float) -> tuple[np.ndarray, np.ndarray]:
    """Return the interval [low, high] of each sample: half-widths kept in [step/2, 8].

    ``half`` is overwritten (clipped). The interval is centred min(h, 1)^2 / 3 above the sample:
    the centre of mass of a cell whose mass grows as exp(log value), to fourth order.
    """
    kind = half.dtype.type
    np.clip(half, kind(0.5 * step), kind(MAX_HALF), out=half)
    low = np.minimum(half, kind(1.0))
    np.square(low, out=low)
    low *= kind(1.0 / 3.0)
    low += logs
    low -= half
    return low, low + 2 * half


def midpoints(count: int, low: float, high: float) -> tuple[np.ndarray, float]:
    """Return the midpoints of ``count`` equal cells of [low, high] and the cell width."""
    step = (high - low) / count
    return low + (np.arange(count) + 0.5) * step, step
