/* test-bandinterp.c: the band interpolant against identities (exact at mesh
 * points, its convergence, derivatives consistent with values) and
 * the pair treatment at a crossing of sorted bands. */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-bandinterp.h"

static double smooth_band(const double f[3])
{
    /* a smooth periodic band with mixed harmonics, eV */
    return exp(0.4 * cos(2 * G_PI * f[0])) * (1.0 + 0.3 * sin(2 * G_PI * (f[1] + f[2])))
           + 0.2 * cos(2 * G_PI * (f[0] - 2 * f[2]));
}

static bm_grid grid_of(size_t n1, size_t n2, size_t n3, size_t nb, double *e)
{
    bm_grid g;
    memset(&g, 0, sizeof g);
    for (int i = 0; i < 3; i++)
        g.recip[i][i] = 1.0;
    g.mesh[0] = n1, g.mesh[1] = n2, g.mesh[2] = n3;
    g.nbands = nb;
    g.energies = e;
    return g;
}

static double *fill(size_t n1, size_t n2, size_t n3, const double off[3],
                    double (*fn)(const double *))
{
    double *e = g_new(double, n1 * n2 * n3);
    for (size_t i = 0; i < n1; i++)
        for (size_t j = 0; j < n2; j++)
            for (size_t l = 0; l < n3; l++) {
                double f[3] = {(i + off[0]) / n1, (j + off[1]) / n2, (l + off[2]) / n3};
                e[(i * n2 + j) * n3 + l] = fn(f);
            }
    return e;
}

static void test_exact_at_mesh_points(void)
{
    const size_t n[3] = {7, 6, 5};
    const double off[3] = {0.0, 0.5, 0.0};
    double *e = fill(n[0], n[1], n[2], off, smooth_band);
    bm_grid g = grid_of(n[0], n[1], n[2], 1, e);
    g.offset[1] = 0.5;
    bm_bandinterp *bi = bm_bandinterp_new(&g, 0.0);
    for (size_t i = 0; i < n[0]; i++)
        for (size_t j = 0; j < n[1]; j++)
            for (size_t l = 0; l < n[2]; l++) {
                /* one period away as well: the spline is periodic */
                double f[3] = {(i + off[0]) / n[0] - 1.0, (j + off[1]) / n[1] + 2.0,
                               (l + off[2]) / n[2]}, v;
                bm_bandinterp_eval(bi, 0, f, &v, NULL, NULL);
                g_assert_cmpfloat(fabs(v - e[(i * n[1] + j) * n[2] + l]), <, 1e-12);
            }
    bm_bandinterp_free(bi);
    g_free(e);
}

static double max_error(size_t n)
{
    const double off[3] = {0, 0, 0};
    double *e = fill(n, n, n, off, smooth_band);
    bm_grid g = grid_of(n, n, n, 1, e);
    bm_bandinterp *bi = bm_bandinterp_new(&g, 0.0);
    double worst = 0.0;
    GRand *r = g_rand_new_with_seed(7);
    for (int s = 0; s < 2000; s++) {
        double f[3] = {g_rand_double(r), g_rand_double(r), g_rand_double(r)}, v;
        bm_bandinterp_eval(bi, 0, f, &v, NULL, NULL);
        worst = fmax(worst, fabs(v - smooth_band(f)));
    }
    g_rand_free(r);
    bm_bandinterp_free(bi);
    g_free(e);
    return worst;
}

static void test_convergence(void)
{
    /* Below BM_BANDINTERP_FINE_MIN points an axis is carried by the smooth
     * series, which for an analytic band converges faster than any power of
     * the step (a trigonometric interpolant of an analytic periodic function
     * converges geometrically: Trefethen, Approximation Theory and
     * Approximation Practice, 2013, ch. 8; from memory): halving the step
     * divides the error by far more than the spline's 16 (measured 76 from 8
     * to 16), until the spline that carries the series on the fine mesh sets
     * the error (at 32: 64 fine points, as the spline alone on 64).  From 64
     * points on the cubic spline alone carries the mesh, and converges as h^4
     * (de Boor, A Practical Guide to Splines, 1978, ch. V; from memory). */
    double e8 = max_error(8), e16 = max_error(16), e32 = max_error(32);
    double e64 = max_error(64), e128 = max_error(128);
    g_test_message("max error 8: %.3g, 16: %.3g, 32: %.3g; spline alone 64: %.3g, 128: %.3g",
                   e8, e16, e32, e64, e128);
    g_assert_cmpfloat(e8 / e16, >, 50.0);
    g_assert_cmpfloat(e16, <, 1e-4);
    g_assert_cmpfloat(e32, <, 2.0 * e64);
    g_assert_cmpfloat(e64 / e128, >, 13.0);
    g_assert_cmpfloat(e64, <, 5e-6);
}

static void test_derivatives_consistent(void)
{
    /* gradient and Hessian against central differences of the spline itself
     * (it is C2, so the differences converge to them) */
    const double off[3] = {0, 0, 0};
    double *e = fill(9, 8, 1, off, smooth_band);
    bm_grid g = grid_of(9, 8, 1, 1, e);
    bm_bandinterp *bi = bm_bandinterp_new(&g, 0.0);
    const double f[3] = {0.3137, 0.8712, 0.2}, h = 1e-5;
    double v, gr[3], hs[3][3];
    bm_bandinterp_eval(bi, 0, f, &v, gr, hs);
    for (int a = 0; a < 3; a++) {
        double fp[3], fm[3], vp, vm, gp[3], gm[3];
        memcpy(fp, f, sizeof fp);
        memcpy(fm, f, sizeof fm);
        fp[a] += h, fm[a] -= h;
        bm_bandinterp_eval(bi, 0, fp, &vp, gp, NULL);
        bm_bandinterp_eval(bi, 0, fm, &vm, gm, NULL);
        g_assert_cmpfloat(fabs((vp - vm) / (2 * h) - gr[a]), <, 1e-6 * (1 + fabs(gr[a])));
        for (int b = 0; b < 3; b++)
            g_assert_cmpfloat(fabs((gp[b] - gm[b]) / (2 * h) - hs[a][b]), <,
                              1e-5 * (1 + fabs(hs[a][b])));
    }
    /* the one-point axis contributes nothing */
    g_assert_cmpfloat(gr[2], ==, 0.0);
    g_assert_cmpfloat(hs[2][2], ==, 0.0);
    bm_bandinterp_free(bi);
    g_free(e);
}

/* Two smooth bands that cross on the plane f1 = 1/4 (and 3/4), delivered
 * sorted by energy as band codes do: each sorted band has a kink there. */
static double band_a(const double f[3]) { return cos(2 * G_PI * f[0]) + 0.1 * cos(2 * G_PI * f[1]); }
static double band_b(const double f[3]) { return -cos(2 * G_PI * f[0]) + 0.1 * cos(2 * G_PI * f[1]); }
static double sorted_lo(const double f[3]) { return fmin(band_a(f), band_b(f)); }
static double sorted_hi(const double f[3]) { return fmax(band_a(f), band_b(f)); }

static void crossing_errors(size_t n, double *worst_plain, double *worst_pair)
{
    const double off[3] = {0, 0, 0};
    double *lo = fill(n, n, 1, off, sorted_lo), *hi = fill(n, n, 1, off, sorted_hi);
    double *e = g_new(double, 2 * n * n);
    memcpy(e, lo, n * n * sizeof *e);
    memcpy(e + n * n, hi, n * n * sizeof *e);
    bm_grid g = grid_of(n, n, 1, 2, e);
    bm_bandinterp *plain = bm_bandinterp_new(&g, 0.0);
    bm_bandinterp *pair = bm_bandinterp_new(&g, BM_BANDINTERP_PAIR_GAP_EV);
    *worst_plain = *worst_pair = 0.0;
    /* within two 24-mesh steps of the crossing, where the kink is */
    for (int s = 0; s <= 200; s++) {
        double f[3] = {0.25 + (s - 100) * 0.0008, 0.137, 0.0}, vp, vq;
        for (size_t b = 0; b < 2; b++) {
            double truth = b ? sorted_hi(f) : sorted_lo(f);
            bm_bandinterp_eval(plain, b, f, &vp, NULL, NULL);
            bm_bandinterp_eval(pair, b, f, &vq, NULL, NULL);
            *worst_plain = fmax(*worst_plain, fabs(vp - truth));
            *worst_pair = fmax(*worst_pair, fabs(vq - truth));
        }
    }
    bm_bandinterp_free(plain);
    bm_bandinterp_free(pair);
    g_free(lo), g_free(hi), g_free(e);
}

static void test_pair_at_crossing(void)
{
    /* A spline of a kinked band errs by O(h) next to the kink (slope jump
     * times a step).  The pair's sum and squared difference are smooth, so
     * their splines err by O(h^4), and the square root that recovers the
     * band turns that into O(h^2) at the crossing itself: halving the step
     * divides the plain error by about 2 and the pair error by about 4. */
    double p24, q24, p48, q48;
    crossing_errors(24, &p24, &q24);
    crossing_errors(48, &p48, &q48);
    g_test_message("near the crossing: plain %.3g / %.3g eV, pair %.3g / %.3g eV (24 / 48 points)",
                   p24, p48, q24, q48);
    g_assert_cmpfloat(q24, <, p24 / 2.0);
    g_assert_cmpfloat(p24 / p48, <, 2.6);
    g_assert_cmpfloat(q24 / q48, >, 2.8);   /* 3.06: approaching 4 */
}

static double band_shift(const double f[3], int b)
{
    /* five bands 0.2 eV apart that wander into each other's pair range */
    return smooth_band(f) * (1.0 + 0.1 * b) + 0.2 * b;
}

static void test_band_range(void)
{
    /* an interpolant of some bands only: the bands it promises (lo - 1 ..
     * hi + 1) give the same bits as the whole grid's interpolant */
    const size_t n = 10, nb = 5, npt = n * n * n;
    double *e = g_new(double, nb * npt);
    for (size_t b = 0; b < nb; b++)
        for (size_t m = 0; m < npt; m++) {
            double f[3] = { (double)(m / (n * n)) / n, (double)((m / n) % n) / n,
                            (double)(m % n) / n };
            e[b * npt + m] = band_shift(f, (int)b);
        }
    bm_grid g = grid_of(n, n, n, nb, e);
    bm_bandinterp *all = bm_bandinterp_new(&g, BM_BANDINTERP_PAIR_GAP_EV);
    bm_bandinterp *some = bm_bandinterp_new_bands(&g, BM_BANDINTERP_PAIR_GAP_EV, 2, 2);
    g_assert_nonnull(all);
    g_assert_nonnull(some);
    GRand *r = g_rand_new_with_seed(11);
    for (int s = 0; s < 200; s++) {
        double f[3] = { g_rand_double(r), g_rand_double(r), g_rand_double(r) };
        for (size_t b = 1; b <= 3; b++) {
            double ea, es, ga[3], gs[3];
            bm_bandinterp_eval(all, b, f, &ea, ga, NULL);
            bm_bandinterp_eval(some, b, f, &es, gs, NULL);
            g_assert_cmpfloat(ea, ==, es);
            for (int i = 0; i < 3; i++)
                g_assert_cmpfloat(ga[i], ==, gs[i]);
        }
    }
    size_t cell[3] = { 3, 4, 5 };
    double la, ha, ls, hs;
    bm_bandinterp_cell_bounds(all, 3, cell, &la, &ha);
    bm_bandinterp_cell_bounds(some, 3, cell, &ls, &hs);
    g_assert_cmpfloat(la, ==, ls);
    g_assert_cmpfloat(ha, ==, hs);
    g_rand_free(r);
    bm_bandinterp_free(some);
    bm_bandinterp_free(all);
    g_assert_null(bm_bandinterp_new_bands(&g, 0.0, 3, 2));
    g_assert_null(bm_bandinterp_new_bands(&g, 0.0, 0, nb));
    g_free(e);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/bandinterp/exact-at-mesh-points", test_exact_at_mesh_points);
    g_test_add_func("/bandinterp/convergence", test_convergence);
    g_test_add_func("/bandinterp/derivatives", test_derivatives_consistent);
    g_test_add_func("/bandinterp/pair-at-crossing", test_pair_at_crossing);
    g_test_add_func("/bandinterp/band-range", test_band_range);
    return g_test_run();
}
