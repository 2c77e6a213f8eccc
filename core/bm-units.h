/* bm-units.h: physical constants in the project's interface units
 * (eV, Angstrom, m_e, K, T, GHz), derived from GSL's CODATA headers. */
#ifndef BM_UNITS_H
#define BM_UNITS_H

#include <gsl/gsl_const_mksa.h>
#include <math.h>
#include <gsl/gsl_math.h>

#define BM_HBAR   GSL_CONST_MKSA_PLANCKS_CONSTANT_HBAR   /* J s */
#define BM_H      GSL_CONST_MKSA_PLANCKS_CONSTANT_H      /* J s */
#define BM_ME     GSL_CONST_MKSA_MASS_ELECTRON           /* kg */
#define BM_QE     GSL_CONST_MKSA_ELECTRON_CHARGE         /* C */
#define BM_EV     GSL_CONST_MKSA_ELECTRON_VOLT           /* J */
#define BM_KB     GSL_CONST_MKSA_BOLTZMANN               /* J/K */

/* hbar^2 / m_e in eV Angstrom^2 (about 7.61996): (M^-1)_ij / m_e^-1 = H_ij / this. */
#define BM_HBAR2_OVER_ME_EV_A2 (BM_HBAR * BM_HBAR / BM_ME / BM_EV * 1e20)

/* Boltzmann constant in eV/K. */
#define BM_KB_EV (BM_KB / BM_EV)

/* Effective density of states 2 (2 pi m_e k_B T / h^2)^(3/2) at T = 1 K, in
 * cm^-3; multiply by (m/m_e)^(3/2) T^(3/2). */
#define BM_NC_PREFACTOR_CM3 \
    (2.0 * pow(2.0 * M_PI * BM_ME * BM_KB / (BM_H * BM_H), 1.5) * 1e-6)

/* 2D density of states per spin-degenerate valley, m_e / (pi hbar^2), in eV^-1 cm^-2. */
#define BM_DOS2D_PER_EV_CM2 (BM_ME / (M_PI * BM_HBAR * BM_HBAR) * BM_EV * 1e-4)

/* Free-electron cyclotron frequency e / (2 pi m_e), GHz per tesla. */
#define BM_CYCLOTRON_GHZ_PER_T (BM_QE / (2.0 * M_PI * BM_ME) * 1e-9)

/* Lifshitz-Kosevich damping: X = this * p (m/m_e) T / B, with T in K and B in T. */
#define BM_LK_K_PER_T (2.0 * M_PI * M_PI * BM_KB * BM_ME / (BM_HBAR * BM_QE))

/* Onsager: frequency in tesla per orbit area in Angstrom^-2, hbar / (2 pi e). */
#define BM_ONSAGER_T_A2 (BM_HBAR / (2.0 * M_PI * BM_QE) * 1e20)

/* Cyclotron mass per dA/dE: m_c / m_e = this * dA/dE (A in A^-2, E in eV). */
#define BM_CYCLOTRON_MASS_PER_DADE (BM_HBAR2_OVER_ME_EV_A2 / (2.0 * M_PI))

#endif
