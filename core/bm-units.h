/* bm-units.h: physical constants in the project's interface units
 * (eV, Angstrom, m_e, K, T, GHz), derived from GSL's CODATA headers. */
#ifndef BM_UNITS_H
#define BM_UNITS_H

#include <gsl/gsl_const_mksa.h>
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

#endif
