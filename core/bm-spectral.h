/* bm-spectral.h: smooth interpolation of one band on a uniform periodic mesh,
 * with analytic first and second derivatives, for locating extrema below the mesh spacing. */
#ifndef BM_SPECTRAL_H
#define BM_SPECTRAL_H

#include <stddef.h>

/* Axes with at most this many points use the full trigonometric (Fourier)
 * interpolant; longer axes use a local polynomial of BM_LOCAL_POINTS points. */
#define BM_SPECTRAL_FULL_MAX 32
#define BM_LOCAL_POINTS 8

/* Scratch and mesh description for evaluations; one per thread. */
typedef struct bm_interp bm_interp;

/* mesh: n1 n2 n3 (each >= 1). Returns NULL when out of memory. */
bm_interp *bm_interp_new(const size_t mesh[3]);
void bm_interp_free(bm_interp *ip);

/* The same interpolant with its top harmonics (coarse axes: those above
 * n/2 - max(1, n/8)) or its outer stencil points (fine axes: 6 in place of 8)
 * left out.  Its difference from the full one estimates the interpolation
 * error: small on a smooth band, large where a kink rings. */
bm_interp *bm_interp_new_reduced(const size_t mesh[3]);

/* Value, gradient and Hessian of the interpolant of band (n1*n2*n3 values in
 * C order) at fractional coordinates f (period 1 along each axis); derivatives
 * are with respect to f. Axes with one point contribute zero derivatives. */
void bm_interp_eval(bm_interp *ip, const double *band, const double f[3],
                    double *e, double g[3], double h[3][3]);

/* The 1D weights behind bm_interp_eval, exposed for tests: for an axis of n
 * points and position x (in units of the mesh spacing), fills up to
 * max(n, BM_LOCAL_POINTS) node indices (0..n-1) and weights w[d][m] for the
 * value (d = 0) and the first and second x-derivatives; returns the count. */
size_t bm_interp_weights(size_t n, double x, size_t *idx, double (*w)[3]);

#endif
