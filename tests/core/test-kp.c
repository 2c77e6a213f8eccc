/* test-kp.c: the k.p fits of degenerate extrema (core/bm-kp.h): parameters
 * recovered from model bands, the directional and DOS masses against the
 * closed forms of the models, and the cubic-frame test. */
#include <glib.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bm-holes.h"
#include "bm-kp.h"
#include "bm-linalg.h"
#include "bm-units.h"

#define C_KIN (0.5 * BM_HBAR2_OVER_ME_EV_A2)

/* Points on the shells of a cubic star (the seven directions [100], [110],
 * [111], [210], [211], [221], [321] and their images) at three radii. */
static size_t star_points(double (*k)[3], size_t cap, const double radii[3])
{
    static const int base[7][3] = {
        { 1, 0, 0 }, { 1, 1, 0 }, { 1, 1, 1 }, { 2, 1, 0 }, { 2, 1, 1 }, { 2, 2, 1 }, { 3, 2, 1 },
    };
    static const int perm[6][3] = { { 0, 1, 2 }, { 1, 2, 0 }, { 2, 0, 1 },
                                    { 1, 0, 2 }, { 0, 2, 1 }, { 2, 1, 0 } };
    size_t n = 0;
    memset(k[n++], 0, sizeof k[0]);
    for (int r = 0; r < 3; r++)
        for (int b = 0; b < 7; b++)
            for (int p = 0; p < 6; p++)
                for (int s = 0; s < 8; s++) {
                    double v[3];
                    for (int a = 0; a < 3; a++)
                        v[a] = base[b][perm[p][a]] * ((s >> a) & 1 ? -1.0 : 1.0);
                    double len = bm_norm3(v);
                    /* duplicates are harmless to a least-squares fit */
                    if (n < cap)
                        for (int a = 0; a < 3; a++)
                            k[n][a] = radii[r] * v[a] / len;
                    n += n < cap;
                }
    return n;
}

/* The threefold Hamiltonian of bm-kp.h with one quartic term, kx^4 on the
 * diagonal, sorted eigenvalues in eV. */
static void threefold_energies(const double lmn[3], double q4, const double k[3], double e[3])
{
    double h[3][3] = { { 0 } }, v[3][3];
    for (int i = 0; i < 3; i++) {
        int j = (i + 1) % 3, l = (i + 2) % 3;
        h[i][i] = lmn[0] * k[i] * k[i] + lmn[1] * (k[j] * k[j] + k[l] * k[l])
                + q4 * pow(k[i], 4);
        h[i][j] = h[j][i] = lmn[2] * k[i] * k[j];
    }
    g_assert_cmpint(bm_symeig(h, 3, e, v), ==, 0);
    for (int b = 0; b < 3; b++)
        e[b] *= C_KIN;
}

static void test_threefold(void)
{
    /* silicon-like parameters (the sizes of the Si corpus; any values would do) */
    const double lmn[3] = { -6.17, -3.80, -9.24 };
    static double k[2000][3];
    const double radii[3] = { 0.01, 0.02, 0.03 };
    size_t n = star_points(k, 2000, radii);
    double *e = malloc(3 * n * sizeof *e);
    for (size_t i = 0; i < n; i++) {
        double ev[3];
        threefold_energies(lmn, 40.0, k[i], ev);
        for (int b = 0; b < 3; b++)
            e[b * n + i] = 0.25 + ev[b];
    }
    bm_kp_data d = { .npoints = n, .k = &k[0][0], .nbands = 3, .energies = e };
    bm_kp_fit f;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_kp_fit_bands(&d, &f, &err), ==, BM_OK);
    g_assert_cmpint(f.model, ==, BM_KP_THREEFOLD);
    g_assert_true(f.quartic);
    g_assert_cmpfloat_with_epsilon(f.e0_ev, 0.25, 1e-9);
    for (int p = 0; p < 3; p++)
        g_assert_cmpfloat_with_epsilon(f.lmn[p], lmn[p], 1e-6);
    /* Directional masses, closed forms of the model (mathematical identity):
     * [100]: L, M, M; [110]: (L + M -/+ N)/2 and M; [111]: (L + 2M + 2N)/3 and
     * (L + 2M - N)/3 twice; the mass is the inverse, bands ascending. */
    double L = lmn[0], M = lmn[1], N = lmn[2];
    double want[3][3] = {
        { 1 / L, 1 / M, 1 / M },
        { 2 / (L + M - N), 1 / M, 2 / (L + M + N) },
        { 3 / (L + 2 * M + 2 * N), 3 / (L + 2 * M - N), 3 / (L + 2 * M - N) },
    };
    for (int t = 0; t < 3; t++) {
        double w[3] = { want[t][0], want[t][1], want[t][2] };
        /* ascending band energy is ascending eigenvalue: descending 1/m for holes */
        for (int a = 0; a < 3; a++)
            for (int b = a + 1; b < 3; b++)
                if (1 / w[b] < 1 / w[a]) {
                    double s = w[a]; w[a] = w[b]; w[b] = s;
                }
        for (int b = 0; b < 3; b++)
            g_assert_cmpfloat_with_epsilon(f.directional[t][b], w[b], 1e-6 * fabs(w[b]));
    }
    /* the J = 3/2 projection (the map in bm-kp.h) */
    g_assert_cmpfloat_with_epsilon(f.gamma[0], -(L + 2 * M) / 3, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.gamma[1], -(L - M) / 6, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.gamma[2], -N / 6, 1e-6);
    /* the error estimate is conservative: the quadratic check fit carries the
     * quartic term (1.6 % of the heavy [110] curvature, a near cancellation) */
    g_test_message("rel_error %g", f.rel_error);
    g_assert_true(f.rel_error > 0.0 && f.rel_error < 0.05);
    bm_warnings_clear(&f.warnings);
    free(e);
}

static void test_threefold_isotropic_dos(void)
{
    /* N = L - M makes H = M k^2 + (L - M) k k^T: eigenvalues M k^2 twice and
     * L k^2 (mathematical identity), so the DOS masses are 1/L, 1/M, 1/M */
    const double lmn[3] = { -8.0, -2.0, -6.0 };
    static double k[2000][3];
    const double radii[3] = { 0.01, 0.02, 0.03 };
    size_t n = star_points(k, 2000, radii);
    double *e = malloc(3 * n * sizeof *e);
    for (size_t i = 0; i < n; i++) {
        double ev[3];
        threefold_energies(lmn, 0.0, k[i], ev);
        for (int b = 0; b < 3; b++)
            e[b * n + i] = ev[b];
    }
    bm_kp_data d = { .npoints = n, .k = &k[0][0], .nbands = 3, .energies = e };
    bm_kp_fit f;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_kp_fit_bands(&d, &f, &err), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(f.dos_mass[0], 1 / -8.0, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.dos_mass[1], 1 / -2.0, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.dos_mass[2], 1 / -2.0, 1e-6);
    bm_warnings_clear(&f.warnings);
    free(e);
}

static void test_fourfold(void)
{
    /* GaAs Luttinger parameters 6.98, 2.06, 2.93 (Vurgaftman, Meyer &
     * Ram-Mohan, J. Appl. Phys. 89, 5815 (2001); from memory): bands from
     * the closed form, each twice (Kramers pairs) */
    bm_luttinger g = { 6.98, 2.06, 2.93 };
    static double k[2000][3];
    const double radii[3] = { 0.01, 0.02, 0.03 };
    size_t n = star_points(k, 2000, radii);
    double *e = malloc(4 * n * sizeof *e);
    for (size_t i = 0; i < n; i++) {
        const double *q = k[i];
        double k2 = bm_dot3(q, q);
        double s = q[0] * q[0] * q[1] * q[1] + q[1] * q[1] * q[2] * q[2] + q[2] * q[2] * q[0] * q[0];
        double r = sqrt(g.g2 * g.g2 * k2 * k2 + 3 * (g.g3 * g.g3 - g.g2 * g.g2) * s);
        e[0 * n + i] = e[1 * n + i] = -C_KIN * (g.g1 * k2 + 2 * r);
        e[2 * n + i] = e[3 * n + i] = -C_KIN * (g.g1 * k2 - 2 * r);
    }
    bm_kp_data d = { .npoints = n, .k = &k[0][0], .nbands = 4, .energies = e };
    bm_kp_fit f;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_kp_fit_bands(&d, &f, &err), ==, BM_OK);
    g_assert_cmpint(f.model, ==, BM_KP_FOURFOLD);
    g_assert_cmpfloat_with_epsilon(f.gamma[0], g.g1, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.gamma[1], g.g2, 1e-6);
    g_assert_cmpfloat_with_epsilon(f.gamma[2], g.g3, 1e-6);
    /* the same masses as hole-mass's Luttinger functions (one formula) */
    bm_luttinger_masses lm;
    g_assert_cmpint(bm_luttinger_masses_compute(&g, &lm, &err), ==, BM_OK);
    for (int t = 0; t < 3; t++) {
        g_assert_cmpfloat_with_epsilon(f.directional[t][0], -lm.light[t], 1e-6);
        g_assert_cmpfloat_with_epsilon(f.directional[t][1], -lm.heavy[t], 1e-6);
    }
    g_assert_cmpfloat_with_epsilon(f.dos_mass[0], -lm.light_dos_mass, 1e-5);
    g_assert_cmpfloat_with_epsilon(f.dos_mass[1], -lm.heavy_dos_mass, 1e-3 * lm.heavy_dos_mass);
    g_assert_cmpfloat_with_epsilon(f.luttinger_dos_mass, lm.combined_dos_mass, 1e-6);
    bm_warnings_clear(&lm.warnings);
    bm_warnings_clear(&f.warnings);
    free(e);
}

/* The line fit: bands of the threefold model plus alpha k^4 + beta k^6 (any
 * band that is a polynomial of degree three in k^2 along each line) on the
 * 13 lines of an fcc mesh through Gamma ([100] x 3, [110] x 6, [111] x 4, the
 * steps of a 24^3 silicon mesh): three points a line determine the cubic in
 * k^2 exactly, so L, M, N come back to rounding (an identity of polynomial
 * interpolation), however large the higher terms are at the line points. */
static void test_lines(void)
{
    const double lmn[3] = { -6.17, -3.80, -9.24 };
    const double alpha = 30.0, beta = -200.0;   /* eV A^4, eV A^6 */
    static const double fam[3][3] = { { 1, 0, 0 }, { 1, 1, 0 }, { 1, 1, 1 } };
    static const double famstep[3] = { 0.0964, 0.1363, 0.0835 };
    double dir[13][3], step[13];
    size_t nl = 0;
    for (int f = 0; f < 3; f++)
        for (int p = 0; p < 6; p++)
            for (int s = 0; s < 4; s++) {
                static const int perm[6][3] = { { 0, 1, 2 }, { 1, 2, 0 }, { 2, 0, 1 },
                                                { 1, 0, 2 }, { 0, 2, 1 }, { 2, 1, 0 } };
                double v[3];
                for (int a = 0; a < 3; a++)
                    v[a] = fam[f][perm[p][a]] * (a > 0 && ((s >> (a - 1)) & 1) ? -1.0 : 1.0);
                double len = bm_norm3(v);
                for (int a = 0; a < 3; a++)
                    v[a] /= len;
                int seen = 0;
                for (size_t q = 0; q < nl; q++)
                    seen |= fabs(fabs(bm_dot3(v, dir[q])) - 1.0) < 1e-12;
                if (seen)
                    continue;
                g_assert_cmpuint(nl, <, 13);
                memcpy(dir[nl], v, sizeof v);
                step[nl++] = famstep[f];
            }
    g_assert_cmpuint(nl, ==, 13);
    enum { P = 3 };
    double en[3 * 13 * (P + 1)];
    for (size_t l = 0; l < nl; l++)
        for (int j = 0; j <= P; j++) {
            double k[3], ev[3], kk = j * step[l];
            for (int a = 0; a < 3; a++)
                k[a] = kk * dir[l][a];
            threefold_energies(lmn, 0.0, k, ev);
            for (int b = 0; b < 3; b++)
                en[(b * nl + l) * (P + 1) + j] = -0.1 + ev[b] + alpha * pow(kk, 4)
                                                 + beta * pow(kk, 6);
        }
    bm_kp_lines lines = { .nlines = nl, .dir = &dir[0][0], .step = step, .npoints = P,
                          .nbands = 3, .energies = en };
    bm_kp_fit f;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_kp_fit_lines(&lines, &f, &err), ==, BM_OK);
    g_assert_cmpint(f.model, ==, BM_KP_THREEFOLD);
    g_assert_cmpfloat_with_epsilon(f.e0_ev, -0.1, 1e-9);
    for (int p = 0; p < 3; p++)
        g_assert_cmpfloat(fabs(f.lmn[p] / lmn[p] - 1.0), <, 1e-7);
    /* [100]: the light band is 1/L, the two others 1/M (closed form) */
    g_assert_cmpfloat(fabs(f.directional[0][0] * lmn[0] - 1.0), <, 1e-7);
    g_assert_cmpfloat(fabs(f.directional[0][1] * lmn[1] - 1.0), <, 1e-7);
    /* the error is the change against one point fewer a line: large here
     * (the higher terms are), never zero */
    g_assert_cmpfloat(f.rel_error, >, 0.0);
    g_assert_true(isfinite(f.rel_error));
    bm_warnings_clear(&f.warnings);

    /* lines of the [100] family alone do not fix N */
    lines.nlines = 3;
    double en3[3 * 3 * (P + 1)];
    for (int b = 0; b < 3; b++)
        for (int l = 0; l < 3; l++)
            memcpy(en3 + (b * 3 + l) * (P + 1), en + (b * nl + (size_t)l) * (P + 1),
                   sizeof(double) * (P + 1));
    lines.energies = en3;
    g_assert_cmpint(bm_kp_fit_lines(&lines, &f, &err), ==, BM_EINVAL);
    bm_warnings_clear(&f.warnings);
}

static void test_refusals(void)
{
    double k[2][3] = { { 0, 0, 0 }, { 0.01, 0, 0 } }, e[6] = { 0 };
    bm_kp_data d = { .npoints = 2, .k = &k[0][0], .nbands = 2, .energies = e };
    bm_kp_fit f;
    bm_errbuf err = { 0 };
    g_assert_cmpint(bm_kp_fit_bands(&d, &f, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "3 (no spin-orbit coupling), 4"));
    /* one line of points cannot separate L, M and N */
    d.nbands = 3;
    g_assert_cmpint(bm_kp_fit_bands(&d, &f, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "do not determine"));
}

static void test_cubic_frame(void)
{
    double a = 5.431, t = 2 * M_PI / a;
    double fcc[3][3] = { { -t, t, t }, { t, -t, t }, { t, t, -t } };
    g_assert_true(bm_kp_cubic_frame(fcc));
    double sc[3][3] = { { t, 0, 0 }, { 0, t, 0 }, { 0, 0, t } };
    g_assert_true(bm_kp_cubic_frame(sc));
    /* the same simple cubic lattice turned by 30 degrees about z */
    double c = cos(M_PI / 6), s = sin(M_PI / 6);
    double turned[3][3] = { { t * c, t * s, 0 }, { -t * s, t * c, 0 }, { 0, 0, t } };
    g_assert_false(bm_kp_cubic_frame(turned));
    double tetragonal[3][3] = { { t, 0, 0 }, { 0, t, 0 }, { 0, 0, 0.9 * t } };
    g_assert_false(bm_kp_cubic_frame(tetragonal));
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/kp/threefold", test_threefold);
    g_test_add_func("/kp/threefold-isotropic-dos", test_threefold_isotropic_dos);
    g_test_add_func("/kp/fourfold", test_fourfold);
    g_test_add_func("/kp/lines", test_lines);
    g_test_add_func("/kp/refusals", test_refusals);
    g_test_add_func("/kp/cubic-frame", test_cubic_frame);
    return g_test_run();
}
