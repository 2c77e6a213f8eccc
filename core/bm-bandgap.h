/* bm-bandgap.h: temperature dependence of a band gap, Varshni and
 * Bose-Einstein (Vina) forms. Energies eV, temperatures K. */
#ifndef BM_BANDGAP_H
#define BM_BANDGAP_H

#include "bm-status.h"

/* Varshni, Physica 34, 149 (1967): Eg(T) = Eg0 - alpha T^2 / (T + beta). */
typedef struct {
    double eg0_ev;          /* gap at 0 K */
    double alpha_ev_per_k;  /* >= 0 */
    double beta_k;          /* > 0 */
} bm_varshni;

/* Bose-Einstein form of Vina, Logothetidis & Cardona, Phys. Rev. B 30, 1979
 * (1984) (from memory), E(T) = E_B - a_B (1 + 2 / (exp(Theta/T) - 1)), written
 * with the 0 K gap Eg0 = E_B - a_B:  Eg(T) = Eg0 - 2 a_B / (exp(Theta/T) - 1).
 * a_B is the electron-phonon coupling strength, Theta an average phonon
 * temperature. */
typedef struct {
    double eg0_ev;
    double a_b_ev;          /* >= 0 */
    double theta_k;         /* > 0 */
} bm_bose_einstein_gap;

/* T >= 0 (T = 0 gives Eg0).  A gap that comes out <= 0 is returned with a
 * warning (w may be NULL), since the parameters are then used outside their
 * range.  Bad parameters or T are BM_EINVAL naming the value. */
bm_status bm_bandgap_varshni(const bm_varshni *p, double t_k, double *eg_ev,
                             bm_warnings *w, bm_errbuf *err);
bm_status bm_bandgap_bose_einstein(const bm_bose_einstein_gap *p, double t_k,
                                   double *eg_ev, bm_warnings *w, bm_errbuf *err);

#endif
