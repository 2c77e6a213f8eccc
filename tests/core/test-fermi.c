/* test-fermi.c: Fermi-Dirac integrals against identities, asymptotes and the
 * inverse round trip; bad orders and arguments. */
#include <glib.h>
#include <math.h>
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
    return g_test_run();
}
