/* bm-quadric.h: weighted least-squares fit of E0 + g.u + u^T H u / 2 to points in
 * 1, 2 or 3 dimensions (3, 6 or 10 parameters), with rank detection. */
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
} bm_quadric;

/* Number of parameters of a quadric in dims dimensions. */
size_t bm_quadric_nparams(int dims);

/* Fits n points: offsets u[m][0..dims-1] (1/Angstrom), energies e[m], weights
 * w[m] (NULL: all 1). Returns 0; -1 when the points do not determine every
 * parameter (q->rank < q->nparams; q still holds rank and nparams); -2 on
 * allocation or GSL failure. */
int bm_quadric_fit(size_t n, int dims, const double (*u)[3], const double *e,
                   const double *w, bm_quadric *q);

#endif
