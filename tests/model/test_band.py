"""Properties of the one shared arrival and of the uncertainty band (hypothesis).

- moving the as-of date forward with no CRQC never lowers P for the same calendar end date,
  for every algorithm (central value and both ends of the band);
- a larger key in one family never falls earlier (shift, P, z; central and band);
- the band always contains the central value (P(exposed), z and start-by), through triage;
- same seed, same output; the band's samples are stratified as documented;
- after the survey's last horizon no date yields P = 0 for a quantum-vulnerable use.

Expectations come from the model's stated rules (docs/threat-model.md sections 4 and 6) and
hand derivations, never from the code's own intermediate results.
"""

from __future__ import annotations

import datetime as dt
import math
from functools import cache

from hypothesis import given, settings
from hypothesis import strategies as st

from pqtriage.catalog import load_catalog
from pqtriage.catalog.spec import AlgorithmSpec
from pqtriage.model.band import STRATA, BandSettings, make_design
from pqtriage.model.inventory import CryptoUse, Inventory, Purpose, System
from pqtriage.model.profile import ThreatProfile, date_of, decimal_year
from pqtriage.model.triage import triage
from pqtriage.model.verdict import TriageResult
from pqtriage.pipeline import arrival_and_band
from pqtriage.sources.hardware_file import shipped_hardware
from pqtriage.sources.profile_file import load_profile, shipped_profiles
from tests.threat.helpers import SOURCE, curve, ffdh, rsa

VULNERABLE = ("RSA-1024", "RSA-2048", "RSA-3072", "RSA-4096", "RSA-8192", "DH-2048", "ffdhe3072",
              "DSA-2048", "ECDH P-256", "X25519", "ECDSA P-384", "ECDSA P-521", "Ed25519")
PROFILES = tuple(p for p in shipped_profiles() if p.startswith("survey-"))
AS_OF = st.dates(dt.date(2026, 1, 1), dt.date(2090, 12, 31))


@cache
def _profile(name: str) -> ThreatProfile:
    return load_profile(name)


@cache
def _spec(name: str) -> AlgorithmSpec:
    spec = load_catalog().resolve(name).spec
    assert spec is not None, name
    return spec


@cache
def _run(profile: str, as_of: dt.date) -> tuple[object, object]:
    return arrival_and_band(_profile(profile), as_of, shipped_hardware())


def _p(profile: str, as_of: dt.date, spec: AlgorithmSpec, end: float) -> tuple[float, float, float]:
    """(central P, band low, band high) that ``spec`` falls before ``end``, as of ``as_of``."""
    arrival, band = _run(profile, as_of)
    now = decimal_year(as_of)
    central = _profile(profile).arrival_probability(end, now, arrival.shift_years(spec))  # type: ignore[attr-defined]
    samples = sorted(band.probabilities(spec, end, now).tolist())  # type: ignore[attr-defined]
    return central, samples[25], samples[230]


@settings(max_examples=60, deadline=None)
@given(profile=st.sampled_from(PROFILES), name=st.sampled_from(VULNERABLE), first=AS_OF,
       later_by=st.floats(0.01, 20), ahead=st.floats(0.01, 30))
def test_moving_the_as_of_date_forward_never_lowers_p_for_the_same_end_date(
    profile: str, name: str, first: dt.date, later_by: float, ahead: float
) -> None:
    second = date_of(decimal_year(first) + later_by)
    end = decimal_year(second) + ahead  # the same calendar end date, after both as-of dates
    spec = _spec(name)
    before = _p(profile, first, spec, end)
    after = _p(profile, second, spec, end)
    for a, b in zip(before, after, strict=True):
        assert b >= a - 1e-12


def _sized(family: str, bits: int) -> AlgorithmSpec:
    if family == "factoring":
        return rsa(bits)
    if family == "ffdh":
        return ffdh(bits, 112)
    if family == "dsa":
        return AlgorithmSpec(f"DSA-{bits}", "DSA", "signature", 112, "acceptable", "shor", SOURCE,
                             shor_problem="finite-field-dlog", problem_bits=bits)
    return curve(f"C-{bits}", bits)


@settings(max_examples=60, deadline=None)
@given(family=st.sampled_from(["factoring", "ffdh", "dsa", "curve"]),
       sizes=st.tuples(st.sampled_from([512, 1024, 1536, 2048, 3072, 4096, 6144, 8192]) | st.integers(512, 16384),
                       st.integers(0, 8000)),
       profile=st.sampled_from(PROFILES), as_of=AS_OF, ahead=st.floats(0.5, 30))
def test_a_larger_key_in_one_family_never_falls_earlier(
    family: str, sizes: tuple[int, int], profile: str, as_of: dt.date, ahead: float
) -> None:
    small, step = sizes
    large = small + step
    if family == "curve":
        small, large = 160 + small // 40, 160 + large // 40  # 172..772-bit curves
    a, b = _sized(family, small), _sized(family, large)
    arrival, band = _run(profile, as_of)
    assert arrival.shift_years(a) <= arrival.shift_years(b) + 1e-9  # type: ignore[attr-defined]
    end = decimal_year(as_of) + ahead
    for p_small, p_large in zip(_p(profile, as_of, a, end), _p(profile, as_of, b, end), strict=True):
        assert p_large <= p_small + 1e-12
    now = decimal_year(as_of)
    z_small = band.use_band(a, 0.0, ahead, now).crqc_year  # type: ignore[attr-defined]
    z_large = band.use_band(b, 0.0, ahead, now).crqc_year  # type: ignore[attr-defined]
    assert z_large.low >= z_small.low and z_large.high >= z_small.high


@settings(max_examples=40, deadline=None)
@given(profile=st.sampled_from(PROFILES), as_of=AS_OF,
       uses=st.lists(st.tuples(st.sampled_from(VULNERABLE + ("TLS_ECDHE_RSA_WITH_AES_128_GCM_SHA256",
                                                              "AES-128-GCM", "ML-KEM-768")),
                               st.sampled_from(list(Purpose)), st.floats(0, 40), st.floats(0, 8)),
                     min_size=1, max_size=8))
def test_the_band_always_contains_the_central_value(
    profile: str, as_of: dt.date, uses: list[tuple[str, Purpose, float, float]]
) -> None:
    systems = tuple(
        System(id=f"s{i}", name=f"s{i}", shelf_life_years=round(x, 2), migration_years=round(y, 2),
               uses=(CryptoUse(purpose=purpose, algorithm=name, trust_years=int(x)),))
        for i, (name, purpose, x, y) in enumerate(uses)
    )
    result = _triage(Inventory("Band Test Cooperative", systems), profile, as_of)
    banded = 0
    for item in result.items:
        for use in item.uses:
            if use.band is None:
                continue
            banded += 1
            assert use.exposure_probability is not None and use.crqc_year is not None
            assert use.band.exposure_probability.contains(use.exposure_probability)
            assert use.band.crqc_year.contains(use.crqc_year)
            earliest, latest = use.band.start_by
            if use.start_by is not None:
                assert earliest is not None and earliest <= use.start_by
                assert latest is None or use.start_by <= latest
    assert banded or all(u.band is None for i in result.items for u in i.uses)


def _triage(inventory: Inventory, profile: str, as_of: dt.date) -> TriageResult:
    arrival, band = arrival_and_band(_profile(profile), as_of, shipped_hardware())
    return triage(inventory, load_catalog(), _profile(profile), arrival, as_of, band)  # type: ignore[arg-type]


def test_same_seed_same_output_and_another_seed_another_band() -> None:
    settings_ = BandSettings(samples=64, seed=7)
    assert make_design(settings_, 1.0) == make_design(settings_, 1.0)
    assert make_design(settings_, 1.0) != make_design(BandSettings(samples=64, seed=8), 1.0)
    inventory = Inventory("Seed Test Cooperative", (
        System(id="a", name="a", shelf_life_years=5, migration_years=2,
               uses=(CryptoUse(purpose=Purpose.KEY_ESTABLISHMENT, algorithm="X25519"),)),
    ))
    first = _triage(inventory, "survey-2025-upper", dt.date(2026, 12, 2)).items[0].uses[0].band
    second = _triage(inventory, "survey-2025-upper", dt.date(2026, 12, 2)).items[0].uses[0].band
    assert first is not None and first == second


def test_the_design_is_stratified_around_the_central_values() -> None:
    # Eight equal strata: survey side x doubling side x default or other construction, each
    # side starting at the central value (docs/threat-model.md section 6).
    settings_ = BandSettings(samples=256, seed=1, doubling_years=1.0, doubling_low=0.8, doubling_high=1.6)
    design = make_design(settings_, 0.25)
    share = 256 // STRATA
    for stratum in range(STRATA):
        rows = range(stratum * share, (stratum + 1) * share)
        up, slow, other = bool(stratum & 1), bool(stratum & 2), bool(stratum & 4)
        for i in rows:
            u, d = design.positions[i], design.doubling_years[i]
            assert (0.25 <= u <= 1.0) if up else (0.0 <= u <= 0.25)
            assert (1.0 <= d <= 1.6) if slow else (0.8 <= d <= 1.0)
            assert design.other_method[i] == other
    # The upper profile sits at the pessimistic end: half the samples there exactly.
    upper = make_design(settings_, 1.0)
    assert sum(1 for u in upper.positions if u == 1.0) == 128


@settings(max_examples=30, deadline=None)
@given(profile=st.sampled_from(PROFILES), name=st.sampled_from(VULNERABLE),
       years_after=st.floats(0, 60), ahead=st.floats(0.1, 10))
def test_after_the_last_horizon_no_date_yields_p_zero(
    profile: str, name: str, years_after: float, ahead: float
) -> None:
    last = _profile(profile).points[-1][0]
    as_of = date_of(last + 0.01 + years_after)
    now = decimal_year(as_of)
    central, low, _ = _p(profile, as_of, _spec(name), now + ahead)
    assert central > 0 and low > 0
    assert not math.isnan(central)
