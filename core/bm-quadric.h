/* bm-quadric.h: weighted least-squares fit of E0 + g.u + u^T H u / 2 to points in
 * 1, 2 or 3 dimensions (3, 6 or 10 parameters), with rank detection, the
 * covariance of the fitted Hessian, and a test for terms beyond quadratic. */
#ifndef BM_QUADRIC_H
#define BM_QUADRIC_H

#include <stddef.h>

typedef struct {
    int dims;
    size_t nparams;     /* 3, 6 or 10 */
    size_t rank;        /* effective rank of the design matrix */
    double e0;          /* eV */
    double g[3];        /* eV Angstrom (unused entries 0) */
    double h[3][3];     /* eV Angstrom^2 (unused rows/columns 0) */
    double rms;         /* weighted root-mean-square residual, eV */
    double sigma;       /* scatter of one energy about the fit, eV: the residuals'
                           sum of squares over its expectation per unit variance */
    double hcov[3][3][3][3];  /* Cov(h[a][b], h[c][d]), eV^2 Angstrom^4, from sigma
                                 (the sandwich form, so it holds for any weights) */
} bm_quadric;

/* Terms beyond quadratic in the same points: an unweighted fit of the full
 * polynomial of degree 4 (or 3 where the points are too few for 4) against
 * the quadric, by the F test of the extra terms. */
typedef struct {
    int degree;         /* 4 or 3; 0: too few points for either (not tested) */
    double p_value;     /* chance of an F this large from scatter alone */
    double h[3][3];     /* the polynomial's Hessian at u = 0, eV Angstrom^2 */
} bm_quadric_beyond;

/* Number of parameters of a quadric in dims dimensions. */
size_t bm_quadric_nparams(int dims);

/* Fits n points: offsets u[m][0..dims-1] (1/Angstrom), energies e[m], weights
 * w[m] (NULL: all 1). Returns 0; -1 when the points do not determine every
 * parameter (q->rank < q->nparams; q still holds rank and nparams); -2 on
 * allocation or GSL failure. */
int bm_quadric_fit(size_t n, int dims, const double (*u)[3], const double *e,
                   const double *w, bm_quadric *q);

/* Variance of the curvature v^T H v along a unit vector v (first dims entries)
 * of a fitted quadric, eV^2 Angstrom^4. */
double bm_quadric_curvature_var(const bm_quadric *q, const double v[3]);

/* Tests n points for terms beyond quadratic. Returns 0, or -2 on allocation
 * or GSL failure (b->degree 0 when the points are too few). */
int bm_quadric_beyond_test(size_t n, int dims, const double (*u)[3], const double *e,
                           bm_quadric_beyond *b);

#endif
