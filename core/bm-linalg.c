/* bm-linalg.c: the double[3][3] interface to the 3x3 arithmetic of bm-mat3.h,
 * symmetric eigen-decomposition through GSL's gsl_eigen_symmv, reciprocal
 * vectors and orthonormal basis completion. */
#include "bm-linalg.h"
#include "bm-mat3.h"

#include <math.h>
#include <gsl/gsl_math.h>
#include <string.h>
#include <gsl/gsl_eigen.h>
#include <gsl/gsl_errno.h>

double bm_det3(double a[3][3])
{
    return bm_m3_det(BM_M3CP(a));
}

int bm_reciprocal3(double a[3][3], double b[3][3])
{
    double det = bm_det3(a);
    double scale = bm_norm3(a[0]) * bm_norm3(a[1]) * bm_norm3(a[2]);
    if (!isfinite(det) || !(scale > 0.0) || fabs(det) <= 1e-10 * scale)
        return -1;
    double c[3][3];
    bm_cross3(a[1], a[2], c[0]);
    bm_cross3(a[2], a[0], c[1]);
    bm_cross3(a[0], a[1], c[2]);
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            b[i][j] = 2.0 * M_PI * c[i][j] / det;
    return 0;
}

int bm_inv3(double a[3][3], double out[3][3])
{
    double det = bm_det3(a);
    double scale = bm_norm3(a[0]) * bm_norm3(a[1]) * bm_norm3(a[2]);
    if (!isfinite(det) || scale == 0.0 || fabs(det) <= 1e-14 * scale)
        return -1;
    return bm_m3_inverse(BM_M3P(out), BM_M3CP(a), 0.0) ? 0 : -1;
}

void bm_matmul3(double a[3][3], double b[3][3], double out[3][3])
{
    bm_m3_mul(BM_M3P(out), BM_M3CP(a), BM_M3CP(b));
}

void bm_transpose3(double a[3][3], double out[3][3])
{
    double r[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            r[i][j] = a[j][i];
    memcpy(out, r, sizeof r);
}

void bm_cross3(const double a[3], const double b[3], double out[3])
{
    double r[3] = { a[1] * b[2] - a[2] * b[1],
                    a[2] * b[0] - a[0] * b[2],
                    a[0] * b[1] - a[1] * b[0] };
    memcpy(out, r, sizeof r);
}

double bm_dot3(const double a[3], const double b[3])
{
    return bm_v3_dot(a, b);
}

double bm_norm3(const double a[3])
{
    return sqrt(bm_dot3(a, a));
}

int bm_symeig(double a[3][3], int n, double evals[3], double evecs[3][3])
{
    if (n < 1 || n > 3)
        return -1;
    double m[9], v[9], e[3];
    for (int i = 0; i < n; i++)
        for (int j = 0; j < n; j++)
            m[i * n + j] = 0.5 * (a[i][j] + a[j][i]);
    gsl_matrix_view mv = gsl_matrix_view_array(m, (size_t)n, (size_t)n);
    gsl_matrix_view vv = gsl_matrix_view_array(v, (size_t)n, (size_t)n);
    gsl_vector_view ev = gsl_vector_view_array(e, (size_t)n);
    gsl_eigen_symmv_workspace *w = gsl_eigen_symmv_alloc((size_t)n);
    if (!w)
        return -1;
    int rc = gsl_eigen_symmv(&mv.matrix, &ev.vector, &vv.matrix, w);
    gsl_eigen_symmv_free(w);
    if (rc != GSL_SUCCESS)
        return -1;
    rc = gsl_eigen_symmv_sort(&ev.vector, &vv.matrix, GSL_EIGEN_SORT_VAL_ASC);
    if (rc != GSL_SUCCESS)
        return -1;
    for (int k = 0; k < n; k++) {
        evals[k] = e[k];
        for (int i = 0; i < n; i++)
            evecs[k][i] = v[i * n + k];   /* column k of V is eigenvector k */
    }
    return 0;
}

void bm_complete_basis(double basis[3][3], int given)
{
    for (int r = given; r < 3; r++) {
        if (r == 2) {
            bm_cross3(basis[0], basis[1], basis[2]);
            continue;
        }
        /* Pick the Cartesian axis least aligned with the rows so far,
         * then Gram-Schmidt it against them. */
        int best = 0;
        double best_overlap = INFINITY;
        for (int c = 0; c < 3; c++) {
            double overlap = 0.0;
            for (int q = 0; q < r; q++)
                overlap += basis[q][c] * basis[q][c];
            if (overlap < best_overlap) {
                best_overlap = overlap;
                best = c;
            }
        }
        double v[3] = { 0.0, 0.0, 0.0 };
        v[best] = 1.0;
        for (int q = 0; q < r; q++) {
            double d = bm_dot3(v, basis[q]);
            for (int c = 0; c < 3; c++)
                v[c] -= d * basis[q][c];
        }
        double nv = bm_norm3(v);
        for (int c = 0; c < 3; c++)
            basis[r][c] = v[c] / nv;
    }
}
