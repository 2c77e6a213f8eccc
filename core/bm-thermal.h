/* bm-thermal.h: full-band, temperature-dependent masses from a band grid.
 *
 * The zone is sampled once: the zone interpolant (bm-bandinterp.h) is
 * evaluated on a mesh refined cell by cell until each fine step changes the
 * energy by less than a quarter of the smallest kT, inside the energy window
 * where carriers live, and the states and their velocities are binned on a
 * fine energy axis (the density of states and the transport distribution).
 * Every temperature and chemical potential is then a one-dimensional sum over
 * that axis, so the cost does not grow as k-points times temperatures. */
#ifndef BM_THERMAL_H
#define BM_THERMAL_H

#include <stddef.h>

#include "bm-bandinterp.h"
#include "bm-bands.h"
#include "bm-status.h"

typedef enum { BM_CARRIER_ELECTRONS, BM_CARRIER_HOLES } bm_carrier;

/* Most cells are refined by less; a cell that would need more is counted as
 * unresolved (the response says which mesh would resolve it). */
#define BM_THERMAL_MAX_REFINE 24

/* The energy axis never has more bins than this (memory: 56 bytes a bin). */
#define BM_THERMAL_MAX_BINS 100000

typedef struct {
    const bm_grid *grid;
    const bm_bandinterp *interp;
    const size_t *bands;      /* the bands that hold the carriers */
    size_t nbands;
    bm_carrier carrier;
    double e_lo, e_hi;        /* window, eV: states outside are not counted */
    double bin_ev;            /* energy axis step */
    double kt_min_ev;         /* smallest kT the spectrum must resolve */
    double kt_max_ev;         /* largest kT */
    double edge_hint_ev;      /* the band edge as the mesh shows it */
} bm_thermal_setup;

/* States and velocities binned on e0 + i de (linear split between the two
 * nearest nodes), per spin and per cubic Angstrom. */
typedef struct {
    size_t nbins;
    double e0, de;
    double *dos;              /* [nbins] states */
    double *trans;            /* [nbins][6] sum of (hbar v)(hbar v)^T: xx yy zz xy xz yz, eV^2 A^2 */
    double *hall;             /* [nbins][3] the Hall sums for a field along x, y, z:
                                 sum of e_gmn (hbar v_a)(hbar v_n) d2E/dk_b dk_m, (a, b, g)
                                 cyclic, eV^3 A^4 */
    double edge_ev;           /* lowest (electrons) or highest (holes) energy sampled */
    double edge_f[3];         /* where, fractional */
    size_t edge_band;
    size_t cells, cells_unresolved, points;
    double refine_needed;     /* largest refinement a cell asked for */
    double min_gap_outside;   /* smallest gap (eV) to a band not selected, inside the window */
    size_t gap_band;          /* which band that was */
    size_t symmetry_ops;      /* rotations the tensors were averaged over (1: none) */
    int hall_symmetrized;     /* the Hall sums too */
} bm_thermal_spectrum;

/* Allocates the axis of s (zeroed) for setup; 0 or BM_ENOMEM. */
bm_status bm_thermal_spectrum_init(bm_thermal_spectrum *sp, const bm_thermal_setup *s,
                                   bm_errbuf *err);
void bm_thermal_spectrum_clear(bm_thermal_spectrum *sp);

/* Zeroes sp for reuse on the same setup. */
void bm_thermal_spectrum_reset(bm_thermal_spectrum *sp, const bm_thermal_setup *s);

/* Number of work units of setup (coarse slabs along the first axis). */
size_t bm_thermal_units(const bm_thermal_setup *s);

/* Adds work unit u to sp.  Units are independent: hosts run them on threads
 * into separate spectra and merge them in unit order, which gives the same
 * bits whatever the thread count. */
void bm_thermal_accumulate(const bm_thermal_setup *s, size_t u, bm_thermal_spectrum *sp);

/* into += part (same axis). */
void bm_thermal_merge(const bm_thermal_setup *s, bm_thermal_spectrum *into,
                      const bm_thermal_spectrum *part);

/* Averages the tensors of sp over the group of Cartesian rotations rot
 * (k' = R k; the data's symmetry, bm_grid_rotations): T -> mean of R T R^T.
 * The band interpolant is exact on the mesh but not symmetric between mesh
 * points on a non-orthogonal cell; the average is the projection onto what
 * the crystal allows, which removes that part of the interpolation error.
 * The Hall sums are kept per field axis, so they are averaged only where the
 * group makes that exact (no mean of R_ga R_gb with a != b: every cubic,
 * tetragonal, orthorhombic and hexagonal group in its usual frame); returns
 * 1 when they were, 0 when they were left alone. */
int bm_thermal_symmetrize(bm_thermal_spectrum *sp, const double (*rot)[3][3], size_t nrot);

/* Polishes sp->edge_ev to the interpolant's own extremum (Newton from the best
 * sample). */
void bm_thermal_polish_edge(const bm_thermal_setup *s, bm_thermal_spectrum *sp);

/* The independent check of the figures near the edge: the interpolant's
 * masses at the band edge against those of the project's mass-tensor search
 * (crossing-aware local fits, bm-extrema.h) on the same band.  Their
 * difference is the error the lowest temperatures inherit. */
typedef struct {
    int assessed;                 /* 0: no single-band tensor at the edge (degenerate) */
    int dims;
    double interp_masses_me[3];   /* ascending */
    double fit_masses_me[3];      /* ascending, |m| */
    double fit_errors_me[3];
    double relative;              /* the larger relative difference of the geometric means
                                     (DOS mass) and the harmonic means (conductivity mass) */
} bm_thermal_edge_check;

bm_status bm_thermal_check_edge(const bm_thermal_setup *s, const bm_thermal_spectrum *sp,
                                bm_thermal_edge_check *out, bm_errbuf *err);

typedef struct {
    double temperature_k;
    double fermi_level_ev;
    double density_cm3;           /* carriers: electrons or holes */
    double edge_density_cm3;      /* N_c or N_v: the Boltzmann-weighted state count */
    double dos_mass_me;
    double cond_tensor_me[3][3];  /* Cartesian */
    double cond_principal_me[3];
    double cond_axes[3][3];       /* rows: unit axes of the principal values */
    double seebeck_principal_uv_k[3];
    double seebeck_tensor_uv_k[3][3];
    double hall_factor[3];        /* r_H = R_H n e (holes) or -R_H n e (electrons), for a
                                     weak field along x, y, z; NAN where undefined */
} bm_thermal_point;

/* One temperature.  mode_density: match density_cm3 (> 0) by the chemical
 * potential; otherwise use fermi_level_ev.  spin_degeneracy 1 or 2: states per
 * band and k-point.  spins: the spin states the bands cover in all, which the
 * DOS mass is defined for (N = spins (2 pi m kT / h^2)^(3/2)): 2 for
 * non-polarised bands, 1 for one channel of a spin-polarised grid, 2 for both. */
bm_status bm_thermal_at(const bm_thermal_spectrum *sp, bm_carrier carrier, double temperature_k,
                        int mode_density, double density_cm3, double fermi_level_ev,
                        double spin_degeneracy, double spins, bm_thermal_point *out,
                        bm_errbuf *err);

#endif
