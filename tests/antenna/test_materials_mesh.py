"""Conductor loss, jacket loading, segmentation convergence and junctions."""

from __future__ import annotations

import math

import numpy as np
import pytest

from fieldkit.antenna import Antenna, Feed, Ground, Insulation, Wire, mesh, solve
from fieldkit.antenna.materials import (
    CONDUCTIVITY_S_M,
    MU0,
    conductor_impedance_per_m,
    insulation_impedance_per_m,
    skin_depth_m,
)
from tests.reference.nec import Piece, nec_solve


@pytest.mark.parametrize(("f_hz", "delta_um"), [(3.5e6, 35.3), (7e6, 25.0)])
def test_copper_skin_depth(f_hz, delta_um):
    # REFERENCES.md: δ = √(ρ/(π f μ)), copper 35.3 µm at 3.5 MHz, 25.0 µm at 7 MHz
    d = skin_depth_m(frequency_hz=f_hz, conductivity_s_m=CONDUCTIVITY_S_M["copper"])
    assert d * 1e6 == pytest.approx(delta_um, rel=0.005)


def test_skin_effect_resistance_and_dc_limit():
    # Ramo, Whinnery & Van Duzer §5.12: R' ≈ ρ/(2π a δ) for δ ≪ a (here δ/a = 0.035, so the exact
    # Bessel form lies ~δ/2a above it), and R' → 1/(σ π a²) at DC
    a, f = 1e-3, 3.5e6
    rho = 1 / CONDUCTIVITY_S_M["copper"]
    z = conductor_impedance_per_m(conductor="copper", frequency_hz=f, radius_m=a)
    delta = skin_depth_m(frequency_hz=f, conductivity_s_m=1 / rho)
    assert z.real == pytest.approx(rho / (2 * math.pi * a * delta), rel=0.03)
    assert z.imag == pytest.approx(z.real, rel=0.05)  # internal reactance ≈ resistance, δ ≪ a
    z_dc = conductor_impedance_per_m(conductor="copper", frequency_hz=100.0, radius_m=a)
    assert z_dc.real == pytest.approx(rho / (math.pi * a * a), rel=0.01)
    steel = conductor_impedance_per_m(conductor="steel", frequency_hz=f, radius_m=a)
    assert steel.real > 10 * z.real  # steel is far lossier (low σ, high μr)


def test_jacket_inductance_formula():
    # Richmond & Newman 1976 (REFERENCES.md): L' = (μ0/2π)(1 − 1/εr) ln(b/a)
    a, t, eps, f = 0.8e-3, 0.7e-3, 3.5, 3.6e6
    z = insulation_impedance_per_m(insulation=Insulation(t, eps), frequency_hz=f, radius_m=a)
    expected = MU0 / (2 * math.pi) * (1 - 1 / eps) * math.log((a + t) / a)
    assert z.imag == pytest.approx(2 * math.pi * f * expected, rel=1e-12)


def _resonance_mhz(wire: Wire, lo=3.2, hi=3.9) -> float:
    half = float(np.linalg.norm(wire.points_m[1] - wire.points_m[0])) / 2
    ant = Antenna((wire,), Feed(0, half))
    freqs = np.linspace(lo, hi, 8) * 1e6
    x = np.array(
        [
            s.impedance_ohm.imag
            for s in solve(ant, frequencies_hz=freqs, ground=Ground("free-space"))
        ]
    )
    i = int(np.nonzero(np.diff(np.sign(x)))[0][0])
    return float(np.interp(0.0, x[i : i + 2], freqs[i : i + 2]) / 1e6)


def test_pvc_jacket_lowers_resonance_by_a_few_percent():
    # common practice: insulated wire resonates 2–5 % lower than bare wire of the same length
    pts = np.array([[-20.0, 0, 10], [20.0, 0, 10]])
    bare = _resonance_mhz(Wire(pts, 0.8e-3, "perfect"))
    jacket = _resonance_mhz(Wire(pts, 0.8e-3, "perfect", Insulation(0.7e-3, 3.5)))
    assert 0.01 < (bare - jacket) / bare < 0.06


def test_segmentation_converged_to_half_a_percent(monkeypatch):
    # issue 3: automatic segmentation fine enough for ~0.5 % resonance accuracy
    pts = np.array([[-20.0, 0, 10], [20.0, 0, 10]])
    default = _resonance_mhz(Wire(pts, 1e-3, "perfect"))
    monkeypatch.setattr(mesh, "SEGMENTS_PER_WAVELENGTH", 4 * mesh.SEGMENTS_PER_WAVELENGTH)
    fine = _resonance_mhz(Wire(pts, 1e-3, "perfect"))
    assert abs(default - fine) / fine < 0.005


def test_split_wire_equals_single_wire():
    # a wire given as two wires meeting end to end is the same conductor
    one = Antenna((Wire(np.array([[-20.0, 0, 8], [20.0, 0, 8]]), 1e-3, "perfect"),), Feed(0, 20.0))
    two = Antenna(
        (
            Wire(np.array([[-20.0, 0, 8], [5.0, 0, 8]]), 1e-3, "perfect"),
            Wire(np.array([[5.0, 0, 8], [20.0, 0, 8]]), 1e-3, "perfect"),
        ),
        Feed(0, 20.0),
    )
    z1 = solve(one, frequencies_hz=3.6e6, ground=Ground("perfect"))[0].impedance_ohm
    z2 = solve(two, frequencies_hz=3.6e6, ground=Ground("perfect"))[0].impedance_ohm
    assert abs(z1 - z2) < 0.5


def test_three_wire_junction_matches_nec():
    # NEC-2 joins wires whose ends coincide; a dipole with an extension and a drop wire at one end
    pieces = [
        Piece((-20, 0, 10), (20, 0, 10), 41),
        Piece((20, 0, 10), (30, 0, 10), 10),
        Piece((20, 0, 10), (20, 0, 5), 5),
    ]
    ref = nec_solve(pieces, feed=(0, 20), frequency_mhz=3.6, radius_m=1e-3, ground=("perfect",))
    ant = Antenna(
        tuple(Wire(np.array([p.start, p.end], dtype=float), 1e-3, "perfect") for p in pieces),
        Feed(0, 20.0),
    )
    z = solve(ant, frequencies_hz=3.6e6, ground=Ground("perfect"))[0].impedance_ohm
    assert abs(z - ref.impedance_ohm) <= max(3.0, 0.05 * abs(ref.impedance_ohm))


def test_wire_folded_back_over_another_is_refused():
    from fieldkit.errors import InputError

    ant = Antenna(
        (
            Wire(np.array([[-20.0, 0, 8], [20.0, 0, 8]]), 1e-3),
            Wire(np.array([[20.0, 0, 8], [10.0, 0, 8]]), 1e-3),
        ),
        Feed(0, 20.0),
    )
    with pytest.raises(InputError, match="overlaps") as err:
        solve(ant, frequencies_hz=3.6e6, ground=Ground("perfect"))
    assert err.value.field == "wires[1].points_m[0]"


def test_blas_single_threaded_switch_restores_the_count():
    from fieldkit.antenna import blas

    api = blas._openblas()
    if api is None:
        pytest.skip("numpy here does not bundle OpenBLAS")
    getter, setter = api
    before = getter()
    with blas.single_threaded():
        assert getter() == 1
    assert getter() == before
