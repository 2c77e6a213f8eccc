/* bm-cyclotron.h: cyclotron masses of models: ellipsoidal valleys and their
 * resonance lines for a field direction, and warped heavy/light hole bands
 * by orbit integration; field-direction sweeps in a plane. */
#ifndef BM_CYCLOTRON_H
#define BM_CYCLOTRON_H

#include <stddef.h>

#include "bm-status.h"
#include "bm-valleys.h"
#include "bm-holes.h"

/* Cyclotron mass of one ellipsoidal valley for a field along b (any length
 * > 0): m_c = sqrt(det M / (b^T M b)) with M the mass tensor and b a unit
 * vector, i.e. sqrt(m1 m2 m3 / sum_i m_i (a_i . b)^2) with the principal
 * masses m_i along the axes a_i (Dresselhaus, Kip & Kittel, Phys. Rev. 98,
 * 368 (1955)). BM_EINVAL for a zero or non-finite b. */
bm_status bm_cyclotron_ellipsoid_mass(const bm_valley *v, const double b[3], double *mass,
                                      bm_errbuf *err);

/* One resonance line: the valleys whose cyclotron masses agree to
 * BM_CYCLOTRON_LINE_TOL (relative) for the field direction. */
#define BM_CYCLOTRON_LINE_TOL 1e-7
typedef struct {
    double mass;             /* m_c, m_e (the mean of its members) */
    double valley_count;     /* sum of the members' weights (a face valley counts 1/2) */
    size_t members;          /* positions in the list */
    size_t index[BM_STAR_MAX];  /* their indices in the valley list (first members) */
} bm_cyclotron_line;

/* The distinct lines of n valleys for a field along b, by increasing mass;
 * lines has room for n entries (n <= BM_STAR_MAX for the member indices, a
 * longer list keeps the first BM_STAR_MAX). *n_lines gets their number. */
bm_status bm_cyclotron_lines(const bm_valley *valleys, size_t n, const double b[3],
                             bm_cyclotron_line *lines, size_t *n_lines, bm_errbuf *err);

/* Unit directions from `from` to `to` by equal angles in their common plane,
 * steps >= 2 of them, both ends included (directions[i], angle_deg[i] from
 * `from`); steps = 1 gives `from` alone. BM_EINVAL for zero vectors, or
 * parallel or antiparallel ends with steps >= 2 (no plane). */
bm_status bm_direction_sweep(const double from[3], const double to[3], size_t steps,
                             double (*directions)[3], double *angle_deg, bm_errbuf *err);

/* Warped hole bands E(k) = (hbar^2 / 2 m_e) [A k^2 -/+ sqrt(B^2 k^4 + C^2 (kx^2 ky^2 +
 * ky^2 kz^2 + kz^2 kx^2))], A = gamma1, B = 2 gamma2, C^2 = 12 (gamma3^2 - gamma2^2),
 * hole energies positive downward; heavy is the minus sign. */
typedef enum { BM_HOLE_HEAVY = 0, BM_HOLE_LIGHT = 1 } bm_hole_band;

#define BM_HOLE_ORBITS_MAX 8

/* One extremal cross-section of a warped band normal to the field, in
 * reduced units: k measured in sqrt(2 m_e E) / hbar at hole energy E, so
 * the orbit's area at E is area_reduced * 2 m_e E / hbar^2. */
typedef struct {
    double k_parallel_reduced;   /* k . b of the section's plane (>= 0; -k is the same orbit) */
    double area_reduced;         /* its area */
    int is_maximum;              /* 1: a maximum of the area along b, 0: a minimum */
    double mass;                 /* m_c / m_e = area_reduced / pi (hbar^2 / 2 pi) dA/dE */
    int irregular;               /* 1: the section is not star-shaped about its centre
                                    (ray areas unreliable: mass NAN) */
} bm_hole_orbit;

typedef struct {
    int closed;                  /* 0: the surface is open (heavy band with
                                    gamma1 <= 2 max(|gamma2|, |gamma3|)): no orbits */
    double central_mass;         /* the k_par = 0 orbit's m_c, m_e (NAN when open) */
    double k_parallel_max_reduced; /* the tip of the surface along b */
    size_t n_orbits;             /* extremal orbits, the central one first */
    bm_hole_orbit orbits[BM_HOLE_ORBITS_MAX];
    double quadrature_change;    /* relative change of the areas on doubling the rays */
} bm_hole_band_orbits;

typedef struct {
    bm_hole_band_orbits band[2]; /* [BM_HOLE_HEAVY], [BM_HOLE_LIGHT] */
    double field_direction[3];   /* unit b */
    bm_warnings warnings;        /* the caller frees them: bm_warnings_clear */
} bm_hole_cyclotron;

/* Heavy- and light-hole cyclotron masses for a field along b (any length > 0)
 * by orbit integration: each cross-section k . b = kappa of the surface at
 * unit energy is traced by rays from its centre (the radius along a ray is a
 * root of a quartic, the squared dispersion, sorted to its band by the sign
 * of A k^2 - E), its area by the periodic trapezoid rule (spectrally
 * accurate; rays doubled from 128 until the areas agree to 1e-10, at most
 * 2048), and the extrema of the area over kappa found by a scan of 48
 * sections refined by Brent's method. The central orbit (kappa = 0) is always
 * extremal (E(k) = E(-k)); for gamma2 = gamma3 it is the only one, with
 * m_c = 1 / (gamma1 -/+ 2 gamma2). BM_EINVAL for bad parameters (as
 * bm_luttinger_direction) or a zero field direction. */
bm_status bm_hole_cyclotron_compute(const bm_luttinger *L, const double b[3],
                                    bm_hole_cyclotron *out, bm_errbuf *err);

#endif
