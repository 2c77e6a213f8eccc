/* bm-valleys.h: valley stars from crystal symmetry and multi-valley averages
 * (conductivity mass tensor, density-of-states mass, valley populations). */
#ifndef BM_VALLEYS_H
#define BM_VALLEYS_H

#include <stddef.h>

#include "bm-status.h"
#include "bm-symmetry.h"
#include "bm-carriers.h"   /* bm_statistics */

/* One ellipsoidal valley: positive principal masses (m_e) along unit axes. */
typedef struct {
    double masses[3];     /* m1 m2 m3, m_e, all > 0 */
    double axes[3][3];    /* rows: orthonormal principal axes, Cartesian */
} bm_valley_shape;

/* Where a valley minimum sits in the Brillouin zone. */
typedef enum {
    BM_SITE_GAMMA,     /* at the zone centre: one valley */
    BM_SITE_INTERIOR,  /* along a direction, inside the zone: k and -k distinct */
    BM_SITE_FACE       /* on the zone boundary: k and -k differ by a reciprocal
                          vector, so each position counts one half */
} bm_valley_site;

/* One member of a star or of an explicit list. */
typedef struct {
    double direction[3];       /* unit vector of the valley position (0 at Gamma) */
    double inv_mass[3][3];     /* inverse mass tensor, 1/m_e, Cartesian */
    double masses[3];          /* principal masses, m_e, ascending */
    double axes[3][3];         /* rows: principal axes, order of masses */
    double weight;             /* multiplicity: 1 (0.5 for a face half-valley) */
    double energy_offset_ev;   /* valley edge relative to a common reference,
                                  positive away from the carriers' band edge
                                  (up for electrons, down for holes) */
    double population;         /* fraction of the carriers (filled by the average) */
    double k[3];               /* a star counted by zone shares: the star point in the
                                  first zone, 1/Angstrom (0 otherwise) */
} bm_valley;

#define BM_STAR_MAX BM_POINT_GROUP_MAX_ORDER

typedef struct {
    double valley_count;       /* full valleys: sum of weights (4 for Ge L) */
    size_t n;                  /* positions listed */
    bm_valley valleys[BM_STAR_MAX];
    bm_warnings warnings;      /* the caller frees them: bm_warnings_clear */
} bm_valley_star;

/* Builds a spheroidal valley: m_l along axis (need not be normalised),
 * m_t across it. BM_EINVAL for non-positive or non-finite masses or a zero axis. */
bm_status bm_valley_shape_spheroid(double m_long, double m_trans, const double axis[3],
                                   bm_valley_shape *out, bm_errbuf *err);

/* Checks a general valley filled in by the caller (principal masses and
 * axes as rows) and corrects it in place: axes orthonormal to within 1e-3
 * are re-orthonormalised by Gram-Schmidt in the given order (with a warning
 * when the correction exceeds 1e-9); larger errors, non-positive or
 * non-finite masses are BM_EINVAL. */
bm_status bm_valley_shape_normalise(bm_valley_shape *shape, bm_warnings *warn,
                                    bm_errbuf *err);

/* Star of a valley under point group g plus time reversal (k -> -k).
 * direction: the valley position (any length > 0) for interior and face
 * sites; ignored (may be NULL) at Gamma. Operations that map the position to
 * itself carry the tensor into a possibly different orientation; the stored
 * tensor is the average over them, with a warning when they disagree (the
 * valley shape then breaks the symmetry of its site). Energy offsets are 0. */
/* Snaps a valley direction found numerically (a mass-tensor extremum) onto
 * the symmetry element it lies on: the operations of g, with time reversal,
 * that map the unit direction onto itself within tol (the length of R d - d)
 * are its site group, and dir becomes the normalised mean of their images
 * (exactly invariant under them). *moved gets the angle turned, radians.
 * Without it a direction 1e-4 off [100] would build a star of 24 valleys
 * instead of 6. BM_EINVAL for a zero or non-finite direction. */
bm_status bm_valley_snap_direction(double dir[3], const bm_point_group *g, double tol,
                                   double *moved, bm_errbuf *err);

bm_status bm_valley_star_build(const bm_valley_shape *shape, bm_valley_site site,
                               const double direction[3], const bm_point_group *g,
                               bm_valley_star *out, bm_errbuf *err);

/* The star of a valley at k (Cartesian, 1/Angstrom) in a crystal of lattice
 * vectors a (rows, Angstrom, in the point group's frame), counted by zone
 * shares: k is taken to its first-zone image, the star points are its images
 * under g with time reversal, and each counts 1/m where m of them are one
 * point modulo a reciprocal-lattice vector (on a zone face 1/2, at a
 * hexagonal zone corner 1/3); valley_count is the number of distinct points
 * modulo the reciprocal lattice. With snap_tol > 0 the first-zone image's
 * direction is snapped first (bm_valley_snap_direction; *snapped_rad gets the
 * angle). BM_EINVAL where g does not map the lattice
 * onto itself (axes not in the group's frame) or a is singular. */
bm_status bm_valley_star_zone(const bm_valley_shape *shape, const double k[3],
                              const double a[3][3], const bm_point_group *g,
                              double snap_tol, double *snapped_rad,
                              bm_valley_star *out, bm_errbuf *err);

/* A valley in a layer confined along the unit normal n (the effective-mass
 * approximation for an ellipsoid tilted against the layer; Stern & Howard,
 * Phys. Rev. 163, 816 (1967)): with W the inverse mass tensor, the subbands
 * are quantised with m_z = 1 / (n W n), and the in-plane motion has the
 * inverse tensor W_ij - W_in W_jn / W_nn, whose determinant gives the 2D
 * density-of-states mass sqrt(m1 m2 m3 / m_z). */
typedef struct {
    double quantization_mass;     /* m_z, m_e */
    double dos_mass_2d;           /* m_e */
    double inplane_masses[2];     /* principal in-plane masses, ascending, m_e */
    double inplane_axes[2][3];    /* their Cartesian unit vectors (rows) */
} bm_confined_valley;

bm_status bm_valley_confine(const bm_valley *v, const double normal[3], bm_confined_valley *out,
                            bm_errbuf *err);

/* Fills a bm_valley from a shape (direction may be NULL, weight > 0). */
bm_status bm_valley_from_shape(const bm_valley_shape *shape, const double direction[3],
                               double weight, double energy_offset_ev,
                               bm_valley *out, bm_errbuf *err);

/* How valleys are populated when their edges differ: equally (thermal = 0;
 * the offsets must then all be 0), or thermally with the statistics of the
 * carrier solver (bm_statistics, bm-carriers.h):
 *   BM_BOLTZMANN    n_v ~ w_v (m1 m2 m3)_v^(1/2) exp(-dE_v / kT)
 *   BM_FERMI_DIRAC  n_v ~ w_v (m1 m2 m3)_v^(1/2) F_1/2((E_F - E_v) / kT) */
typedef struct {
    int thermal;              /* 0: every valley alike; 1: thermal populations */
    bm_statistics statistics; /* thermal populations: their statistics */
    double temperature_k;     /* >= 0 when thermal (> 0 when the offsets differ) */
    double fermi_level_ev;    /* BM_FERMI_DIRAC: measured like the offsets,
                                 positive into the band (above the reference for
                                 electrons, below it for holes) */
} bm_population;

typedef struct {
    double conductivity_inv_mass[3][3];   /* M_c^-1, 1/m_e */
    double conductivity_mass_tensor[3][3];/* M_c, m_e */
    double conductivity_masses[3];        /* principal values of M_c, ascending */
    double conductivity_axes[3][3];       /* rows, order of conductivity_masses */
    int conductivity_isotropic;           /* 1: M_c is a scalar (to 1e-9 relative) */
    double conductivity_mass;             /* 3 / tr(M_c^-1): the scalar of a cubic
                                             crystal, the harmonic mean otherwise */
    double dos_mass;                      /* m_d, referred to the lowest valley edge */
    double valley_count;                  /* sum of weights */
    double effective_valley_count;        /* sum of w'_v: populated valleys */
    bm_warnings warnings;      /* the caller frees them: bm_warnings_clear */
} bm_valley_average;

/* Averages over n valleys; fills each valley's population fraction.
 *   M_c^-1 = sum_v p_v M_v^-1 / sum_v p_v,  p_v the population of valley v;
 *   m_d^(3/2) = sum_v w_v r_v (m1 m2 m3)_v^(1/2), with r_v the occupation of
 *   valley v relative to a valley at the lowest edge (exp(-(E_v - E_min)/kT)
 *   for Boltzmann, F_1/2(eta_v)/F_1/2(eta_min) for Fermi-Dirac), so that
 *   n = N_c(m_d) F_1/2(eta_min) counts every carrier.
 * BM_EINVAL for n = 0, non-positive weights, non-finite offsets, a
 * non-positive temperature with offsets, or equal populations with non-zero
 * offsets. */
bm_status bm_valley_average_compute(bm_valley *valleys, size_t n, const bm_population *pop,
                                    bm_valley_average *out, bm_errbuf *err);

/* Principal masses (ascending) and axes (rows) of a symmetric positive
 * inverse-mass tensor. BM_EINVAL when it is not positive definite. */
bm_status bm_inv_mass_principal(const double *inv_mass /* 9 doubles, row-major: (const double *)t */,
                                double masses[3],
                                double axes[3][3], bm_errbuf *err);

#endif
