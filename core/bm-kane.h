/* bm-kane.h: the non-parabolic (Kane) band E (1 + alpha E) = sum_i hbar^2 q_i^2 / (2 m_i)
 * fitted to energies around an extremum, beside the parabolic fit, and the
 * non-degenerate thermal masses of the fitted band. */
#ifndef BM_KANE_H
#define BM_KANE_H

#include <stddef.h>

#include "bm-status.h"

typedef struct {
    int dims;                 /* principal directions fitted (1 to 3) */
    double masses_me[3];      /* band-edge masses along the principal directions */
    double masses_stderr_me[3];
    double alpha_per_ev;      /* 0 for the parabolic fit */
    double alpha_stderr_per_ev;
    double offset_ev;         /* fitted energy of the edge relative to the one given */
    double shift[3];          /* fitted centre along each principal direction, from the
                                 point given, 1/Angstrom */
    double rms_residual_ev;
    double aic;               /* n ln(RSS / n) + 2 p: the smaller describes the data better */
    size_t npoints;
    int nparams;
} bm_kane_fit;

/* Fits n points: q[i][0..dims-1], the offsets from the extremum along its
 * principal directions (1/Angstrom), and e[i], energies measured from the
 * edge into the band (positive: electrons up, holes down).  The edge's energy
 * and position are refined with the fit (offset, and a shift along each
 * direction).  kane = 0 gives the parabolic fit.  Gauss-Newton on the energy residuals from the implicit
 * linear fit, standard errors from s^2 (J^T J)^-1. */
bm_status bm_kane_fit_points(const double (*q)[3], const double *e, size_t n, int dims, int kane,
                             bm_kane_fit *out, bm_errbuf *err);

/* The fitted band at q (offsets from the point given along the principal
 * directions, 1/Angstrom): offset + E, E (1 + alpha E) = sum_i hbar^2 (q_i -
 * shift_i)^2 / (2 m_i), measured into the band as the fit's energies; NAN
 * past the turning point of a negative alpha. */
double bm_kane_fit_energy(const bm_kane_fit *f, const double q[3]);

/* Non-degenerate thermal masses of a Kane band with principal masses m
 * (dims of them) and alpha, at temperature T: the DOS mass from the closed
 * form  int g(E) e^(-E/kT) dE  ~  e^b K2(b) / b,  b = 1 / (2 alpha kT), and
 * the conductivity masses m_i / F with F = (2/3kT) <gamma^(3/2)/u> / <gamma^(1/2) u>
 * (gamma = E (1 + alpha E), u = 1 + 2 alpha E) by quadrature. */
bm_status bm_kane_thermal(const double m[3], int dims, double alpha, double temperature_k,
                          double *dos_mass_me, double cond_masses_me[3], bm_errbuf *err);

#endif
