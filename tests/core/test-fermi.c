/* test-fermi.c: Fermi-Dirac integrals against identities, asymptotes and the
 * inverse round trip; bad orders and arguments. */
#include <float.h>
#include <glib.h>
#include <math.h>
#include <gsl/gsl_errno.h>
#include <string.h>
#include <gsl/gsl_sf_fermi_dirac.h>

#include "bm-fermi.h"

static double fd(double j, double eta)
{
    double v;
    bm_errbuf err;
    g_assert_cmpint(bm_fermi_dirac(j, eta, &v, &err), ==, BM_OK);
    return v;
}

static void test_values_at_zero(void)
{
    /* F_j(0) = (1 - 2^-j) zeta(j+1) (Dirichlet eta identity, DLMF 25.12(iii);
     * from memory): values as listed in the project's reference list. */
    g_assert_cmpfloat_with_epsilon(fd(0.5, 0.0), 0.7651470246, 1e-10);
    g_assert_cmpfloat_with_epsilon(fd(-0.5, 0.0), 0.6048986434, 1e-10);
    g_assert_cmpfloat_with_epsilon(fd(1.5, 0.0), 0.8671998890, 1e-10);
    /* F_1(0) = pi^2 / 12 (same identity, eta(2) = pi^2/12). */
    g_assert_cmpfloat_with_epsilon(fd(1.0, 0.0), G_PI * G_PI / 12.0, 1e-15);
    /* F_2(0) = (3/4) zeta(3), zeta(3) = 1.2020569031595943 (Apery's constant). */
    g_assert_cmpfloat_with_epsilon(fd(2.0, 0.0), 0.75 * 1.2020569031595943, 1e-15);
}

static void test_order_zero_closed_form(void)
{
    /* F_0(eta) = ln(1 + e^eta) exactly (elementary integral).  Checked against
     * the Mercator series sum (-1)^(k+1) e^(k eta) / k in long double for
     * eta < 0, and the reflection F_0(eta) - F_0(-eta) = eta for eta > 0. */
    for (double eta = -60.0; eta < -0.5; eta += 0.37) {
        long double z = expl((long double)eta), zk = z, sum = 0.0L;
        for (int k = 1; k < 200; k++, zk *= z)
            sum += (k % 2 ? 1.0L : -1.0L) * zk / k;
        g_assert_cmpfloat(fabs(fd(0.0, eta) / (double)sum - 1.0), <, 4e-16);
        g_assert_cmpfloat(fabs((fd(0.0, -eta) - fd(0.0, eta)) / -eta - 1.0), <, 4e-16);
    }
    g_assert_cmpfloat_with_epsilon(fd(0.0, 0.0), G_LN2, 1e-16);
}

static void test_asymptotes(void)
{
    const double js[] = { -0.5, 0.0, 0.5, 1.0, 1.5, 2.0 };
    for (size_t k = 0; k < G_N_ELEMENTS(js); k++) {
        /* eta -> -inf: F_j = e^eta (1 - e^eta / 2^(j+1) + ...), series DLMF 25.12.16 */
        for (double eta = -40.0; eta > -700.0; eta -= 13.0)
            g_assert_cmpfloat(fabs(fd(js[k], eta) / exp(eta) - 1.0), <, 4e-16);
        double e = -5.0, z = exp(e);
        double two_terms = z - z * z / pow(2.0, js[k] + 1.0) + z * z * z / pow(3.0, js[k] + 1.0);
        g_assert_cmpfloat(fabs(fd(js[k], e) / two_terms - 1.0), <, 1e-6);
        /* far below the double range: graceful underflow to 0, no error */
        g_assert_cmpfloat(fd(js[k], -1000.0), ==, 0.0);
        g_assert_cmpfloat(fd(js[k], -INFINITY), ==, 0.0);
    }
    /* eta -> +inf: Sommerfeld expansion F_j = eta^(j+1)/Gamma(j+2) (1 + (j+1) j pi^2 / (6 eta^2)
     * + ...) (textbook; from memory). Checked at eta = 1e3 and 1e4 to 1e-10. */
    for (double eta = 1e3; eta <= 1e4; eta *= 10.0) {
        for (size_t k = 0; k < G_N_ELEMENTS(js); k++) {
            double j = js[k];
            double lead = pow(eta, j + 1.0) / tgamma(j + 2.0);
            double approx = lead * (1.0 + (j + 1.0) * j * G_PI * G_PI / (6.0 * eta * eta));
            g_assert_cmpfloat(fabs(fd(j, eta) / approx - 1.0), <, 1e-10);
        }
    }
    /* F_1/2 at eta = 1e150 is still a double; F_2 at 1e150 is not. */
    double v;
    bm_errbuf err;
    g_assert_cmpint(bm_fermi_dirac(2.0, 1e150, &v, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "eta = 1e+150"));
}

static void test_series_matches_gsl(void)
{
    /* The shared series path (eta < -1) against GSL's own routines: two
     * independent evaluations of the same function. */
    bm_errbuf err;
    for (double eta = -45.0; eta < -1.0; eta += 0.0731) {
        gsl_sf_result r;
        double fh, fm;
        bm_fermi_dirac_half_pair(eta, &fh, &fm);
        g_assert_cmpint(gsl_sf_fermi_dirac_half_e(eta, &r), ==, 0);
        g_assert_cmpfloat(fabs(fh / r.val - 1.0), <, 2e-15);
        g_assert_cmpint(gsl_sf_fermi_dirac_mhalf_e(eta, &r), ==, 0);
        g_assert_cmpfloat(fabs(fm / r.val - 1.0), <, 2e-15);
        double v;
        g_assert_cmpint(bm_fermi_dirac(0.5, eta, &v, &err), ==, BM_OK);
        g_assert_cmpfloat(v, ==, fh);
    }
}

static void test_derivative(void)
{
    /* dF_j/deta = F_(j-1) (differentiate under the integral with the 1/Gamma
     * normalisation): central differences of F_1/2 against F_-1/2, F_3/2 against F_1/2. */
    for (double eta = -20.0; eta <= 40.0; eta += 1.3) {
        double h = 1e-5;
        double d1 = (fd(0.5, eta + h) - fd(0.5, eta - h)) / (2 * h);
        double d3 = (fd(1.5, eta + h) - fd(1.5, eta - h)) / (2 * h);
        double d2 = (fd(2.0, eta + h) - fd(2.0, eta - h)) / (2 * h);
        g_assert_cmpfloat(fabs(d1 / fd(-0.5, eta) - 1.0), <, 1e-8);
        g_assert_cmpfloat(fabs(d3 / fd(0.5, eta) - 1.0), <, 1e-8);
        g_assert_cmpfloat(fabs(d2 / fd(1.0, eta) - 1.0), <, 1e-8);
    }
}

static void test_inverse_round_trip(void)
{
    bm_errbuf err;
    for (double eta = -700.0; eta < 1e5; eta = eta < -2 ? eta * 0.8 : (eta < 2 ? eta + 0.05 : eta * 1.3)) {
        double f, back;
        g_assert_cmpint(bm_fermi_dirac(0.5, eta, &f, &err), ==, BM_OK);
        g_assert_cmpint(bm_fermi_dirac_half_inverse(f, &back, &err), ==, BM_OK);
        g_assert_cmpfloat(fabs(back - eta), <=, 1e-13 * fmax(1.0, fabs(eta)));
    }
    /* F_1/2(0) = 0.7651470246 (identity above) inverts to 0. */
    double e;
    g_assert_cmpint(bm_fermi_dirac_half_inverse(0.7651470246, &e, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(e), <, 1e-9);
    g_assert_cmpint(bm_fermi_dirac_half_inverse(1e-310, &e, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(e - log(1e-310)), <, 1e-12);
}

/* GSL reports through one process-wide handler (a host's own, or its
 * aborting default): no argument may make the core's calls report. */
static int gsl_reports;
static void count_report(const char *reason, const char *file, int line, int gsl_errno)
{
    (void)reason, (void)file, (void)line, (void)gsl_errno;
    gsl_reports++;
}

static void test_no_gsl_error_anywhere(void)
{
    gsl_error_handler_t *old = gsl_set_error_handler(count_report);
    bm_errbuf err;
    static const double orders[] = { -0.5, 0.0, 0.5, 1.0, 1.5, 2.0 };
    for (size_t o = 0; o < G_N_ELEMENTS(orders); o++)
        for (double a = 1e-3; a < 1.7e308; a *= 1.7)
            for (int sign = -1; sign <= 1; sign += 2) {
                double v, back;
                bm_status s = bm_fermi_dirac(orders[o], sign * a, &v, &err);
                g_assert_true(s == BM_OK || (s == BM_EINVAL && strstr(err.message, "overflows")));
                if (s == BM_OK)
                    g_assert_true(isfinite(v) && v >= 0.0);
                if (orders[o] == 0.5 && s == BM_OK && v > 0.0)
                    g_assert_cmpint(bm_fermi_dirac_half_inverse(v, &back, &err), ==, BM_OK);
                double fh, fm;
                bm_fermi_dirac_half_pair(sign * a, &fh, &fm);
            }
    double fh, fm;
    bm_fermi_dirac_half_pair(INFINITY, &fh, &fm);
    bm_fermi_dirac_half_pair(NAN, &fh, &fm);
    double e;
    g_assert_cmpint(bm_fermi_dirac_half_inverse(DBL_MAX, &e, &err), ==, BM_OK);
    gsl_set_error_handler(old);
    g_assert_cmpint(gsl_reports, ==, 0);
}

/* Near overflow: F_j(eta) ~ eta^(j+1) / Gamma(j+2) (Sommerfeld expansion of
 * DLMF 25.12.14) passes the largest double at eta = 5.6e102 for j = 2 and
 * 3.9e205 for j = 1/2: refused by name there, never an infinite value. */
static void test_overflow_refused(void)
{
    bm_errbuf err;
    double v;
    g_assert_cmpint(bm_fermi_dirac(2.0, 1e102, &v, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(v / (1e306 / 6.0) - 1.0), <, 1e-12);   /* eta^3 / 3! */
    g_assert_cmpint(bm_fermi_dirac(2.0, 1e103, &v, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "overflows a double"));
    g_assert_cmpint(bm_fermi_dirac(0.5, 1e206, &v, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_fermi_dirac(1.0, 1e155, &v, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_fermi_dirac(1.5, 1e124, &v, &err), ==, BM_EINVAL);
    /* F_-1/2 ~ 2 sqrt(eta / pi) (same expansion) never overflows */
    g_assert_cmpint(bm_fermi_dirac(-0.5, 1e308, &v, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(v / (2.0 * sqrt(1e308 / G_PI)) - 1.0), <, 1e-12);
}

/* The inverse of F_1/2 far above zero: eta = v (1 - pi^2 / (12 v^2) + ...),
 * v = (Gamma(5/2) u)^(2/3) (Sommerfeld); check values from mpmath at 40
 * digits of that expansion: u = 1e24 -> 12089939655123522.305,
 * 1e300 -> 1.2089939655123522305e200, 1.7e308 -> 3.7101381459136026298e205. */
static void test_inverse_far_above(void)
{
    bm_errbuf err;
    double e;
    static const double u[3] = { 1e24, 1e300, 1.7e308 };
    static const double want[3] = { 12089939655123522.305, 1.2089939655123522305e200,
                                    3.7101381459136026298e205 };
    for (int i = 0; i < 3; i++) {
        g_assert_cmpint(bm_fermi_dirac_half_inverse(u[i], &e, &err), ==, BM_OK);
        g_assert_cmpfloat(fabs(e / want[i] - 1.0), <, 1e-15);
    }
}

static void test_bad_input(void)
{
    double v;
    bm_errbuf err;
    g_assert_cmpint(bm_fermi_dirac(0.25, 0.0, &v, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "j = 0.25"));
    g_assert_cmpint(bm_fermi_dirac(3.0, 0.0, &v, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_fermi_dirac(0.5, NAN, &v, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "eta"));
    g_assert_cmpint(bm_fermi_dirac(0.5, INFINITY, &v, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_fermi_dirac_half_inverse(0.0, &v, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "value 0"));
    g_assert_cmpint(bm_fermi_dirac_half_inverse(-1.0, &v, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_fermi_dirac_half_inverse(NAN, &v, &err), ==, BM_EINVAL);
}

int main(int argc, char **argv)
{
    bm_core_init();
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/fermi/values-at-zero", test_values_at_zero);
    g_test_add_func("/fermi/order-zero-closed-form", test_order_zero_closed_form);
    g_test_add_func("/fermi/asymptotes", test_asymptotes);
    g_test_add_func("/fermi/series-matches-gsl", test_series_matches_gsl);
    g_test_add_func("/fermi/derivative", test_derivative);
    g_test_add_func("/fermi/inverse-round-trip", test_inverse_round_trip);
    g_test_add_func("/fermi/bad-input", test_bad_input);
    g_test_add_func("/fermi/overflow-refused", test_overflow_refused);
    g_test_add_func("/fermi/inverse-far-above", test_inverse_far_above);
    g_test_add_func("/fermi/no-gsl-error-anywhere", test_no_gsl_error_anywhere);
    return g_test_run();
}
