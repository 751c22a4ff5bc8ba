"""Lossy ground: the exact half-space field of wire currents by the discrete complex image method.

The field reflected by a homogeneous lossy half-space (εc = εr − jσ/ωε0) from a current element is
Sommerfeld's: with Hertz potential Π (E = k0²Π + ∇∇·Π, H = jωε0 ∇×Π) the reflected part is

    Π_h = p_h S[R_H],  Π_z = p_z S[R_V] + (p_h·∇) S[C u0],   S[F] = ∫0^∞ F(λ) J0(λρ) e^{−u0 ζ} λ/u0 dλ,

    u0 = √(λ² − k0²), u2 = √(λ² − k2²), R_H = (u0 − u2)/(u0 + u2), R_V = (εc u0 − u2)/(εc u0 + u2),
    C = 2(εc − 1)/((u0 + u2)(εc u0 + u2)),   ζ = z + z'  (Sommerfeld 1949, §31–33; Baños 1966).

The E field needs ∂z S[C u0] = −S[C u0²]. The spectral functions R_H, R_V − R∞, C u0² − R∞ and
C u0 (R∞ = (εc − 1)/(εc + 1), the quasi-static image, is kept exactly) are fitted by a sum of
exponentials e^{−u0 β_i} with the generalised pencil-of-function method on the two-level path of
Aksun; every exponential is then a closed-form complex image by the Sommerfeld identity
S[e^{−u0 β}] = e^{−jk0 R_β}/R_β, R_β = √(ρ² + (ζ + β)²). The images depend only on frequency and
ground and are cached, so a rope-height sweep fits them once. The fields of the images are exact
derivatives of e^{−jkR}/R, so no interpolation table is needed.

References
----------
.. [1] A. Sommerfeld, *Partial Differential Equations in Physics*, Academic Press 1949, §31–33.
.. [2] A. Baños, *Dipole Radiation in the Presence of a Conducting Half-Space*, Pergamon 1966.
.. [3] D. G. Fang, J. J. Yang, G. Y. Delisle, "Discrete image theory for horizontal electric dipoles
   in a multilayered medium", IEE Proc. H 135(5), 1988, pp. 297-303, doi:10.1049/ip-h-2.1988.0061.
.. [4] M. I. Aksun, "A robust approach for the derivation of closed-form Green's functions", IEEE
   Trans. MTT 44(5), 1996, pp. 651-658, doi:10.1109/22.493917 (two-level DCIM with GPOF).
.. [5] Y. Hua, T. K. Sarkar, "Generalized pencil-of-function method for extracting poles of an EM
   system from its transient response", IEEE Trans. AP 37(2), 1989, doi:10.1109/8.18715.
.. [6] G. J. Burke, E. K. Miller, "Modeling antennas near to and penetrating a lossy interface",
   IEEE Trans. AP 32(10), 1984, doi:10.1109/TAP.1984.1143200 (the NEC-2 treatment this replaces).
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import dataclass
from functools import lru_cache
from typing import Protocol

import numpy as np

from fieldkit.constants import EPS0, SPEED_OF_LIGHT_M_S

from . import native
from .grounds import Ground
from .kernel import basis_weights, gauss01
from .mesh import Mesh

# Two-level path (Aksun 1996): level 1 on u0 = k0 (T2 + t), 0 ≤ t ≤ T1; level 2 on
# u0 = k0 (t + j (1 − t/T2)), 0 ≤ t ≤ T2. Values chosen by the fit-error study in docs/engine.md.
T1 = 400.0
T2 = 20.0
N_SAMPLES_1 = 120
N_SAMPLES_2 = 400
GPOF_TOLERANCE = 1e-9  # relative singular-value cut-off
N_REFLECTED = 2  # Gauss points per segment for the reflected field in the matrix


@dataclass(frozen=True)
class ComplexImages:
    """Shared image depths β (complex, metres) and residues per spectral function."""

    k0: float
    r_inf: complex
    beta: np.ndarray  # (n,)
    a_h: np.ndarray  # R_H
    a_v: np.ndarray  # R_V − R∞
    a_d: np.ndarray  # C u0² − R∞
    a_c: np.ndarray  # C u0


def spectral_functions(u0: np.ndarray, eps: complex, k0: float) -> np.ndarray:
    """R_H, R_V − R∞, C u0² − R∞, C u0 at u0 (shape (4, n)) [-, -, -, 1/m·m]."""
    u2 = np.sqrt(u0 * u0 - (eps - 1) * k0 * k0)
    r_inf = (eps - 1) / (eps + 1)
    r_h = (u0 - u2) / (u0 + u2)
    r_v = (eps * u0 - u2) / (eps * u0 + u2)
    c = 2 * (eps - 1) / ((u0 + u2) * (eps * u0 + u2))
    return np.stack([r_h, r_v - r_inf, c * u0 * u0 - r_inf, c * u0])


def _gpof(samples: np.ndarray, dt: float) -> tuple[np.ndarray, np.ndarray]:
    """Common exponents s and residues (n_fun, n_exp) so that y_f(t) ≈ Σ a_f e^{s t} (Hua & Sarkar)."""
    n = samples.shape[1]
    pencil = n // 2
    rows = n - pencil
    idx = np.arange(rows)[:, None] + np.arange(pencil + 1)[None, :]
    scale = np.abs(samples).max(axis=1, keepdims=True)
    scale[scale == 0] = 1.0
    y = np.vstack([(samples / scale)[f][idx] for f in range(samples.shape[0])])
    # y = Q R (Householder, R only): R has y's singular values and right singular vectors, and its
    # SVD skips forming the tall left factor (~40 % less time for the level-2 fit)
    if y.shape[0] > y.shape[1]:
        y = np.linalg.qr(y, mode="r")
    _, sv, vh = np.linalg.svd(y)
    m = int(np.sum(sv > GPOF_TOLERANCE * sv[0]))
    m = max(1, min(m, 40))
    v = vh[:m].conj().T  # (L+1, m)
    z = np.linalg.eigvals(np.linalg.pinv(v[:-1]) @ v[1:])
    s = np.log(z) / dt
    basis = np.exp(np.outer(np.arange(n) * dt, s))  # (n, m)
    res, *_ = np.linalg.lstsq(basis, samples.T, rcond=None)
    return s, res.T  # (m,), (n_fun, m)


class ImageStore(Protocol):
    """Where fitted images may be kept across processes (e.g. :class:`fieldkit.disk_cache.ArrayDir`)."""

    def load(self, key: str) -> np.ndarray | None: ...

    def save(self, key: str, array: np.ndarray) -> None: ...


# what a stored fit depends on besides (f, εr, σ): the fit settings and the LAPACK behind numpy
IMAGE_FIT_ID = (
    f"dcim-{T1:g}-{T2:g}-{N_SAMPLES_1}-{N_SAMPLES_2}-{GPOF_TOLERANCE:g}-numpy{np.__version__}"
)
MAX_IMAGES = 2 * 40  # at most 40 exponentials per level (see _gpof)
_store: ImageStore | None = None


def keep_images_in(store: ImageStore | None) -> None:
    """Keep fitted images across processes in ``store`` (the CLI sets one in the cache directory).

    The engine itself does no file I/O: without a store (the default, and in the tests that call
    the engine directly) every process fits its images again. A stored fit is the fit's own
    arrays, so the results are the same to the bit.
    """
    global _store
    _store = store


@lru_cache(maxsize=64)
def complex_images(
    frequency_hz: float, relative_permittivity: float, conductivity_s_m: float
) -> ComplexImages:
    """Fit the complex images of a ground at one frequency (cached on (f, εr, σ)).

    About 20 ms of LAPACK (the QR and SVD of the level-2 pencil); kept in memory per process and,
    when :func:`keep_images_in` has set a store, across processes.
    """
    k0 = 2 * math.pi * frequency_hz / SPEED_OF_LIGHT_M_S
    eps = complex(relative_permittivity, -conductivity_s_m / (2 * math.pi * frequency_hz * EPS0))
    key = f"{frequency_hz!r}_{relative_permittivity!r}_{conductivity_s_m!r}"
    stored = _store.load(key) if _store is not None else None
    if _usable(stored):
        beta, a_h, a_v, a_d, a_c = (np.array(row) for row in stored)
    else:
        beta, a_h, a_v, a_d, a_c = _fit(k0, eps)
        if _store is not None:
            _store.save(key, np.stack([beta, a_h, a_v, a_d, a_c]))
    return ComplexImages(
        k0=k0, r_inf=(eps - 1) / (eps + 1), beta=beta, a_h=a_h, a_v=a_v, a_d=a_d, a_c=a_c
    )


def _usable(stored: np.ndarray | None) -> bool:
    return (
        stored is not None
        and stored.dtype == np.complex128
        and stored.ndim == 2
        and stored.shape[0] == 5
        and 1 <= stored.shape[1] <= MAX_IMAGES
        and bool(np.isfinite(stored).all())
    )


def _fit(k0: float, eps: complex):
    """β and the residues (a_h, a_v, a_d, a_c) of the two-level fit (Aksun 1996)."""
    # level 1: the large-λ (near-zone) behaviour
    t1 = np.linspace(0.0, T1, N_SAMPLES_1)
    u1 = k0 * (T2 + t1)
    f1 = spectral_functions(u1, eps, k0)
    s1, r1 = _gpof(f1, t1[1] - t1[0])
    beta1 = -s1 / k0
    amp1 = r1 * np.exp(k0 * T2 * beta1)[None, :]
    # level 2: the rest, on a path that passes above the branch point and the pole near λ = k0
    t2 = np.linspace(0.0, T2, N_SAMPLES_2)
    u2 = k0 * (t2 + 1j * (1 - t2 / T2))
    f2 = spectral_functions(u2, eps, k0) - amp1 @ np.exp(-np.outer(beta1, u2))
    s2, r2 = _gpof(f2, t2[1] - t2[0])
    beta2 = -s2 / (k0 * (1 - 1j / T2))
    amp2 = r2 * np.exp(-1j * s2 / (1 - 1j / T2))[None, :]
    beta = np.concatenate([beta1, beta2])
    amp = np.concatenate([amp1, amp2], axis=1)
    return beta, amp[0], amp[1], amp[2], amp[3]


def _images_for(ground: Ground, frequency_hz: float) -> ComplexImages:
    return complex_images(
        float(frequency_hz), float(ground.relative_permittivity), float(ground.conductivity_s_m)
    )


def _all_images(im: ComplexImages):
    """Image list with the exact R∞ image (β = 0) appended: β, a_h, a_v, a_d, a_c."""
    zero = np.zeros(1)
    return (
        np.concatenate([im.beta, zero]),
        np.concatenate([im.a_h, [0]]),
        np.concatenate([im.a_v, [im.r_inf]]),
        np.concatenate([im.a_d, [im.r_inf]]),
        np.concatenate([im.a_c, [0]]),
    )


def reflected_coupling(obs, t_obs, src, t_src, im: ComplexImages) -> np.ndarray:
    """t_obs · Ê(obs; src, t_src) for all pairs (n_obs, n_src), Ê = 4π jωε0 E per unit moment.

    The reflected field of a unit current element at ``src`` along ``t_src``, dotted with ``t_obs``.
    Image sums are formed as matrix products over the image axis (the hot path of a lossy solve).
    """
    shape = (len(obs), len(src))
    io, js = (a.ravel() for a in np.indices(shape))
    return coupling_pairs(obs[io], t_obs[io], src[js], t_src[js], im).reshape(shape)


def _image_sums(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) -> np.ndarray:
    """The eight image sums (8, n) of the reflected coupling at (ρ², ζ) points.

    Rows: Σa_h·kg, Σa_v·kg, Σa_d·G1, Σa_c·G1, Σ(a_h − a_d)·G2, Σ(a_h − a_d)·G2·z, Σa_v·G2·z,
    Σa_v·G2·z². The compiled kernel (:mod:`fieldkit.antenna.native`) when it is built, else
    :func:`_image_sums_numpy`.
    """
    out = native.image_sums(k, rho2, zeta, beta, _row_weights(a_h, a_v, a_d, a_c))
    return _image_sums_numpy(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) if out is None else out


def _row_weights(a_h, a_v, a_d, a_c, *, field: bool = False) -> np.ndarray:
    """The residues per row of the image sums (8 or 12, I), in the compiled kernel's row order:
    the matrix's eight, then the near field's four more."""
    a_hd = a_h - a_d
    rows = [a_h, a_v, a_d, a_c, a_hd, a_hd, a_v, a_v] + ([a_h, a_v, a_c, a_h] if field else [])
    return np.stack(rows)


def _image_sums_numpy(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) -> np.ndarray:
    """:func:`_image_sums` in numpy: the reference the compiled kernel is tested against."""
    return _matrix_rows(*_image_kernels_numpy(k, rho2, zeta, beta), a_h, a_v, a_d, a_c)


def _matrix_rows(z, kg, g1, g2, a_h, a_v, a_d, a_c) -> np.ndarray:
    """The matrix's eight image sums (8, n) from the images' kernels (I, n), numpy."""
    g2z = g2 * z
    a_hd = a_h - a_d
    return np.concatenate(
        [
            np.stack([a_h, a_v]) @ kg,
            np.stack([a_d, a_c]) @ g1,
            (a_hd @ g2)[None],
            np.stack([a_hd, a_v]) @ g2z,
            (a_v @ (g2z * z))[None],
        ]
    )


def _pair_terms(obs, t_obs, src, t_src):
    """Geometry of paired observation/source rows (n, 3) for the image sums.

    Returns the eight factors that multiply the sums of :func:`_image_sums`, in its row order (row 3
    also carries k²), the distinct (ρ², ζ) pairs, and the index of every row's pair: the sums depend
    on (ρ², ζ) only, and a straight or symmetric wire repeats the same separations many times.
    """
    dx = obs[:, 0] - src[:, 0]
    dy = obs[:, 1] - src[:, 1]
    zeta = obs[:, 2] + src[:, 2]
    px, py, pz = t_src.T
    tx, ty, tz = t_obs.T
    tp_h = tx * px + ty * py
    ph_x = px * dx + py * dy
    t_xy = tx * dx + ty * dy
    key = np.round(dx * dx + dy * dy, 9) + 1j * np.round(zeta, 9)
    uniq, inverse = np.unique(key, return_inverse=True)
    factors = np.stack(
        [tp_h, pz * tz, -tp_h, ph_x * tz, t_xy * ph_x, tz * ph_x, t_xy * pz, tz * pz]
    )
    return factors, uniq, inverse.ravel()


def coupling_pairs(obs, t_obs, src, t_src, im: ComplexImages) -> np.ndarray:
    """As :func:`reflected_coupling`, for paired rows of obs/src (n, 3) → (n,)."""
    k = im.k0
    beta, a_h, a_v, a_d, a_c = _all_images(im)
    factors, uniq, inverse = _pair_terms(obs, t_obs, src, t_src)
    sums = _image_sums(k, uniq.real, uniq.imag, beta, a_h, a_v, a_d, a_c)[:, inverse]
    factors[3] *= k * k
    return np.einsum("rn,rn->n", factors, sums)


def _image_kernels_numpy(k, rho2, zeta, beta):
    """z = ζ + β and the kernels kg = k²G + G1, G1, G2 (I, n) of every image at (ρ², ζ) points.

    G = e^{−jkR}/R with R = √(ρ² + z²) and ∂i∂j G = G2 XiXj + G1 δij; computed with in-place
    products (the blocks are memory-bound). The numpy reference of the compiled image sums.
    """
    z = zeta[None, :] + beta[:, None]  # (I, n)
    r2 = z * z
    r2 += rho2[None, :]
    r = np.sqrt(r2)
    inv2 = np.reciprocal(r2, out=r2)  # 1/R², in place (fewer temporaries)
    jkr = r * (-1j * k)  # −jkR for the exponential, negated below
    g = np.exp(jkr)
    g /= r  # G = e^{−jkR}/R
    jkr *= -1
    g1 = jkr + 1
    g1 *= g
    g1 *= inv2
    g1 *= -1  # G1 = −(1 + jkR) G/R²
    g2 = jkr + 3
    g2 *= jkr
    g2 += 3
    g2 *= g
    g2 *= inv2
    g2 *= inv2  # G2 = (3 + 3jkR + (jkR)²) G/R⁴
    kg = g
    kg *= k * k
    kg += g1
    return z, kg, g1, g2


def _field_sums(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) -> np.ndarray:
    """The image sums (12, n) of the reflected E and H at paired (ρ², ζ) points.

    Rows: the matrix's eight (:func:`_image_sums`: Σa_h·kg, Σa_v·kg, Σa_d·G1, Σa_c·G1,
    Σ(a_h − a_d)·G2, Σ(a_h − a_d)·G2·z, Σa_v·G2·z, Σa_v·G2·z²), then Σa_h·G1, Σa_v·G1, Σa_c·G2,
    Σa_h·G1·z, with kg = k²G + G1 and z = ζ + β. The compiled kernel
    (:mod:`fieldkit.antenna.native`) when it is built, else :func:`_field_sums_numpy`.
    """
    weights = _row_weights(a_h, a_v, a_d, a_c, field=True)
    out = native.image_sums(k, rho2, zeta, beta, weights)
    return _field_sums_numpy(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) if out is None else out


def _field_sums_numpy(k, rho2, zeta, beta, a_h, a_v, a_d, a_c) -> np.ndarray:
    """:func:`_field_sums` in numpy: the reference the compiled kernel is tested against."""
    z, kg, g1, g2 = _image_kernels_numpy(k, rho2, zeta, beta)
    return np.concatenate(
        [
            _matrix_rows(z, kg, g1, g2, a_h, a_v, a_d, a_c),
            np.stack([a_h, a_v]) @ g1,
            (a_c @ g2)[None],
            (a_h @ (g1 * z))[None],
        ]
    )


FIELD_PAIRS_PER_BLOCK = 1024  # observation-source pairs per block of image sums (memory)


def reflected_fields(obs, src, moment, im: ComplexImages) -> tuple[np.ndarray, np.ndarray]:
    """Reflected Ê and Ĥ vectors at obs (n, 3) from current elements at src with complex moments (m, 3).

    Returns 4π jωε0·E and 4π·H summed over the sources (multiply by 1/(4πjωε0) and 1/(4π)).
    With x = (dx, dy, ζ + β) per image, horizontal moment p_h and vertical p_z (Sommerfeld's
    potentials, see the module docstring), the image sums of :func:`_field_sums` give

        Ê = S_H^kg p_h − S_D^G1 p_h + S_V^kg p_z ẑ + (p_h·x)(S_HD^G2 (dx, dy) + S_HD^G2z ẑ)
            + p_z (S_V^G2z (dx, dy) + S_V^G2zz ẑ) + k² S_C^G1 (p_h·x) ẑ,
        Ĥ = S_H^G1z (ẑ × p_h) + S_H^G1 (x_h × p_h) + (p_z S_V^G1 + (p_h·x) S_C^G2)(x_h × ẑ)
            + S_C^G1 (p_h × ẑ),

    where p_h·x and x_h = (dx, dy, 0) do not depend on the image. All images and pairs are
    evaluated at once by matrix products over the image axis.
    """
    k = im.k0
    beta, a_h, a_v, a_d, a_c = _all_images(im)
    obs = np.asarray(obs, dtype=float)
    src = np.asarray(src, dtype=float)
    n_obs, n_src = len(obs), len(src)
    px, py, pz = moment[:, 0], moment[:, 1], moment[:, 2]
    e_out = np.zeros((n_obs, 3), dtype=complex)
    h_out = np.zeros((n_obs, 3), dtype=complex)
    step = max(1, FIELD_PAIRS_PER_BLOCK // max(n_src, 1))
    for lo in range(0, n_obs, step):
        o = obs[lo : lo + step]
        dx = o[:, None, 0] - src[None, :, 0]  # (P, S)
        dy = o[:, None, 1] - src[None, :, 1]
        zeta = o[:, None, 2] + src[None, :, 2]
        rho2 = dx * dx + dy * dy
        shape = dx.shape
        s = _field_sums(k, rho2.ravel(), zeta.ravel(), beta, a_h, a_v, a_d, a_c).reshape(
            (12,) + shape
        )
        kgh, kgv, g1d, g1c, g2hd, g2z_hd, g2z_v, g2zz_v, g1h, g1v, g2c, g1z_h = s
        ph_x = px * dx + py * dy  # (P, S), moments broadcast over the source axis
        a = kgh - g1d
        b = g2hd * ph_x + g2z_v * pz
        e_out[lo : lo + step, 0] = (a * px + b * dx).sum(axis=1)
        e_out[lo : lo + step, 1] = (a * py + b * dy).sum(axis=1)
        e_out[lo : lo + step, 2] = (
            kgv * pz + g2z_hd * ph_x + g2zz_v * pz + (k * k) * g1c * ph_x
        ).sum(axis=1)
        c = g1v * pz + g2c * ph_x  # coefficient of x_h × ẑ = (dy, −dx, 0)
        h_out[lo : lo + step, 0] = (-g1z_h * py + c * dy + g1c * py).sum(axis=1)
        h_out[lo : lo + step, 1] = (g1z_h * px - c * dx - g1c * px).sum(axis=1)
        h_out[lo : lo + step, 2] = (g1h * (dx * py - dy * px)).sum(axis=1)
    return e_out, h_out


@dataclass(frozen=True)
class _PairLayout:
    """What the reflected coupling of a mesh needs besides the images, for translated copies.

    The coupling of two Gauss points depends on their horizontal separation, the sum of their
    heights ζ and the tangents. A translated mesh (a rope-height sweep) keeps all of these except ζ,
    which shifts by twice the height change: the distinct (ρ², ζ) pairs and the geometric factor of
    each image sum are kept here with ζ relative to the first segment's start.
    """

    iu: np.ndarray  # upper-triangle pair indices (reciprocity)
    ju: np.ndarray
    rho2: np.ndarray  # distinct ρ² [m²]
    zeta_rel: np.ndarray  # and ζ − 2 z_origin [m]
    inverse: np.ndarray  # pair → distinct index
    rows: np.ndarray  # indices of the image sums with a nonzero factor
    factors: np.ndarray  # (len(rows), n_pairs) geometric factor of each image sum
    k2_row: np.ndarray  # True where the factor is multiplied by k² (the C u0 term)
    weights: np.ndarray  # basis_weights (N·Q, M)
    n_points: int


_LAYOUT_CACHE: OrderedDict[bytes, _PairLayout] = OrderedDict()
_LAYOUT_CACHE_SIZE = 16


def _pair_layout(mesh: Mesh) -> _PairLayout:
    key = mesh.shape_key()
    lay = _LAYOUT_CACHE.get(key)
    if lay is not None:
        _LAYOUT_CACHE.move_to_end(key)
        return lay
    u, w = gauss01(N_REFLECTED)
    q = len(u)
    origin = mesh.start[0]
    pts = (
        (mesh.start - origin)[:, None, :]
        + u[None, :, None] * (mesh.length[:, None, None] * mesh.tangent[:, None, :])
    ).reshape(-1, 3)
    tan = np.repeat(mesh.tangent, q, axis=0)
    iu, ju = np.triu_indices(len(pts))
    obs, t_obs, src, t_src = pts[iu], tan[iu], pts[ju], tan[ju]
    factors, uniq, inverse = _pair_terms(obs, t_obs, src, t_src)
    rows = np.nonzero(np.any(factors != 0, axis=1))[0]
    lay = _PairLayout(
        iu=iu,
        ju=ju,
        rho2=uniq.real.copy(),
        zeta_rel=uniq.imag.copy(),
        inverse=inverse,
        rows=rows,
        factors=factors[rows],
        k2_row=rows == 3,
        weights=basis_weights(mesh, u, w),
        n_points=len(pts),
    )
    _LAYOUT_CACHE[key] = lay
    if len(_LAYOUT_CACHE) > _LAYOUT_CACHE_SIZE:
        _LAYOUT_CACHE.popitem(last=False)
    return lay


def lossy_ground_matrix(mesh: Mesh, ground: Ground, frequency_hz: float) -> np.ndarray:
    """Contribution of the lossy half-space to the moment-method matrix (M, M) [ohm]."""
    return lossy_ground_matrices([mesh], ground, frequency_hz)[0]


def lossy_ground_matrices(meshes, ground: Ground, frequency_hz: float) -> np.ndarray:
    """:func:`lossy_ground_matrix` of translated copies of one mesh (a sweep), (n, M, M) [ohm].

    The copies share the pair layout; only ζ moves with the height, so the image sums of all
    copies are formed together.
    """
    im = _images_for(ground, frequency_hz)
    omega = 2 * math.pi * frequency_hz
    k = im.k0
    lay = _pair_layout(meshes[0])
    beta, a_h, a_v, a_d, a_c = _all_images(im)
    n = len(lay.rho2)
    zeta = np.concatenate([lay.zeta_rel + 2 * m.start[0, 2] for m in meshes])
    rho2 = np.tile(lay.rho2, len(meshes)) if len(meshes) > 1 else lay.rho2
    sums = _image_sums(k, rho2, zeta, beta, a_h, a_v, a_d, a_c)[lay.rows]
    coef = lay.factors
    if lay.k2_row.any():
        coef = np.where(lay.k2_row, k * k, 1.0)[:, None] * coef
    per_pair = np.take(sums.reshape(len(sums), len(meshes), n), lay.inverse, axis=2)
    vals = coef[0] * per_pair[0]
    for r in range(1, len(coef)):
        vals += coef[r] * per_pair[r]
    # reciprocity: the coupling matrix is symmetric, so only the upper triangle is computed
    t = np.empty((len(meshes), lay.n_points, lay.n_points), dtype=complex)
    t[:, lay.iu, lay.ju] = vals
    t[:, lay.ju, lay.iu] = vals
    c = lay.weights
    # Z_mn = −∫ f_m · E[f_n] with E = Ê / (4π jωε0)
    return -(c.T @ t @ c) / (4 * math.pi * 1j * omega * EPS0)


#: Gauss points per segment for the reflected near field, fewest first, and the quadrature error
#: allowed: the images lie at least (z_obs + z_src) from a point, so the kernel along a segment of
#: length L is smooth on that scale and n-point Gauss–Legendre errs by about (L / 2d)^(2n)
#: (Abramowitz & Stegun 25.4.30, for an integrand analytic within d of the segment; from memory)
REFLECTED_GAUSS_POINTS = (3, 4, 6, 8)
REFLECTED_QUADRATURE_ERROR = 1e-10


def _reflected_gauss_points(mesh, points: np.ndarray) -> int:
    """The fewest Gauss points per segment whose error stays under REFLECTED_QUADRATURE_ERROR."""
    pts = np.asarray(points, dtype=float)
    lowest = float(pts[:, 2].min()) + float(np.minimum(mesh.start[:, 2], mesh.end[:, 2]).min())
    if lowest <= 0:
        return REFLECTED_GAUSS_POINTS[-1]
    ratio = float(mesh.length.max()) / (2 * lowest)
    for n in REFLECTED_GAUSS_POINTS:
        if ratio ** (2 * n) < REFLECTED_QUADRATURE_ERROR:
            return n
    return REFLECTED_GAUSS_POINTS[-1]


def reflected_near_field(sol, points: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Reflected E [V/m] and H [A/m] (RMS, complex) at points from a lossy-ground solution."""
    mesh = sol.mesh
    im = _images_for(sol.ground, sol.frequency_hz)
    omega = 2 * math.pi * sol.frequency_hz
    i_start, i_end = sol.segment_currents_a
    u, w = gauss01(_reflected_gauss_points(mesh, points))
    src = (
        mesh.start[:, None, :]
        + u[None, :, None] * (mesh.length[:, None, None] * mesh.tangent[:, None, :])
    ).reshape(-1, 3)
    cur = (i_start[:, None] * (1 - u[None, :]) + i_end[:, None] * u[None, :]) * (
        w[None, :] * mesh.length[:, None]
    )
    moment = cur.reshape(-1)[:, None] * np.repeat(mesh.tangent, len(u), axis=0)
    e = np.zeros((len(points), 3), dtype=complex)
    h = np.zeros((len(points), 3), dtype=complex)
    for lo in range(0, len(points), 256):
        e_hat, h_hat = reflected_fields(points[lo : lo + 256], src, moment, im)
        e[lo : lo + 256] = e_hat / (4 * math.pi * 1j * omega * EPS0)
        h[lo : lo + 256] = h_hat / (4 * math.pi)
    return e, h
