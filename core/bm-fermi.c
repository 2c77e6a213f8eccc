/* bm-fermi.c: complete Fermi-Dirac integrals (GSL's routines plus a shared power
 * series for the F_1/2, F_-1/2 pair) and the inverse of F_1/2. */
#include "bm-fermi.h"

#include <float.h>
#include <math.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_math.h>
#include <gsl/gsl_sf_fermi_dirac.h>

/* k^(-3/2) and k^(-1/2), k = 1..40: the coefficients of
 * F_j(eta) = sum_k (-1)^(k+1) e^(k eta) / k^(j+1), valid for eta < 0
 * (DLMF 25.12.16 with the polylogarithm series). */
static const double series_coef[40][2] = {
    { 1.00000000000000000e+00, 1.00000000000000000e+00 },
    { 3.53553390593273786e-01, 7.07106781186547573e-01 },
    { 1.92450089729875262e-01, 5.77350269189625731e-01 },
    { 1.25000000000000000e-01, 5.00000000000000000e-01 },
    { 8.94427190999915883e-02, 4.47213595499957928e-01 },
    { 6.80413817439771695e-02, 4.08248290463863017e-01 },
    { 5.39949247156038883e-02, 3.77964473009227253e-01 },
    { 4.41941738241592233e-02, 3.53553390593273786e-01 },
    { 3.70370370370370350e-02, 3.33333333333333315e-01 },
    { 3.16227766016837913e-02, 3.16227766016837941e-01 },
    { 2.74101222343421484e-02, 3.01511344577763629e-01 },
    { 2.40562612162344078e-02, 2.88675134594812866e-01 },
    { 2.13346229317395823e-02, 2.77350098112614574e-01 },
    { 1.90900887080303130e-02, 2.67261241912424397e-01 },
    { 1.72132593164774084e-02, 2.58198889747161153e-01 },
    { 1.56250000000000000e-02, 2.50000000000000000e-01 },
    { 1.42668014727254690e-02, 2.42535625036332969e-01 },
    { 1.30945700219731020e-02, 2.35702260395515839e-01 },
    { 1.20745123089769351e-02, 2.29415733870561772e-01 },
    { 1.11803398874989485e-02, 2.23606797749978964e-01 },
    { 1.03913281064758282e-02, 2.18217890235992390e-01 },
    { 9.69094165252774691e-03, 2.13200716355610442e-01 },
    { 9.06584408943803335e-03, 2.08514414057074771e-01 },
    { 8.50517271799714619e-03, 2.04124145231931509e-01 },
    { 8.00000000000000017e-03, 2.00000000000000011e-01 },
    { 7.54292827454553991e-03, 1.96116135138184045e-01 },
    { 7.12778110110649094e-03, 1.92450089729875262e-01 },
    { 6.74936558945048604e-03, 1.88982236504613627e-01 },
    { 6.40328752334661574e-03, 1.85695338177051861e-01 },
    { 6.08580619450184608e-03, 1.82574185835055358e-01 },
    { 5.79371942021854498e-03, 1.79605302026774910e-01 },
    { 5.52427172801990291e-03, 1.76776695296636893e-01 },
    { 5.27508048350599536e-03, 1.74077655955697852e-01 },
    { 5.04407603360320072e-03, 1.71498585142508847e-01 },
    { 4.82945288416295176e-03, 1.69030850945703304e-01 },
    { 4.62962962962962937e-03, 1.66666666666666657e-01 },
    { 4.44321587311776421e-03, 1.64398987305357291e-01 },
    { 4.26898476659901428e-03, 1.62221421130762544e-01 },
    { 4.10585009756633638e-03, 1.60128153805087131e-01 },
    { 3.95284707521047392e-03, 1.58113883008418971e-01 },
};

/* Below this eta the series needs at most 40 terms; above it GSL's Chebyshev
 * and asymptotic expansions are used. */
#define SERIES_ETA_MAX (-1.0)
/* Below this eta, e^eta alone equals F_1/2 and F_-1/2 to double precision:
 * the second term is at most e^eta / sqrt(2) < 1e-16 relative. */
#define BOLTZMANN_ETA_MAX (-37.0)

/* F_j(eta) ~ eta^(j+1) / Gamma(j+2) for large eta (DLMF 25.12.14, the
 * Sommerfeld expansion), and GSL reports an overflow as soon as eta^(j+1)
 * exceeds the largest double. The core never lets GSL report (the error
 * handler is process-wide and may abort the host), so such an eta is
 * refused before the call: within a factor e of the largest double. */
static int overflows(double j, double eta)
{
    return j > -0.5 && eta > 1.0 && (j + 1.0) * log(eta) >= log(DBL_MAX) - 1.0;
}

static void half_pair_series(double eta, double *fh, double *fm)
{
    double z = exp(eta);
    double zk = z, sh = 0.0, sm = 0.0, sign = 1.0;
    for (int k = 0; k < 40; k++) {
        double th = zk * series_coef[k][0], tm = zk * series_coef[k][1];
        sh += sign * th;
        sm += sign * tm;
        if (tm < 1e-17 * sm)
            break;
        zk *= z;
        sign = -sign;
    }
    *fh = sh;
    *fm = sm;
}

void bm_fermi_dirac_half_pair(double eta, double *f_half, double *f_mhalf)
{
    if (eta < BOLTZMANN_ETA_MAX) {
        double z = exp(eta);
        *f_half = z;
        *f_mhalf = z;
        return;
    }
    if (eta < SERIES_ETA_MAX) {
        half_pair_series(eta, f_half, f_mhalf);
        return;
    }
    gsl_sf_result r;
    /* eta >= -1 here: neither routine can underflow. F_1/2 overflows where
     * eta^(3/2) does (eta near 4e205): never called there, so that GSL
     * reports no error (its handler is the host's). F_-1/2 ~ 2 sqrt(eta/pi)
     * never overflows. */
    if (!(eta < HUGE_VAL)) {        /* +Inf or NaN: GSL would report a domain error */
        *f_half = *f_mhalf = eta;
        return;
    }
    if (overflows(0.5, eta))
        *f_half = HUGE_VAL;
    else
        *f_half = (gsl_sf_fermi_dirac_half_e(eta, &r) == GSL_SUCCESS) ? r.val : HUGE_VAL;
    *f_mhalf = (gsl_sf_fermi_dirac_mhalf_e(eta, &r) == GSL_SUCCESS) ? r.val : HUGE_VAL;
}

double bm_fermi_dirac_half_log(double eta, double *dlog_deta)
{
    if (eta < BOLTZMANN_ETA_MAX) {
        if (dlog_deta)
            *dlog_deta = 1.0;
        return eta;
    }
    double fh, fm;
    bm_fermi_dirac_half_pair(eta, &fh, &fm);
    if (dlog_deta)
        *dlog_deta = fm / fh;
    return log(fh);
}

bm_status bm_fermi_dirac(double j, double eta, double *value, bm_errbuf *err)
{
    if (!value)
        return bm_fail(err, BM_EINVAL, "fermi-dirac: no place for the result");
    *value = NAN;
    if (isnan(eta) || eta == INFINITY)
        return bm_fail(err, BM_EINVAL,
                       "fermi-dirac: eta = %g is not a finite reduced energy", eta);
    int twice_j = (int)lround(2.0 * j);
    if (!(fabs(2.0 * j - twice_j) == 0.0) || twice_j < -1 || twice_j > 4)
        return bm_fail(err, BM_EINVAL,
                       "fermi-dirac: order j = %g not supported "
                       "(one of -0.5, 0, 0.5, 1, 1.5, 2)", j);
    /* Far below zero every order equals e^eta to double precision (and GSL
     * reports underflow below ln DBL_MIN): return the graceful limit. */
    if (eta < -708.0) {
        *value = exp(eta);
        return BM_OK;
    }
    if (twice_j == 0) {
        /* F_0 = ln(1 + e^eta) in closed form, to an ulp or two (GSL's series
         * below eta = -5 is good to about 1e-14 only). */
        *value = eta > 0.0 ? eta + log1p(exp(-eta)) : log1p(exp(eta));
        return BM_OK;
    }
    if ((twice_j == 1 || twice_j == -1) && eta < SERIES_ETA_MAX) {
        double fh, fm;
        bm_fermi_dirac_half_pair(eta, &fh, &fm);
        *value = twice_j == 1 ? fh : fm;
        return BM_OK;
    }
    if (overflows(j, eta))
        return bm_fail(err, BM_EINVAL,
                       "fermi-dirac: F_%g(eta = %g) ~ eta^%g / Gamma(%g) overflows a double",
                       j, eta, j + 1.0, j + 2.0);
    gsl_sf_result r;
    int s;
    switch (twice_j) {
    case -1: s = gsl_sf_fermi_dirac_mhalf_e(eta, &r); break;
    case 0:  s = gsl_sf_fermi_dirac_0_e(eta, &r); break;
    case 1:  s = gsl_sf_fermi_dirac_half_e(eta, &r); break;
    case 2:  s = gsl_sf_fermi_dirac_1_e(eta, &r); break;
    case 3:  s = gsl_sf_fermi_dirac_3half_e(eta, &r); break;
    default: s = gsl_sf_fermi_dirac_2_e(eta, &r); break;
    }
    if (s == GSL_EUNDRFLW) {
        *value = exp(eta);
        return BM_OK;
    }
    if (s == GSL_EOVRFLW || (s == GSL_SUCCESS && !isfinite(r.val)))
        return bm_fail(err, BM_EINVAL,
                       "fermi-dirac: F_%g(eta = %g) overflows a double", j, eta);
    if (s != GSL_SUCCESS)
        return bm_fail(err, BM_EINTERNAL, "fermi-dirac: F_%g(eta = %g): %s",
                       j, eta, gsl_strerror(s));
    *value = r.val;
    return BM_OK;
}

bm_status bm_fermi_dirac_half_inverse(double value, double *eta, bm_errbuf *err)
{
    if (!eta)
        return bm_fail(err, BM_EINVAL, "fermi-dirac inverse: no place for the result");
    *eta = NAN;
    if (!(value > 0.0) || !isfinite(value))
        return bm_fail(err, BM_EINVAL,
                       "fermi-dirac inverse: F_1/2 value %g must be finite and > 0", value);
    double lv = log(value);
    /* F_1/2 = e^eta exactly below eta = -37 (see BOLTZMANN_ETA_MAX). */
    if (lv < -37.5) {
        *eta = lv;
        return BM_OK;
    }
    /* Nilsson (1973): eta ~ ln u / (1 - u^2) + v / (1 + (0.24 + 1.08 v)^-2),
     * v = (3 sqrt(pi) u / 4)^(2/3), u = value (normalised F_1/2);
     * the first term is replaced by its limit ln u near u = 1. */
    double u = value;
    /* v as a product: 3 sqrt(pi) u / 4 overflows for u near the largest double */
    double cv = cbrt(3.0 * sqrt(M_PI) / 4.0) * cbrt(u), v = cv * cv;
    /* Sommerfeld: F_1/2(eta) = eta^(3/2) / Gamma(5/2) (1 + pi^2 / (8 eta^2) + ...)
     * (DLMF 25.12.14 expanded for large eta), so eta = v (1 - pi^2 / (12 v^2)
     * + ...) with v = (Gamma(5/2) u)^(2/3) = (3 sqrt(pi) u / 4)^(2/3): beyond
     * v = 1e8 the correction is below the double precision of v. */
    if (v > 1e8) {
        *eta = v;
        return BM_OK;
    }
    double first = fabs(1.0 - u * u) > 1e-6 ? lv / (1.0 - u * u) : -0.5;
    double x = first + v / (1.0 + 1.0 / ((0.24 + 1.08 * v) * (0.24 + 1.08 * v)));
    for (int it = 0; it < 60; it++) {
        double d;
        double lf = bm_fermi_dirac_half_log(x, &d);
        double step = (lf - lv) / d;
        x -= step;
        if (fabs(step) <= 4.0 * 2.220446049250313e-16 * fmax(1.0, fabs(x))) {
            *eta = x;
            return BM_OK;
        }
    }
    /* Only ulp-level oscillation of the last steps can get here (the step
     * test is at 4 ulp): the iterate is as good as double precision allows. */
    *eta = x;
    return BM_OK;
}
