/* bm-kane.c: Kane-band fits and their thermal masses (bm-kane.h). */
#include "bm-kane.h"

#include <math.h>
#include <string.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_sf_bessel.h>
#include <gsl/gsl_vector.h>

#include "bm-units.h"

/* E from gamma = sum c_i q_i^2, and dE/dgamma, dE/dalpha; the series where
 * 4 alpha gamma is small keeps alpha -> 0 exact. */
static void kane_energy(double gamma, double alpha, double *e, double *de_dg, double *de_da)
{
    double x = 4.0 * alpha * gamma;
    if (fabs(x) < 1e-6) {
        *e = gamma - alpha * gamma * gamma + 2.0 * alpha * alpha * gamma * gamma * gamma;
        *de_dg = 1.0 - 2.0 * alpha * gamma + 6.0 * alpha * alpha * gamma * gamma;
        *de_da = -gamma * gamma + 4.0 * alpha * gamma * gamma * gamma;
        return;
    }
    double s = sqrt(1.0 + x);
    *e = (s - 1.0) / (2.0 * alpha);
    *de_dg = 1.0 / s;
    *de_da = (4.0 * alpha * gamma / s - 2.0 * (s - 1.0)) / (4.0 * alpha * alpha);
}

/* Least squares of J p = r (n x np) by QR; p and, when cov, (J^T J)^-1. */
static int solve_ls(gsl_matrix *j, gsl_vector *r, gsl_vector *p, gsl_matrix *cov)
{
    size_t n = j->size1, np = j->size2;
    gsl_matrix *a = gsl_matrix_alloc(n, np);
    gsl_vector *tau = gsl_vector_alloc(np), *res = gsl_vector_alloc(n);
    int st = -1;
    if (a && tau && res) {
        gsl_matrix_memcpy(a, j);
        if (gsl_linalg_QR_decomp(a, tau) == 0 && gsl_linalg_QR_lssolve(a, tau, r, p, res) == 0) {
            st = 0;
            if (cov) {
                /* (J^T J)^-1 = R^-1 R^-T */
                gsl_matrix_view rr = gsl_matrix_submatrix(a, 0, 0, np, np);
                gsl_matrix *ri = gsl_matrix_alloc(np, np);
                if (!ri)
                    st = -1;
                else {
                    gsl_matrix_set_identity(ri);
                    for (size_t c = 0; c < np && st == 0; c++) {
                        gsl_vector_view col = gsl_matrix_column(ri, c);
                        if (gsl_blas_dtrsv(CblasUpper, CblasNoTrans, CblasNonUnit, &rr.matrix,
                                           &col.vector) != 0)
                            st = -1;
                    }
                    for (size_t i = 0; i < np; i++)
                        for (size_t k = 0; k < np; k++) {
                            double v = 0.0;
                            for (size_t m = 0; m < np; m++)
                                v += gsl_matrix_get(ri, i, m) * gsl_matrix_get(ri, k, m);
                            gsl_matrix_set(cov, i, k, v);
                        }
                    gsl_matrix_free(ri);
                }
            }
        }
    }
    gsl_matrix_free(a);
    gsl_vector_free(tau);
    gsl_vector_free(res);
    return st;
}

/* Residuals e - model at parameters par (c_1..c_d, offset, shifts, alpha)
 * into r and the Jacobian into j; returns the residual sum of squares. */
static double residuals(const double (*q)[3], const double *e, size_t n, int dims, int kane,
                        const double *par, gsl_matrix *j, gsl_vector *r)
{
    int ia = 2 * dims + 1;
    double alpha = kane ? par[ia] : 0.0, rss = 0.0;
    for (size_t i = 0; i < n; i++) {
        double gamma = 0.0, em, dg, da, x[3];
        for (int d = 0; d < dims; d++) {
            x[d] = q[i][d] - par[dims + 1 + d];
            gamma += par[d] * x[d] * x[d];
        }
        kane_energy(gamma, alpha, &em, &dg, &da);
        double res = e[i] - (em + par[dims]);
        rss += res * res;
        gsl_vector_set(r, i, res);
        for (int d = 0; d < dims; d++) {
            gsl_matrix_set(j, i, (size_t)d, dg * x[d] * x[d]);
            gsl_matrix_set(j, i, (size_t)(dims + 1 + d), -2.0 * dg * par[d] * x[d]);
        }
        gsl_matrix_set(j, i, (size_t)dims, 1.0);
        if (kane)
            gsl_matrix_set(j, i, (size_t)ia, da);
    }
    return rss;
}

bm_status bm_kane_fit_points(const double (*q)[3], const double *e, size_t n, int dims, int kane,
                             bm_kane_fit *out, bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    out->dims = dims;
    out->npoints = n;
    /* c_1..c_d, offset, the centre's shift delta_1..delta_d, alpha */
    int np = 2 * dims + 1 + (kane ? 1 : 0), ia = 2 * dims + 1;
    out->nparams = np;
    if (dims < 1 || dims > 3)
        return bm_fail(err, BM_EINVAL, "kane fit: %d principal directions (1 to 3)", dims);
    if (n < (size_t)np + 2)
        return bm_fail(err, BM_EINVAL,
                       "kane fit: %zu points for %d parameters: give at least %d inside the "
                       "energy window", n, np, np + 2);
    gsl_matrix *j = gsl_matrix_alloc(n, (size_t)np), *cov = gsl_matrix_alloc((size_t)np, (size_t)np);
    gsl_vector *r = gsl_vector_alloc(n), *p = gsl_vector_alloc((size_t)np);
    double par[8] = {0};
    bm_status st = BM_OK;
    if (!j || !cov || !r || !p) {
        st = bm_fail(err, BM_ENOMEM, "kane fit: out of memory");
        goto done;
    }
    /* start: the implicit form E + alpha E^2 = e0 + sum c_i (q_i - d_i)^2 is linear in
     * c_i, the linear coefficients b_i = -2 c_i d_i, the constant and alpha */
    for (size_t i = 0; i < n; i++) {
        for (int d = 0; d < dims; d++) {
            gsl_matrix_set(j, i, (size_t)d, q[i][d] * q[i][d]);
            gsl_matrix_set(j, i, (size_t)(dims + 1 + d), q[i][d]);
        }
        gsl_matrix_set(j, i, (size_t)dims, 1.0);
        if (kane)
            gsl_matrix_set(j, i, (size_t)ia, -e[i] * e[i]);
        gsl_vector_set(r, i, e[i]);
    }
    if (solve_ls(j, r, p, NULL) != 0) {
        st = bm_fail(err, BM_EINVAL, "kane fit: the points do not determine the fit (too few "
                     "distinct directions or distances)");
        goto done;
    }
    for (int k = 0; k < np; k++)
        par[k] = gsl_vector_get(p, (size_t)k);
    for (int d = 0; d < dims; d++)
        par[dims + 1 + d] = par[d] != 0.0 ? -par[dims + 1 + d] / (2.0 * par[d]) : 0.0;
    /* Gauss-Newton on E_model(q) + offset - e */
    double rss = 0.0;
    for (int it = 0; it < 50; it++) {
        rss = residuals(q, e, n, dims, kane, par, j, r);
        if (solve_ls(j, r, p, cov) != 0) {
            st = bm_fail(err, BM_EINVAL, "kane fit: the points do not determine the fit");
            goto done;
        }
        double step = 0.0, size = 0.0;
        for (int k = 0; k < np; k++) {
            par[k] += gsl_vector_get(p, (size_t)k);
            step += fabs(gsl_vector_get(p, (size_t)k));
            size += fabs(par[k]);
        }
        if (step <= 1e-13 * (1.0 + size))
            break;
    }
    /* final residuals and covariance at the solution */
    {
        rss = residuals(q, e, n, dims, kane, par, j, r);
        gsl_vector_set_zero(r);
        if (solve_ls(j, r, p, cov) != 0) {
            st = bm_fail(err, BM_EINVAL, "kane fit: the points do not determine the fit");
            goto done;
        }
    }
    double s2 = rss / (double)(n - (size_t)np);
    for (int d = 0; d < dims; d++) {
        double c = par[d], sc = sqrt(s2 * gsl_matrix_get(cov, (size_t)d, (size_t)d));
        /* c = hbar^2 / (2 m): m = hbar^2 / (2 c), dm = m dc / c */
        out->masses_me[d] = BM_HBAR2_OVER_ME_EV_A2 / (2.0 * c);
        out->masses_stderr_me[d] = fabs(out->masses_me[d] * sc / c);
    }
    out->offset_ev = par[dims];
    for (int d = 0; d < dims; d++)
        out->shift[d] = par[dims + 1 + d];
    if (kane) {
        out->alpha_per_ev = par[ia];
        out->alpha_stderr_per_ev = sqrt(s2 * gsl_matrix_get(cov, (size_t)ia, (size_t)ia));
    }
    out->rms_residual_ev = sqrt(rss / (double)n);
    out->aic = (double)n * log(fmax(rss, 1e-300) / (double)n) + 2.0 * np;
done:
    gsl_matrix_free(j);
    gsl_matrix_free(cov);
    gsl_vector_free(r);
    gsl_vector_free(p);
    return st;
}

double bm_kane_fit_energy(const bm_kane_fit *f, const double q[3])
{
    double gamma = 0.0, e, dg, da;
    for (int d = 0; d < f->dims; d++) {
        double x = q[d] - f->shift[d];
        gamma += BM_HBAR2_OVER_ME_EV_A2 / (2.0 * f->masses_me[d]) * x * x;
    }
    if (1.0 + 4.0 * f->alpha_per_ev * gamma < 0.0)
        return NAN;
    kane_energy(gamma, f->alpha_per_ev, &e, &dg, &da);
    return f->offset_ev + e;
}

typedef struct {
    double alpha, beta;
    int which;   /* 0: sqrt(gamma) u, 1: gamma^(3/2) / u */
} kane_integrand;

static double integrand(double e, void *data)
{
    const kane_integrand *k = data;
    double gamma = e * (1.0 + k->alpha * e), u = 1.0 + 2.0 * k->alpha * e;
    double w = exp(-k->beta * e);
    return k->which ? pow(gamma, 1.5) / u * w : sqrt(gamma) * u * w;
}

bm_status bm_kane_thermal(const double m[3], int dims, double alpha, double temperature_k,
                          double *dos_mass_me, double cond_masses_me[3], bm_errbuf *err)
{
    double kt = BM_KB_EV * temperature_k;
    if (!(kt > 0.0) || !isfinite(kt))
        return bm_fail(err, BM_EINVAL, "temperature %g K: must be above 0 K", temperature_k);
    if (!(alpha >= 0.0) || !isfinite(alpha))
        return bm_fail(err, BM_EINVAL, "alpha %g per eV: the Kane band needs alpha >= 0", alpha);
    double geo = 1.0;
    for (int d = 0; d < dims; d++)
        geo *= m[d];
    geo = pow(geo, 1.0 / dims);
    /* DOS: ratio to the parabolic integral (sqrt(pi)/2) kT^(3/2) */
    double ratio = 1.0, b = 1.0 / (2.0 * alpha * kt);
    if (alpha > 0.0 && b < 700.0) {
        gsl_sf_result k2;
        if (gsl_sf_bessel_Kn_scaled_e(2, b, &k2) != GSL_SUCCESS)
            return bm_fail(err, BM_EINVAL, "kane thermal: Bessel K2(%g) failed", b);
        ratio = k2.val / (4.0 * pow(alpha, 1.5) * b) / (0.5 * sqrt(M_PI) * pow(kt, 1.5));
    } else if (alpha > 0.0) {
        ratio = 1.0 + 3.75 * alpha * kt;   /* b large: the first term of the series */
    }
    *dos_mass_me = geo * pow(ratio, 2.0 / 3.0);
    /* conductivity: F = (2 / 3kT) int gamma^(3/2)/u e^(-E/kT) / int gamma^(1/2) u e^(-E/kT) */
    double f = 1.0;
    if (alpha > 0.0) {
        gsl_integration_workspace *ws = gsl_integration_workspace_alloc(200);
        if (!ws)
            return bm_fail(err, BM_ENOMEM, "kane thermal: out of memory");
        kane_integrand k0 = { alpha, 1.0 / kt, 0 }, k1 = { alpha, 1.0 / kt, 1 };
        gsl_function f0 = { integrand, &k0 }, f1 = { integrand, &k1 };
        double i0, i1, e0, e1;
        int s0 = gsl_integration_qag(&f0, 0.0, 80.0 * kt, 0.0, 1e-11, 200, GSL_INTEG_GAUSS41, ws,
                                     &i0, &e0);
        int s1 = gsl_integration_qag(&f1, 0.0, 80.0 * kt, 0.0, 1e-11, 200, GSL_INTEG_GAUSS41, ws,
                                     &i1, &e1);
        gsl_integration_workspace_free(ws);
        if (s0 || s1 || !(i0 > 0.0))
            return bm_fail(err, BM_EINVAL, "kane thermal: quadrature failed at %g K",
                           temperature_k);
        f = 2.0 / (3.0 * kt) * i1 / i0;
    }
    for (int d = 0; d < 3; d++)
        cond_masses_me[d] = d < dims ? m[d] / f : NAN;
    return BM_OK;
}
