/* test-cuts.c: band cuts for plotting (bm-cuts.h): the samples of a grid and
 * a table near a line, the quadric's energy on it, the interpolated band on
 * it, and the fitted Kane band's energy (bm_kane_fit_energy). */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-bandinterp.h"
#include "bm-cuts.h"
#include "bm-kane.h"

/* hbar^2 / (2 m_e) = 3.80998 eV Angstrom^2 (CODATA 2018: hbar = 1.054571817e-34
 * J s, m_e = 9.1093837015e-31 kg, e = 1.602176634e-19 C; from memory). */
#define HB2M_HALF_REF 3.80998

#define N 12
#define A 1.0   /* |b_i| = 1 1/Angstrom: a simple cubic reciprocal lattice */

/* E = 3.80998 |k|^2 / 0.5 on the nearest image of each mesh point: a parabola
 * of mass 0.5 m_e at Gamma. */
static double parabola(const double k[3])
{
    return HB2M_HALF_REF * (k[0] * k[0] + k[1] * k[1] + k[2] * k[2]) / 0.5;
}

static double *mesh_energies(void)
{
    double *e = g_new(double, N * N * N);
    for (int i = 0; i < N; i++)
        for (int j = 0; j < N; j++)
            for (int l = 0; l < N; l++) {
                int idx[3] = { i, j, l };
                double k[3];
                for (int a = 0; a < 3; a++)
                    k[a] = A * ((double)idx[a] / N - (idx[a] > N / 2 ? 1.0 : 0.0));
                e[(i * N + j) * N + l] = parabola(k);
            }
    return e;
}

static bm_grid make_grid(const double *e)
{
    bm_grid g;
    memset(&g, 0, sizeof g);
    for (int a = 0; a < 3; a++)
        g.recip[a][a] = A;
    g.mesh[0] = g.mesh[1] = g.mesh[2] = N;
    g.nbands = 1;
    g.energies = e;
    return g;
}

static void test_grid_samples(void)
{
    g_autofree double *e = mesh_energies();
    bm_grid g = make_grid(e);
    bm_line_samples s;
    bm_errbuf err = { BM_OK, "" };
    double k0[3] = { 0, 0, 0 }, x[3] = { 2, 0, 0 }, d[3] = { 1, 1, 0 };
    /* along [100]: the mesh points j / 12 for |j| <= 3 (reach 0.26), exactly on
     * the line; their energies are the parabola's (identity) */
    g_assert_cmpint(bm_grid_line_samples(&g, 0, k0, x, 0.26, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 7);
    for (size_t i = 0; i < s.n; i++) {
        double q = ((double)i - 3.0) / N, k[3] = { q, 0, 0 };
        g_assert_cmpfloat_with_epsilon(s.q[i], q, 1e-12);
        g_assert_cmpfloat_with_epsilon(s.e[i], parabola(k), 1e-12);
    }
    bm_line_samples_clear(&s);
    /* along [110]: the points (j, j, 0) / 12, at q = sqrt(2) j / 12 */
    g_assert_cmpint(bm_grid_line_samples(&g, 0, k0, d, 0.3, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 5);
    g_assert_cmpfloat_with_epsilon(s.q[4], 2.0 * sqrt(2.0) / N, 1e-12);
    bm_line_samples_clear(&s);
    /* through a point between mesh planes: the points within half a step */
    double k1[3] = { 0, 0.03, 0 };
    g_assert_cmpint(bm_grid_line_samples(&g, 0, k1, x, 0.26, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 7);
    bm_line_samples_clear(&s);
    double k2[3] = { 0, 0.5 / N, 0.5 / N };   /* sqrt(2) / 2 steps away: none */
    g_assert_cmpint(bm_grid_line_samples(&g, 0, k2, x, 0.26, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 0);
    bm_line_samples_clear(&s);
    /* bad input */
    double zero[3] = { 0, 0, 0 };
    g_assert_cmpint(bm_grid_line_samples(&g, 0, k0, zero, 0.2, &s, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_grid_line_samples(&g, 1, k0, x, 0.2, &s, &err), ==, BM_EINVAL);
}

static void test_grid_band(void)
{
    /* the interpolant passes through the mesh energies (an interpolating
     * series carried by a spline), so at the mesh points of the line it is
     * the parabola */
    g_autofree double *e = mesh_energies();
    bm_grid g = make_grid(e);
    bm_errbuf err = { BM_OK, "" };
    double k0[3] = { 0, 0, 0 }, x[3] = { 1, 0, 0 }, q[3] = { -2.0 / N, 0.0, 1.0 / N }, out[3];
    bm_bandinterp *bi = bm_bandinterp_new(&g, BM_BANDINTERP_PAIR_GAP_EV);
    g_assert_nonnull(bi);
    g_assert_cmpint(bm_grid_line_band(&g, bi, 0, k0, x, q, 3, out, &err), ==, BM_OK);
    bm_bandinterp_free(bi);
    for (int i = 0; i < 3; i++) {
        double k[3] = { q[i], 0, 0 };
        g_assert_cmpfloat_with_epsilon(out[i], parabola(k), 1e-9);
    }
}

static void test_table_samples(void)
{
    /* a 5 x 5 map in kx, ky with spacing 0.01 */
    double k[25][3], e[25];
    for (int i = 0; i < 25; i++) {
        k[i][0] = 0.01 * (i % 5 - 2);
        k[i][1] = 0.01 * (i / 5 - 2);
        k[i][2] = 0;
        e[i] = parabola(k[i]);
    }
    bm_ktable t = { 25, &k[0][0], 1, e };
    bm_line_samples s;
    bm_errbuf err = { BM_OK, "" };
    double k0[3] = { 0, 0, 0 }, y[3] = { 0, 1, 0 }, d[3] = { 1, 1, 0 };
    g_assert_cmpint(bm_ktable_line_samples(&t, 0, k0, y, 1.0, 0.005, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 5);
    for (size_t i = 1; i < s.n; i++)
        g_assert_cmpfloat(s.q[i], >, s.q[i - 1]);   /* by increasing q */
    bm_line_samples_clear(&s);
    g_assert_cmpint(bm_ktable_line_samples(&t, 0, k0, d, 1.0, 0.005, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 5);   /* the diagonal */
    bm_line_samples_clear(&s);
    g_assert_cmpint(bm_ktable_line_samples(&t, 0, k0, d, 0.015, 0.005, &s, &err), ==, BM_OK);
    g_assert_cmpuint(s.n, ==, 3);   /* reach sqrt(2) 0.01 = 0.0141 < 0.015 < 0.0283 */
    bm_line_samples_clear(&s);
}

static void test_quadric_energy(void)
{
    /* E0 + hbar^2 q^2 / (2 m m_e) along a principal axis of mass m (definition
     * of the effective mass; hbar^2 / 2 m_e from CODATA, above) */
    bm_mass_tensor t;
    memset(&t, 0, sizeof t);
    t.energy_ev = 0.4;
    t.inv_mass[0][0] = 1.0 / 0.19;
    t.inv_mass[1][1] = 1.0 / 0.19;
    t.inv_mass[2][2] = 1.0 / 0.92;
    double dk[3] = { 0, 0, 0.05 };
    g_assert_cmpfloat_with_epsilon(bm_mass_tensor_energy(&t, dk),
                                   0.4 + HB2M_HALF_REF * 0.05 * 0.05 / 0.92, 1e-6);
    double dk2[3] = { 0.03, 0, 0 };
    g_assert_cmpfloat_with_epsilon(bm_mass_tensor_energy(&t, dk2),
                                   0.4 + HB2M_HALF_REF * 0.03 * 0.03 / 0.19, 1e-6);
    /* the reach: the quadric climbs energy E at sqrt(2 m E m_e) / hbar */
    double r = bm_quadric_reach(-0.5, 0.2);
    g_assert_cmpfloat_with_epsilon(HB2M_HALF_REF * r * r / 0.5, 0.2, 1e-5);
}

static void test_kane_energy(void)
{
    /* points of an exact Kane band E (1 + alpha E) = hbar^2 q^2 / 2m along one
     * direction, centred at q = 0.004: the fit finds it, and its energy at q
     * is the closed form E = (sqrt(1 + 4 alpha g) - 1) / (2 alpha) (identity) */
    const double m = 0.067, alpha = 0.64, c = 0.004;
    double q[41][3], e[41];
    for (int i = 0; i < 41; i++) {
        q[i][0] = 0.004 * (i - 20);
        q[i][1] = q[i][2] = 0;
        double gam = HB2M_HALF_REF * (q[i][0] - c) * (q[i][0] - c) / m;
        e[i] = (sqrt(1 + 4 * alpha * gam) - 1) / (2 * alpha);
    }
    bm_kane_fit f;
    bm_errbuf err = { BM_OK, "" };
    g_assert_cmpint(bm_kane_fit_points((const double (*)[3])q, e, 41, 1, 1, &f, &err), ==,
                    BM_OK);
    g_assert_cmpfloat_with_epsilon(f.shift[0], c, 1e-7);
    for (int i = 0; i < 41; i += 5)
        g_assert_cmpfloat_with_epsilon(bm_kane_fit_energy(&f, q[i]), e[i], 1e-7);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/cuts/grid-samples", test_grid_samples);
    g_test_add_func("/cuts/grid-band", test_grid_band);
    g_test_add_func("/cuts/table-samples", test_table_samples);
    g_test_add_func("/cuts/quadric-energy", test_quadric_energy);
    g_test_add_func("/cuts/kane-energy", test_kane_energy);
    return g_test_run();
}
