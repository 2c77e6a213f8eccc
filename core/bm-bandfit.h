/* bm-bandfit.h: crossing-aware local polynomial fits of one band of a periodic
 * grid around a mesh point; each fit setting gives a stationary point and its
 * Hessian, and the spread between settings is the error estimate of a mass. */
#ifndef BM_BANDFIT_H
#define BM_BANDFIT_H

#include <stddef.h>

#include "bm-bands.h"

/* A fit setting: polynomial degree and fit radius in mesh steps (the longest
 * of |b_a| / n_a over the sampled axes). */
typedef struct {
    int order;
    double radius_steps;
} bm_bandfit_setting;

#define BM_BANDFIT_NSETTINGS 3
extern const bm_bandfit_setting bm_bandfit_settings[BM_BANDFIT_NSETTINGS];

typedef struct {
    int ok;                  /* 1: the fit was determined and its Newton search converged */
    size_t npoints;          /* mesh points in the fit */
    double k[3];             /* stationary point, Cartesian, 1/Angstrom */
    double energy_ev;
    double hessian[3][3];    /* d2E / dk_i dk_j, eV Angstrom^2, Cartesian */
    double gap_ev;           /* fitted gap to the partner band at k (INFINITY without) */
} bm_bandfit;

/* The mesh step (1/Angstrom) the settings are measured in. */
double bm_bandfit_step(const bm_grid *g);

/* The neighbouring band (band - 1 or band + 1) that comes closest to band
 * among the mesh points within radius (1/Angstrom) of the Cartesian point kc
 * (fractional f0), or -1 for a single band; *min_gap gets that smallest gap
 * (INFINITY for a single band) and *span the band's energy range there. */
int bm_bandfit_partner(const bm_grid *g, size_t band, const double f0[3], const double kc[3],
                       double radius, double *min_gap, double *span);

/* Fits band around the Cartesian point kc (fractional f0; kc must be the
 * image that f0 gives) over the first dims rows of the orthonormal basis p.
 * Without a partner (partner < 0) the band itself is fitted; with one, the
 * sum and the squared difference of the two bands, which stay smooth where
 * sorted bands cross or touch, and the band is recovered as the lower or
 * upper root.  Returns 0 with out->ok telling whether the fit holds; -1 on
 * allocation or GSL failure. */
int bm_bandfit_run(const bm_grid *g, size_t band, int partner, const double f0[3],
                   const double kc[3], int dims, double p[3][3],
                   const bm_bandfit_setting *s, bm_bandfit *out);

#endif
