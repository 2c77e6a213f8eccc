/* bm-extrema.h: band extrema and their inertial mass tensors, from a periodic
 * grid or from scattered k-points. The plugin's mass-tensor operation calls this. */
#ifndef BM_EXTREMA_H
#define BM_EXTREMA_H

#include "bm-bands.h"
#include "bm-kp.h"
#include "bm-status.h"

typedef enum {
    BM_EXTREMUM_MINIMUM,
    BM_EXTREMUM_MAXIMUM,
    BM_EXTREMUM_SADDLE,
    BM_EXTREMUM_NOT_STATIONARY   /* a given point where the gradient does not vanish */
} bm_extremum_kind;

typedef enum {
    BM_SEARCH_MINIMUM,   /* the lowest minimum */
    BM_SEARCH_MAXIMUM,   /* the highest maximum */
    BM_SEARCH_ALL        /* every local extremum (periodic boundaries honoured) */
} bm_search;

typedef struct {
    double fit_radius_inv_angstrom;  /* 0: automatic */
    double degeneracy_tol_ev;        /* 0: default (1 meV) */
    double convergence_tol;          /* relative error a converged mass may have; 0: 0.02 */
} bm_fit_options;

/* How a grid tensor was obtained. */
typedef enum {
    BM_METHOD_INTERPOLANT,     /* Fourier / local-stencil interpolant of the band */
    BM_METHOD_CROSSING_FIT,    /* local fits of the band and its crossing partner */
    BM_METHOD_TABLE_FIT        /* quadric fit of scattered points */
} bm_tensor_method;

#define BM_DIRECTIONAL_MAX 13

typedef struct {
    bm_extremum_kind kind;
    int dims;                 /* 3; 2 for a sheet; 1 for a line cut */
    double energy_ev;
    double k[3];              /* Cartesian, 1/Angstrom, refined below the mesh spacing */
    double k_frac[3];         /* fractional coordinates (NAN for scattered tables) */
    double inv_mass[3][3];    /* inverse mass tensor, 1/m_e */
    double masses[3];         /* signed principal masses, m_e (negative at a maximum),
                                 sampled directions first, by increasing |m|;
                                 INFINITY where the curvature vanishes; NAN for a
                                 direction the data do not sample */
    double axes[3][3];        /* rows: unit principal axes, Cartesian, order of masses */
    double fit_rms_ev;        /* residual of the local quadratic fit */
    int divergent;            /* conical or flat: no finite inertial mass */
    bm_tensor_method method;
    int partner_band;         /* band fitted together with this one across a crossing, or -1 */
    double mass_errors[3];    /* estimated error of each principal mass, m_e: the spread of
                                 independent local fits (NAN where not assessed) */
    double mass_stderr[3];    /* a table fit: the statistical part of each mass's error, m_e,
                                 from the scatter of the energies about the fit propagated
                                 through the fit's covariance to the principal values (NAN
                                 elsewhere); mass_errors is never below it */
    struct {
        size_t points;        /* samples in the fit window */
        double radius;        /* distance of the farthest, 1/Angstrom */
        int chosen;           /* 0: the radius given; 1: the default count (the data show
                                 terms beyond quadratic there already, or cannot tell);
                                 2: grown from it while they showed none */
        int beyond_degree;    /* degree of the polynomial the quadric was tested against
                                 (4 or 3; 0: too few points to test) */
        double beyond_p;      /* p-value of its extra terms (F test); NAN: not tested */
        double noise_ev;      /* scatter of one energy about the quadric, eV */
    } window;                 /* a table fit's window (points 0 elsewhere) */
    double k_error;           /* estimated error of k, 1/Angstrom (NAN: not assessed) */
    int nfits;                /* independent estimates behind the errors */
    double sample_spacing;    /* a table: distance from the sample nearest the extremum to
                                 its nearest neighbour, 1/Angstrom (NAN for a grid) */
    int converged;            /* 1: every error within the tolerance and the estimates agree
                                 on the kind; 0: not; -1: not assessed */
    int degenerate;           /* other bands touch this one at the extremum: one band alone
                                 has no mass tensor there (masses NAN, kind from the search) */
    size_t ndirectional;      /* a degenerate table extremum: masses along the lines of
                                 sampled points through it */
    struct {
        double direction[3];  /* Cartesian unit vector */
        double mass;          /* m_e, signed: hbar^2 / (d2E/ds2) at the extremum */
        double error;         /* m_e: the quartic correction between the two steps */
    } directional[BM_DIRECTIONAL_MAX];
    int outside_data;         /* a table: the fit's stationary point lies beyond the points
                                 given, so this is an estimate to sample around, not an
                                 extremum (bm_ktable_mass_tensors lists these last) */
    int symmetry_snapped;     /* 1: k lay within its error of a point the lattice's symmetry
                                 fixes and was moved there, the tensor symmetrised over
                                 the rotations that fix it */
    double snap_shift;        /* how far k moved, 1/Angstrom (0 when not snapped) */
    int site_rotations;       /* lattice rotations fixing the snapped k (0: not snapped) */
    int line_fitted;          /* 1: the mass along line_axis and the position along it come
                                 from the line of mesh points through k (see bm-extrema.c) */
    double line_axis[3];      /* Cartesian unit vector */
    double line_shift;        /* how far the line fit moved k, 1/Angstrom */
    int line_points;          /* mesh points of the widest line fit */
    bm_kp_fit kp;             /* a degenerate extremum of a cubic crystal: the k.p fit of
                                 the touching bands (kp.model BM_KP_NONE otherwise) */
    bm_warnings warnings;
} bm_mass_tensor;

/* Checks energies (finite), mesh and reciprocal vectors (non-singular). */
bm_status bm_grid_validate(const bm_grid *g, bm_errbuf *err);

/* The most extrema an "all" search of a grid fits and reports: beyond it
 * (a rough or noisy band) those closest in energy to the band's lowest
 * minimum or highest maximum are kept, and the lowest reported extremum
 * carries BM_WARN_EXTREMA_CAPPED with the count found. */
#define BM_GRID_MAX_EXTREMA 1000

/* Extrema of one band of a grid. k_at (NULL unless wanted) evaluates the
 * tensor at that Cartesian point instead of searching. *out is malloc'd;
 * the caller frees it (and the warnings of every tensor) with
 * bm_mass_tensors_free(). */
bm_status bm_grid_mass_tensors(const bm_grid *g, size_t band, bm_search which,
                               const double *k_at, const bm_fit_options *opt,
                               bm_mass_tensor **out, size_t *n_out, bm_errbuf *err);

/* The same for scattered points. An extremum of a table is a stationary
 * point of the fit inside the data: the search starts at the lowest (highest)
 * sample and walks the fit window to the stationary point; where the walk
 * leaves the data, or reaches a stationary point of the other kind, that
 * search reports nothing and says why in notes (may be NULL). BM_SEARCH_ALL
 * runs both searches (a saddle they both reach is reported once). */
bm_status bm_ktable_mass_tensors(const bm_ktable *t, size_t band, bm_search which,
                                 const double *k_at, const bm_fit_options *opt,
                                 bm_mass_tensor **out, size_t *n_out, bm_warnings *notes,
                                 bm_errbuf *err);

/* Frees n tensors from bm_grid_mass_tensors/bm_ktable_mass_tensors with
 * their warnings. t may be NULL. */
void bm_mass_tensors_free(bm_mass_tensor *t, size_t n);

#endif
