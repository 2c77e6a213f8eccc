/* bm-measure.h: masses from measurements: cyclotron resonance (one peak or a
 * linear fit of frequency against field), the Lifshitz-Kosevich temperature
 * damping of quantum oscillations, the Dingle plot, and the thermal mass
 * from the electronic specific heat. Fits report standard errors from
 * their covariance and warn when the data do not constrain them. */
#ifndef BM_MEASURE_H
#define BM_MEASURE_H

#include <stddef.h>

#include "bm-status.h"

/* ---- cyclotron resonance ---------------------------------------------- */

/* m_c / m_e = (e / 2 pi m_e) B / f (BM_CYCLOTRON_GHZ_PER_T * B / f); with
 * standard errors sf, sb (0 for none) the first-order propagation
 * sm = m sqrt((sf/f)^2 + (sb/B)^2). BM_EINVAL for non-positive f or B. */
bm_status bm_resonance_mass(double f_ghz, double b_t, double sf_ghz, double sb_t,
                            double *mass, double *mass_stderr, bm_errbuf *err);

typedef struct {
    double mass, mass_stderr;          /* m_e: e / (2 pi m_e slope) */
    double slope_ghz_per_t, slope_stderr;
    double intercept_ghz, intercept_stderr;   /* 0 and 0 without an intercept */
    double chi2;                       /* weighted: sum ((f - fit) / sf)^2; else the RSS */
    double chi2_per_dof;
    size_t dof;                        /* n - parameters */
    int weighted;                      /* 1: errors given, covariance absolute */
    bm_warnings warnings;              /* the caller frees them: bm_warnings_clear */
} bm_resonance_fit;

/* Least-squares line f = s B (+ f0 with intercept) through n >= 2 (>= 3 with
 * an intercept) points. With sf (n standard errors of f, or NULL) the fit is
 * weighted by 1/sf^2 and the covariance taken as absolute; without, the
 * covariance is scaled by the residual variance (needs one point more than
 * the parameters for an error; with exactly as many the errors are NAN and
 * a no-error-estimate warning says so). residuals (n, may be NULL) get
 * f - fit. */
bm_status bm_resonance_fit_compute(const double *f_ghz, const double *b_t, const double *sf,
                                   size_t n, int intercept, double *residuals,
                                   bm_resonance_fit *out, bm_errbuf *err);

/* ---- quantum oscillations --------------------------------------------- */

/* R_T = X / sinh X (1 at X = 0), X = BM_LK_K_PER_T p m T / B. */
double bm_lk_factor(double x);

typedef struct {
    double field_t;                    /* B used in X */
    int harmonic;                      /* p */
    double mass, mass_stderr;          /* m_c / m_e */
    double amplitude, amplitude_stderr;/* A0: the T -> 0 amplitude */
    double correlation;                /* between mass and A0 */
    double chi2, chi2_per_dof;         /* as for the resonance fit */
    size_t dof;
    int weighted;
    double x_min, x_max;               /* X at the lowest and highest temperature */
    size_t iterations;
    bm_warnings warnings;              /* the caller frees them: bm_warnings_clear */
} bm_lk_fit;

/* Fits A(T) = A0 R_T(X), X = BM_LK_K_PER_T p m T / B, to n >= 2 amplitudes
 * a (all > 0, or all < 0: the sign is the phase and is kept in A0) at
 * temperatures t (> 0, at least two distinct) by GSL's nonlinear least
 * squares (trust region, Levenberg-Marquardt), started from the best of a
 * logarithmic grid of masses 1e-3..1e3 with A0 solved linearly. Standard
 * errors from the covariance as in bm_resonance_fit_compute (sa: n errors
 * of a, or NULL). residuals (n, may be NULL) get a - fit. Warnings: X_max
 * below 1 (the damping is too weak to fix the mass), a relative mass error
 * above 20 %, chi2 beyond its 99.9 % point with given errors.
 * BM_EINVAL for bad input, and for amplitudes that do not fall with
 * temperature (the best mass gives X < 0.01); BM_ENOCONV when the fit fails. */
bm_status bm_lk_fit_compute(const double *t_k, const double *a, const double *sa, size_t n,
                            double field_t, int harmonic, double *residuals, bm_lk_fit *out,
                            bm_errbuf *err);

typedef struct {
    double dingle_temperature_k, dingle_temperature_stderr_k;
    double dingle_temperature_stderr_mass_k;   /* the part from the mass's error */
    double prefactor;                  /* C of A = C B^k R_T R_D */
    double chi2, chi2_per_dof;
    size_t dof;
    int weighted;
    bm_warnings warnings;              /* the caller frees them: bm_warnings_clear */
} bm_dingle_fit;

/* The Dingle plot: amplitudes a (all > 0, or all < 0) at n >= 2 fields b
 * (> 0, at least two distinct), one temperature t_k (> 0) and a known mass
 * (m > 0, with standard error sm >= 0) follow A = C B^k R_T(B) R_D(B), R_D =
 * exp(-BM_LK_K_PER_T p m T_D / B), so ln |A| - k ln B - ln R_T is a line in
 * 1/B of slope -BM_LK_K_PER_T p m T_D; fitted by linear least squares
 * (weights 1/(sa/A)^2 with sa given), T_D's error from the covariance and,
 * in quadrature, from the mass's error (refits at m -/+ sm). residuals (n,
 * may be NULL) get the residuals of ln |A|. */
bm_status bm_dingle_fit_compute(const double *b_t, const double *a, const double *sa,
                                size_t n, double t_k, double mass, double mass_stderr,
                                int harmonic, double field_power, double *residuals,
                                bm_dingle_fit *out, bm_errbuf *err);

/* ---- specific heat ---------------------------------------------------- */

/* Free-electron Fermi energy hbar^2 (3 pi^2 n)^(2/3) / 2 m_e, eV, for n in cm^-3 > 0. */
bm_status bm_free_electron_fermi_energy(double n_cm3, double *ef_ev, bm_errbuf *err);

typedef struct {
    double free_gamma;                 /* (pi^2 / 2) z R k_B / E_F, mJ mol^-1 K^-2 */
    double ratio;                      /* gamma / free_gamma: the thermal mass ratio */
    double ratio_stderr;               /* from gamma's standard error (NAN without) */
    double dos_per_ev_formula_unit;    /* g(E_F) = 3 gamma / (pi^2 k_B^2 N_A), both spins */
    double free_dos_per_ev_formula_unit;  /* 3 z / (2 E_F) */
    bm_warnings warnings;              /* the caller frees them: bm_warnings_clear */
} bm_thermal_mass;

/* Thermal mass ratio of gamma (mJ mol^-1 K^-2, > 0; its standard error
 * sgamma >= 0 or NAN) against the free-electron value for z (> 0)
 * conduction electrons per formula unit and Fermi energy ef_ev (> 0).
 * Warns outside the usual 0.1..10 (heavy-fermion territory above). */
bm_status bm_thermal_mass_compute(double gamma, double sgamma, double ef_ev, double z,
                                  bm_thermal_mass *out, bm_errbuf *err);

typedef struct {
    double gamma, gamma_stderr;        /* mJ mol^-1 K^-2 */
    double beta, beta_stderr;          /* mJ mol^-1 K^-4 */
    double debye_temperature_k, debye_temperature_stderr_k;  /* NAN when beta <= 0 */
    double chi2, chi2_per_dof;
    size_t dof;
    int weighted;
    bm_warnings warnings;              /* the caller frees them: bm_warnings_clear */
} bm_heat_fit;

/* C/T = gamma + beta T^2 fitted to n >= 2 points (t_k > 0, c in mJ mol^-1
 * K^-1, sc its standard errors or NULL) by linear least squares in T^2;
 * the Debye temperature (12 pi^4 r R / (5 beta))^(1/3) for r atoms per
 * formula unit. residuals (n, may be NULL) get C/T - fit. Warns when gamma
 * is not positive or poorly fixed. */
bm_status bm_heat_fit_compute(const double *t_k, const double *c, const double *sc, size_t n,
                              double atoms_per_formula_unit, double *residuals,
                              bm_heat_fit *out, bm_errbuf *err);

#endif
