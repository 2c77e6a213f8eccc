/* bm-mat3.h: the static-inline 3x3 arithmetic (products, tensor rotation,
 * determinant, inverse) on flat row-major arrays; bm-linalg wraps it for double[3][3]. */
#ifndef BM_MAT3_H
#define BM_MAT3_H

/* Matrices are passed as pointers to 9 doubles, row-major (for an array
 * double a[3][3], pass BM_M3P(a) or BM_M3CP(a)); this keeps const-correct calls free of the
 * C11 qualifier rules for pointers to arrays. */

#include <math.h>
#include <string.h>

#define BM_M3(a, i, j) ((a)[3 * (i) + (j)])

/* The 9 doubles of an array double x[3][3] (or of a whole array of them):
 * converting the pointer to the array object keeps the arithmetic within it. */
#define BM_M3P(x) ((double *)(x))
#define BM_M3CP(x) ((const double *)(x))

static inline void bm_m3_copy(double *dst, const double *src)
{
    memmove(dst, src, 9 * sizeof(double));
}

static inline void bm_m3_identity(double *a)
{
    for (int i = 0; i < 9; i++)
        a[i] = (i % 4 == 0) ? 1.0 : 0.0;
}

/* c = a b (c may alias a or b). */
static inline void bm_m3_mul(double *c, const double *a, const double *b)
{
    double t[9];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double s = 0.0;
            for (int k = 0; k < 3; k++)
                s += BM_M3(a, i, k) * BM_M3(b, k, j);
            BM_M3(t, i, j) = s;
        }
    bm_m3_copy(c, t);
}

/* y = a x (y may alias x). */
static inline void bm_m3_apply(double *y, const double *a, const double *x)
{
    double t[3];
    for (int i = 0; i < 3; i++)
        t[i] = BM_M3(a, i, 0) * x[0] + BM_M3(a, i, 1) * x[1] + BM_M3(a, i, 2) * x[2];
    y[0] = t[0]; y[1] = t[1]; y[2] = t[2];
}

/* b = a^T (b may alias a). */
static inline void bm_m3_transpose(double *b, const double *a)
{
    double t[9];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            BM_M3(t, i, j) = BM_M3(a, j, i);
    bm_m3_copy(b, t);
}

/* out = r t r^T: a second-rank tensor t carried by the operation r. */
static inline void bm_m3_rotate_tensor(double *out, const double *r, const double *t)
{
    double rt[9], r_transposed[9];
    bm_m3_mul(rt, r, t);
    bm_m3_transpose(r_transposed, r);
    bm_m3_mul(out, rt, r_transposed);
}

static inline double bm_m3_det(const double *a)
{
    return BM_M3(a, 0, 0) * (BM_M3(a, 1, 1) * BM_M3(a, 2, 2) - BM_M3(a, 1, 2) * BM_M3(a, 2, 1))
         - BM_M3(a, 0, 1) * (BM_M3(a, 1, 0) * BM_M3(a, 2, 2) - BM_M3(a, 1, 2) * BM_M3(a, 2, 0))
         + BM_M3(a, 0, 2) * (BM_M3(a, 1, 0) * BM_M3(a, 2, 1) - BM_M3(a, 1, 1) * BM_M3(a, 2, 0));
}

/* Largest absolute entry of a - b. */
static inline double bm_m3_maxdiff(const double *a, const double *b)
{
    double m = 0.0;
    for (int i = 0; i < 9; i++)
        m = fmax(m, fabs(a[i] - b[i]));
    return m;
}

/* Largest absolute entry of a a^T - 1 (0 for an orthogonal matrix). */
static inline double bm_m3_orthogonality_error(const double *a)
{
    double m = 0.0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double s = BM_M3(a, i, 0) * BM_M3(a, j, 0) + BM_M3(a, i, 1) * BM_M3(a, j, 1)
                     + BM_M3(a, i, 2) * BM_M3(a, j, 2);
            m = fmax(m, fabs(s - (i == j ? 1.0 : 0.0)));
        }
    return m;
}

static inline double bm_v3_dot(const double *a, const double *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static inline double bm_v3_norm(const double *a)
{
    return sqrt(bm_v3_dot(a, a));
}

/* Inverse of a; returns 0 (and leaves inv untouched) when |det| <= tiny. */
static inline int bm_m3_inverse(double *inv, const double *a, double tiny)
{
    double d = bm_m3_det(a);
    if (!(fabs(d) > tiny))
        return 0;
    double t[9];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            /* cofactor of (j, i) */
            int r0 = (j + 1) % 3, r1 = (j + 2) % 3, c0 = (i + 1) % 3, c1 = (i + 2) % 3;
            BM_M3(t, i, j) = (BM_M3(a, r0, c0) * BM_M3(a, r1, c1)
                            - BM_M3(a, r0, c1) * BM_M3(a, r1, c0)) / d;
        }
    bm_m3_copy(inv, t);
    return 1;
}

#endif
