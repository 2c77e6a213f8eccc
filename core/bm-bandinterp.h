/* bm-bandinterp.h: the band interpolant for integrals over the zone (thermal
 * masses, transport, orbits, band cuts): on meshes coarser than
 * BM_BANDINTERP_FINE_MIN points an axis, each band's smooth Fourier series
 * (least roughness through the mesh values, weighed by Cartesian |R|),
 * sampled on a finer mesh; periodic cubic B-splines through those samples (or
 * through the mesh itself, on fine meshes) carry it: C2 everywhere, 64 terms
 * per evaluation; crossing-aware where two sorted bands come close.
 *
 * Why this and not the spline alone or the exact Fourier series: sorted
 * first-principles bands have kinks where they cross or touch.  The exact
 * series spreads each kink's ringing over the zone; a spline on the mesh
 * keeps it local but, on a skewed cell, is smoother along some directions
 * than others, and on silicon's 24^3 mesh put the conduction valley's masses
 * 6 to 56 % off.  The smooth series spreads the kink over the aliases that
 * cost least roughness, equally in every direction.  Near a crossing the band
 * is recovered from the sum and the squared difference of the pair, which
 * stay smooth there, blended in smoothly by the interpolated gap (measured on
 * the silicon corpus: README, "Band interpolation"). */
#ifndef BM_BANDINTERP_H
#define BM_BANDINTERP_H

#include <stddef.h>

#include "bm-bands.h"

typedef struct bm_bandinterp bm_bandinterp;

/* Default pair gap (eV): below it a band and its closer neighbour are
 * interpolated as a pair, above three times it as single bands (measured on
 * the silicon corpus, README). */
#define BM_BANDINTERP_PAIR_GAP_EV 0.3

/* Meshes with fewer points than this along an axis are carried on a mesh
 * that many times finer (the smooth series sampled there); the fine mesh's
 * bands and pairs stay within the budget (16 Mi doubles, 128 MiB), the
 * finer mesh made coarser where they would not. */
#define BM_BANDINTERP_FINE_MIN 64
#define BM_BANDINTERP_FINE_BUDGET (16.0 * 1024 * 1024)

/* The interpolant of every band of g (and of its neighbouring pairs when
 * pair_gap_ev > 0; 0 switches the pair treatment off).  g's energies are read
 * during the call only.  Returns NULL when out of memory. */
bm_bandinterp *bm_bandinterp_new(const bm_grid *g, double pair_gap_ev);

/* The same for the bands lo .. hi of g only, with what their neighbours
 * need: bands lo - 1 .. hi + 1 (those the grid has) keep both their pair
 * partners.  eval and cell_bounds take the grid's band indices, those only.
 * Less memory and set-up on a grid of many bands, so a finer mesh within the
 * budget.
 * NULL when lo > hi, hi is past the last band, or out of memory. */
bm_bandinterp *bm_bandinterp_new_bands(const bm_grid *g, double pair_gap_ev, size_t lo,
                                       size_t hi);
void bm_bandinterp_free(bm_bandinterp *bi);

/* Band energy (eV) at fractional coordinates f (k = f1 b1 + f2 b2 + f3 b3,
 * period 1 along each axis; the grid's mesh offset is accounted for), and
 * optionally its gradient (eV per unit fractional coordinate) and Hessian.
 * Axes with one mesh point contribute nothing and have zero derivatives.
 * Thread-safe: bi is read only. */
void bm_bandinterp_eval(const bm_bandinterp *bi, size_t band, const double f[3], double *e,
                        double grad[3], double hess[3][3]);

/* Bounds of band over the grid's mesh cell (i, j, l) (the box from mesh point
 * (i, j, l) to (i+1, j+1, l+1)): a B-spline lies in the range of the
 * coefficients that carry it (the convex-hull property; (up + 3)^3 of them for
 * a cell that holds up^3 fine cells), widened by the pair blend's reach where
 * pairs are on.  For skipping cells outside an energy window. */
void bm_bandinterp_cell_bounds(const bm_bandinterp *bi, size_t band, const size_t cell[3],
                               double *lo, double *hi);

#endif
