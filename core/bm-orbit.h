/* bm-orbit.h: cyclotron orbits on the interpolated band of a grid: sections
 * of the constant-energy surface by planes perpendicular to the field, their
 * areas, the extremal ones along the field, and m_c = (hbar^2 / 2 pi) dA/dE. */
#ifndef BM_ORBIT_H
#define BM_ORBIT_H

#include <stddef.h>

#include "bm-bandinterp.h"
#include "bm-bands.h"
#include "bm-status.h"

/* Rays per section: the area is the periodic trapezoid rule on r(theta)^2 / 2,
 * spectrally accurate for smooth star-shaped sections. */
#define BM_ORBIT_RAYS 128
#define BM_ORBIT_MAX 16

typedef struct {
    double k_parallel;        /* 1/Angstrom along the field from the centre */
    double area;              /* 1/Angstrom^2 */
    double mass_me;           /* signed: negative for a hole orbit (area shrinking with E) */
    double mass_error_me;     /* |m(h) - m(2h)|: the energy-difference error */
    double energy_step_ev;    /* h */
    int extremum;             /* +1 maximum of A(k_par), -1 minimum, 0 the one section of a sheet */
    int irregular;            /* a ray crosses the energy more than once: not star-shaped */
} bm_orbit;

typedef struct {
    size_t count;
    bm_orbit orbits[BM_ORBIT_MAX];
    int open;                 /* the section at the centre does not close within reach */
    int missed;               /* the energy is on the wrong side at the centre: no orbit */
    double reach;             /* 1/Angstrom: half the shortest reciprocal vector */
} bm_orbit_set;

/* Orbits of band about the Cartesian point centre (1/Angstrom) for a field
 * along field (any length) at energy e_ev.  sense: +1 electron orbits about a
 * minimum (e_ev must lie above the centre's energy), -1 hole orbits about a
 * maximum, 0 taken from which side of the centre's energy e_ev lies.  A sheet
 * (mesh n3 = 1) has one section, the field taken along its normal. */
bm_status bm_orbits_find(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                         const double centre[3], const double field[3], double e_ev, int sense,
                         bm_orbit_set *out, bm_errbuf *err);

/* The contour of one section as n points (Cartesian, 1/Angstrom), for plots. */
bm_status bm_orbit_contour(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                           const double centre[3], const double field[3], double e_ev,
                           double k_parallel, double (*pts)[3], size_t n, bm_errbuf *err);

#endif
