/* The engine's two hottest loops, compiled; each has its numpy reference beside the Python caller.
 *
 * 1. fk_image_sums, fk_field_sums: the complex-image kernels of the lossy-ground field, the same
 * quantities as fieldkit.antenna.sommerfeld._image_kernels_numpy, per image i and point n,
 *
 *   z = zeta + beta_i,  R = sqrt(rho^2 + z^2)  (principal root),  G = e^{-jkR} / R,
 *   G1 = -(1 + jkR) G / R^2,  G2 = (3 + 3jkR + (jkR)^2) G / R^4,  kg = k^2 G + G1,
 *
 * summed over the images with their residues for the matrix (_image_sums_numpy) and the near
 * field (_field_sums_numpy).
 *
 * 2. fk_smooth_potentials: the smooth part (e^{-jkR} - 1)/R of the free-space potential integrals
 * summed over the source Gauss points, as fieldkit.antenna.kernel._smooth_sums_numpy.
 *
 * Written in real arithmetic so that gcc vectorises the loops over points and calls glibc's
 * vector maths library (libmvec: exp, sin, cos, within 4 ulp) for the exponential; the complex
 * square root is the textbook real-arithmetic form (Kahan, "Branch cuts for complex elementary
 * functions", 1987; principal branch, Re >= 0) on the hardware square root. Built by
 * fieldkit/antenna/native/build.py; loaded with ctypes by fieldkit/antenna/native/__init__.py.
 */
#include <math.h>
#include <stddef.h>
#include <stdlib.h>

/* Vector variants exist in libmvec; declared here so that no -ffast-math is needed (it would also
 * reassociate sums and, linked into a shared library, set flush-to-zero for the whole process).
 * Built with -fno-builtin-sin -fno-builtin-cos: otherwise gcc fuses sin and cos of one argument
 * into a scalar sincos call before it vectorises. */
__attribute__((simd("notinbranch"), const, nothrow)) double exp(double);
__attribute__((simd("notinbranch"), const, nothrow)) double sin(double);
__attribute__((simd("notinbranch"), const, nothrow)) double cos(double);

#ifndef FK_SOURCE_SHA256
#define FK_SOURCE_SHA256 "unknown"
#endif

/* The sha256 of this file when it was compiled: the loader refuses a library built from another
 * version of the source. */
const char *fk_source_sha256(void) { return FK_SOURCE_SHA256; }

/* The kernels of one image (depth br + j bi) at one point (rho2, zeta): z, kg, G1 and G2, each
 * complex as (re, im). */
static inline void image_kernel(double k, double rho2, double zeta, double br, double bi,
                                double z[2], double kg[2], double g1[2], double g2[2])
{
    const double zr = zeta + br, zi = bi;
    /* R^2 = rho^2 + z^2 and its modulus |R|^2 */
    const double sr = zr * zr - zi * zi + rho2, si = 2.0 * zr * zi;
    const double m2 = sqrt(sr * sr + si * si);
    /* R = sqrt(R^2), principal branch */
    const double t = sqrt(0.5 * (m2 + fabs(sr)));
    const double u = 0.5 * si / t;
    const double rr = sr >= 0.0 ? t : fabs(u);
    const double ri = sr >= 0.0 ? u : copysign(t, si);
    /* e^{-jkR} = e^{k Im R} (cos k Re R - j sin k Re R) */
    const double ex = exp(k * ri);
    const double er = ex * cos(k * rr), ei = -ex * sin(k * rr);
    /* G = e^{-jkR} conj(R) / |R|^2 */
    const double inv_m2 = 1.0 / m2;
    const double gr = (er * rr + ei * ri) * inv_m2, gi = (ei * rr - er * ri) * inv_m2;
    /* 1/R^2 = conj(R^2) / |R|^4 */
    const double inv_m4 = inv_m2 * inv_m2;
    const double qr = sr * inv_m4, qi = -si * inv_m4;
    /* jkR */
    const double ar = -k * ri, ai = k * rr;
    /* G/R^2 */
    const double hr = gr * qr - gi * qi, hi = gr * qi + gi * qr;
    /* G1 = -(1 + jkR) G/R^2 */
    const double g1r = -((1.0 + ar) * hr - ai * hi), g1i = -((1.0 + ar) * hi + ai * hr);
    /* 3 + 3 jkR + (jkR)^2 = (jkR + 3) jkR + 3 */
    const double pr = (ar + 3.0) * ar - ai * ai + 3.0, pi = (ar + 3.0) * ai + ai * ar;
    /* G/R^4 */
    const double h2r = hr * qr - hi * qi, h2i = hr * qi + hi * qr;
    z[0] = zr;
    z[1] = zi;
    kg[0] = k * k * gr + g1r;
    kg[1] = k * k * gi + g1i;
    g1[0] = g1r;
    g1[1] = g1i;
    g2[0] = pr * h2r - pi * h2i;
    g2[1] = pr * h2i + pi * h2r;
}

#define SUM_ROWS 12
#define MATRIX_ROWS 8
#define SUM_BLOCK 128 /* points per block: the block's sums stay in L1 (24 KiB) */

/* Image sums at n_pts points: with per-image weights w (complex (n_rows, n_img), interleaved),
 * row r is sum_i w[r, i] K_r(i, n) for the kernel quantities, in this order,
 *   K = kg, kg, G1, G1, G2, G2 z, G2 z, G2 z^2 | G1, G1, G2, G1 z
 * (the first eight are the matrix's, all twelve the near field's); out complex (n_rows, n_pts).
 * The images' kernels of a block of points are summed in L1: no (images x points) arrays. */
static inline __attribute__((always_inline)) void
image_sums(int n_rows, ptrdiff_t n_img, ptrdiff_t n_pts, double k, const double *restrict rho2,
           const double *restrict zeta, const double *restrict beta, const double *restrict w,
           double *restrict out)
{
    double acc_r[SUM_ROWS][SUM_BLOCK], acc_i[SUM_ROWS][SUM_BLOCK];
    for (ptrdiff_t lo = 0; lo < n_pts; lo += SUM_BLOCK) {
        const ptrdiff_t m = n_pts - lo < SUM_BLOCK ? n_pts - lo : SUM_BLOCK;
        for (int r = 0; r < n_rows; ++r)
            for (ptrdiff_t n = 0; n < m; ++n)
                acc_r[r][n] = acc_i[r][n] = 0.0;
        for (ptrdiff_t i = 0; i < n_img; ++i) {
            const double br = beta[2 * i], bi = beta[2 * i + 1];
            double wr[SUM_ROWS], wi[SUM_ROWS];
            for (int r = 0; r < n_rows; ++r) {
                wr[r] = w[2 * (r * n_img + i)];
                wi[r] = w[2 * (r * n_img + i) + 1];
            }
#pragma GCC ivdep
            for (ptrdiff_t n = 0; n < m; ++n) {
                double z[2], kg[2], g1[2], g2[2];
                image_kernel(k, rho2[lo + n], zeta[lo + n], br, bi, z, kg, g1, g2);
                const double g2zr = g2[0] * z[0] - g2[1] * z[1];
                const double g2zi = g2[0] * z[1] + g2[1] * z[0];
                const double g2zzr = g2zr * z[0] - g2zi * z[1];
                const double g2zzi = g2zr * z[1] + g2zi * z[0];
                const double g1zr = g1[0] * z[0] - g1[1] * z[1];
                const double g1zi = g1[0] * z[1] + g1[1] * z[0];
                const double vr[SUM_ROWS] = {kg[0], kg[0], g1[0], g1[0], g2[0], g2zr,
                                             g2zr,  g2zzr, g1[0], g1[0], g2[0], g1zr};
                const double vi[SUM_ROWS] = {kg[1], kg[1], g1[1], g1[1], g2[1], g2zi,
                                             g2zi,  g2zzi, g1[1], g1[1], g2[1], g1zi};
                for (int r = 0; r < n_rows; ++r) {
                    acc_r[r][n] += wr[r] * vr[r] - wi[r] * vi[r];
                    acc_i[r][n] += wr[r] * vi[r] + wi[r] * vr[r];
                }
            }
        }
        for (int r = 0; r < n_rows; ++r) {
            double *restrict o = out + 2 * (r * n_pts + lo);
            for (ptrdiff_t n = 0; n < m; ++n) {
                o[2 * n] = acc_r[r][n];
                o[2 * n + 1] = acc_i[r][n];
            }
        }
    }
}

/* The matrix's eight image sums (fieldkit.antenna.sommerfeld._image_sums_numpy): w (8, n_img) */
void fk_image_sums(ptrdiff_t n_img, ptrdiff_t n_pts, double k, const double *restrict rho2,
                   const double *restrict zeta, const double *restrict beta,
                   const double *restrict w, double *restrict out)
{
    image_sums(MATRIX_ROWS, n_img, n_pts, k, rho2, zeta, beta, w, out);
}

/* The near field's twelve image sums (fieldkit.antenna.sommerfeld._field_sums_numpy, in the
 * order above): w (12, n_img) */
void fk_field_sums(ptrdiff_t n_img, ptrdiff_t n_pts, double k, const double *restrict rho2,
                   const double *restrict zeta, const double *restrict beta,
                   const double *restrict w, double *restrict out)
{
    image_sums(SUM_ROWS, n_img, n_pts, k, rho2, zeta, beta, w, out);
}

/* Sums over the n_q source Gauss points of (e^{-jkr} - 1)/r, weighted:
 *   s0[p, s] = sum_q e(r_psq) wl[s, q],   s1[p, s] = sum_q e(r_psq) wl[s, q] u[q],
 * with e^{-jkr} - 1 = -2 sin^2(kr/2) - j sin(kr) (no cancellation at small kr). r is
 * (n_obs, n_src, n_q) row-major, wl (n_src, n_q), u (n_q); s0 and s1 complex (n_obs, n_src),
 * interleaved. Returns 0, or -1 when the work buffer cannot be allocated (outputs untouched). */
int fk_smooth_potentials(ptrdiff_t n_obs, ptrdiff_t n_src, ptrdiff_t n_q, double k,
                         const double *restrict r, const double *restrict wl,
                         const double *restrict u, double *restrict s0, double *restrict s1)
{
    const ptrdiff_t row = n_src * n_q;
    if (row == 0) { /* no source points: the sums are empty */
        for (ptrdiff_t m = 0; m < 2 * n_obs * n_src; ++m)
            s0[m] = s1[m] = 0.0;
        return 0;
    }
    double *buf = malloc(2 * (size_t)row * sizeof(double));
    if (buf == NULL)
        return -1;
    double *restrict er = buf, *restrict ei = buf + row;
    for (ptrdiff_t p = 0; p < n_obs; ++p) {
        const double *restrict rp = r + p * row;
#pragma GCC ivdep
        for (ptrdiff_t m = 0; m < row; ++m) {
            const double y = -k * rp[m];
            const double half = sin(y * 0.5);
            const double inv = 1.0 / rp[m];
            er[m] = (-2.0 * half * half) * inv * wl[m];
            ei[m] = sin(y) * inv * wl[m];
        }
        double *restrict o0 = s0 + 2 * p * n_src, *restrict o1 = s1 + 2 * p * n_src;
        for (ptrdiff_t s = 0; s < n_src; ++s) {
            double a0r = 0.0, a0i = 0.0, a1r = 0.0, a1i = 0.0;
            for (ptrdiff_t q = 0; q < n_q; ++q) {
                const double xr = er[s * n_q + q], xi = ei[s * n_q + q];
                a0r += xr;
                a0i += xi;
                a1r += xr * u[q];
                a1i += xi * u[q];
            }
            o0[2 * s] = a0r;
            o0[2 * s + 1] = a0i;
            o1[2 * s] = a1r;
            o1[2 * s + 1] = a1i;
        }
    }
    free(buf);
    return 0;
}
