/* bm-fermi.h: complete Fermi-Dirac integrals F_j(eta) for j = -1/2 ... 2 and the
 * inverse of F_1/2, to full double precision over the whole real line. */
#ifndef BM_FERMI_H
#define BM_FERMI_H

#include "bm-status.h"

/* Normalisation (the one GSL uses, DLMF 25.12.14):
 *
 *     F_j(eta) = 1/Gamma(j+1) * int_0^inf x^j / (1 + exp(x - eta)) dx
 *
 * so that F_j(eta) -> exp(eta) for eta -> -inf for every j, F_0 = ln(1 + e^eta),
 * and F_j(eta) -> eta^(j+1) / Gamma(j+2) for eta -> +inf.  With it the 3D
 * electron density is n = Nc F_1/2((EF - Ec)/kT) with no extra 2/sqrt(pi). */

/* F_j(eta) for j in {-0.5, 0, 0.5, 1, 1.5, 2}; any finite eta, eta = -INFINITY
 * gives 0.  Below the double range the value underflows gracefully to exp(eta)
 * (0 at the end); a value too large for a double is BM_EINVAL naming eta.
 * Any other j, or eta NaN/+inf, is BM_EINVAL. */
bm_status bm_fermi_dirac(double j, double eta, double *value, bm_errbuf *err);

/* F_1/2(eta) and F_-1/2(eta) together (F_-1/2 = dF_1/2/deta) for finite eta,
 * no error path: the inner loop of the carrier solvers.  Same precision as
 * bm_fermi_dirac (a shared power series below eta = -2, GSL above). */
void bm_fermi_dirac_half_pair(double eta, double *f_half, double *f_mhalf);

/* ln F_1/2(eta), finite for every finite eta (equals eta far below zero where
 * F_1/2 itself underflows). */
double bm_fermi_dirac_half_log(double eta, double *dlog_deta);

/* The eta with F_1/2(eta) = value, for value > 0 (BM_EINVAL otherwise).
 * Starting guess: Nilsson's full-range approximation (N. G. Nilsson,
 * Phys. Status Solidi A 19, K75 (1973); from memory), then Newton steps on
 * ln F_1/2 using the exact derivative F_-1/2/F_1/2, to a few ulp. */
bm_status bm_fermi_dirac_half_inverse(double value, double *eta, bm_errbuf *err);

#endif
