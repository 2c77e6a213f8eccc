/* bm-kp.h: k.p parameters of a degenerate band extremum of a cubic crystal,
 * fitted to the energies of the touching bands near it, and the masses the
 * fitted model gives: along [100], [110], [111] and averaged over the sphere.
 *
 * Two models, both in units of hbar^2 / 2 m_e (E - E0 = (hbar^2/2m_e) x
 * eigenvalue), with the Cartesian axes taken as the cubic axes:
 *  - threefold (no spin-orbit coupling; Dresselhaus, Kip & Kittel, Phys. Rev.
 *    98, 368 (1955)): H_xx = L kx^2 + M (ky^2 + kz^2), H_xy = N kx ky and
 *    cyclic, free-electron term included; with quartic terms the six
 *    cubic invariants of a threefold band at fourth order (time reversal
 *    without spin-orbit coupling forbids odd powers);
 *  - fourfold (two Kramers pairs, split-off band far away; Luttinger, Phys.
 *    Rev. 102, 1030 (1956)): E - E0 = -(gamma1 k^2 -/+ 2 sqrt(gamma2^2 k^4 +
 *    3 (gamma3^2 - gamma2^2)(kx^2 ky^2 + ky^2 kz^2 + kz^2 kx^2))), quadratic only;
 *  - sixfold (spin-orbit coupling, the split-off pair included; Dresselhaus,
 *    Kip & Kittel's H in the six p-like spin states plus (Delta/3)(L.sigma - 1),
 *    which puts the J = 3/2 states at E0 and the split-off pair at E0 - Delta):
 *    quadratic in k, exact in Delta, so it holds across energies comparable
 *    to the split-off gap, where the fourfold form fails. Its masses at the
 *    point are those of the J = 3/2 projection and -1/gamma1 (split-off).
 * The parameter sets are one linear map apart (the J = 3/2 projection of the
 * threefold band when the spin-orbit splitting is large against the energies
 * fitted): gamma1 = -(L + 2M)/3, gamma2 = -(L - M)/6, gamma3 = -N/6. */
#ifndef BM_KP_H
#define BM_KP_H

#include <stddef.h>
#include "bm-status.h"

typedef enum {
    BM_KP_NONE,        /* no fit */
    BM_KP_THREEFOLD,   /* three bands, no spin-orbit coupling: L, M, N */
    BM_KP_FOURFOLD,    /* four bands in two Kramers pairs: gamma1, gamma2, gamma3 */
    BM_KP_SIXFOLD      /* six bands in three Kramers pairs, spin-orbit coupling with the
                          split-off pair: L, M, N and the split-off gap */
} bm_kp_model;

/* Energies of the touching bands around the degenerate point. */
typedef struct {
    size_t npoints;
    const double *k;          /* [point][3], Cartesian, 1/Angstrom, relative to the
                                 degenerate point, cubic axes */
    size_t nbands;            /* 3: threefold; 4: fourfold; 6: sixfold */
    const double *energies;   /* [band][point], eV, bands ascending at every point */
    double radius;            /* the main fit takes the points within it, 1/Angstrom;
                                 those beyond serve the error estimate (0: every point) */
    const double *weights;    /* [band][point], 1/eV, or NULL (every point counts alike) */
} bm_kp_data;

/* Energies of the touching bands on straight lines of mesh points through the
 * degenerate point (itself a mesh point): each line is k = j * step * dir,
 * j = 0 .. npoints, the energy at j the mean over +j and -j (which cancels
 * odd powers of k). */
typedef struct {
    size_t nlines;
    const double *dir;        /* [line][3], unit, Cartesian cubic axes */
    const double *step;       /* [line], 1/Angstrom */
    size_t npoints;           /* points on each line beyond the centre: 3 or 4 */
    size_t nbands;            /* 3: threefold; 4: fourfold */
    const double *energies;   /* [band][line][j], eV, bands ascending at every point */
} bm_kp_lines;

typedef struct {
    bm_kp_model model;
    int quartic;              /* the quartic invariants were fitted (threefold) */
    size_t npoints;           /* points fitted */
    double radius;            /* largest |k| fitted, 1/Angstrom */
    double e0_ev;             /* fitted energy of the degenerate point */
    double rms_ev;            /* residual of the fit */
    double lmn[3], lmn_error[3];        /* L, M, N (hbar^2/2m_e units) */
    double gamma[3], gamma_error[3];    /* gamma1..3 of the J = 3/2 projection */
    double split_off_ev, split_off_error_ev;   /* sixfold: the fitted gap Delta */
    size_t ndistinct;         /* distinct bands: 3 (threefold, sixfold) or 2 (fourfold) */
    double directional[3][3]; /* [direction [100],[110],[111]][distinct band, lowest
                                 first (sixfold at a maximum: split-off, light, heavy)]:
                                 signed masses, m_e (INFINITY: flat) */
    double directional_error[3][3];
    double dos_mass[3];       /* sphere-averaged DOS mass of each distinct band, m_e,
                                 signed like the band; INFINITY when its surface
                                 is open (the curvature changes sign) */
    double dos_mass_error[3];
    double rel_error;         /* largest relative error of the directional masses */
    double luttinger_dos_mass;/* hole-mass's band-edge DOS mass (warped heavy and light
                                 bands) of gamma, m_e; NAN unless a hole maximum with
                                 a closed heavy surface */
    size_t nbands;            /* the caller's band indices of the fitted bands */
    size_t band_index[6];
    bm_warnings warnings;     /* the caller frees them: bm_warnings_clear */
} bm_kp_fit;

/* Fits the model the band count selects to the points, with the quartic
 * invariants where there are enough points, and estimates each error as the
 * statistical error of the fit combined with the largest change against
 * independent fits (the quadratic model on the points within 0.7 of the
 * radius, and the model on every point given when some lie beyond the
 * radius): truncation of the model is the larger part on a mesh.
 * BM_EINVAL for a band count other than 3 or 4, too few points, non-finite
 * data; BM_ENOMEM. *out is zeroed first; free its warnings. */
bm_status bm_kp_fit_bands(const bm_kp_data *d, bm_kp_fit *out, bm_errbuf *err);

/* The same models fitted to the curvatures of the bands at the degenerate
 * point along each line, each extrapolated to k = 0 by the polynomial in k^2
 * through the centre and the points on the line (Richardson's idea: a coarse
 * mesh resolves the band only several hundred meV away from the point, where
 * the quartic and higher terms the model lacks are large). The curvatures
 * from one point fewer weigh each line (their change is its error) and give
 * the independent check. Only the quadratic model is fitted (rms_ev is the
 * residual at the first line point). BM_EINVAL when the lines do not
 * determine the parameters (lines of one family only): fit the points then. */
bm_status bm_kp_fit_lines(const bm_kp_lines *l, bm_kp_fit *out, bm_errbuf *err);

/* 1 when the lattice with reciprocal vectors in the rows of recip is mapped
 * onto itself by the 48 operations of the cube in the Cartesian frame (so its
 * Cartesian axes are cubic axes and the models above apply). */
int bm_kp_cubic_frame(const double recip[3][3]);

#endif
