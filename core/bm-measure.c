/* bm-measure.c: masses from measurements: cyclotron resonance, the
 * Lifshitz-Kosevich temperature damping and Dingle plot of quantum
 * oscillations, and the thermal mass from the electronic specific heat. */
#include "bm-measure.h"
#include "bm-units.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_const_num.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit_nlinear.h>

#define MASS_LOW 0.01          /* usual range of effective masses, m_e */
#define MASS_HIGH 10.0         /* (common practice, no source) */
#define POOR_RELATIVE 0.2      /* a relative standard error above this is "poorly fixed" */
#define CHI2_TAIL 1e-3         /* chi2 beyond its 99.9 % point: residuals too large */

/* ---- helpers ----------------------------------------------------------- */

static bm_status check_array(const double *v, size_t n, const char *what, int positive,
                             bm_errbuf *err)
{
    if (!v)
        return bm_fail(err, BM_EINVAL, "%s: none given", what);
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(v[i]))
            return bm_fail(err, BM_EINVAL, "%s[%zu] is not finite", what, i);
        if (positive && !(v[i] > 0.0))
            return bm_fail(err, BM_EINVAL, "%s[%zu] is %g: must be positive", what, i, v[i]);
    }
    return BM_OK;
}

static int distinct(const double *v, size_t n)
{
    for (size_t i = 1; i < n; i++)
        if (v[i] != v[0])
            return 1;
    return 0;
}

/* Weighted least squares y = c0 + c1 x (c0 = 0 without intercept): the
 * unscaled covariance (X^T W X)^-1 and chi2 = sum w (y - fit)^2. Centred
 * sums keep it accurate for x far from 0. 0 on success. */
typedef struct {
    double c0, c1, cov00, cov01, cov11, chi2;
} Line;

static int fit_line(const double *x, const double *y, const double *w, size_t n,
                    int intercept, Line *l)
{
    memset(l, 0, sizeof *l);
    double sw = 0.0, sx = 0.0, sy = 0.0;
    for (size_t i = 0; i < n; i++) {
        double wi = w ? w[i] : 1.0;
        sw += wi;
        sx += wi * x[i];
        sy += wi * y[i];
    }
    if (intercept) {
        double xm = sx / sw, ym = sy / sw, sxx = 0.0, sxy = 0.0;
        for (size_t i = 0; i < n; i++) {
            double wi = w ? w[i] : 1.0;
            sxx += wi * (x[i] - xm) * (x[i] - xm);
            sxy += wi * (x[i] - xm) * (y[i] - ym);
        }
        if (!(sxx > 0.0))
            return -1;
        l->c1 = sxy / sxx;
        l->c0 = ym - l->c1 * xm;
        l->cov11 = 1.0 / sxx;
        l->cov00 = 1.0 / sw + xm * xm / sxx;
        l->cov01 = -xm / sxx;
    } else {
        double sxx = 0.0, sxy = 0.0;
        for (size_t i = 0; i < n; i++) {
            double wi = w ? w[i] : 1.0;
            sxx += wi * x[i] * x[i];
            sxy += wi * x[i] * y[i];
        }
        if (!(sxx > 0.0))
            return -1;
        l->c1 = sxy / sxx;
        l->cov11 = 1.0 / sxx;
    }
    for (size_t i = 0; i < n; i++) {
        double wi = w ? w[i] : 1.0, r = y[i] - l->c0 - l->c1 * x[i];
        l->chi2 += wi * r * r;
    }
    return 0;
}

/* Scale of the covariance: 1 with absolute errors, chi2 / dof without
 * (NAN when dof = 0, with a warning). Also the chi2 check. */
static double covariance_scale(double chi2, size_t dof, int weighted, bm_warnings *w,
                               const char *what)
{
    if (dof == 0) {
        bm_warn(w, BM_WARN_NO_ERROR_ESTIMATE, "%s: as many points as parameters, so no "
                "standard error can be estimated: give more points", what);
        return NAN;
    }
    if (weighted) {
        if (gsl_cdf_chisq_Q(chi2, (double)dof) < CHI2_TAIL)
            bm_warn(w, BM_WARN_FIT_INCONSISTENT, "%s: chi2 = %.3g for %zu degrees of freedom "
                    "is beyond its 99.9 %% point: the residuals exceed the stated "
                    "uncertainties (the model or the errors do not fit the data)", what,
                    chi2, dof);
        return 1.0;
    }
    return chi2 / (double)dof;
}

static void warn_mass_range(bm_warnings *w, const char *what, double m)
{
    if (isfinite(m) && m > 0.0 && (m < MASS_LOW || m > MASS_HIGH))
        bm_warn(w, BM_WARN_MASS_OUT_OF_RANGE, "%s %g m_e is outside the usual %g..%g m_e",
                what, m, MASS_LOW, MASS_HIGH);
}

static void warn_poor(bm_warnings *w, const char *what, double v, double sv)
{
    if (isfinite(sv) && fabs(sv) > POOR_RELATIVE * fabs(v))
        bm_warn(w, BM_WARN_FIT_POORLY_CONSTRAINED, "%s %g has a standard error of %g "
                "(%.0f %%): the data fix it poorly", what, v, sv, 100.0 * fabs(sv / v));
}

/* ---- resonance ---------------------------------------------------------- */

bm_status bm_resonance_mass(double f_ghz, double b_t, double sf_ghz, double sb_t,
                            double *mass, double *mass_stderr, bm_errbuf *err)
{
    if (!(f_ghz > 0.0) || !isfinite(f_ghz))
        return bm_fail(err, BM_EINVAL, "resonance frequency %g GHz: must be positive", f_ghz);
    if (!(b_t > 0.0) || !isfinite(b_t))
        return bm_fail(err, BM_EINVAL, "resonance field %g T: must be positive", b_t);
    if (!(sf_ghz >= 0.0) || !(sb_t >= 0.0))
        return bm_fail(err, BM_EINVAL, "resonance standard errors must be zero or positive");
    *mass = BM_CYCLOTRON_GHZ_PER_T * b_t / f_ghz;
    if (mass_stderr)
        *mass_stderr = *mass * hypot(sf_ghz / f_ghz, sb_t / b_t);
    return BM_OK;
}

bm_status bm_resonance_fit_compute(const double *f_ghz, const double *b_t, const double *sf,
                                   size_t n, int intercept, double *residuals,
                                   bm_resonance_fit *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "resonance fit: no output given");
    memset(out, 0, sizeof *out);
    size_t np = intercept ? 2 : 1;
    if (n < np + (intercept ? 0 : 1))
        return bm_fail(err, BM_EINVAL, "resonance fit: %zu points for %zu parameters (the "
                       "slope%s): give at least %zu", n, np,
                       intercept ? " and the intercept" : "", np + (intercept ? 0 : 1));
    bm_status st;
    if ((st = check_array(f_ghz, n, "frequency_ghz", 1, err)) != BM_OK
        || (st = check_array(b_t, n, "field_t", 1, err)) != BM_OK
        || (sf && (st = check_array(sf, n, "frequency_stderr_ghz", 1, err)) != BM_OK))
        return st;
    if (!distinct(b_t, n))
        return bm_fail(err, BM_EINVAL, "resonance fit: every field is %g T: a line needs "
                       "at least two different fields", b_t[0]);
    double *w = sf ? malloc(n * sizeof *w) : NULL;
    if (sf && !w)
        return bm_fail(err, BM_ENOMEM, "resonance fit: allocation failed");
    for (size_t i = 0; sf && i < n; i++)
        w[i] = 1.0 / (sf[i] * sf[i]);
    Line l;
    int bad = fit_line(b_t, f_ghz, w, n, intercept, &l);
    free(w);
    if (bad)
        return bm_fail(err, BM_EINVAL, "resonance fit: the fields do not determine a line");
    out->weighted = sf != NULL;
    out->dof = n - np;
    out->chi2 = l.chi2;
    out->chi2_per_dof = out->dof ? l.chi2 / (double)out->dof : NAN;
    double s2 = covariance_scale(l.chi2, out->dof, out->weighted, &out->warnings,
                                 "resonance fit");
    out->slope_ghz_per_t = l.c1;
    out->slope_stderr = sqrt(s2 * l.cov11);
    out->intercept_ghz = l.c0;
    out->intercept_stderr = intercept ? sqrt(s2 * l.cov00) : 0.0;
    for (size_t i = 0; residuals && i < n; i++)
        residuals[i] = f_ghz[i] - l.c0 - l.c1 * b_t[i];
    if (!(l.c1 > 0.0)) {
        bm_warnings_clear(&out->warnings);
        return bm_fail(err, BM_EINVAL, "resonance fit: the fitted slope %g GHz/T is not "
                       "positive: the frequencies do not rise with the field", l.c1);
    }
    out->mass = BM_CYCLOTRON_GHZ_PER_T / l.c1;
    out->mass_stderr = out->mass * out->slope_stderr / l.c1;
    warn_poor(&out->warnings, "cyclotron mass (m_e)", out->mass, out->mass_stderr);
    warn_mass_range(&out->warnings, "cyclotron mass", out->mass);
    return BM_OK;
}

/* ---- Lifshitz-Kosevich -------------------------------------------------- */

double bm_lk_factor(double x)
{
    if (fabs(x) < 1e-4)
        return 1.0 - x * x / 6.0;
    if (x > 700.0)
        return 2.0 * x * exp(-x);
    return x / sinh(x);
}

/* d(x / sinh x)/dx = (sinh x - x cosh x) / sinh^2 x; -x/3 near 0. */
static double lk_factor_deriv(double x)
{
    if (fabs(x) < 1e-4)
        return -x / 3.0;
    if (x > 700.0)
        return 2.0 * (1.0 - x) * exp(-x);
    double s = sinh(x);
    return (s - x * cosh(x)) / (s * s);
}

typedef struct {
    const double *t, *a, *sa;
    size_t n;
    double k;      /* BM_LK_K_PER_T p / B: X = k m T */
} LkData;

static int lk_f(const gsl_vector *p, void *data, gsl_vector *f)
{
    const LkData *d = data;
    double a0 = gsl_vector_get(p, 0), m = gsl_vector_get(p, 1);
    for (size_t i = 0; i < d->n; i++) {
        double r = a0 * bm_lk_factor(d->k * m * d->t[i]) - d->a[i];
        gsl_vector_set(f, i, d->sa ? r / d->sa[i] : r);
    }
    return GSL_SUCCESS;
}

static int lk_df(const gsl_vector *p, void *data, gsl_matrix *J)
{
    const LkData *d = data;
    double a0 = gsl_vector_get(p, 0), m = gsl_vector_get(p, 1);
    for (size_t i = 0; i < d->n; i++) {
        double x = d->k * m * d->t[i], s = d->sa ? 1.0 / d->sa[i] : 1.0;
        gsl_matrix_set(J, i, 0, s * bm_lk_factor(x));
        gsl_matrix_set(J, i, 1, s * a0 * lk_factor_deriv(x) * d->k * d->t[i]);
    }
    return GSL_SUCCESS;
}

/* For a fixed mass the best A0 is linear: sum w a R / sum w R^2; returns chi2. */
static double lk_profile(const LkData *d, double m, double *a0)
{
    double num = 0.0, den = 0.0;
    for (size_t i = 0; i < d->n; i++) {
        double w = d->sa ? 1.0 / (d->sa[i] * d->sa[i]) : 1.0;
        double r = bm_lk_factor(d->k * m * d->t[i]);
        num += w * d->a[i] * r;
        den += w * r * r;
    }
    *a0 = num / den;
    double chi2 = 0.0;
    for (size_t i = 0; i < d->n; i++) {
        double w = d->sa ? 1.0 / (d->sa[i] * d->sa[i]) : 1.0;
        double r = *a0 * bm_lk_factor(d->k * m * d->t[i]) - d->a[i];
        chi2 += w * r * r;
    }
    return chi2;
}

bm_status bm_lk_fit_compute(const double *t_k, const double *a, const double *sa, size_t n,
                            double field_t, int harmonic, double *residuals, bm_lk_fit *out,
                            bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "temperature-damping fit: no output given");
    memset(out, 0, sizeof *out);
    if (n < 2)
        return bm_fail(err, BM_EINVAL, "temperature-damping fit: %zu point(s) for 2 "
                       "parameters (amplitude and mass): give at least 2 temperatures "
                       "(3 or more for standard errors)", n);
    if (!(field_t > 0.0) || !isfinite(field_t))
        return bm_fail(err, BM_EINVAL, "temperature-damping fit: field %g T must be positive",
                       field_t);
    if (harmonic < 1)
        return bm_fail(err, BM_EINVAL, "temperature-damping fit: harmonic %d must be 1 or "
                       "more", harmonic);
    bm_status st;
    if ((st = check_array(t_k, n, "temperatures_k", 1, err)) != BM_OK
        || (st = check_array(a, n, "amplitudes", 0, err)) != BM_OK
        || (sa && (st = check_array(sa, n, "amplitude_stderrs", 1, err)) != BM_OK))
        return st;
    int sign = a[0] > 0.0 ? 1 : -1;
    for (size_t i = 0; i < n; i++)
        if (!(sign * a[i] > 0.0))
            return bm_fail(err, BM_EINVAL, "amplitudes[%zu] is %g: amplitudes must all be "
                           "positive (or all negative, the sign being the phase); an "
                           "amplitude of zero or of the other sign is not damping", i, a[i]);
    if (!distinct(t_k, n))
        return bm_fail(err, BM_EINVAL, "temperature-damping fit: every temperature is %g K: "
                       "the damping needs at least two different temperatures", t_k[0]);
    LkData d = { t_k, a, sa, n, BM_LK_K_PER_T * harmonic / field_t };
    /* start: the best mass of a logarithmic grid, A0 solved for each */
    double best_m = NAN, best_c = INFINITY, best_a0 = NAN;
    for (int i = 0; i <= 120; i++) {
        double m = pow(10.0, -3.0 + 6.0 * i / 120.0), a0;
        double c = lk_profile(&d, m, &a0);
        if (c < best_c) {
            best_c = c;
            best_m = m;
            best_a0 = a0;
        }
    }
    const size_t np = 2;
    gsl_multifit_nlinear_parameters fp = gsl_multifit_nlinear_default_parameters();
    gsl_multifit_nlinear_workspace *ws =
        gsl_multifit_nlinear_alloc(gsl_multifit_nlinear_trust, &fp, n, np);
    gsl_matrix *cov = gsl_matrix_alloc(np, np);
    if (!ws || !cov) {
        if (ws)
            gsl_multifit_nlinear_free(ws);
        if (cov)
            gsl_matrix_free(cov);
        return bm_fail(err, BM_ENOMEM, "temperature-damping fit: allocation failed");
    }
    gsl_multifit_nlinear_fdf fdf = { .f = lk_f, .df = lk_df, .fvv = NULL, .n = n, .p = np,
                                     .params = &d };
    double p0[2] = { best_a0, best_m };
    gsl_vector_view x0 = gsl_vector_view_array(p0, np);
    int info = 0;
    int gs = gsl_multifit_nlinear_init(&x0.vector, &fdf, ws);
    if (gs == GSL_SUCCESS)
        gs = gsl_multifit_nlinear_driver(200, 1e-12, 1e-12, 1e-12, NULL, NULL, &info, ws);
    bm_status result = BM_OK;
    if (gs != GSL_SUCCESS && gs != GSL_EMAXITER) {
        result = bm_fail(err, BM_ENOCONV, "temperature-damping fit did not converge (%s)",
                         gsl_strerror(gs));
        goto done;
    }
    const gsl_vector *x = gsl_multifit_nlinear_position(ws);
    out->amplitude = gsl_vector_get(x, 0);
    out->mass = gsl_vector_get(x, 1);
    out->iterations = gsl_multifit_nlinear_niter(ws);
    /* X / sinh X is even in m: the sign of the fitted mass means nothing */
    out->mass = fabs(out->mass);
    double tmax = t_k[0], tmin = t_k[0];
    for (size_t i = 1; i < n; i++) {
        tmin = fmin(tmin, t_k[i]);
        tmax = fmax(tmax, t_k[i]);
    }
    if (!isfinite(out->mass) || d.k * out->mass * tmax < 1e-2) {
        result = bm_fail(err, BM_EINVAL, "temperature-damping fit: the best mass is %g m_e "
                         "(X = %.2g at the highest temperature): the amplitudes do not fall "
                         "with temperature as X / sinh X does, so they give no mass",
                         out->mass, d.k * out->mass * tmax);
        goto done;
    }
    if (gs == GSL_EMAXITER)
        bm_warn(&out->warnings, BM_WARN_REFINEMENT_NOT_CONVERGED, "temperature-damping fit: "
                "the iteration limit was reached; the values are approximate");
    gsl_vector *fres = gsl_multifit_nlinear_residual(ws);
    double chi2;
    gsl_blas_ddot(fres, fres, &chi2);
    out->chi2 = chi2;
    out->dof = n - np;
    out->chi2_per_dof = out->dof ? chi2 / (double)out->dof : NAN;
    out->weighted = sa != NULL;
    out->field_t = field_t;
    out->harmonic = harmonic;
    gsl_matrix *J = gsl_multifit_nlinear_jac(ws);
    if (gsl_multifit_nlinear_covar(J, 0.0, cov) != GSL_SUCCESS) {
        result = bm_fail(err, BM_ENOCONV, "temperature-damping fit: the covariance is "
                         "singular (the data do not fix both the amplitude and the mass)");
        goto done;
    }
    double s2 = covariance_scale(chi2, out->dof, out->weighted, &out->warnings,
                                 "temperature-damping fit");
    out->amplitude_stderr = sqrt(s2 * gsl_matrix_get(cov, 0, 0));
    out->mass_stderr = sqrt(s2 * gsl_matrix_get(cov, 1, 1));
    out->correlation = gsl_matrix_get(cov, 0, 1)
                     / sqrt(gsl_matrix_get(cov, 0, 0) * gsl_matrix_get(cov, 1, 1));
    out->x_min = d.k * out->mass * tmin;
    out->x_max = d.k * out->mass * tmax;
    for (size_t i = 0; residuals && i < n; i++)
        residuals[i] = a[i] - out->amplitude * bm_lk_factor(d.k * out->mass * t_k[i]);
    if (out->x_max < 1.0)
        bm_warn(&out->warnings, BM_WARN_FIT_POORLY_CONSTRAINED, "temperature-damping fit: "
                "X = 2 pi^2 p k_B T m_c / (hbar e B) reaches only %.2g at the highest "
                "temperature, so the amplitudes fall by at most %.0f %%: measure to higher "
                "temperatures or a lower field", out->x_max,
                100.0 * (1.0 - bm_lk_factor(out->x_max)));
    warn_poor(&out->warnings, "cyclotron mass (m_e)", out->mass, out->mass_stderr);
    warn_mass_range(&out->warnings, "cyclotron mass", out->mass);
done:
    gsl_multifit_nlinear_free(ws);
    gsl_matrix_free(cov);
    if (result != BM_OK)
        bm_warnings_clear(&out->warnings);
    return result;
}

/* The Dingle line for one mass: y = ln|A| - k ln B - ln R_T against 1/B. */
static int dingle_line(const double *b, const double *a, const double *w, size_t n,
                       double t_k, double m, int p, double k, Line *l, double *y)
{
    double *x = malloc(n * sizeof *x);
    if (!x)
        return -1;
    for (size_t i = 0; i < n; i++) {
        x[i] = 1.0 / b[i];
        y[i] = log(fabs(a[i])) - k * log(b[i])
             - log(bm_lk_factor(BM_LK_K_PER_T * p * m * t_k / b[i]));
    }
    int r = fit_line(x, y, w, n, 1, l);
    free(x);
    return r;
}

bm_status bm_dingle_fit_compute(const double *b_t, const double *a, const double *sa,
                                size_t n, double t_k, double mass, double mass_stderr,
                                int harmonic, double field_power, double *residuals,
                                bm_dingle_fit *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "Dingle fit: no output given");
    memset(out, 0, sizeof *out);
    if (n < 2)
        return bm_fail(err, BM_EINVAL, "Dingle fit: %zu point(s) for 2 parameters "
                       "(prefactor and Dingle temperature): give at least 2 fields", n);
    if (!(t_k > 0.0) || !(mass > 0.0) || !(mass_stderr >= 0.0) || harmonic < 1
        || !isfinite(field_power))
        return bm_fail(err, BM_EINVAL, "Dingle fit: temperature %g K and mass %g m_e must be "
                       "positive, the mass error not negative, the harmonic 1 or more",
                       t_k, mass);
    bm_status st;
    if ((st = check_array(b_t, n, "fields_t", 1, err)) != BM_OK
        || (st = check_array(a, n, "amplitudes", 0, err)) != BM_OK
        || (sa && (st = check_array(sa, n, "amplitude_stderrs", 1, err)) != BM_OK))
        return st;
    for (size_t i = 0; i < n; i++)
        if (!((a[0] > 0.0 ? 1.0 : -1.0) * a[i] > 0.0))
            return bm_fail(err, BM_EINVAL, "amplitudes[%zu] is %g: amplitudes must all be "
                           "positive (or all negative)", i, a[i]);
    if (!distinct(b_t, n))
        return bm_fail(err, BM_EINVAL, "Dingle fit: every field is %g T: the Dingle plot needs "
                       "at least two different fields", b_t[0]);
    /* ln |A| has the relative error sa / |A| */
    double *w = malloc(3 * n * sizeof *w), *y = w + n, *yy = w + 2 * n;
    if (!w)
        return bm_fail(err, BM_ENOMEM, "Dingle fit: allocation failed");
    for (size_t i = 0; sa && i < n; i++)
        w[i] = (a[i] * a[i]) / (sa[i] * sa[i]);
    Line l;
    if (dingle_line(b_t, a, sa ? w : NULL, n, t_k, mass, harmonic, field_power, &l, y) != 0) {
        free(w);
        return bm_fail(err, BM_EINVAL, "Dingle fit: the fields do not determine a line");
    }
    out->weighted = sa != NULL;
    out->dof = n - 2;
    out->chi2 = l.chi2;
    out->chi2_per_dof = out->dof ? l.chi2 / (double)out->dof : NAN;
    double s2 = covariance_scale(l.chi2, out->dof, out->weighted, &out->warnings, "Dingle fit");
    double scale = BM_LK_K_PER_T * harmonic * mass;
    out->dingle_temperature_k = -l.c1 / scale;
    double s_fit = sqrt(s2 * l.cov11) / scale;
    out->prefactor = (a[0] > 0.0 ? 1.0 : -1.0) * exp(l.c0);
    for (size_t i = 0; residuals && i < n; i++)
        residuals[i] = y[i] - l.c0 - l.c1 / b_t[i];
    /* the mass's error: refits at m -/+ sm, half the spread */
    double s_mass = 0.0;
    if (mass_stderr > 0.0 && mass_stderr < mass) {
        Line lo, hi;
        if (dingle_line(b_t, a, sa ? w : NULL, n, t_k, mass - mass_stderr, harmonic,
                        field_power, &lo, yy) == 0
            && dingle_line(b_t, a, sa ? w : NULL, n, t_k, mass + mass_stderr, harmonic,
                           field_power, &hi, yy) == 0) {
            double tlo = -lo.c1 / (BM_LK_K_PER_T * harmonic * (mass - mass_stderr));
            double thi = -hi.c1 / (BM_LK_K_PER_T * harmonic * (mass + mass_stderr));
            s_mass = 0.5 * fabs(thi - tlo);
        }
    }
    free(w);
    out->dingle_temperature_stderr_mass_k = s_mass;
    out->dingle_temperature_stderr_k = hypot(s_fit, s_mass);
    if (isfinite(out->dingle_temperature_stderr_k)
        && fabs(out->dingle_temperature_k) < 2.0 * out->dingle_temperature_stderr_k)
        bm_warn(&out->warnings, BM_WARN_FIT_POORLY_CONSTRAINED, "Dingle fit: T_D = %g K is "
                "within two standard errors (%g K) of zero", out->dingle_temperature_k,
                out->dingle_temperature_stderr_k);
    else
        warn_poor(&out->warnings, "Dingle temperature (K)", out->dingle_temperature_k,
                  out->dingle_temperature_stderr_k);
    if (out->dingle_temperature_k < 0.0)
        bm_warn(&out->warnings, BM_WARN_FIT_POORLY_CONSTRAINED, "Dingle fit: T_D = %g K is "
                "negative: the amplitudes grow faster with field than R_T and B^%g allow "
                "(check field_power and the mass)", out->dingle_temperature_k, field_power);
    return BM_OK;
}

/* ---- specific heat ------------------------------------------------------ */

#define AVOGADRO GSL_CONST_NUM_AVOGADRO
#define GAS_R (AVOGADRO * BM_KB)   /* R = N_A k_B, consistent with k_B below */

bm_status bm_free_electron_fermi_energy(double n_cm3, double *ef_ev, bm_errbuf *err)
{
    if (!(n_cm3 > 0.0) || !isfinite(n_cm3))
        return bm_fail(err, BM_EINVAL, "electron density %g cm^-3: must be positive", n_cm3);
    double n_m3 = n_cm3 * 1e6;
    *ef_ev = BM_HBAR * BM_HBAR * pow(3.0 * M_PI * M_PI * n_m3, 2.0 / 3.0) / (2.0 * BM_ME)
           / BM_EV;
    return BM_OK;
}

bm_status bm_thermal_mass_compute(double gamma, double sgamma, double ef_ev, double z,
                                  bm_thermal_mass *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "thermal mass: no output given");
    memset(out, 0, sizeof *out);
    if (!(gamma > 0.0) || !isfinite(gamma))
        return bm_fail(err, BM_EINVAL, "electronic specific-heat coefficient %g mJ mol^-1 "
                       "K^-2: must be positive", gamma);
    if (!(ef_ev > 0.0) || !isfinite(ef_ev))
        return bm_fail(err, BM_EINVAL, "Fermi energy %g eV: must be positive", ef_ev);
    if (!(z > 0.0) || !isfinite(z))
        return bm_fail(err, BM_EINVAL, "electrons per formula unit %g: must be positive", z);
    /* gamma_free = (pi^2 / 2) z R / T_F, T_F = E_F / k_B; mJ */
    double tf = ef_ev / BM_KB_EV;
    out->free_gamma = 0.5 * M_PI * M_PI * z * GAS_R / tf * 1e3;
    out->ratio = gamma / out->free_gamma;
    out->ratio_stderr = isfinite(sgamma) ? sgamma / out->free_gamma : NAN;
    /* gamma = (pi^2 / 3) k_B^2 N_A g: g per J per formula unit, both spins */
    double g_per_j = 3.0 * gamma * 1e-3 / (M_PI * M_PI * BM_KB * BM_KB * AVOGADRO);
    out->dos_per_ev_formula_unit = g_per_j * BM_EV;
    out->free_dos_per_ev_formula_unit = 1.5 * z / ef_ev;
    if (out->ratio > MASS_HIGH)
        bm_warn(&out->warnings, BM_WARN_MASS_OUT_OF_RANGE, "thermal mass ratio %.3g is above "
                "%g: heavy-fermion territory, where the free-electron comparison says little "
                "about band masses (many-body enhancement); check units (mJ, per mole of "
                "formula units) if that is not expected", out->ratio, MASS_HIGH);
    else if (out->ratio < 0.1)
        bm_warn(&out->warnings, BM_WARN_MASS_OUT_OF_RANGE, "thermal mass ratio %.3g is below "
                "0.1: check the units (mJ, per mole) and the electron count", out->ratio);
    return BM_OK;
}

bm_status bm_heat_fit_compute(const double *t_k, const double *c, const double *sc, size_t n,
                              double atoms_per_formula_unit, double *residuals,
                              bm_heat_fit *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "specific-heat fit: no output given");
    memset(out, 0, sizeof *out);
    if (n < 2)
        return bm_fail(err, BM_EINVAL, "specific-heat fit: %zu point(s) for 2 parameters "
                       "(gamma and beta): give at least 2 temperatures (3 or more for "
                       "standard errors)", n);
    if (!(atoms_per_formula_unit > 0.0))
        return bm_fail(err, BM_EINVAL, "specific-heat fit: atoms per formula unit %g must be "
                       "positive", atoms_per_formula_unit);
    bm_status st;
    if ((st = check_array(t_k, n, "temperatures_k", 1, err)) != BM_OK
        || (st = check_array(c, n, "heat_capacity_mj_per_mol_k", 0, err)) != BM_OK
        || (sc && (st = check_array(sc, n, "heat_capacity_stderr_mj_per_mol_k", 1, err))
            != BM_OK))
        return st;
    if (!distinct(t_k, n))
        return bm_fail(err, BM_EINVAL, "specific-heat fit: every temperature is %g K: C/T "
                       "against T^2 needs at least two different temperatures", t_k[0]);
    double *x = malloc(3 * n * sizeof *x), *y = x + n, *w = x + 2 * n;
    if (!x)
        return bm_fail(err, BM_ENOMEM, "specific-heat fit: allocation failed");
    for (size_t i = 0; i < n; i++) {
        x[i] = t_k[i] * t_k[i];
        y[i] = c[i] / t_k[i];
        if (sc)
            w[i] = t_k[i] * t_k[i] / (sc[i] * sc[i]);   /* error of C/T: sc / T */
    }
    Line l;
    if (fit_line(x, y, sc ? w : NULL, n, 1, &l) != 0) {
        free(x);
        return bm_fail(err, BM_EINVAL, "specific-heat fit: the temperatures do not "
                       "determine a line");
    }
    out->weighted = sc != NULL;
    out->dof = n - 2;
    out->chi2 = l.chi2;
    out->chi2_per_dof = out->dof ? l.chi2 / (double)out->dof : NAN;
    double s2 = covariance_scale(l.chi2, out->dof, out->weighted, &out->warnings,
                                 "specific-heat fit");
    out->gamma = l.c0;
    out->gamma_stderr = sqrt(s2 * l.cov00);
    out->beta = l.c1;
    out->beta_stderr = sqrt(s2 * l.cov11);
    for (size_t i = 0; residuals && i < n; i++)
        residuals[i] = y[i] - l.c0 - l.c1 * x[i];
    free(x);
    out->debye_temperature_k = NAN;
    out->debye_temperature_stderr_k = NAN;
    if (out->beta > 0.0) {
        /* beta = 12 pi^4 r R / (5 theta^3); beta in mJ: x 1e-3 */
        out->debye_temperature_k = cbrt(12.0 * pow(M_PI, 4) * atoms_per_formula_unit * GAS_R
                                        / (5.0 * out->beta * 1e-3));
        out->debye_temperature_stderr_k = out->debye_temperature_k * out->beta_stderr
                                        / (3.0 * out->beta);
    } else
        bm_warn(&out->warnings, BM_WARN_FIT_POORLY_CONSTRAINED, "specific-heat fit: beta = %g "
                "mJ mol^-1 K^-4 is not positive: no Debye temperature", out->beta);
    if (!(out->gamma > 0.0))
        bm_warn(&out->warnings, BM_WARN_FIT_POORLY_CONSTRAINED, "specific-heat fit: gamma = %g "
                "mJ mol^-1 K^-2 is not positive: the data show no electronic term",
                out->gamma);
    else
        warn_poor(&out->warnings, "gamma (mJ mol^-1 K^-2)", out->gamma, out->gamma_stderr);
    return BM_OK;
}
