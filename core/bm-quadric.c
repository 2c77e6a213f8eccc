/* bm-quadric.c: weighted quadric fit through GSL's truncated-SVD linear least
 * squares, with coordinates scaled to unit size for conditioning. */
#include "bm-quadric.h"

#include <math.h>
#include <string.h>
#include <gsl/gsl_blas.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_multifit.h>

/* The scatter of one energy and the covariance of the coefficients of a
 * weighted fit: Cov(c) = s^2 M S2 M with M = (X^T W X)^-1 (cov, from GSL),
 * S2 = X^T W^2 X, and s^2 the unweighted residual sum of squares over its
 * expectation per unit variance, n - 2p + tr(M S0 M S2) with S0 = X^T X
 * (n - p for equal weights). Fills ccov (p x p); returns s, or NAN. */
static double coefficient_cov(const gsl_matrix *X, const gsl_vector *w, const gsl_vector *c,
                              const gsl_vector *y, const gsl_matrix *cov, gsl_matrix *ccov)
{
    size_t n = X->size1, p = X->size2;
    gsl_matrix *s0 = gsl_matrix_calloc(p, p), *s2 = gsl_matrix_calloc(p, p);
    gsl_matrix *t1 = gsl_matrix_alloc(p, p), *t2 = gsl_matrix_alloc(p, p);
    double result = NAN;
    if (!s0 || !s2 || !t1 || !t2)
        goto done;
    gsl_matrix *wx = gsl_matrix_alloc(n, p);
    gsl_vector *fit = gsl_vector_alloc(n);
    if (!wx || !fit) {
        gsl_matrix_free(wx);
        gsl_vector_free(fit);
        goto done;
    }
    gsl_matrix_memcpy(wx, X);
    for (size_t m = 0; m < n; m++) {
        gsl_vector_view row = gsl_matrix_row(wx, m);
        gsl_vector_scale(&row.vector, gsl_vector_get(w, m));
    }
    gsl_blas_dgemm(CblasTrans, CblasNoTrans, 1.0, X, X, 0.0, s0);
    gsl_blas_dgemm(CblasTrans, CblasNoTrans, 1.0, wx, wx, 0.0, s2);
    gsl_blas_dgemv(CblasNoTrans, 1.0, X, c, 0.0, fit);
    double rss = 0.0;
    for (size_t m = 0; m < n; m++) {
        double r = gsl_vector_get(y, m) - gsl_vector_get(fit, m);
        rss += r * r;
    }
    gsl_matrix_free(wx);
    gsl_vector_free(fit);
    /* t1 = M S0 M, then tr(t1 S2) */
    gsl_blas_dgemm(CblasNoTrans, CblasNoTrans, 1.0, cov, s0, 0.0, t2);
    gsl_blas_dgemm(CblasNoTrans, CblasNoTrans, 1.0, t2, cov, 0.0, t1);
    double tr = 0.0;
    for (size_t i = 0; i < p; i++)
        for (size_t j = 0; j < p; j++)
            tr += gsl_matrix_get(t1, i, j) * gsl_matrix_get(s2, j, i);
    double dof = (double)n - 2.0 * (double)p + tr;
    if (!(dof > 0.5))
        goto done;   /* as many points as parameters: no scatter to measure */
    double s2v = rss / dof;
    gsl_blas_dgemm(CblasNoTrans, CblasNoTrans, 1.0, cov, s2, 0.0, t2);
    gsl_blas_dgemm(CblasNoTrans, CblasNoTrans, s2v, t2, cov, 0.0, ccov);
    result = sqrt(s2v);
done:
    gsl_matrix_free(s0);
    gsl_matrix_free(s2);
    gsl_matrix_free(t1);
    gsl_matrix_free(t2);
    return result;
}

size_t bm_quadric_nparams(int dims)
{
    return 1 + (size_t)dims + (size_t)(dims * (dims + 1) / 2);
}

int bm_quadric_fit(size_t n, int dims, const double (*u)[3], const double *e,
                   const double *w, bm_quadric *q)
{
    memset(q, 0, sizeof *q);
    q->dims = dims;
    q->nparams = bm_quadric_nparams(dims);
    size_t p = q->nparams;
    if (dims < 1 || dims > 3)
        return -2;
    double scale = 0.0;
    for (size_t m = 0; m < n; m++)
        for (int a = 0; a < dims; a++)
            scale = fmax(scale, fabs(u[m][a]));
    if (n < p || scale == 0.0) {
        q->rank = n < p ? n : 1;
        return -1;
    }
    gsl_matrix *X = gsl_matrix_alloc(n, p);
    gsl_vector *y = gsl_vector_alloc(n);
    gsl_vector *wv = gsl_vector_alloc(n);
    gsl_vector *c = gsl_vector_alloc(p);
    gsl_matrix *cov = gsl_matrix_alloc(p, p), *ccov = gsl_matrix_calloc(p, p);
    gsl_multifit_linear_workspace *work = gsl_multifit_linear_alloc(n, p);
    int ret = -2;
    if (!X || !y || !wv || !c || !cov || !ccov || !work)
        goto done;
    for (size_t m = 0; m < n; m++) {
        double s[3] = { 0, 0, 0 };
        for (int a = 0; a < dims; a++)
            s[a] = u[m][a] / scale;
        size_t col = 0;
        gsl_matrix_set(X, m, col++, 1.0);
        for (int a = 0; a < dims; a++)
            gsl_matrix_set(X, m, col++, s[a]);
        for (int a = 0; a < dims; a++)
            for (int b = a; b < dims; b++)
                gsl_matrix_set(X, m, col++, a == b ? 0.5 * s[a] * s[a] : s[a] * s[b]);
        gsl_vector_set(y, m, e[m]);
        gsl_vector_set(wv, m, w ? w[m] : 1.0);
    }
    double chisq;
    size_t rank = 0;
    if (gsl_multifit_wlinear_tsvd(X, wv, y, 1e-10, c, cov, &chisq, &rank, work) != GSL_SUCCESS)
        goto done;
    q->rank = rank;
    if (rank < p) {
        ret = -1;
        goto done;
    }
    size_t col = 0;
    q->e0 = gsl_vector_get(c, col++);
    for (int a = 0; a < dims; a++)
        q->g[a] = gsl_vector_get(c, col++) / scale;
    for (int a = 0; a < dims; a++)
        for (int b = a; b < dims; b++) {
            double v = gsl_vector_get(c, col++) / (scale * scale);
            q->h[a][b] = q->h[b][a] = v;
        }
    double sw = 0.0, sr = 0.0;
    for (size_t m = 0; m < n; m++) {
        double fit = q->e0;
        for (int a = 0; a < dims; a++) {
            fit += q->g[a] * u[m][a];
            for (int b = 0; b < dims; b++)
                fit += 0.5 * q->h[a][b] * u[m][a] * u[m][b];
        }
        double wm = w ? w[m] : 1.0;
        sw += wm;
        sr += wm * (e[m] - fit) * (e[m] - fit);
    }
    q->rms = sw > 0.0 ? sqrt(sr / sw) : 0.0;
    q->sigma = coefficient_cov(X, wv, c, y, cov, ccov);
    /* the Hessian's entries are the coefficients from column 1 + dims on */
    size_t hcol[3][3];
    col = 1 + (size_t)dims;
    for (int a = 0; a < dims; a++)
        for (int b = a; b < dims; b++)
            hcol[a][b] = hcol[b][a] = col++;
    double s4 = scale * scale * scale * scale;
    for (int a = 0; a < dims; a++)
        for (int b = 0; b < dims; b++)
            for (int cc = 0; cc < dims; cc++)
                for (int d = 0; d < dims; d++)
                    q->hcov[a][b][cc][d] = isfinite(q->sigma)
                        ? gsl_matrix_get(ccov, hcol[a][b], hcol[cc][d]) / s4 : NAN;
    ret = 0;
done:
    gsl_matrix_free(X);
    gsl_vector_free(y);
    gsl_vector_free(wv);
    gsl_vector_free(c);
    gsl_matrix_free(cov);
    gsl_matrix_free(ccov);
    if (work)
        gsl_multifit_linear_free(work);
    return ret;
}

double bm_quadric_curvature_var(const bm_quadric *q, const double v[3])
{
    double var = 0.0;
    for (int a = 0; a < q->dims; a++)
        for (int b = 0; b < q->dims; b++)
            for (int c = 0; c < q->dims; c++)
                for (int d = 0; d < q->dims; d++)
                    var += v[a] * v[b] * v[c] * v[d] * q->hcov[a][b][c][d];
    return var;
}

/* The exponents of every monomial in dims variables of total degree <= deg,
 * by degree; returns their number (at most 35). */
static size_t monomials(int dims, int deg, int (*ex)[3])
{
    size_t n = 0;
    for (int t = 0; t <= deg; t++)
        for (int i = t; i >= 0; i--)
            for (int j = t - i; j >= 0; j--) {
                int k = t - i - j;
                if ((dims < 2 && j) || (dims < 3 && k))
                    continue;
                ex[n][0] = i;
                ex[n][1] = j;
                ex[n][2] = k;
                n++;
            }
    return n;
}

int bm_quadric_beyond_test(size_t n, int dims, const double (*u)[3], const double *e,
                           bm_quadric_beyond *b)
{
    memset(b, 0, sizeof *b);
    b->p_value = NAN;
    int ex[35][3];
    size_t p2 = monomials(dims, 2, ex);
    int deg = 4;
    size_t pd = monomials(dims, 4, ex);
    /* eight degrees of freedom at least beyond the polynomial's parameters */
    if (n < pd + 8) {
        deg = 3;
        pd = monomials(dims, 3, ex);
    }
    if (dims < 1 || dims > 3 || n < pd + 8)
        return 0;
    double scale = 0.0, emean = 0.0;
    for (size_t m = 0; m < n; m++) {
        emean += e[m] / (double)n;
        for (int a = 0; a < dims; a++)
            scale = fmax(scale, fabs(u[m][a]));
    }
    if (scale == 0.0)
        return 0;
    gsl_matrix *X = gsl_matrix_alloc(n, pd);
    gsl_vector *y = gsl_vector_alloc(n), *c = gsl_vector_alloc(pd);
    int ret = -2;
    if (!X || !y || !c)
        goto done;
    for (size_t m = 0; m < n; m++) {
        for (size_t i = 0; i < pd; i++) {
            double v = 1.0;
            for (int a = 0; a < 3; a++)
                for (int r = 0; r < ex[i][a]; r++)
                    v *= u[m][a] / scale;
            gsl_matrix_set(X, m, i, v);
        }
        gsl_vector_set(y, m, e[m] - emean);
    }
    /* one Householder QR of the columns ordered by degree gives the residual
     * sum of squares of every leading set: |y|^2 - |(Q^T y)[0..p)|^2 */
    if (gsl_linalg_QR_decomp(X, c) != GSL_SUCCESS)
        goto done;
    double rmax = 0.0, rmin = INFINITY;
    for (size_t i = 0; i < pd; i++) {
        rmax = fmax(rmax, fabs(gsl_matrix_get(X, i, i)));
        rmin = fmin(rmin, fabs(gsl_matrix_get(X, i, i)));
    }
    ret = 0;
    if (!(rmin > 1e-10 * rmax))
        goto done;   /* the points do not determine the polynomial: not tested */
    if (gsl_linalg_QR_QTvec(X, c, y) != GSL_SUCCESS) {
        ret = -2;
        goto done;
    }
    double rss2 = 0.0, rssd = 0.0;
    for (size_t i = p2; i < n; i++) {
        double v = gsl_vector_get(y, i);
        rss2 += v * v;
        if (i >= pd)
            rssd += v * v;
    }
    /* the polynomial's coefficients: R c = (Q^T y)[0..pd) */
    gsl_vector_const_view head = gsl_vector_const_subvector(y, 0, pd);
    gsl_matrix_const_view r = gsl_matrix_const_submatrix(X, 0, 0, pd, pd);
    gsl_vector_memcpy(c, &head.vector);
    gsl_blas_dtrsv(CblasUpper, CblasNoTrans, CblasNonUnit, &r.matrix, c);
    b->degree = deg;
    double nu1 = (double)(pd - p2), nu2 = (double)(n - pd);
    /* exact data (sums of squares at rounding level): nothing beyond quadratic
     * can be told from scatter, so the test does not reject */
    double tiny = 1e-24 * (double)n * (emean * emean + 1.0);
    if (rss2 <= tiny)
        b->p_value = 1.0;
    else if (rssd <= tiny)
        b->p_value = 0.0;
    else
        b->p_value = gsl_cdf_fdist_Q(((rss2 - rssd) / nu1) / (rssd / nu2), nu1, nu2);
    for (size_t i = 0; i < pd; i++) {
        int a = -1, bb = -1;
        if (ex[i][0] + ex[i][1] + ex[i][2] != 2)
            continue;
        for (int q = 0; q < 3; q++)
            for (int r = 0; r < ex[i][q]; r++) {
                if (a < 0)
                    a = q;
                else
                    bb = q;
            }
        double v = gsl_vector_get(c, i) / (scale * scale);
        if (a == bb)
            b->h[a][a] = 2.0 * v;
        else
            b->h[a][bb] = b->h[bb][a] = v;
    }
done:
    gsl_matrix_free(X);
    gsl_vector_free(y);
    gsl_vector_free(c);
    return ret;
}
