/* bm-holes.h: valence-band hole masses: the heavy/light/split-off DOS mass
 * combination and directional and DOS masses from Luttinger parameters. */
#ifndef BM_HOLES_H
#define BM_HOLES_H

#include <stddef.h>

#include "bm-status.h"

/* Heavy, light and split-off bands at one valence-band maximum. */
typedef struct {
    double m_hh;            /* heavy-hole DOS mass, m_e, > 0 */
    double m_lh;            /* light-hole DOS mass, m_e, > 0 */
    double m_so;            /* split-off mass, m_e; 0 leaves the band out */
    double delta_so_ev;     /* spin-orbit splitting, eV, >= 0 (with m_so > 0) */
    double temperature_k;   /* K, > 0 when the split-off band is included */
} bm_hole_bands;

typedef struct {
    double dos_mass;        /* m_dh, m_e */
    double fraction_hh;     /* share of the holes in each band (non-degenerate) */
    double fraction_lh;
    double fraction_so;
    bm_warnings warnings;      /* the caller frees them: bm_warnings_clear */
} bm_hole_dos;

/* m_dh^(3/2) = m_hh^(3/2) + m_lh^(3/2) + m_so^(3/2) exp(-Delta_so / kT).
 * BM_EINVAL for non-positive masses, a negative m_so or Delta_so, or a
 * non-positive temperature when the split-off band is included. */
bm_status bm_hole_dos_mass(const bm_hole_bands *b, bm_hole_dos *out, bm_errbuf *err);

/* Means over the unit sphere of nvals functions of the direction that keep
 * the cube's symmetry (so one octant stands for the sphere): f fills
 * vals[0..nvals-1] at unit n; Gauss-Legendre with nu nodes in cos(theta),
 * the midpoint rule with 2 nu in phi. nvals <= BM_OCTANT_MAX_VALUES. */
#define BM_OCTANT_MAX_VALUES 16
bm_status bm_octant_means(void (*f)(const double n[3], void *ctx, double *vals), void *ctx,
                          size_t nvals, size_t nu, double *means, bm_errbuf *err);

/* Luttinger parameters of the four-fold valence-band maximum of a cubic
 * semiconductor (Luttinger, Phys. Rev. 102, 1030 (1956)). */
typedef struct {
    double g1, g2, g3;
} bm_luttinger;

/* Heavy and light masses along a direction n (any length > 0), m_e:
 * 1/m = g1 -/+ sqrt(4 g2^2 + 12 (g3^2 - g2^2)(nx^2 ny^2 + ny^2 nz^2 + nz^2 nx^2)).
 * Where the heavy-hole factor is not positive the band curves the wrong way:
 * m_heavy is then negative (INFINITY where it vanishes), and *concave is 1. */
bm_status bm_luttinger_direction(const bm_luttinger *L, const double n[3],
                                 double *m_heavy, double *m_light, int *concave,
                                 bm_errbuf *err);

typedef struct {
    double heavy[3];          /* heavy-hole mass along [100], [110], [111], m_e */
    double light[3];          /* light-hole mass along the same */
    double heavy_dos_mass;    /* warped-surface DOS masses, m_e; heavy_dos_mass is */
    double light_dos_mass;    /* INFINITY when heavy_convex is 0 (open surface) */
    double combined_dos_mass; /* (m_hd^(3/2) + m_ld^(3/2))^(2/3); INFINITY likewise */
    int heavy_convex;         /* 1 when the heavy-hole factor is positive everywhere */
    double heavy_factor_min;  /* min over directions of g1 - sqrt(...), 1/m_e */
    double quadrature_change; /* relative change of the DOS masses on doubling
                                 the quadrature: an error estimate */
    bm_warnings warnings;      /* the caller frees them: bm_warnings_clear */
} bm_luttinger_masses;

/* Directional masses and the angle averages
 *   m_d^(3/2) = < f(n)^(-3/2) >_sphere,   f = g1 -/+ sqrt(...),
 * by Gauss-Legendre quadrature in cos(theta) times the periodic rule in phi.
 * BM_EINVAL for non-finite parameters or g1 <= 0 (no hole band at all). */
bm_status bm_luttinger_masses_compute(const bm_luttinger *L, bm_luttinger_masses *out,
                                      bm_errbuf *err);

/* The band-edge k.p hole density-of-states mass: the warped heavy- and
 * light-hole surfaces of L combined, m^(3/2) = m_hd^(3/2) + m_ld^(3/2)
 * (bm_luttinger_masses_compute's combined_dos_mass), and with m_so > 0 the
 * split-off band at its offset Delta_so added as m_so^(3/2) exp(-Delta_so/kT)
 * (then t_k > 0 is needed; m_so = 0 leaves it out and ignores delta and T).
 * This is a band-edge quantity: it is not the mass that reproduces a
 * measured Nv at room temperature (non-parabolicity and the temperature
 * dependence of the valence bands are left out).  BM_EINVAL as for the two
 * functions it uses, and for an open heavy-hole surface (no finite mass);
 * warnings (w may be NULL) are those of the warped-band computation. */
bm_status bm_band_edge_hole_dos_mass(const bm_luttinger *L, double m_so, double delta_so_ev,
                                     double t_k, double *mass, bm_warnings *w,
                                     bm_errbuf *err);

#endif
