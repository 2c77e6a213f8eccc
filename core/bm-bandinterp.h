/* bm-bandinterp.h: the band interpolant for integrals over the zone (thermal
 * masses, transport, orbits): a periodic cubic B-spline through every mesh
 * point of every band, C2 everywhere (mesh points included), 64 terms per
 * evaluation, and crossing-aware where two sorted bands come close.
 *
 * Why a spline and not the exact Fourier series: sorted first-principles bands
 * have kinks where they cross or touch, and a Fourier series spreads the
 * ringing of each kink over the whole zone, while the spline's error decays by
 * a factor of about 0.27 per mesh step away from it (measured on the silicon
 * corpus; README, "Band interpolation").  Near a crossing the band is
 * recovered from splines of the sum and the squared difference of the pair,
 * which stay smooth there, blended in smoothly by the interpolated gap. */
#ifndef BM_BANDINTERP_H
#define BM_BANDINTERP_H

#include <stddef.h>

#include "bm-bands.h"

typedef struct bm_bandinterp bm_bandinterp;

/* Default pair gap (eV): below it a band and its closer neighbour are
 * interpolated as a pair, above three times it as single bands (measured on
 * the silicon corpus, README). */
#define BM_BANDINTERP_PAIR_GAP_EV 0.15

/* Spline coefficients of every band of g (and of its neighbouring pairs when
 * pair_gap_ev > 0; 0 switches the pair treatment off).  g's energies are read
 * during the call only.  Returns NULL when out of memory. */
bm_bandinterp *bm_bandinterp_new(const bm_grid *g, double pair_gap_ev);
void bm_bandinterp_free(bm_bandinterp *bi);

/* Band energy (eV) at fractional coordinates f (k = f1 b1 + f2 b2 + f3 b3,
 * period 1 along each axis; the grid's mesh offset is accounted for), and
 * optionally its gradient (eV per unit fractional coordinate) and Hessian.  Axes with one mesh point contribute
 * nothing and have zero derivatives.  Thread-safe: bi is read only. */
void bm_bandinterp_eval(const bm_bandinterp *bi, size_t band, const double f[3], double *e,
                        double grad[3], double hess[3][3]);

/* Bounds of band over mesh cell (i, j, l) (the box from mesh point (i, j, l)
 * to (i+1, j+1, l+1)): a B-spline lies in the range of the 64 coefficients
 * that carry it (the convex-hull property), widened by the pair blend's
 * reach where pairs are on.  For skipping cells outside an energy window. */
void bm_bandinterp_cell_bounds(const bm_bandinterp *bi, size_t band, const size_t cell[3],
                               double *lo, double *hi);

#endif
