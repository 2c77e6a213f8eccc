/* bm-quadric.c: weighted quadric fit through GSL's truncated-SVD linear least
 * squares, with coordinates scaled to unit size for conditioning. */
#include "bm-quadric.h"

#include <math.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit.h>

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
    gsl_matrix *cov = gsl_matrix_alloc(p, p);
    gsl_multifit_linear_workspace *work = gsl_multifit_linear_alloc(n, p);
    int ret = -2;
    if (!X || !y || !wv || !c || !cov || !work)
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
    ret = 0;
done:
    gsl_matrix_free(X);
    gsl_vector_free(y);
    gsl_vector_free(wv);
    gsl_vector_free(c);
    gsl_matrix_free(cov);
    if (work)
        gsl_multifit_linear_free(work);
    return ret;
}
