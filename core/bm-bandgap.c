/* bm-bandgap.c: band gap against temperature (Varshni; Vina's Bose-Einstein
 * form). */
#include "bm-bandgap.h"

#include <math.h>

static bm_status check_t(const char *form, double t_k, bm_errbuf *err)
{
    if (!(t_k >= 0.0) || !isfinite(t_k))
        return bm_fail(err, BM_EINVAL, "band gap (%s): temperature %g K must be "
                       "finite and >= 0", form, t_k);
    return BM_OK;
}

static void warn_gap(const char *form, double t_k, double eg, bm_warnings *w)
{
    if (eg <= 0.0)
        bm_warn(w, BM_WARN_GAP_NOT_POSITIVE, "band gap (%s): Eg(%g K) = %g eV is not positive; the "
                "parameters are used outside their range", form, t_k, eg);
}

bm_status bm_bandgap_varshni(const bm_varshni *p, double t_k, double *eg_ev,
                             bm_warnings *w, bm_errbuf *err)
{
    if (!p || !eg_ev)
        return bm_fail(err, BM_EINVAL, "band gap (Varshni): missing parameters or result");
    *eg_ev = NAN;
    if (!isfinite(p->eg0_ev))
        return bm_fail(err, BM_EINVAL, "band gap (Varshni): Eg0 = %g eV is not finite",
                       p->eg0_ev);
    if (!(p->alpha_ev_per_k >= 0.0) || !isfinite(p->alpha_ev_per_k))
        return bm_fail(err, BM_EINVAL, "band gap (Varshni): alpha = %g eV/K must be >= 0",
                       p->alpha_ev_per_k);
    if (!(p->beta_k > 0.0) || !isfinite(p->beta_k))
        return bm_fail(err, BM_EINVAL, "band gap (Varshni): beta = %g K must be > 0",
                       p->beta_k);
    bm_status s = check_t("Varshni", t_k, err);
    if (s)
        return s;
    *eg_ev = p->eg0_ev - p->alpha_ev_per_k * t_k * t_k / (t_k + p->beta_k);
    warn_gap("Varshni", t_k, *eg_ev, w);
    return BM_OK;
}

bm_status bm_bandgap_bose_einstein(const bm_bose_einstein_gap *p, double t_k,
                                   double *eg_ev, bm_warnings *w, bm_errbuf *err)
{
    if (!p || !eg_ev)
        return bm_fail(err, BM_EINVAL,
                       "band gap (Bose-Einstein): missing parameters or result");
    *eg_ev = NAN;
    if (!isfinite(p->eg0_ev))
        return bm_fail(err, BM_EINVAL, "band gap (Bose-Einstein): Eg0 = %g eV is not finite",
                       p->eg0_ev);
    if (!(p->a_b_ev >= 0.0) || !isfinite(p->a_b_ev))
        return bm_fail(err, BM_EINVAL, "band gap (Bose-Einstein): a_B = %g eV must be >= 0",
                       p->a_b_ev);
    if (!(p->theta_k > 0.0) || !isfinite(p->theta_k))
        return bm_fail(err, BM_EINVAL, "band gap (Bose-Einstein): Theta = %g K must be > 0",
                       p->theta_k);
    bm_status s = check_t("Bose-Einstein", t_k, err);
    if (s)
        return s;
    /* 1/(e^x - 1) -> 0 as T -> 0; expm1 keeps precision at high T. */
    double x = t_k > 0.0 ? p->theta_k / t_k : INFINITY;
    double occ = x > 700.0 ? 0.0 : 1.0 / expm1(x);
    *eg_ev = p->eg0_ev - 2.0 * p->a_b_ev * occ;
    warn_gap("Bose-Einstein", t_k, *eg_ev, w);
    return BM_OK;
}
