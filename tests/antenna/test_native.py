"""The compiled kernels (fieldkit/antenna/native) against numpy's complex arithmetic.

Reference: numpy's complex128 sqrt, exp and sin (C99 Annex G principal branches, as glibc
implements them) in ``sommerfeld._image_kernels_numpy`` (through ``_image_sums_numpy`` and
``_field_sums_numpy``) and ``kernel._smooth_sums_numpy``, the
code the engine ran before the kernels were compiled and still runs without a compiler. The whole engine is checked against NEC-2 with the
compiled kernel in tests/antenna/test_nec_lossy.py.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys

import numpy as np
import pytest

from fieldkit.antenna import kernel, native, parse_ground, solve
from fieldkit.antenna import sommerfeld as sf
from fieldkit.antenna.grounds import GROUND_PRESETS
from fieldkit.antenna.mesh import build_mesh
from fieldkit.antenna.native import build as native_build
from tests.antenna.cases import dipole

# relative to the largest kernel value of each image: libmvec's exp, sin and cos are within 4 ulp
# (glibc manual, "Errors in Math Functions"), the rest is a few roundings more
AGREEMENT = 1e-13


def _compiled_or_skip():
    if not native.compiled():
        pytest.skip(native.status())


def test_the_compiled_kernel_is_in_use():
    # `make test` runs with FIELDKIT_NO_SKIPS=1: on the team's machines (gcc present) the package
    # build must have compiled the kernel, or this fails with the reason
    _compiled_or_skip()
    assert native.status().startswith("compiled")


def _points(rng, n):
    rho2 = rng.uniform(0.0, 60.0, n) ** 2
    rho2[:8] = 0.0  # directly above: the images' own axis
    zeta = rng.uniform(0.3, 40.0, n)
    return rho2, zeta


def _kernels_of_each_image(k, rho2, zeta, beta):
    """Per image, the twelve compiled sums with that image's weight 1 and the others' 0: the
    kernel quantities kg, kg, G1, G1, G2, G2z, G2z, G2z², G1, G1, G2, G1z of that image alone."""
    out = []
    for i in range(len(beta)):
        unit = np.zeros((native.FIELD_ROWS, len(beta)), dtype=complex)
        unit[:, i] = 1.0
        out.append(native.image_sums(k, rho2, zeta, beta, unit))
    return np.stack(out, axis=1)  # (12, I, n)


def _numpy_kernels(k, rho2, zeta, beta):
    z, kg, g1, g2 = sf._image_kernels_numpy(k, rho2, zeta, beta)
    g2z = g2 * z
    return np.stack([kg, kg, g1, g1, g2, g2z, g2z, g2z * z, g1, g1, g2, g1 * z])


@pytest.mark.parametrize("ground", sorted(GROUND_PRESETS))
@pytest.mark.parametrize("f_mhz", [1.9, 5.36, 14.2])
def test_kernels_agree_with_numpy(ground, f_mhz):
    _compiled_or_skip()
    im = sf._images_for(parse_ground(ground), f_mhz * 1e6)
    beta = sf._all_images(im)[0]
    rho2, zeta = _points(np.random.default_rng(7), 300)
    want = _numpy_kernels(im.k0, rho2, zeta, beta)
    got = _kernels_of_each_image(im.k0, rho2, zeta, beta)
    scale = np.max(np.abs(want), axis=2, keepdims=True)  # per row and image
    assert np.max(np.abs(got - want) / scale) < AGREEMENT


@pytest.mark.parametrize("ground", ["sea-water", "average", "very-dry"])
def test_image_sums_agree_with_numpy(ground):
    # 300 points: more than two of the kernel's blocks of 128, the last one partial
    _compiled_or_skip()
    im = sf._images_for(parse_ground(ground), 3.6e6)
    images = sf._all_images(im)
    rho2, zeta = _points(np.random.default_rng(11), 300)
    for fast, slow, rows in (
        (sf._image_sums, sf._image_sums_numpy, 8),
        (sf._field_sums, sf._field_sums_numpy, 12),
    ):
        want = slow(im.k0, rho2, zeta, *images)
        got = fast(im.k0, rho2, zeta, *images)
        assert got.shape == want.shape == (rows, 300)
        scale = np.max(np.abs(want), axis=1, keepdims=True)
        assert np.max(np.abs(got - want) / scale) < AGREEMENT, fast.__name__


def test_both_branches_of_the_square_root():
    # R² = ρ² + (ζ + β)² with Re R² < 0 takes the other arm of the real-arithmetic root;
    # numpy's csqrt gives the principal root on both sides and on the cut's edges (Im R² = ±0)
    _compiled_or_skip()
    beta = np.array([3j, -3j, 2 + 5j, 2 - 5j, 0.0, 1e-3 + 8j])
    rho2 = np.array([0.0, 1.0, 4.0, 30.0, 100.0])
    zeta = np.array([0.5, 1.0, 2.0, 0.2, 6.0])
    k = 2 * np.pi / 80.0
    r2 = (zeta[None, :] + beta[:, None]) ** 2 + rho2[None, :]
    assert (r2.real < 0).any() and (r2.real > 0).any()  # both arms are exercised
    want = _numpy_kernels(k, rho2, zeta, beta)
    got = _kernels_of_each_image(k, rho2, zeta, beta)
    np.testing.assert_allclose(got, want, rtol=AGREEMENT, atol=0)


def test_malformed_arguments_are_refused():
    _compiled_or_skip()
    with pytest.raises(ValueError, match="8 or 12"):
        native.image_sums(1.0, np.ones(3), np.ones(3), np.ones(2), np.ones((5, 2)))
    with pytest.raises(ValueError, match="1-D of one length"):
        native.image_sums(1.0, np.ones(3), np.ones(4), np.ones(2), np.ones((8, 2)))


@pytest.mark.parametrize("f_mhz", [1.9, 7.1, 29.0])
def test_smooth_potentials_agree_with_numpy(f_mhz):
    # the free-space fill's distances of an inverted-V, near (reduced kernel, R ≥ a) and far
    _compiled_or_skip()
    case = dipole("inverted-v", f_mhz, 0.15)
    mesh = build_mesh(case.antenna, max_frequency_hz=f_mhz * 1e6)
    obs, _, _ = kernel.test_points(mesh)
    _, _, r = kernel._source_geometry(obs, mesh.start, mesh.tangent, mesh.length, mesh.radius)
    u, w = kernel.gauss01(kernel.N_SOURCE)
    wl = w[None, :] * mesh.length[:, None]
    k = 2 * np.pi * f_mhz / 299.792458
    want = kernel._smooth_sums_numpy(k, r, wl, u)
    got = native.smooth_potentials(k, r, wl, u)
    for w_, g in zip(want, got, strict=True):
        assert np.max(np.abs(g - w_)) < AGREEMENT * np.max(np.abs(w_))


def _numpy_only(monkeypatch):
    for name in ("image_sums", "smooth_potentials"):
        monkeypatch.setattr(native, name, lambda *a, **k: None)


def test_a_lossy_solve_is_the_same_with_either_kernel(monkeypatch):
    _compiled_or_skip()
    case = dipole("flat", 3.6, 0.12)
    kw = dict(frequencies_hz=[3.5e6, 3.6e6], ground=parse_ground("average"))
    # near-field points as the keep-out search takes them: beside and under the wire, 0.5–2 m up
    pts = np.array([[x, y, z] for x in (0.0, 8.0, 30.0) for y in (0.0, 4.0) for z in (0.5, 2.0)])
    fast = solve(case.antenna, **kw)
    fast_near = fast[1].near_field(pts)
    _numpy_only(monkeypatch)
    slow = solve(case.antenna, **kw)
    slow_near = slow[1].near_field(pts)
    for a, b in zip(fast, slow, strict=True):
        assert abs(a.impedance_ohm - b.impedance_ohm) < 1e-9 * abs(b.impedance_ohm)
        assert a.zenith_gain_dbi == pytest.approx(b.zenith_gain_dbi, abs=1e-9)
    for a, b in zip(fast_near, slow_near, strict=True):  # E [V/m] and H [A/m]
        assert np.max(np.abs(a - b)) < 1e-9 * np.max(np.abs(b))


@pytest.mark.skipif(shutil.which("cc") is None and shutil.which("gcc") is None, reason="no cc")
def test_a_library_built_from_other_source_is_refused(tmp_path):
    src = tmp_path / "kernels.c"
    src.write_text(native.SOURCE.read_text())
    lib = native_build.build(tmp_path / "k.so", source=src)
    kernels, why = native.load_library(lib, src)
    assert kernels is not None and why.startswith("compiled")
    src.write_text(native.SOURCE.read_text() + "\n/* edited */\n")
    kernels, why = native.load_library(lib, src)
    assert kernels is None and "built from another kernels.c" in why
    kernels, why = native.load_library(tmp_path / "missing.so", src)
    assert kernels is None and "no compiled library" in why


def test_the_switch_selects_numpy():
    env = dict(os.environ, FIELDKIT_NUMPY_KERNELS="1")
    code = "from fieldkit.antenna import native; print(native.status())"
    out = subprocess.run(
        [sys.executable, "-c", code], env=env, capture_output=True, text=True, check=True
    )
    assert out.stdout.startswith("numpy kernels (FIELDKIT_NUMPY_KERNELS=1)")


def test_the_plan_says_which_kernels_ran(monkeypatch):
    from fieldkit.planning import result

    engine = type("Counter", (), {"calls": 1, "frequencies": 1, "reused": 0})()
    assert result.engine_json(engine, {}, 0.1)["kernels"] == (
        "compiled" if native.compiled() else "numpy"
    )
    monkeypatch.setattr(native, "compiled", lambda: False)
    assert result.engine_json(engine, {}, 0.1)["kernels"] == "numpy"


def test_empty_source_sums_are_zero():
    _compiled_or_skip()
    s0, s1 = native.smooth_potentials(1.0, np.ones((3, 2, 0)), np.ones((2, 0)), np.ones(0))
    assert s0.shape == s1.shape == (3, 2) and not s0.any() and not s1.any()
    want = kernel._smooth_sums_numpy(1.0, np.ones((3, 2, 0)), np.ones((2, 0)), np.ones(0))
    np.testing.assert_array_equal(s0, want[0])
