"""Breaking loads, wind on a tied-off span (Irvine's cable equation) and guy statics, against outside
figures and hand-worked examples."""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from fieldkit.rigging.feed_advice import feedline_words, longest_run_m
from fieldkit.rigging.feedline import parse_coax, total_loss_db
from fieldkit.rigging.mast import guy_tensions_n
from fieldkit.rigging.strength import (
    WIRE_SAFETY_FACTOR,
    rope_strength,
    wire_strength,
)
from fieldkit.rigging.wind import (
    SpanLoad,
    drag_n_per_m,
    dynamic_pressure_pa,
    ice_weight_n_per_m,
    tied_off_tension_n,
)
from fieldkit.rigging.wire import awg_diameter_m, parse_wire


def _wire(**kw):
    return parse_wire({"diameter_mm": 1.6, **kw})


# --- breaking loads -------------------------------------------------------------------------------


def test_soft_drawn_copper_of_1_6_mm_breaks_near_0_45_kn():
    w = wire_strength(_wire())
    # issue 14: "soft-drawn copper of that size breaks at roughly 0.45 kN" (from memory)
    assert w.breaking_n == pytest.approx(450, rel=0.05)
    # area × 220 MPa, the annealed-copper row (ASTM B3 / ASM C11000 annealed, from memory)
    assert w.breaking_n == pytest.approx(math.pi * 0.8e-3**2 * 220e6, rel=1e-12)  # computed
    assert w.working_n == pytest.approx(w.breaking_n / WIRE_SAFETY_FACTOR)
    assert w.soft_copper and "soft-drawn copper" in w.source and "from memory" in w.source


def test_tempers_and_metals_rank_as_the_wire_tables_do():
    soft = wire_strength(_wire(temper="soft")).breaking_n
    hard = wire_strength(_wire(temper="hard")).breaking_n
    ccs = wire_strength(_wire(conductor="copper-clad-steel")).breaking_n
    # ASTM B1 hard-drawn ~380–450 MPa against B3 annealed ~210–250 MPa (from memory): 1.6–2.1×
    assert 1.5 < hard / soft < 2.2
    # copper-clad steel (ASTM B227/B910, from memory) is stronger than either
    assert ccs > hard
    # AWG 12 hard-drawn copper (2.053 mm, ASTM B258): ~1.2–1.5 kN breaking (ASTM B1, from memory)
    awg12 = parse_wire({"awg": 12, "temper": "hard"})
    assert awg12.diameter_m == pytest.approx(awg_diameter_m(12))
    assert 1200 < wire_strength(awg12).breaking_n < 1500


def test_stranded_and_insulated_wire():
    solid = wire_strength(_wire()).breaking_n
    stranded = wire_strength(_wire(stranded=True)).breaking_n
    # 7 strands of d/3 fill 7/9 of the circle (geometry), the lay keeps ~93 % (from memory)
    assert stranded / solid == pytest.approx(7 / 9 * 0.93, rel=1e-12)
    jacketed = _wire(insulation={"thickness_mm": 0.7, "relative_permittivity": 3.5})
    assert wire_strength(jacketed).breaking_n == pytest.approx(solid)  # the jacket is not counted


def test_rope_working_load_given_or_estimated():
    assert rope_strength(diameter_mm=4, working_load_n=300).working_n == 300
    est = rope_strength(diameter_mm=8, working_load_n=None)
    # 8 mm laid polyester ~10 kN breaking (maker tables, from memory), design factor 5 (Cordage
    # Institute, from memory): about 2 kN
    assert est.working_n == pytest.approx(2000, rel=0.1)
    assert not est.given and "working_load_n" in est.source


# --- wind and ice ---------------------------------------------------------------------------------


def test_wind_pressure_and_drag():
    assert dynamic_pressure_pa(wind_m_s=20) == pytest.approx(245.0)  # ½·1.225·20², computed
    # 3 mm jacketed wire at 17.2 m/s: 181.2 Pa × 1.2 × 0.003 m (Hoerner C_d 1.2, from memory)
    assert drag_n_per_m(diameter_m=0.003, wind_m_s=17.2) == pytest.approx(0.6522, rel=1e-3)
    # 5 mm of ice widens 3 mm to 13 mm
    assert drag_n_per_m(diameter_m=0.003, wind_m_s=17.2, ice_m=0.005) == pytest.approx(
        0.6522 * 13 / 3, rel=1e-3
    )
    # ice ring 1.5 → 6.5 mm radius at 900 kg/m³ (ASCE 7 glaze, from memory): 0.1131 N/m, computed
    assert ice_weight_n_per_m(diameter_m=0.003, ice_m=0.005) == pytest.approx(
        900 * math.pi * (0.0065**2 - 0.0015**2) * 9.80665, rel=1e-12
    )


def _exact_inextensible_h(*, span_m, w, h, w_loaded):
    """Irvine ch. 1: a level inextensible catenary keeps its arc length S = 2a·sinh(L/2a), a = H/w;
    loaded to w′ it keeps S, so H′ = a′w′ with a′ from S (scipy's brentq)."""
    s = 2 * (h / w) * math.sinh(span_m * w / (2 * h))
    a2 = brentq(lambda a: 2 * a * math.sinh(span_m / (2 * a)) - s, 1.0, 1e6, xtol=1e-12)
    return a2 * w_loaded


@pytest.mark.parametrize(
    ("span_m", "w", "h", "across"),
    [
        (30.0, 0.981, 50.0, 2.0),  # REFERENCES.md catenary case, 2 N/m of wind across
        (40.0, 0.245, 60.0, 0.652),  # 1.6 mm jacketed copper in a 17.2 m/s gale
    ],
)
def test_inextensible_span_in_wind_matches_irvines_catenary(span_m, w, h, across):
    got = tied_off_tension_n(
        span_m=span_m,
        tension_n=h,
        still=SpanLoad(w, 0.0),
        down=SpanLoad(w, 0.0),
        across=SpanLoad(across, 0.0),
        compliance_m_per_n=0.0,
    )
    want = _exact_inextensible_h(span_m=span_m, w=w, h=h, w_loaded=math.hypot(w, across))
    assert got == pytest.approx(want, rel=0.01)  # shallow cable against the exact catenary
    assert got == pytest.approx(h * math.hypot(w, across) / w, rel=1e-9)  # parabolic: H/w kept


def test_elastic_span_solves_irvines_cable_equation_in_cubic_form():
    # 40 m span of 1.6 mm copper (EA 235 kN) and 60 m of 4 mm polyester rope (EA 16.5 kN),
    # w = 0.245 N/m, H = 60 N, wind 0.652 N/m across. Irvine §2.2: D′/(2H′²) − C·H′ = D/(2H²) − C·H,
    # i.e. C·H′³ + K·H′² − D′/2 = 0 with K = D/(2H²) − C·H (hand-derived cubic, numpy's roots)
    L, w, h, wx = 40.0, 0.245, 60.0, 0.652
    c = 40 / 235e3 + 60 / 16.5e3
    d0 = w * w * L**3 / 12
    d1 = (w * w + wx * wx) * L**3 / 12
    k = d0 / (2 * h * h) - c * h
    roots = np.roots([c, k, 0.0, -d1 / 2])
    want = max(r.real for r in roots if abs(r.imag) < 1e-9 and r.real > 0)
    got = tied_off_tension_n(
        span_m=L,
        tension_n=h,
        still=SpanLoad(w, 0.0),
        down=SpanLoad(w, 0.0),
        across=SpanLoad(wx, 0.0),
        compliance_m_per_n=c,
    )
    assert got == pytest.approx(want, rel=1e-6)
    assert h < got < h * math.hypot(w, wx) / w  # the stretch gives some of the length back


def test_point_load_shear_integral():
    # ∫Q² over a simply supported span with a mid-span load P alone: P²L/4 (statics, computed)
    assert SpanLoad(0.0, 10.0).shear_integral(20.0) == pytest.approx(100 * 20 / 4)
    # uniform load alone: w²L³/12, so D/(2H²) = w²L³/(24H²), the shallow cable's excess length
    assert SpanLoad(1.0, 0.0).shear_integral(30.0) == pytest.approx(30**3 / 12)


# --- guys -----------------------------------------------------------------------------------------


def test_guy_tension_by_statics_hand_worked():
    # 30 N at the head of a mast, guys anchored 0.7 × their height out (β = atan(1/0.7) = 55.0°).
    # Three guys at 120°: the worst direction, 30° off a guy and square to its neighbour, loads the
    # first with F/sin 120° = 34.64 N on the ground, 34.64/cos β = 60.41 N along it (hand-worked).
    three = guy_tensions_n(head_force_n=30.0, guys=3)
    assert three == pytest.approx((60.41,) * 3, abs=0.01)
    # four guys at 90°: a force along a guy loads it alone: 30/cos β = 52.31 N (hand-worked)
    assert guy_tensions_n(head_force_n=30.0, guys=4) == pytest.approx((52.31,) * 4, abs=0.01)
    assert len(guy_tensions_n(head_force_n=30.0, guys=2)) == 3  # fewer than 3 cannot hold a mast


# --- feedline -------------------------------------------------------------------------------------


def test_500_m_of_rg58_at_3_6_mhz_warns_and_names_a_better_class():
    coax = parse_coax({"class": "rg-58", "length_m": 500})
    words = feedline_words(coax, frequency_hz=3.6e6, swr=1.0)
    # issue 14: 500 m of RG-58 loses 11.3 dB at 3.6 MHz (class figures, REFERENCES.md, from memory)
    assert len(words) == 1 and "11.3 dB" in words[0]
    assert "lmr-400 class coax" in words[0] and "run of at most" in words[0]
    run = longest_run_m(coax, frequency_hz=3.6e6, swr=1.0, limit_db=3.0)
    short = parse_coax({"class": "rg-58", "length_m": run})
    assert total_loss_db(matched_loss_db=short.matched_loss_db(3.6e6), swr=1.0) == pytest.approx(
        3.0, abs=1e-3
    )
    assert (
        feedline_words(parse_coax({"class": "rg-58", "length_m": 25}), frequency_hz=3.6e6, swr=1.5)
        == []
    )


def test_mismatch_counts_toward_the_3_db():
    # 70 m RG-58 at 7 MHz: 2.26 dB matched (class fit); at SWR 3 the total is 3.11 dB
    # (Chipman 1968, computed)
    coax = parse_coax({"class": "rg-58", "length_m": 70})
    ml = coax.matched_loss_db(7e6)
    assert ml < 3.0 < total_loss_db(matched_loss_db=ml, swr=3.0)
    assert feedline_words(coax, frequency_hz=7e6, swr=1.0) == []
    assert feedline_words(coax, frequency_hz=7e6, swr=3.0)
