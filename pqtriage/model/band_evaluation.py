"""The uncertainty band evaluated over its samples, vectorised with numpy.

P(exposed) per sample is the profile's rule (pqtriage.model.profile.ThreatProfile.
arrival_probability) at each sample's survey position and shift; z per sample is its quantile
rule. numpy evaluates all samples of one use at once; results are memoised per run, since
many uses share algorithm, x and y.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence

import numpy as np

from pqtriage.model.band import SampleDesign, UseBand, choose, order_band
from pqtriage.model.profile import ThreatProfile, blend, curve_quantile, date_of


class BandEvaluator:
    """Evaluates P(exposed) and z over the samples for a profile, vectorised with numpy.

    ``shifts(spec)`` gives each sample's arrival shift for an algorithm (the arrival model's
    ``shift_samples``); results are memoised per run.
    """

    def __init__(self, profile: ThreatProfile, design: SampleDesign,
                 shifts: Callable[[object], Sequence[float]], summary: object = None) -> None:
        self.summary = summary
        self.profile = profile
        self.design = design
        self._shifts = shifts
        self._positions = np.asarray(design.positions, dtype=float)
        low, high = profile.band_curves
        self._low = (np.asarray(low[0]), np.asarray(low[1]))
        self._high = (np.asarray(high[0]), np.asarray(high[1]))
        self._shift_cache: dict[int, tuple[object, np.ndarray]] = {}
        self._quantile_cache: dict[float, np.ndarray] = {}
        self._band_cache: dict[tuple[int, float, float], UseBand] = {}

    def shift_array(self, spec: object) -> np.ndarray:
        """Each sample's shift for ``spec`` (inf: beyond the horizon)."""
        found = self._shift_cache.get(id(spec))
        if found is None or found[0] is not spec:
            found = (spec, np.asarray(self._shifts(spec), dtype=float))
            self._shift_cache[id(spec)] = found
        return found[1]

    def _cdf(self, years: np.ndarray) -> np.ndarray:
        profile = self.profile
        if profile.crqc_year is not None:
            return (years > profile.crqc_year).astype(float)
        low = np.interp(years, self._low[0], self._low[1], left=0.0)
        high = np.interp(years, self._high[0], self._high[1], left=0.0)
        return low + self._positions * (high - low)

    def probabilities(self, spec: object, horizon: float, as_of: float) -> np.ndarray:
        """P(the algorithm falls before ``horizon``) per sample (arrival_probability's rule)."""
        shifts = self.shift_array(spec)
        if horizon <= as_of:
            return np.zeros(self.design.size)
        finite = np.isfinite(shifts)
        years = np.where(finite, horizon - np.where(finite, shifts, 0.0), -np.inf)
        return np.where(finite, self._cdf(years), 0.0)

    def _quantiles(self, probability: float) -> np.ndarray:
        found = self._quantile_cache.get(probability)
        if found is None:
            profile = self.profile
            if profile.crqc_year is not None:
                found = np.full(self.design.size, float(profile.crqc_year))
            else:
                low, high = profile.band_curves
                cache: dict[float, float] = {}
                values = []
                for u in self.design.positions:
                    if u not in cache:
                        cache[u] = curve_quantile(blend(low, high, u), probability)
                    values.append(cache[u])
                found = np.asarray(values, dtype=float)
            self._quantile_cache[probability] = found
        return found

    def years(self, spec: object, probability: float, as_of: float) -> np.ndarray:
        """Year each sample's arrival reaches ``probability``: max(as_of, F^-1(p) + shift)."""
        shifts = self.shift_array(spec)
        with np.errstate(invalid="ignore"):
            raw = self._quantiles(probability) + shifts
        return np.maximum(np.where(np.isnan(raw), np.inf, raw), as_of)

    def use_band(self, spec: object, x: float, y: float, as_of: float) -> UseBand:
        """The band of one use: P(exposed) at as_of + x + y, z at the risk tolerance, start-by."""
        key = (id(spec), x, y)
        found = self._band_cache.get(key)
        if found is not None and self._shift_cache.get(id(spec), (None,))[0] is spec:
            return found
        probability = order_band(self.probabilities(spec, as_of + x + y, as_of).tolist())
        z = order_band(self.years(spec, self.profile.risk_tolerance, as_of).tolist())
        start = tuple(None if math.isinf(v) else date_of(v - x - y) for v in (z.low, z.high))
        band = UseBand(probability, z, (start[0], start[1]), self.design.size)
        self._band_cache[key] = band
        return band


def band_evaluator(profile: ThreatProfile, arrival: object, design: SampleDesign,
                   summary: object = None) -> BandEvaluator:
    """A BandEvaluator whose shifts come from an arrival model's ``shift_samples``."""
    samples = getattr(arrival, "shift_samples", None)
    methods = getattr(arrival, "band_methods", None)

    def shifts(spec: object) -> Sequence[float]:
        if samples is None or methods is None:
            return [arrival.shift_years(spec)] * design.size  # type: ignore[attr-defined]
        central, others = methods(spec)
        return samples(spec, design, choose(design, central, others))  # type: ignore[no-any-return]

    return BandEvaluator(profile, design, shifts, summary)
