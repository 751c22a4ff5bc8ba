"""Analyser files: Touchstone written by scikit-rf, CSV with named columns, and the refusals."""

import math

import numpy as np
import pytest

from fieldkit.errors import InputError
from fieldkit.rigging.analyser import MAX_POINTS, MAX_TEXT_BYTES, read_sweep
from fieldkit.rigging.feedline import parse_coax
from fieldkit.rigging.measured import sweep_findings

F0 = 3.65e6
R_S, L_S = 40.0, 20e-6  # a series RLC standing in for the dipole near resonance
C_S = 1 / ((2 * math.pi * F0) ** 2 * L_S)  # resonance f0 = 1/(2π√(LC)) (circuit theory)
COAX = parse_coax({"class": "rg-58", "length_m": 12.5})


def _rlc(f):
    w = 2 * math.pi * np.asarray(f)
    return R_S + 1j * (w * L_S - 1 / (w * C_S))


def _touchstone_text(tmp_path, f, z, **kw) -> str:
    import skrf

    freq = skrf.Frequency.from_f(f, unit="hz")
    net = skrf.Network(frequency=freq, z=z.reshape(-1, 1, 1), z0=50, name="sweep")
    net.write_touchstone(str(tmp_path / "sweep"), **kw)
    return (tmp_path / "sweep.s1p").read_text()


@pytest.mark.parametrize("form", ["ri", "ma", "db"])
def test_touchstone_written_by_scikit_rf(tmp_path, form):
    f = np.linspace(3.5e6, 3.8e6, 61)
    z = _rlc(f)
    sweep = read_sweep(_touchstone_text(tmp_path, f, z, form=form), format="touchstone")
    np.testing.assert_allclose(sweep.frequencies_hz, f, rtol=1e-9)
    np.testing.assert_allclose(sweep.z_ohm, z, rtol=1e-6, atol=1e-6)
    found = sweep_findings(sweep, at="feedpoint", coax=COAX, target_hz=F0)
    # series RLC: X = 0 at f0, R there = R_S, SWR there = 50/40 = 1.25 (circuit theory)
    assert found.resonance_hz == pytest.approx(F0, abs=50)
    assert found.r_at_resonance_ohm == pytest.approx(R_S, abs=0.01)
    assert found.lowest_swr == pytest.approx(1.25, abs=0.01)


def test_radio_end_sweep_is_moved_back(tmp_path):
    from fieldkit.rigging.line import radio_impedance

    f = np.linspace(3.5e6, 3.8e6, 31)
    z_radio = radio_impedance(_rlc(f), frequencies_hz=f, coax=COAX)
    sweep = read_sweep(_touchstone_text(tmp_path, f, z_radio), format="touchstone")
    at_radio = sweep_findings(sweep, at="feedpoint", coax=COAX, target_hz=F0)
    moved = sweep_findings(sweep, at="radio", coax=COAX, target_hz=F0)
    assert moved.resonance_hz == pytest.approx(F0, abs=200)
    assert moved.r_at_resonance_ohm == pytest.approx(R_S, abs=0.5)
    # unmoved, the radio end's X crossing and R are the line's, not the antenna's
    assert abs(at_radio.resonance_hz - F0) > 5e3 and at_radio.r_at_resonance_ohm > 55
    # the lowest SWR stays where it was (a 50 Ω line; issue 14)
    assert at_radio.lowest_swr_hz == pytest.approx(moved.lowest_swr_hz, abs=2e3)


def test_csv_with_r_and_x_and_with_swr():
    f = np.linspace(3.5, 3.8, 31)
    z = _rlc(f * 1e6)
    text = "# analyser export\nFrequency_MHz, R_ohm, X_ohm\n" + "\n".join(
        f"{a:.4f},{b.real:.3f},{b.imag:.3f}" for a, b in zip(f, z, strict=True)
    )
    sweep = read_sweep(text, format="csv")
    found = sweep_findings(sweep, at="feedpoint", coax=COAX, target_hz=F0)
    assert found.resonance_hz == pytest.approx(F0, abs=200)
    g = np.abs((z - 50) / (z + 50))
    swr = (1 + g) / (1 - g)
    text = "frequency_khz;swr\n" + "\n".join(
        f"{a * 1000:.1f};{s:.4f}" for a, s in zip(f, swr, strict=True)
    )
    sweep = read_sweep(text, format="csv")
    assert sweep.z_ohm is None
    # the header as a person writes it reads the same
    same = read_sweep(text.replace("frequency_khz;swr", "Frequency (kHz); SWR"), format="csv")
    np.testing.assert_array_equal(same.swr, sweep.swr)
    found = sweep_findings(sweep, at="feedpoint", coax=COAX, target_hz=F0)
    # the lowest SWR of a series RLC on 50 Ω lies at f0 (|Γ| smallest where X = 0)
    assert found.lowest_swr_hz == pytest.approx(F0, rel=2e-3)


HEAD = "frequency_mhz,r_ohm,x_ohm\n"
ROWS = "3.60,40,-20\n3.65,41,0\n3.70,42,20\n"


@pytest.mark.parametrize(
    "text, words",
    [
        ("", "empty file"),
        ("freq,r,x\n" + ROWS, "line 1, column 1: unknown column 'freq'"),
        ("frequency_mhz,r_ohm\n3.6,40\n3.7,41\n3.8,42\n", "with r_ohm and x_ohm, or swr"),
        (HEAD + "3.60,40,-20\n3.65,abc,0\n3.70,42,20\n", "line 3, column 2 (r_ohm): expected R"),
        (HEAD + "3.60,40,-20\n3.55,41,0\n3.70,42,20\n", "line 3: the frequency does not rise"),
        (HEAD + "3.60,40\n", "line 2: 2 columns; the header has 3"),
        (HEAD + "3.60,40,-20\n3.65,41,0\n", "2 points; expected 3"),
        (HEAD + "3.60,-4,-20\n3.65,41,0\n3.70,42,20\n", "line 2, column 2 (r_ohm)"),
        (
            "frequency_mhz,swr\n3.6,0.5\n3.65,1.1\n3.7,2\n",
            "line 2, column 2 (swr): expected an SWR",
        ),
        ("frequency_hz,swr\n3.6,2\n3.65,1.1\n3.7,2\n", "is the frequency column in the unit"),
        (HEAD + "3.60,nan,-20\n3.65,41,0\n3.70,42,20\n", "line 2, column 2"),
    ],
)
def test_csv_refusals_name_line_and_column(text, words):
    with pytest.raises(InputError) as e:
        read_sweep(text, format="csv")
    assert e.value.field == "retrim.sweep.text"
    assert words in e.value.detail, e.value.detail


def test_size_limits():
    rows = "".join(f"{3 + i * 1e-4:.4f},40,0\n" for i in range(MAX_POINTS + 1))
    with pytest.raises(InputError) as e:
        read_sweep(HEAD + rows, format="csv")
    assert f"more than {MAX_POINTS} points" in e.value.detail
    with pytest.raises(InputError) as e:
        read_sweep("#" * (MAX_TEXT_BYTES + 1), format="csv")
    assert e.value.status == 413


def test_bad_touchstone_is_refused():
    with pytest.raises(InputError) as e:
        read_sweep("# MHz S RI R 50\n3.6 0.1\n", format="touchstone")
    assert e.value.field == "retrim.sweep.text" and "Touchstone" in e.value.detail


def test_touchstone_open_short_and_active_points_are_refused(tmp_path):
    f = np.linspace(3.5e6, 3.8e6, 5)
    # S11 = 1 is an open (Z = ∞); |S11| > 1 is R < 0 (Pozar, Microwave Engineering, §4.3)
    for s11, words in ((1.0, "open or short"), (1.5, "R < 0")):
        s = np.full(5, 0.2 + 0j)
        s[2] = s11
        text = "# MHz S RI R 50\n" + "".join(
            f"{a / 1e6:.4f} {b.real:.4f} {b.imag:.4f}\n" for a, b in zip(f, s, strict=True)
        )
        with pytest.raises(InputError) as e:
            read_sweep(text, format="touchstone")
        assert words in e.value.detail, e.value.detail
