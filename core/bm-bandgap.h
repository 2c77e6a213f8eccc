/* bm-bandgap.h: the band-gap model of a material (Varshni, Bose-Einstein or a
 * fixed gap) as one tagged type, and the one function giving the gap at T.
 * Energies eV, temperatures K. */
#ifndef BM_BANDGAP_H
#define BM_BANDGAP_H

#include "bm-status.h"

typedef enum {
    BM_GAP_NONE = 0,         /* no gap given (a zero-initialised model) */
    /* Varshni, Physica 34, 149 (1967): Eg(T) = Eg0 - alpha T^2 / (T + beta). */
    BM_GAP_VARSHNI,
    /* Bose-Einstein form of Vina, Logothetidis & Cardona, Phys. Rev. B 30,
     * 1979 (1984) (from memory), E(T) = E_B - a_B (1 + 2 / (exp(Theta/T) - 1)),
     * written with the 0 K gap Eg0 = E_B - a_B:
     * Eg(T) = Eg0 - 2 a_B / (exp(Theta/T) - 1).  a_B is the electron-phonon
     * coupling strength, Theta an average phonon temperature. */
    BM_GAP_BOSE_EINSTEIN,
    /* The same gap Eg0 at every temperature. */
    BM_GAP_FIXED
} bm_gap_kind;

typedef struct {
    bm_gap_kind kind;
    double eg0_ev;           /* gap at 0 K; the gap itself for BM_GAP_FIXED */
    double alpha_ev_per_k;   /* Varshni, >= 0 */
    double beta_k;           /* Varshni, > 0 */
    double a_b_ev;           /* Bose-Einstein, >= 0 */
    double theta_k;          /* Bose-Einstein, > 0 */
    const char *source;      /* where the parameters come from */
} bm_gap_model;

/* The domain of gaps (Eg0, and Eg at any temperature): |Eg| <= 100 eV. A
 * larger value is a unit mistake, and would defeat the carrier solver. */
#define BM_GAP_MAX_EV 100.0
/* The most negative gap: the band overlap of a semimetal (HgTe about -0.3 eV,
 * grey tin and bismuth less; common practice, no source). Beyond it the
 * parameters are used far outside their range. */
#define BM_GAP_MIN_EV (-2.0)

/* The parameters of a model (kind VARSHNI, BOSE_EINSTEIN or FIXED): finite,
 * within their ranges and |Eg0| <= BM_GAP_MAX_EV; BM_EINVAL naming the value
 * otherwise. bm_gap_at checks the same, and its result against the domain. */
bm_status bm_gap_model_check(const bm_gap_model *g, bm_errbuf *err);

/* "varshni", "bose-einstein", "fixed", "none". */
const char *bm_gap_kind_name(bm_gap_kind kind);

/* Eg(t_k) of the model, T >= 0 (T = 0 gives Eg0).  A gap that comes out <= 0
 * is returned with a warning (w may be NULL), since the parameters are then
 * used outside their range.  Bad parameters, no model (BM_GAP_NONE), a bad
 * T or a gap beyond |Eg| <= BM_GAP_MAX_EV are BM_EINVAL naming the value. */
bm_status bm_gap_at(const bm_gap_model *g, double t_k, double *eg_ev, bm_warnings *w,
                    bm_errbuf *err);

#endif
