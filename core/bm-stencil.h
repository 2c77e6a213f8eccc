/* bm-stencil.h: the k-points of a refinement stencil around an extremum, to be
 * computed with the band-structure code and fitted back as a k-table. */
#ifndef BM_STENCIL_H
#define BM_STENCIL_H

#include <stddef.h>

/* Points per stencil in dims (1 to 3) sampled directions: the centre, then for
 * the step h and for h / 2 the points +-h e_a along each principal axis and
 * +-h (e_a +- e_b) / sqrt 2 across each pair (1 + 2 (2 d + 2 d (d - 1))):
 * 5, 17 or 37.  Two steps give the fit two radii to compare (its error
 * estimate); the cross points fix the off-diagonal curvature. */
#define BM_STENCIL_MAX 37
size_t bm_stencil_size(int dims);

/* The stencil step (1/Angstrom) for a position known to within k_error: wide
 * enough to contain the extremum, never below 0.01 (finite differences of DFT
 * energies lose digits below that) nor above 0.05 (non-parabolicity); and,
 * when the estimate came from samples spaced `spacing` apart (a previous
 * stencil; NAN for a grid), not above that spacing (half the last step), so each round
 * of the loop closes in even where a flat direction keeps k_error large. */
double bm_stencil_step(double k_error, double spacing);

/* Fills out[0 .. bm_stencil_size(dims) - 1] with Cartesian points around
 * centre; axes rows are orthonormal principal axes (the first dims used). */
void bm_stencil_points(const double centre[3], const double axes[3][3], int dims, double step,
                       double (*out)[3]);

/* At a degenerate extremum (bands touching, no tensor) the stencil samples
 * lines instead: the centre and the points step u and 2 step u along the
 * Cartesian [100], [110] and [111] (the cube axes of a cubic crystal; both
 * signs are equivalent where time reversal maps k0 to itself, as at Gamma). */
#define BM_STENCIL_DIRECTIONAL 7
void bm_stencil_directional(const double centre[3], double step, double (*out)[3]);

#endif
