/* test-extrema.c: mass tensors at band extrema from periodic grids and k-tables:
 * synthetic round trips, textbook bands, warnings and bad input. */
#include <glib.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "bm-extrema.h"
#include "bm-linalg.h"
#include "bm-units.h"

/* hbar^2 / (2 m_e) = 3.80998 eV Angstrom^2 (REFERENCES.md, CODATA). */
#define HB2M_HALF_REF 3.80998

/* A periodic model band: E(f) = e0 + sign * sum_m amp_m (1 - cos(2 pi q_m.(f - f0)))
 * with integer q_m, so it is periodic and stationary at f0 with fractional
 * Hessian H_f = sign * sum_m amp_m (2 pi)^2 q_m q_m^T (exact identity). */
typedef struct {
    int nterms;
    int q[8][3];
    double amp[8];
    double f0[3];
    double e0;
    double sign[8];
} cos_band;

static double cos_band_eval(const cos_band *b, const double f[3])
{
    double e = b->e0;
    for (int m = 0; m < b->nterms; m++) {
        double ph = 0.0;
        for (int a = 0; a < 3; a++)
            ph += b->q[m][a] * (f[a] - b->f0[a]);
        e += b->sign[m] * b->amp[m] * (1.0 - cos(2.0 * M_PI * ph));
    }
    return e;
}

/* Expected Cartesian Hessian H_k = B^-1 H_f B^-T (chain rule for k = f B). */
static void cos_band_hk(const cos_band *b, double recip[3][3], int dims, double hk[3][3])
{
    double hf[3][3] = { { 0 } }, bb[3][3], binv[3][3], t[3][3], bt[3][3];
    for (int m = 0; m < b->nterms; m++)
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                hf[i][j] += b->sign[m] * b->amp[m] * 4.0 * M_PI * M_PI * b->q[m][i] * b->q[m][j];
    memcpy(bb, recip, sizeof bb);
    if (dims == 2) {
        double nrm[3];
        bm_cross3(bb[0], bb[1], nrm);
        double l = bm_norm3(nrm);
        for (int i = 0; i < 3; i++)
            bb[2][i] = nrm[i] / l;
    }
    g_assert_cmpint(bm_inv3(bb, binv), ==, 0);
    bm_matmul3(binv, hf, t);
    bm_transpose3(binv, bt);
    bm_matmul3(t, bt, hk);
}

static double *fill_grid(bm_grid *g, double recip[3][3], size_t n1, size_t n2, size_t n3,
                         size_t nbands, const cos_band *bands)
{
    memset(g, 0, sizeof *g);
    memcpy(g->recip, recip, sizeof g->recip);
    g->mesh[0] = n1;
    g->mesh[1] = n2;
    g->mesh[2] = n3;
    g->nbands = nbands;
    double *e = malloc(nbands * n1 * n2 * n3 * sizeof *e);
    for (size_t b = 0; b < nbands; b++)
        for (size_t i = 0; i < n1; i++)
            for (size_t j = 0; j < n2; j++)
                for (size_t l = 0; l < n3; l++) {
                    double f[3] = { (double)i / n1, (double)j / n2, (double)l / n3 };
                    e[((b * n1 + i) * n2 + j) * n3 + l] = cos_band_eval(&bands[b], f);
                }
    g->energies = e;
    return e;
}

static void cubic(double a, double r[3][3])
{
    memset(r, 0, 9 * sizeof(double));
    for (int i = 0; i < 3; i++)
        r[i][i] = 2.0 * M_PI / a;
}

static int has_warning(const bm_mass_tensor *t, const char *word)
{
    for (size_t w = 0; w < t->warnings.count; w++)
        if (strstr(t->warnings.items[w].text, word))
            return 1;
    return 0;
}

/* Each principal pair satisfies M^-1 axis = (1/m) axis, axes are orthonormal,
 * and the tensor agrees elementwise with the expected Hessian / (hbar^2/m_e). */
static void check_tensor(const bm_mass_tensor *t, double hk[3][3], double rel)
{
    double scale = 0.0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            scale = fmax(scale, fabs(hk[i][j] / BM_HBAR2_OVER_ME_EV_A2));
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            g_assert_cmpfloat_with_epsilon(t->inv_mass[i][j], hk[i][j] / BM_HBAR2_OVER_ME_EV_A2,
                                           rel * scale);
    for (int m = 0; m < t->dims; m++) {
        g_assert_cmpfloat_with_epsilon(bm_norm3(t->axes[m]), 1.0, 1e-12);
        for (int i = 0; i < 3; i++) {
            double mv = 0.0;
            for (int j = 0; j < 3; j++)
                mv += t->inv_mass[i][j] * t->axes[m][j];
            g_assert_cmpfloat_with_epsilon(mv, t->axes[m][i] / t->masses[m], 1e-9 * scale);
        }
    }
}

static void check_position(const bm_mass_tensor *t, const double f0[3], double recip[3][3], double tol)
{
    /* shortest periodic image of k - k0 */
    double df[3];
    for (int a = 0; a < 3; a++) {
        df[a] = t->k_frac[a] - f0[a];
        df[a] -= round(df[a]);
    }
    double dk[3];
    for (int i = 0; i < 3; i++)
        dk[i] = df[0] * recip[0][i] + df[1] * recip[1][i] + df[2] * recip[2][i];
    g_assert_cmpfloat(bm_norm3(dk), <, tol);
}

/* Nearest-neighbour tight binding on a simple cubic lattice,
 * E = -2t (cos kx a + cos ky a + cos kz a): m* = hbar^2 / (2 t a^2) at the
 * minimum (Gamma) and -m* at the maximum (R) (Ashcroft and Mermin ch. 10,
 * from memory; follows from the Taylor series of the cosine). */
static void test_tight_binding(void)
{
    double a = 3.0, tt = 0.75, recip[3][3];
    cubic(a, recip);
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
                   .amp = { 2 * tt, 2 * tt, 2 * tt }, .sign = { 1, 1, 1 }, .e0 = -6 * tt };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 1, &b);
    double mstar = BM_HBAR2_OVER_ME_EV_A2 / (2.0 * tt * a * a);
    bm_mass_tensor *res;
    size_t n;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, &err), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MINIMUM);
    for (int m = 0; m < 3; m++)
        g_assert_cmpfloat_with_epsilon(res[0].masses[m], mstar, 1e-6 * mstar);
    g_assert_cmpfloat_with_epsilon(res[0].energy_ev, -6 * tt, 1e-9);
    g_assert_cmpfloat(bm_norm3(res[0].k), <, 1e-8);
    g_assert_cmpint(res[0].divergent, ==, 0);
    g_assert_cmpint(res[0].warnings.count, ==, 0);
    bm_mass_tensors_free(res, n);
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MAXIMUM, NULL, NULL, &res, &n, &err), ==, BM_OK);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MAXIMUM);
    for (int m = 0; m < 3; m++)
        g_assert_cmpfloat_with_epsilon(res[0].masses[m], -mstar, 1e-6 * mstar);
    g_assert_cmpfloat_with_epsilon(res[0].energy_ev, 6 * tt, 1e-9);
    bm_mass_tensors_free(res, n);
    free(e);
}

/* The 12^3 accuracy target: extremum between mesh points, off Gamma, axes
 * along the cube edges so the masses are known in closed form:
 * H_k,aa = amp_a (2 pi)^2 (a / 2 pi)^2 = amp_a a^2 (chain rule). */
static void test_accuracy_12(void)
{
    double a = 4.0, recip[3][3];
    cubic(a, recip);
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
                   .amp = { 0.4, 0.9, 1.7 }, .sign = { 1, 1, 1 }, .e0 = 0.3,
                   .f0 = { 0.3137, 0.1712, 0.4421 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 1, &b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    double expect[3] = { BM_HBAR2_OVER_ME_EV_A2 / (1.7 * a * a), BM_HBAR2_OVER_ME_EV_A2 / (0.9 * a * a),
                         BM_HBAR2_OVER_ME_EV_A2 / (0.4 * a * a) };
    for (int m = 0; m < 3; m++)
        g_assert_cmpfloat_with_epsilon(res[0].masses[m], expect[m], 1e-3 * expect[m]);
    check_position(&res[0], b.f0, recip, 1e-4);
    g_assert_cmpfloat_with_epsilon(res[0].energy_ev, 0.3, 1e-6);
    bm_mass_tensors_free(res, n);
    free(e);
}

/* Rotated ellipsoid (cross terms), valence maximum (negated), non-orthogonal
 * cells: the tensor must equal B^-1 H_f B^-T / (hbar^2/m_e) (chain rule). */
static void round_trip(double recip[3][3], size_t n, double sign, const double f0[3])
{
    cos_band b = { .nterms = 5, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 }, { 1, 1, 0 }, { 0, 1, -1 } },
                   .amp = { 0.5, 0.8, 0.6, 0.3, 0.2 }, .e0 = 1.0 };
    for (int m = 0; m < 5; m++)
        b.sign[m] = sign;
    memcpy(b.f0, f0, sizeof b.f0);
    bm_grid g;
    double *e = fill_grid(&g, recip, n, n, n, 1, &b);
    bm_mass_tensor *res;
    size_t nr;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, sign > 0 ? BM_SEARCH_MINIMUM : BM_SEARCH_MAXIMUM,
                                         NULL, NULL, &res, &nr, &err), ==, BM_OK);
    double hk[3][3];
    cos_band_hk(&b, recip, 3, hk);
    check_tensor(&res[0], hk, 1e-3);
    check_position(&res[0], f0, recip, 1e-4);
    g_assert_cmpint(res[0].kind, ==, sign > 0 ? BM_EXTREMUM_MINIMUM : BM_EXTREMUM_MAXIMUM);
    for (int m = 0; m < 3; m++)
        g_assert_cmpfloat(sign * res[0].masses[m], >, 0.0);
    /* a clean smooth extremum raises no warning */
    for (size_t w = 0; w < res[0].warnings.count; w++)
        g_printerr("unexpected warning: %s\n", res[0].warnings.items[w].text);
    g_assert_cmpint(res[0].warnings.count, ==, 0);
    g_assert_cmpint(res[0].divergent, ==, 0);
    bm_mass_tensors_free(res, nr);
    free(e);
}

/* A minimum just below the cell edge (f = -0.004 = 0.996) found from mesh
 * point 0: the refined position wraps, and the local fit must still see the
 * mesh around it (it once got the wrapped Cartesian k beside the unwrapped
 * fractional one, so an explicit radius found no points). Regression test. */
static void test_wrapped_fit(void)
{
    double recip[3][3];
    cubic(5.43, recip);
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
                   .amp = { 0.5, 0.8, 0.6 }, .sign = { 1, 1, 1 }, .f0 = { -0.004, 0.3, 0.6 },
                   .e0 = 1.0 };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 1, &b);
    bm_fit_options opt = { .fit_radius_inv_angstrom = 0.2 };
    bm_mass_tensor *res;
    size_t nr;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, &opt, &res, &nr, NULL),
                    ==, BM_OK);
    /* reported as its first-zone image: f = -0.004, not 0.996 */
    g_assert_cmpfloat_with_epsilon(res[0].k_frac[0], -0.004, 1e-6);
    g_assert_true(isfinite(res[0].fit_rms_ev));
    g_assert_false(bm_warnings_has(&res[0].warnings, BM_WARN_FIT_UNDETERMINED));
    bm_mass_tensors_free(res, nr);
    free(e);
}

static void test_rotated_ellipsoid(void)
{
    double recip[3][3], f0[3] = { 0.137, 0.561, 0.802 };
    cubic(5.43, recip);
    round_trip(recip, 12, 1.0, f0);
}

static void test_valence_maximum(void)
{
    double recip[3][3], f0[3] = { 0.61, 0.27, 0.04 };
    cubic(5.65, recip);
    round_trip(recip, 12, -1.0, f0);
}

/* Hexagonal lattice a = 3.19, c = 5.19 Angstrom: b1 = (2pi/a)(1, 1/sqrt3, 0),
 * b2 = (2pi/a)(0, 2/sqrt3, 0), b3 = (2pi/c)(0, 0, 1) (standard construction). */
static void test_hexagonal(void)
{
    double a = 3.19, c = 5.19, s3 = sqrt(3.0);
    double recip[3][3] = { { 2 * M_PI / a, 2 * M_PI / (a * s3), 0 },
                           { 0, 4 * M_PI / (a * s3), 0 },
                           { 0, 0, 2 * M_PI / c } };
    double f0[3] = { 0.29, 0.47, 0.13 };
    round_trip(recip, 12, 1.0, f0);
    round_trip(recip, 16, -1.0, f0);
}

/* fcc lattice constant a: reciprocal vectors (2pi/a)(-1,1,1), (1,-1,1), (1,1,-1). */
static void test_fcc(void)
{
    double a = 5.43, s = 2 * M_PI / a;
    double recip[3][3] = { { -s, s, s }, { s, -s, s }, { s, s, -s } };
    double f0[3] = { 0.41, 0.08, 0.66 };
    round_trip(recip, 12, 1.0, f0);
    /* a fine mesh exercises the local-polynomial path */
    round_trip(recip, 40, 1.0, f0);
}

/* Saddle: curvature signs (+, +, -) by construction; evaluated at the point. */
static void test_saddle(void)
{
    double recip[3][3];
    cubic(4.0, recip);
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
                   .amp = { 0.5, 0.7, 0.4 }, .sign = { 1, 1, -1 }, .f0 = { 0.25, 0.25, 0.25 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 1, &b);
    double kat[3] = { 0.25 * recip[0][0], 0.25 * recip[1][1], 0.25 * recip[2][2] };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, kat, NULL, &res, &n, NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_SADDLE);
    g_assert_true(has_warning(&res[0], "saddle"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_SADDLE_POINT));
    double hk[3][3];
    cos_band_hk(&b, recip, 3, hk);
    check_tensor(&res[0], hk, 1e-6);
    int neg = 0;
    for (int m = 0; m < 3; m++)
        neg += res[0].masses[m] < 0;
    g_assert_cmpint(neg, ==, 1);
    bm_mass_tensors_free(res, n);
    free(e);
}

/* 2D sheet (n3 = 1) on a hexagonal net: dims 2, third mass NAN, third axis
 * normal to the sheet. */
static void test_sheet(void)
{
    double a = 2.46, s3 = sqrt(3.0);
    double recip[3][3] = { { 2 * M_PI / a, 2 * M_PI / (a * s3), 0 },
                           { 0, 4 * M_PI / (a * s3), 0 },
                           { 0, 0, 2 * M_PI / 20.0 } };
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 1, 1, 0 } },
                   .amp = { 0.6, 0.4, 0.25 }, .sign = { 1, 1, 1 }, .f0 = { 0.37, 0.71, 0 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 1, 1, &b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].dims, ==, 2);
    g_assert_true(isnan(res[0].masses[2]));
    g_assert_cmpfloat_with_epsilon(fabs(res[0].axes[2][2]), 1.0, 1e-12);
    double hk[3][3];
    cos_band_hk(&b, recip, 2, hk);
    check_tensor(&res[0], hk, 1e-3);
    check_position(&res[0], b.f0, recip, 1e-4);
    bm_mass_tensors_free(res, n);
    free(e);
}

/* Every local extremum: sum_a cos(4 pi f_a) has minima at f_a in {1/4, 3/4}
 * (8) and maxima at f_a in {0, 1/2} (8), each with H_f,aa = (4 pi)^2 (exact). */
static void test_all(void)
{
    double a = 4.0, recip[3][3];
    cubic(a, recip);
    cos_band b = { .nterms = 3, .q = { { 2, 0, 0 }, { 0, 2, 0 }, { 0, 0, 2 } },
                   .amp = { 0.5, 0.5, 0.5 }, .sign = { 1, 1, 1 }, .f0 = { 0.25, 0.25, 0.25 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 16, 16, 16, 1, &b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_ALL, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 16);
    double m_expect = BM_HBAR2_OVER_ME_EV_A2 / (0.5 * 16 * M_PI * M_PI * (a / (2 * M_PI)) * (a / (2 * M_PI)));
    int nmin = 0;
    for (size_t q = 0; q < n; q++) {
        nmin += res[q].kind == BM_EXTREMUM_MINIMUM;
        for (int m = 0; m < 3; m++)
            g_assert_cmpfloat_with_epsilon(fabs(res[q].masses[m]), m_expect, 1e-6 * m_expect);
    }
    g_assert_cmpint(nmin, ==, 8);
    g_assert_cmpfloat(res[0].energy_ev, <=, res[n - 1].energy_ev);
    bm_mass_tensors_free(res, n);
    free(e);
}

/* Free electrons in the empty lattice: the lowest band is hbar^2 |k|^2 / 2 m_e
 * inside the first zone, so m* = 1 (REFERENCES.md: hbar^2/(2 m_e) = 3.80998
 * eV A^2; a free-electron band gives 1). A 48^3 mesh keeps the local stencil
 * inside the zone, where the band is an exact parabola. */
static void test_free_electron(void)
{
    double a = 4.0, recip[3][3];
    cubic(a, recip);
    size_t n = 48;
    double *e = malloc(n * n * n * sizeof *e);
    for (size_t i = 0; i < n; i++)
        for (size_t j = 0; j < n; j++)
            for (size_t l = 0; l < n; l++) {
                double best = INFINITY;
                for (int g1 = -1; g1 <= 1; g1++)
                    for (int g2 = -1; g2 <= 1; g2++)
                        for (int g3 = -1; g3 <= 1; g3++) {
                            double k[3] = { ((double)i / n + g1) * recip[0][0],
                                            ((double)j / n + g2) * recip[1][1],
                                            ((double)l / n + g3) * recip[2][2] };
                            best = fmin(best, HB2M_HALF_REF * bm_dot3(k, k));
                        }
                e[(i * n + j) * n + l] = best;
            }
    bm_grid g = { .mesh = { n, n, n }, .nbands = 1, .energies = e };
    memcpy(g.recip, recip, sizeof recip);
    bm_mass_tensor *res;
    size_t nr;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &nr, NULL), ==, BM_OK);
    for (int m = 0; m < 3; m++)
        g_assert_cmpfloat_with_epsilon(res[0].masses[m], 1.0, 1e-5);
    bm_mass_tensors_free(res, nr);
    free(e);
}

/* Cone E = v |k| near Gamma (periodic form v (a/2pi) sqrt(sum 2 - 2 cos(k_a a))):
 * no finite mass; must be flagged divergent, not given a number. */
static void test_cone(void)
{
    double a = 4.0, recip[3][3], v = 2.0;
    cubic(a, recip);
    size_t n = 24;
    double *e = malloc(2 * n * n * n * sizeof *e);
    for (size_t i = 0; i < n; i++)
        for (size_t j = 0; j < n; j++)
            for (size_t l = 0; l < n; l++) {
                double f[3] = { (double)i / n, (double)j / n, (double)l / n }, s = 0.0;
                for (int c = 0; c < 3; c++)
                    s += 2.0 - 2.0 * cos(2 * M_PI * f[c]);
                e[(i * n + j) * n + l] = v * a / (2 * M_PI) * sqrt(s);
                e[n * n * n + (i * n + j) * n + l] = -v * a / (2 * M_PI) * sqrt(s);
            }
    bm_grid g = { .mesh = { n, n, n }, .nbands = 2, .energies = e };
    memcpy(g.recip, recip, sizeof recip);
    bm_mass_tensor *res;
    size_t nr;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &nr, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].divergent, ==, 1);
    g_assert_true(has_warning(&res[0], "conical"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_CONICAL_POINT));
    g_assert_true(isnan(res[0].masses[0]));
    /* the touching band below meets it at the apex: degeneracy warning too */
    g_assert_true(has_warning(&res[0], "degenerate"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_DEGENERATE_BAND));
    bm_mass_tensors_free(res, nr);
    free(e);
}

/* Flat band: zero curvature gives an infinite mass and a warning. */
static void test_flat(void)
{
    double recip[3][3];
    cubic(4.0, recip);
    cos_band b = { .nterms = 0, .e0 = -1.25 };
    bm_grid g;
    double *e = fill_grid(&g, recip, 8, 8, 8, 1, &b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].divergent, ==, 1);
    for (int m = 0; m < 3; m++)
        g_assert_true(isinf(res[0].masses[m]));
    g_assert_true(has_warning(&res[0], "flat"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_FLAT_DIRECTION));
    bm_mass_tensors_free(res, n);
    free(e);
}

/* Two bands 0.5 meV apart at the minimum: within the default 1 meV the tensor
 * is ill-defined and says so; with a 0.1 meV tolerance it does not. */
static void test_degenerate(void)
{
    double recip[3][3];
    cubic(4.0, recip);
    cos_band b[2] = {
        { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } }, .amp = { 0.5, 0.5, 0.5 },
          .sign = { 1, 1, 1 }, .f0 = { 0.1, 0.2, 0.3 } },
        { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } }, .amp = { 0.9, 0.9, 0.9 },
          .sign = { 1, 1, 1 }, .f0 = { 0.1, 0.2, 0.3 }, .e0 = 5e-4 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 2, b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    g_assert_true(has_warning(&res[0], "band 1 lies 0.5 meV"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_DEGENERATE_BAND));
    g_assert_true(has_warning(&res[0], "ill-defined"));
    bm_mass_tensors_free(res, n);
    bm_fit_options opt = { .degeneracy_tol_ev = 1e-4 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, &opt, &res, &n, NULL), ==, BM_OK);
    g_assert_false(has_warning(&res[0], "degenerate"));
    bm_mass_tensors_free(res, n);
    free(e);
}

/* A heavy band: amplitude 20 meV on a = 4 A gives m = (hbar^2/m_e)/(amp a^2)
 * = 23.8 m_e (chain rule as above), outside 0.01..10 m_e: reported and warned. */
static void test_heavy(void)
{
    double recip[3][3];
    cubic(4.0, recip);
    cos_band b = { .nterms = 3, .q = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } },
                   .amp = { 0.02, 0.5, 0.5 }, .sign = { 1, 1, 1 } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 12, 12, 12, 1, &b);
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL), ==, BM_OK);
    double heavy = BM_HBAR2_OVER_ME_EV_A2 / (0.02 * 16.0);
    g_assert_cmpfloat_with_epsilon(res[0].masses[2], heavy, 1e-6 * heavy);
    g_assert_true(has_warning(&res[0], "outside the usual range"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_MASS_OUT_OF_RANGE));
    bm_mass_tensors_free(res, n);
    free(e);
}

/* ---------------------------------------------------------------- tables */

/* Strongly non-parabolic line cut E = c s^2 / 2 + q s^4: the quadratic fit
 * leaves a residual and says so (a quartic is not a quadric: identity). */
static void test_table_nonparabolic(void)
{
    size_t np = 21;
    double k[63], e[21];
    for (size_t m = 0; m < np; m++) {
        double s = 0.01 * ((double)m - 10.0);
        k[3 * m] = s;
        k[3 * m + 1] = k[3 * m + 2] = 0.0;
        e[m] = 0.5 * 10.0 * s * s + 3000.0 * s * s * s * s;
    }
    bm_ktable t = { .npoints = np, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(res[0].fit_rms_ev, >, 0.0);
    g_assert_true(has_warning(&res[0], "non-parabolic"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_NON_PARABOLIC));
    bm_mass_tensors_free(res, n);
}

/* Points of an anisotropic parabola E = E0 + (k-k0)^T H (k-k0) / 2 on a
 * local 5x5x5 mesh whose centre is off k0: the quadric fit is exact. */
static void test_table_parabola(void)
{
    double h[3][3] = { { 9.0, 1.5, 0.0 }, { 1.5, 6.0, -0.8 }, { 0.0, -0.8, 3.0 } };
    double k0[3] = { 0.013, -0.021, 0.007 };
    size_t np = 125;
    double *k = malloc(np * 3 * sizeof *k), *e = malloc(np * sizeof *e);
    size_t m = 0;
    for (int i = -2; i <= 2; i++)
        for (int j = -2; j <= 2; j++)
            for (int l = -2; l <= 2; l++, m++) {
                double kk[3] = { 0.05 * i, 0.05 * j, 0.05 * l }, d[3];
                for (int c = 0; c < 3; c++) {
                    k[3 * m + c] = kk[c];
                    d[c] = kk[c] - k0[c];
                }
                double s = 0.0;
                for (int a = 0; a < 3; a++)
                    for (int b = 0; b < 3; b++)
                        s += 0.5 * d[a] * h[a][b] * d[b];
                e[m] = 1.1 + s;
            }
    bm_ktable t = { .npoints = np, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, &err), ==, BM_OK);
    g_assert_cmpint(res[0].dims, ==, 3);
    check_tensor(&res[0], h, 1e-9);
    for (int c = 0; c < 3; c++)
        g_assert_cmpfloat_with_epsilon(res[0].k[c], k0[c], 1e-9);
    g_assert_cmpfloat_with_epsilon(res[0].energy_ev, 1.1, 1e-12);
    g_assert_cmpint(res[0].warnings.count, ==, 0);
    g_assert_true(isnan(res[0].k_frac[0]));
    bm_mass_tensors_free(res, n);
    free(k);
    free(e);
}

/* A line cut through a valence maximum along (1,1,0)/sqrt2: dims 1, mass
 * -hbar^2/(m_e c) for E = E0 - c s^2 / 2 (definition of the mass). */
static void test_table_line(void)
{
    size_t np = 21;
    double c = 12.0, k[63], e[21];
    for (size_t m = 0; m < np; m++) {
        double s = 0.01 * ((double)m - 10.0) + 0.0037;
        k[3 * m] = k[3 * m + 1] = s / sqrt(2.0);
        k[3 * m + 2] = 0.0;
        e[m] = -0.5 * c * (s - 0.0037 - 0.002) * (s - 0.0037 - 0.002);
    }
    bm_ktable t = { .npoints = np, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MAXIMUM, NULL, NULL, &res, &n, NULL, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].dims, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MAXIMUM);
    g_assert_cmpfloat_with_epsilon(res[0].masses[0], -BM_HBAR2_OVER_ME_EV_A2 / c, 1e-9);
    g_assert_true(isnan(res[0].masses[1]) && isnan(res[0].masses[2]));
    g_assert_cmpfloat_with_epsilon(fabs(res[0].axes[0][0]), 1.0 / sqrt(2.0), 1e-9);
    bm_mass_tensors_free(res, n);
}

/* A planar set (kz = 0.2 fixed): dims 2. Cone in a table: E = v |k|. */
static void test_table_plane_and_cone(void)
{
    size_t np = 81;
    double k[243], e[81], ec[81];
    size_t m = 0;
    for (int i = -4; i <= 4; i++)
        for (int j = -4; j <= 4; j++, m++) {
            k[3 * m] = 0.02 * i;
            k[3 * m + 1] = 0.02 * j;
            k[3 * m + 2] = 0.2;
            e[m] = 0.5 * (4.0 * k[3 * m] * k[3 * m] + 2.0 * k[3 * m + 1] * k[3 * m + 1]);
            ec[m] = 3.0 * hypot(k[3 * m], k[3 * m + 1]);
        }
    bm_ktable t = { .npoints = np, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].dims, ==, 2);
    g_assert_cmpfloat_with_epsilon(res[0].masses[0], BM_HBAR2_OVER_ME_EV_A2 / 4.0, 1e-9);
    g_assert_cmpfloat_with_epsilon(res[0].masses[1], BM_HBAR2_OVER_ME_EV_A2 / 2.0, 1e-9);
    g_assert_false(res[0].divergent);
    bm_mass_tensors_free(res, n);
    t.energies = ec;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, NULL), ==, BM_OK);
    g_assert_cmpint(res[0].divergent, ==, 1);
    g_assert_true(has_warning(&res[0], "conical"));
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_CONICAL_POINT));
    bm_mass_tensors_free(res, n);
}

/* ------------------------------------------------------------- bad input */

static void test_bad_input(void)
{
    double recip[3][3];
    cubic(4.0, recip);
    cos_band b[2] = { { .nterms = 1, .q = { { 1, 0, 0 } }, .amp = { 1 }, .sign = { 1 } },
                      { .nterms = 1, .q = { { 1, 0, 0 } }, .amp = { 1 }, .sign = { 1 } } };
    bm_grid g;
    double *e = fill_grid(&g, recip, 4, 5, 6, 2, b);
    bm_errbuf err = { 0 };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_grid_validate(&g, &err), ==, BM_OK);
    g_assert_cmpint(bm_grid_mass_tensors(&g, 2, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "band index 2"));
    g_assert_nonnull(strstr(err.message, "2 bands"));
    e[4 * 5 * 6 + (1 * 5 + 2) * 6 + 3] = NAN;
    g_assert_cmpint(bm_grid_validate(&g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "band 1, mesh index (i, j, l) = (1, 2, 3)"));
    g_assert_cmpint(bm_grid_mass_tensors(&g, 1, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "(1, 2, 3)"));
    g.mesh[1] = 0;
    g_assert_cmpint(bm_grid_validate(&g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "n2 is 0"));
    g.mesh[1] = 5;
    memcpy(g.recip[2], g.recip[0], sizeof g.recip[2]);
    g_assert_cmpint(bm_grid_validate(&g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "singular"));
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, &err), ==, BM_EINVAL);
    memcpy(g.recip, recip, sizeof recip);
    bm_fit_options opt = { .fit_radius_inv_angstrom = -1.0 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, &opt, &res, &n, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "fit radius -1"));
    free(e);

    /* k-table: too few points, a radius too small for a full quadric */
    double k[3 * 27], et[27];
    size_t m = 0;
    for (int i = -1; i <= 1; i++)
        for (int j = -1; j <= 1; j++)
            for (int l = -1; l <= 1; l++, m++) {
                k[3 * m] = 0.1 * i;
                k[3 * m + 1] = 0.1 * j;
                k[3 * m + 2] = 0.1 * l;
                et[m] = k[3 * m] * k[3 * m] + k[3 * m + 1] * k[3 * m + 1] + k[3 * m + 2] * k[3 * m + 2];
            }
    bm_ktable t = { .npoints = 27, .k = k, .nbands = 1, .energies = et };
    opt.fit_radius_inv_angstrom = 0.11;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, &opt, &res, &n, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "rank-deficient"));
    g_assert_nonnull(strstr(err.message, "7 points"));
    /* the first 5 points lie in the plane kx = -0.1: a 2D quadric needs 6 */
    t.npoints = 5;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "has 5 points but a 2-dimensional quadric needs at least 6"));
    t.npoints = 27;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 3, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "band index 3 is out of range: the table has 1 band"));
    et[5] = INFINITY;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "point 5"));
}


/* ---------------------------------------------------------- table extrema */

/* A 7 x 7 x 7 cube of points, spacing 0.01 1/A, centred at c, with
 * E = sum_i s_i hbar^2 (k_i - k0_i)^2 / (2 m_i): a quadric, so the fit is
 * exact (identity) and k0 the one stationary point. */
static void quadric_table(const double c[3], const double k0[3], const double m[3],
                          const double sign[3], double *k, double *e)
{
    size_t n = 0;
    for (int i = -3; i <= 3; i++)
        for (int j = -3; j <= 3; j++)
            for (int l = -3; l <= 3; l++, n++) {
                double q[3] = { c[0] + 0.01 * i, c[1] + 0.01 * j, c[2] + 0.01 * l };
                memcpy(k + 3 * n, q, sizeof q);
                e[n] = 0.0;
                for (int a = 0; a < 3; a++)
                    e[n] += sign[a] * HB2M_HALF_REF * (q[a] - k0[a]) * (q[a] - k0[a]) / m[a];
            }
}

static void test_table_extremum_inside(void)
{
    /* one clean minimum, off the samples: "all" reports it once, at the fitted
     * position, and says why the maximum search reports nothing */
    static double k[343 * 3], e[343];
    const double c[3] = { 0, 0, 0 }, k0[3] = { 0.0037, -0.0052, 0.0011 };
    const double m[3] = { 0.3, 0.5, 0.8 }, up[3] = { 1, 1, 1 }, down[3] = { -1, -1, -1 };
    quadric_table(c, k0, m, up, k, e);
    bm_ktable t = { .npoints = 343, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    bm_warnings notes = { 0 };
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_ALL, NULL, NULL, &res, &n, &notes,
                                           NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MINIMUM);
    for (int a = 0; a < 3; a++)
        g_assert_cmpfloat_with_epsilon(res[0].k[a], k0[a], 1e-9);
    g_assert_cmpfloat_with_epsilon(res[0].masses[0], 0.3, 1e-6);
    g_assert_true(bm_warnings_has(&notes, BM_WARN_NO_EXTREMUM));
    bm_mass_tensors_free(res, n);
    bm_warnings_clear(&notes);
    /* a pure maximum: the same, and the maximum is the one entry */
    quadric_table(c, k0, m, down, k, e);
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_ALL, NULL, NULL, &res, &n, &notes,
                                           NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MAXIMUM);
    g_assert_cmpfloat_with_epsilon(res[0].masses[0], -0.3, 1e-6);
    bm_mass_tensors_free(res, n);
    bm_warnings_clear(&notes);
}

static void test_table_saddle_once(void)
{
    /* the only stationary point is a saddle inside the data: reported once,
     * at the stationary point, not at two edge samples */
    static double k[343 * 3], e[343];
    const double c[3] = { 0, 0, 0 }, k0[3] = { 0.013, -0.007, 0.004 };
    const double m[3] = { 0.3, 0.5, 0.8 }, mixed[3] = { 1, -1, 1 };
    quadric_table(c, k0, m, mixed, k, e);
    bm_ktable t = { .npoints = 343, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_ALL, NULL, NULL, &res, &n, NULL,
                                           NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_SADDLE);
    for (int a = 0; a < 3; a++)
        g_assert_cmpfloat_with_epsilon(res[0].k[a], k0[a], 1e-9);
    bm_mass_tensors_free(res, n);
}

static void test_table_minimum_beyond_data(void)
{
    /* the minimum lies 0.05 1/A beyond the cube: not an extremum of the table;
     * its estimate is kept apart (outside_data, never converged) */
    static double k[343 * 3], e[343];
    const double c[3] = { 0, 0, 0 }, k0[3] = { 0.08, 0.0, 0.0 };
    const double m[3] = { 0.3, 0.5, 0.8 }, up[3] = { 1, 1, 1 };
    quadric_table(c, k0, m, up, k, e);
    bm_ktable t = { .npoints = 343, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    bm_warnings notes = { 0 };
    bm_errbuf err = { 0 };
    bm_status st = bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n,
                                          &notes, &err);
    if (st != BM_OK)
        g_test_message("%s", err.message);
    g_assert_cmpint(st, ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_true(res[0].outside_data);
    g_assert_cmpint(res[0].converged, ==, 0);
    g_assert_cmpfloat_with_epsilon(res[0].k[0], 0.08, 1e-6);
    g_assert_true(bm_warnings_has(&notes, BM_WARN_NO_EXTREMUM));
    bm_mass_tensors_free(res, n);
    bm_warnings_clear(&notes);
}

static void test_table_given_point_not_stationary(void)
{
    /* a given k where the gradient does not vanish, on a saddle-shaped table:
     * "not stationary", never a saddle */
    static double k[343 * 3], e[343];
    const double c[3] = { 0, 0, 0 }, k0[3] = { 0, 0, 0 };
    const double m[3] = { 0.3, 0.5, 0.8 }, mixed[3] = { 1, -1, 1 };
    quadric_table(c, k0, m, mixed, k, e);
    bm_ktable t = { .npoints = 343, .k = k, .nbands = 1, .energies = e };
    bm_mass_tensor *res;
    size_t n;
    const double at[3] = { 0.02, 0.01, 0.0 };
    g_assert_cmpint(bm_ktable_mass_tensors(&t, 0, BM_SEARCH_MINIMUM, at, NULL, &res, &n, NULL,
                                           NULL), ==, BM_OK);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_NOT_STATIONARY);
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_NOT_STATIONARY));
    g_assert_false(bm_warnings_has(&res[0].warnings, BM_WARN_SADDLE_POINT));
    bm_mass_tensors_free(res, n);
}


/* ------------------------------------------------------- numerical edges */

/* E = -sum cos(k_i a) eV on n^3 (or n x n x 1) meshes: a first harmonic, so
 * the interpolant is exact from n = 3; d2E/dk2 = a^2 eV A^2 at Gamma, so
 * m* = (hbar^2/m_e) / a^2 (mathematical identity).
 * Coarse meshes were once called conical (the doubled step of the cone test
 * reached round the zone). */
static void test_cosine_coarse_meshes(void)
{
    const double a = 4.0, want = BM_HBAR2_OVER_ME_EV_A2 / (a * a);
    const size_t meshes[3][3] = { { 4, 4, 4 }, { 3, 3, 3 }, { 4, 4, 1 } };
    for (int q = 0; q < 3; q++) {
        const size_t *m = meshes[q];
        size_t np = m[0] * m[1] * m[2];
        double *e = malloc(np * sizeof *e);
        for (size_t i = 0; i < m[0]; i++)
            for (size_t j = 0; j < m[1]; j++)
                for (size_t l = 0; l < m[2]; l++)
                    e[(i * m[1] + j) * m[2] + l] = -cos(2 * M_PI * (double)i / m[0])
                        - cos(2 * M_PI * (double)j / m[1])
                        - (m[2] > 1 ? cos(2 * M_PI * (double)l / m[2]) : 0.0);
        bm_grid g = { .mesh = { m[0], m[1], m[2] }, .nbands = 1, .energies = e };
        double recip[3][3];
        cubic(a, recip);
        memcpy(g.recip, recip, sizeof recip);
        bm_mass_tensor *res;
        size_t n;
        g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, NULL),
                        ==, BM_OK);
        g_assert_cmpint(res[0].kind, ==, BM_EXTREMUM_MINIMUM);
        g_assert_false(bm_warnings_has(&res[0].warnings, BM_WARN_CONICAL_POINT));
        int dims = m[2] > 1 ? 3 : 2;
        for (int d = 0; d < dims; d++)
            g_assert_cmpfloat_with_epsilon(res[0].masses[d], want, 1e-9 * want);
        bm_mass_tensors_free(res, n);
        free(e);
    }
}

/* The domain: |E| <= 1e6 eV and |k_i| <= 1e3 1/A, refused by name beyond. */
static void test_input_domain(void)
{
    double e[8];
    for (int p = 0; p < 8; p++)
        e[p] = 1e300;
    bm_grid g = { .mesh = { 2, 2, 2 }, .nbands = 1, .energies = e };
    cubic(4.0, g.recip);
    bm_mass_tensor *res = NULL;
    size_t n = 0;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, NULL, NULL, &res, &n, &err),
                    ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "outside the domain"));
    for (int p = 0; p < 8; p++)
        e[p] = (double)p;
    const double far[3] = { 1e17, 0, 0 };
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_MINIMUM, far, NULL, &res, &n, &err),
                    ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "k[0] = 1e+17"));
}

/* A rough band (deterministic noise on a 32^3 mesh: some 2,400 local
 * extrema) costs at most BM_GRID_MAX_EXTREMA fits: the search keeps those
 * closest in energy to the lowest minimum and highest maximum, so both of
 * those are reported, and says how many it found. The counts are a property
 * of the noise, not physics: only the cap and the kept ends are checked. */
static void test_rough_band_capped(void)
{
    enum { n = 32 };
    static double e[n * n * n];
    guint32 x = 12345u;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t p = 0; p < G_N_ELEMENTS(e); p++) {
        x = x * 1664525u + 1013904223u;   /* Numerical Recipes LCG */
        e[p] = (double)(x >> 8) / 16777216.0;
        lo = fmin(lo, e[p]);
        hi = fmax(hi, e[p]);
    }
    double recip[3][3] = { { 1.5, 0, 0 }, { 0, 1.5, 0 }, { 0, 0, 1.5 } };
    bm_grid g = { .mesh = { n, n, n }, .nbands = 1, .energies = e };
    memcpy(g.recip, recip, sizeof recip);
    bm_mass_tensor *res;
    size_t nr;
    g_assert_cmpint(bm_grid_mass_tensors(&g, 0, BM_SEARCH_ALL, NULL, NULL, &res, &nr, NULL),
                    ==, BM_OK);
    g_assert_cmpuint(nr, <=, BM_GRID_MAX_EXTREMA);
    g_assert_cmpuint(nr, >, BM_GRID_MAX_EXTREMA / 2);
    g_assert_true(bm_warnings_has(&res[0].warnings, BM_WARN_EXTREMA_CAPPED));
    size_t found = 0;
    for (size_t i = 0; i < res[0].warnings.count; i++)
        if (res[0].warnings.items[i].code == BM_WARN_EXTREMA_CAPPED)
            g_assert_cmpint(sscanf(res[0].warnings.items[i].text, "the band has %zu", &found),
                            ==, 1);
    g_assert_cmpuint(found, >, BM_GRID_MAX_EXTREMA);
    double emin = INFINITY, emax = -INFINITY;
    for (size_t i = 0; i < nr; i++) {
        emin = fmin(emin, res[i].energy_ev);
        emax = fmax(emax, res[i].energy_ev);
    }
    g_assert_cmpfloat(emin, <=, lo + 0.05);
    g_assert_cmpfloat(emax, >=, hi - 0.05);
    bm_mass_tensors_free(res, nr);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/core/extrema/tight-binding", test_tight_binding);
    g_test_add_func("/core/extrema/accuracy-12", test_accuracy_12);
    g_test_add_func("/core/extrema/rotated-ellipsoid", test_rotated_ellipsoid);
    g_test_add_func("/core/extrema/valence-maximum", test_valence_maximum);
    g_test_add_func("/core/extrema/hexagonal", test_hexagonal);
    g_test_add_func("/core/extrema/fcc", test_fcc);
    g_test_add_func("/core/extrema/saddle", test_saddle);
    g_test_add_func("/core/extrema/sheet", test_sheet);
    g_test_add_func("/core/extrema/all", test_all);
    g_test_add_func("/core/extrema/free-electron", test_free_electron);
    g_test_add_func("/core/extrema/cone", test_cone);
    g_test_add_func("/core/extrema/wrapped-fit", test_wrapped_fit);
    g_test_add_func("/core/extrema/flat", test_flat);
    g_test_add_func("/core/extrema/degenerate", test_degenerate);
    g_test_add_func("/core/extrema/heavy", test_heavy);
    g_test_add_func("/core/extrema/table-parabola", test_table_parabola);
    g_test_add_func("/core/extrema/table-nonparabolic", test_table_nonparabolic);
    g_test_add_func("/core/extrema/table-line", test_table_line);
    g_test_add_func("/core/extrema/table-plane-cone", test_table_plane_and_cone);
    g_test_add_func("/core/extrema/bad-input", test_bad_input);
    g_test_add_func("/extrema/cosine-coarse-meshes", test_cosine_coarse_meshes);
    g_test_add_func("/extrema/input-domain", test_input_domain);
    g_test_add_func("/extrema/table-extremum-inside", test_table_extremum_inside);
    g_test_add_func("/extrema/table-saddle-once", test_table_saddle_once);
    g_test_add_func("/extrema/table-minimum-beyond-data", test_table_minimum_beyond_data);
    g_test_add_func("/extrema/table-given-point-not-stationary", test_table_given_point_not_stationary);
    g_test_add_func("/extrema/rough-band-capped", test_rough_band_capped);
    return g_test_run();
}
