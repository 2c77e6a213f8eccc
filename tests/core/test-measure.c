/* test-measure.c: masses from measurements: cyclotron resonance, the
 * Lifshitz-Kosevich temperature fit (exact data, SciPy curve_fit, coverage
 * of its standard error over seeded noise), the Dingle plot, and the
 * thermal mass from the specific heat (Kittel's table). */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-measure.h"
#include "bm-units.h"
#include <gsl/gsl_const_num.h>

/* ---- helpers ---------------------------------------------------------- */

/* A standard normal deviate from a seeded GRand (Box-Muller). */
static double gauss(GRand *r)
{
    double u1 = g_rand_double(r), u2 = g_rand_double(r);
    return sqrt(-2.0 * log(1.0 - u1)) * cos(2.0 * G_PI * u2);
}

static GString *json_array(GString *s, const char *key, const double *v, size_t n)
{
    g_string_append_printf(s, "\"%s\": [", key);
    for (size_t i = 0; i < n; i++) {
        gchar b[G_ASCII_DTOSTR_BUF_SIZE];
        g_string_append_printf(s, "%s%s", i ? ", " : "", g_ascii_dtostr(b, sizeof b, v[i]));
    }
    return g_string_append(s, "]");
}

/* Runs tests/reference/fits_ref.py (SciPy curve_fit) on a request; the
 * numbers it prints, or FALSE when it cannot run. */
static gboolean scipy_fit(const char *model, const double *x, const double *y,
                          const double *sigma, size_t n, double field_t, int harmonic,
                          double *out, int nout)
{
    GString *q = g_string_new(NULL);
    g_string_append_printf(q, "{\"model\": \"%s\", ", model);
    json_array(q, "x", x, n);
    g_string_append(q, ", ");
    json_array(q, "y", y, n);
    if (sigma) {
        g_string_append(q, ", ");
        json_array(q, "sigma", sigma, n);
    }
    gchar b[G_ASCII_DTOSTR_BUF_SIZE];
    g_string_append_printf(q, ", \"field_t\": %s, \"harmonic\": %d, ",
                           g_ascii_dtostr(b, sizeof b, field_t), harmonic);
    /* the project's constant, so that only the fits are compared */
    g_string_append_printf(q, "\"constant\": %s}", g_ascii_dtostr(b, sizeof b,
                           strcmp(model, "lk") ? BM_CYCLOTRON_GHZ_PER_T : BM_LK_K_PER_T));
    gchar *script = g_build_filename(BM_REFERENCE_DIR, "fits_ref.py", NULL);
    gchar *argv[] = {"/usr/bin/python3", script, q->str, NULL};
    gchar *text = NULL;
    gint status = 0;
    gboolean ok = g_file_test(argv[0], G_FILE_TEST_IS_EXECUTABLE)
               && g_spawn_sync(NULL, argv, NULL, G_SPAWN_STDERR_TO_DEV_NULL, NULL, NULL, &text,
                               NULL, &status, NULL)
               && g_spawn_check_wait_status(status, NULL);
    if (ok) {
        gchar *p = text;
        for (int i = 0; i < nout; i++)
            out[i] = g_ascii_strtod(p, &p);
    }
    g_free(text);
    g_free(script);
    g_string_free(q, TRUE);
    return ok;
}

/* ---- resonance -------------------------------------------------------- */

/* The free-electron resonance: 27.9925 GHz per tesla (e / 2 pi m_e, CODATA;
 * tests/reference/README). */
static void test_resonance_free_electron(void)
{
    double m, sm;
    g_assert_cmpint(bm_resonance_mass(27.9925, 1.0, 0.0, 0.0, &m, &sm, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(m, 1.0, 2e-6);
    g_assert_cmpfloat(sm, ==, 0.0);
    /* 1 % in f and 2 % in B: sqrt(1 + 4) % of m (first-order propagation) */
    g_assert_cmpint(bm_resonance_mass(35.0, 0.0837, 0.35, 0.0837 * 0.02, &m, &sm, NULL), ==,
                    BM_OK);
    g_assert_cmpfloat_with_epsilon(m, 27.9925 * 0.0837 / 35.0, 1e-6);
    g_assert_cmpfloat_with_epsilon(sm, m * sqrt(5e-4), 1e-12);
    bm_errbuf err = {0};
    g_assert_cmpint(bm_resonance_mass(0.0, 1.0, 0.0, 0.0, &m, &sm, &err), ==, BM_EINVAL);
}

/* A line through the origin: exact data give the mass; noisy data give
 * SciPy curve_fit's slope and error (unweighted and weighted). */
static void test_resonance_fit(void)
{
    double b[6] = {0.5, 0.8, 1.1, 1.4, 1.7, 2.0}, f[6], sf[6];
    double m0 = 0.067, s = BM_CYCLOTRON_GHZ_PER_T / m0;
    GRand *r = g_rand_new_with_seed(7);
    for (int i = 0; i < 6; i++) {
        f[i] = s * b[i] * (1.0 + 0.01 * gauss(r));
        sf[i] = 0.01 * s * b[i];
    }
    g_rand_free(r);
    for (int weighted = 0; weighted < 2; weighted++) {
        bm_resonance_fit fit;
        g_assert_cmpint(bm_resonance_fit_compute(f, b, weighted ? sf : NULL, 6, 0, NULL, &fit,
                                                 NULL), ==, BM_OK);
        double ref[2];
        if (!scipy_fit("resonance", b, f, weighted ? sf : NULL, 6, 0, 0, ref, 2)) {
            g_test_skip("/usr/bin/python3 with SciPy is not available");
            return;
        }
        g_test_message("resonance fit (weighted %d): m = %.8f +- %.8f (SciPy %.8f +- %.8f)",
                       weighted, fit.mass, fit.mass_stderr, ref[0], ref[1]);
        g_assert_cmpfloat_with_epsilon(fit.mass, ref[0], 1e-8 * ref[0]);
        g_assert_cmpfloat_with_epsilon(fit.mass_stderr, ref[1], 1e-5 * ref[1]);
        g_assert_cmpfloat_with_epsilon(fit.mass, m0, 0.02);
        bm_warnings_clear(&fit.warnings);
    }
    /* one point: no line through the origin error estimate needs two */
    bm_resonance_fit fit;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_resonance_fit_compute(f, b, NULL, 1, 0, NULL, &fit, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "1 points for 1 parameters"));
    /* two points with an intercept: values, no error (and a warning) */
    g_assert_cmpint(bm_resonance_fit_compute(f, b, NULL, 2, 1, NULL, &fit, &err), ==, BM_OK);
    g_assert_true(isnan(fit.mass_stderr));
    g_assert_true(bm_warnings_has(&fit.warnings, BM_WARN_NO_ERROR_ESTIMATE));
    bm_warnings_clear(&fit.warnings);
}

/* ---- Lifshitz-Kosevich ------------------------------------------------ */

#define LK_N 12
static const double lk_t[LK_N] = {1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5, 5, 5.5, 6, 6.5};

static void lk_data(double m, double a0, double b, double noise, GRand *r, double *a)
{
    for (int i = 0; i < LK_N; i++) {
        double x = BM_LK_K_PER_T * m * lk_t[i] / b;
        a[i] = a0 * x / sinh(x) + (r ? noise * gauss(r) : 0.0);
    }
}

/* Exact synthetic amplitudes give the mass and amplitude back. X / sinh X
 * (Shoenberg, Magnetic Oscillations in Metals, 1984; from memory) with
 * 14.69 K/T per m_e (CODATA; tests/reference/README). */
static void test_lk_exact(void)
{
    g_assert_cmpfloat_with_epsilon(BM_LK_K_PER_T, 14.6932, 1e-4);
    double a[LK_N];
    lk_data(0.35, 2.5, 8.0, 0, NULL, a);
    bm_lk_fit fit;
    g_assert_cmpint(bm_lk_fit_compute(lk_t, a, NULL, LK_N, 8.0, 1, NULL, &fit, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(fit.mass, 0.35, 1e-9);
    g_assert_cmpfloat_with_epsilon(fit.amplitude, 2.5, 1e-8);
    g_assert_cmpuint(fit.warnings.count, ==, 0);
    bm_warnings_clear(&fit.warnings);
    /* the second harmonic of a mass m damps like the first of 2 m */
    lk_data(0.7, 1.0, 8.0, 0, NULL, a);
    g_assert_cmpint(bm_lk_fit_compute(lk_t, a, NULL, LK_N, 8.0, 2, NULL, &fit, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(fit.mass, 0.35, 1e-9);
    bm_warnings_clear(&fit.warnings);
    /* negative amplitudes (phase pi): the same mass, a negative A0 */
    for (int i = 0; i < LK_N; i++)
        a[i] = -a[i];
    g_assert_cmpint(bm_lk_fit_compute(lk_t, a, NULL, LK_N, 8.0, 2, NULL, &fit, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(fit.mass, 0.35, 1e-9);
    g_assert_cmpfloat(fit.amplitude, <, 0.0);
    bm_warnings_clear(&fit.warnings);
}

/* Noisy amplitudes: the same values and standard errors as SciPy's
 * curve_fit, unweighted and with given errors. */
static void test_lk_scipy(void)
{
    double a[LK_N], sa[LK_N];
    GRand *r = g_rand_new_with_seed(11);
    lk_data(0.35, 2.5, 8.0, 0.02, r, a);
    g_rand_free(r);
    for (int i = 0; i < LK_N; i++)
        sa[i] = 0.02;
    for (int weighted = 0; weighted < 2; weighted++) {
        bm_lk_fit fit;
        g_assert_cmpint(bm_lk_fit_compute(lk_t, a, weighted ? sa : NULL, LK_N, 8.0, 1, NULL,
                                          &fit, NULL), ==, BM_OK);
        double ref[4];
        if (!scipy_fit("lk", lk_t, a, weighted ? sa : NULL, LK_N, 8.0, 1, ref, 4)) {
            g_test_skip("/usr/bin/python3 with SciPy is not available");
            return;
        }
        g_test_message("LK fit (weighted %d): m = %.8f +- %.8f (SciPy %.8f +- %.8f), "
                       "A0 = %.6f +- %.6f (SciPy %.6f +- %.6f)", weighted, fit.mass,
                       fit.mass_stderr, ref[0], ref[1], fit.amplitude, fit.amplitude_stderr,
                       ref[2], ref[3]);
        g_assert_cmpfloat_with_epsilon(fit.mass, ref[0], 1e-7 * ref[0]);
        g_assert_cmpfloat_with_epsilon(fit.mass_stderr, ref[1], 1e-4 * ref[1]);
        g_assert_cmpfloat_with_epsilon(fit.amplitude, ref[2], 1e-7 * fabs(ref[2]));
        g_assert_cmpfloat_with_epsilon(fit.amplitude_stderr, ref[3], 1e-4 * ref[3]);
        bm_warnings_clear(&fit.warnings);
    }
}

/* Honest errors: over 200 seeded noise draws the true mass lies within two
 * standard errors in 90 to 98 % of the fits (for 10 degrees of freedom the
 * t distribution puts 92.7 % inside +-2; common practice, no source). */
static void test_lk_coverage(void)
{
    GRand *r = g_rand_new_with_seed(20261203);
    int inside = 0, draws = 200;
    double a[LK_N];
    for (int k = 0; k < draws; k++) {
        lk_data(0.35, 2.5, 8.0, 0.02, r, a);
        bm_lk_fit fit;
        g_assert_cmpint(bm_lk_fit_compute(lk_t, a, NULL, LK_N, 8.0, 1, NULL, &fit, NULL), ==,
                        BM_OK);
        inside += fabs(fit.mass - 0.35) <= 2.0 * fit.mass_stderr;
        bm_warnings_clear(&fit.warnings);
    }
    g_rand_free(r);
    g_test_message("LK coverage: %d of %d within two standard errors", inside, draws);
    g_assert_cmpint(inside, >=, 180);
    g_assert_cmpint(inside, <=, 196);
}

/* Ill-posed and bad input: damping too weak to fix the mass (X < 1 at the
 * highest temperature) warns; amplitudes that rise with T, non-positive
 * amplitudes and fewer points than parameters are refused. */
static void test_lk_bad(void)
{
    double t[4] = {0.3, 0.4, 0.5, 0.6}, a[4];
    for (int i = 0; i < 4; i++) {
        double x = BM_LK_K_PER_T * 0.2 * t[i] / 30.0;
        a[i] = x / sinh(x) * (1.0 + 1e-4 * (i % 2 ? 1 : -1));
    }
    bm_lk_fit fit;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_lk_fit_compute(t, a, NULL, 4, 30.0, 1, NULL, &fit, &err), ==, BM_OK);
    g_assert_true(bm_warnings_has(&fit.warnings, BM_WARN_FIT_POORLY_CONSTRAINED));
    bm_warnings_clear(&fit.warnings);
    double rising[4] = {1.0, 1.1, 1.2, 1.3};
    g_assert_cmpint(bm_lk_fit_compute(t, rising, NULL, 4, 30.0, 1, NULL, &fit, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "do not fall"));
    double withzero[4] = {1.0, 0.8, 0.0, 0.5};
    g_assert_cmpint(bm_lk_fit_compute(t, withzero, NULL, 4, 30.0, 1, NULL, &fit, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "amplitudes[2]"));
    g_assert_cmpint(bm_lk_fit_compute(t, a, NULL, 1, 30.0, 1, NULL, &fit, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "2 parameters"));
    /* two points: the exact solution, no error estimate */
    g_assert_cmpint(bm_lk_fit_compute(lk_t, (const double[2]){0.9, 0.5}, NULL, 2, 8.0, 1, NULL,
                                      &fit, &err), ==, BM_OK);
    g_assert_true(isnan(fit.mass_stderr));
    g_assert_true(bm_warnings_has(&fit.warnings, BM_WARN_NO_ERROR_ESTIMATE));
    bm_warnings_clear(&fit.warnings);
}

/* ---- Dingle ------------------------------------------------------------ */

/* A = C B^k R_T R_D, R_D = exp(-14.69 p m T_D / B) (Shoenberg 1984, from
 * memory): exact data give T_D back; an error in the mass adds to its error. */
static void test_dingle(void)
{
    double b[6] = {4, 5, 6, 8, 10, 12}, a[6];
    double m = 0.3, td = 2.2, t = 1.8, k = 0.5;
    for (int i = 0; i < 6; i++) {
        double x = BM_LK_K_PER_T * m * t / b[i];
        a[i] = 3.0 * pow(b[i], k) * x / sinh(x) * exp(-BM_LK_K_PER_T * m * td / b[i]);
    }
    bm_dingle_fit fit;
    g_assert_cmpint(bm_dingle_fit_compute(b, a, NULL, 6, t, m, 0.0, 1, k, NULL, &fit, NULL), ==,
                    BM_OK);
    g_assert_cmpfloat_with_epsilon(fit.dingle_temperature_k, td, 1e-9);
    g_assert_cmpfloat_with_epsilon(fit.prefactor, 3.0, 1e-9);
    bm_warnings_clear(&fit.warnings);
    g_assert_cmpint(bm_dingle_fit_compute(b, a, NULL, 6, t, m, 0.03, 1, k, NULL, &fit, NULL), ==,
                    BM_OK);
    g_assert_cmpfloat(fit.dingle_temperature_stderr_mass_k, >, 0.0);
    g_assert_cmpfloat_with_epsilon(fit.dingle_temperature_stderr_k,
                                   fit.dingle_temperature_stderr_mass_k, 1e-9);
    bm_warnings_clear(&fit.warnings);
}

/* ---- specific heat ---------------------------------------------------- */

/* Kittel, Introduction to Solid State Physics, 8th ed., ch. 6 (from memory):
 * Table 1 free-electron Fermi energies (Na 3.24, Cu 7.00, Ag 5.49 eV) and
 * densities (2.65, 8.47, 5.86 e22 cm^-3); Table 2 gamma observed and free
 * (Na 1.38 / 1.094, Cu 0.695 / 0.505, Ag 0.646 / 0.645 mJ mol^-1 K^-2), so
 * thermal mass ratios 1.26, 1.38, 1.00. */
static void test_kittel_table(void)
{
    static const struct {
        const char *name;
        double ef, n22, gobs, gfree, ratio;
    } rows[] = {
        {"Na", 3.24, 2.65, 1.38, 1.094, 1.26},
        {"Cu", 7.00, 8.47, 0.695, 0.505, 1.38},
        {"Ag", 5.49, 5.86, 0.646, 0.645, 1.00},
    };
    for (size_t i = 0; i < G_N_ELEMENTS(rows); i++) {
        bm_thermal_mass tm;
        g_assert_cmpint(bm_thermal_mass_compute(rows[i].gobs, NAN, rows[i].ef, 1.0, &tm, NULL),
                        ==, BM_OK);
        g_test_message("%s: free gamma %.4f (Kittel %.3f), ratio %.3f (Kittel %.2f)",
                       rows[i].name, tm.free_gamma, rows[i].gfree, tm.ratio, rows[i].ratio);
        g_assert_cmpfloat_with_epsilon(tm.free_gamma, rows[i].gfree, 0.005 * rows[i].gfree);
        g_assert_cmpfloat_with_epsilon(tm.ratio, rows[i].ratio, 0.01);
        /* identity: the DOS that the free gamma implies is 3 z / (2 E_F) */
        bm_thermal_mass fr;
        g_assert_cmpint(bm_thermal_mass_compute(tm.free_gamma, NAN, rows[i].ef, 1.0, &fr, NULL),
                        ==, BM_OK);
        g_assert_cmpfloat_with_epsilon(fr.dos_per_ev_formula_unit, 1.5 / rows[i].ef, 1e-12);
        double ef;
        g_assert_cmpint(bm_free_electron_fermi_energy(rows[i].n22 * 1e22, &ef, NULL), ==, BM_OK);
        g_assert_cmpfloat_with_epsilon(ef, rows[i].ef, 0.01 * rows[i].ef);
        bm_warnings_clear(&tm.warnings);
        bm_warnings_clear(&fr.warnings);
    }
    /* heavy-fermion territory is said */
    bm_thermal_mass tm;
    g_assert_cmpint(bm_thermal_mass_compute(400.0, NAN, 7.0, 1.0, &tm, NULL), ==, BM_OK);
    g_assert_true(bm_warnings_has(&tm.warnings, BM_WARN_MASS_OUT_OF_RANGE));
    bm_warnings_clear(&tm.warnings);
}

/* C/T = gamma + beta T^2: exact data give gamma, beta and the Debye
 * temperature (12 pi^4 r R / (5 theta^3) = beta, identity); noisy data the
 * same values and errors as SciPy's curve_fit. */
static void test_heat_fit(void)
{
    double t[8] = {1, 1.5, 2, 2.5, 3, 3.5, 4, 4.5}, c[8], sc[8];
    double gamma = 0.695, theta = 343.0;
    double beta = 12.0 * pow(G_PI, 4) * (GSL_CONST_NUM_AVOGADRO * BM_KB) / (5.0 * pow(theta, 3)) * 1e3;
    for (int i = 0; i < 8; i++)
        c[i] = gamma * t[i] + beta * pow(t[i], 3);
    bm_heat_fit fit;
    g_assert_cmpint(bm_heat_fit_compute(t, c, NULL, 8, 1.0, NULL, &fit, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(fit.gamma, gamma, 1e-10);
    g_assert_cmpfloat_with_epsilon(fit.beta, beta, 1e-12);
    g_assert_cmpfloat_with_epsilon(fit.debye_temperature_k, theta, 1e-6);
    bm_warnings_clear(&fit.warnings);
    GRand *r = g_rand_new_with_seed(5);
    for (int i = 0; i < 8; i++) {
        sc[i] = 0.01 * c[i];
        c[i] += sc[i] * gauss(r);
    }
    g_rand_free(r);
    for (int weighted = 0; weighted < 2; weighted++) {
        g_assert_cmpint(bm_heat_fit_compute(t, c, weighted ? sc : NULL, 8, 1.0, NULL, &fit,
                                            NULL), ==, BM_OK);
        double ref[4];
        if (!scipy_fit("heat", t, c, weighted ? sc : NULL, 8, 0, 0, ref, 4)) {
            g_test_skip("/usr/bin/python3 with SciPy is not available");
            return;
        }
        g_test_message("heat fit (weighted %d): gamma %.6f +- %.6f (SciPy %.6f +- %.6f)",
                       weighted, fit.gamma, fit.gamma_stderr, ref[0], ref[1]);
        g_assert_cmpfloat_with_epsilon(fit.gamma, ref[0], 1e-7 * ref[0]);
        g_assert_cmpfloat_with_epsilon(fit.gamma_stderr, ref[1], 1e-5 * ref[1]);
        g_assert_cmpfloat_with_epsilon(fit.beta, ref[2], 1e-7 * ref[2]);
        g_assert_cmpfloat_with_epsilon(fit.beta_stderr, ref[3], 1e-5 * ref[3]);
        bm_warnings_clear(&fit.warnings);
    }
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/measure/resonance/free-electron", test_resonance_free_electron);
    g_test_add_func("/measure/resonance/fit", test_resonance_fit);
    g_test_add_func("/measure/damping/exact", test_lk_exact);
    g_test_add_func("/measure/damping/scipy", test_lk_scipy);
    g_test_add_func("/measure/damping/coverage", test_lk_coverage);
    g_test_add_func("/measure/damping/bad-input", test_lk_bad);
    g_test_add_func("/measure/dingle", test_dingle);
    g_test_add_func("/measure/specific-heat/kittel", test_kittel_table);
    g_test_add_func("/measure/specific-heat/fit", test_heat_fit);
    return g_test_run();
}
