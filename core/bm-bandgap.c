/* bm-bandgap.c: band gap against temperature (Varshni; Vina's Bose-Einstein
 * form; fixed), one entry point for every model. */
#include "bm-bandgap.h"

#include <math.h>

const char *bm_gap_kind_name(bm_gap_kind kind)
{
    switch (kind) {
    case BM_GAP_VARSHNI:       return "varshni";
    case BM_GAP_BOSE_EINSTEIN: return "bose-einstein";
    case BM_GAP_FIXED:         return "fixed";
    case BM_GAP_NONE:          break;
    }
    return "none";
}

static const char *form_name(bm_gap_kind kind)
{
    return kind == BM_GAP_VARSHNI ? "Varshni"
         : kind == BM_GAP_BOSE_EINSTEIN ? "Bose-Einstein" : "fixed";
}

bm_status bm_gap_model_check(const bm_gap_model *g, bm_errbuf *err)
{
    const char *form = form_name(g->kind);
    if (!isfinite(g->eg0_ev))
        return bm_fail(err, BM_EINVAL, "band gap (%s): Eg0 = %g eV is not finite", form,
                       g->eg0_ev);
    if (!(fabs(g->eg0_ev) <= BM_GAP_MAX_EV))
        return bm_fail(err, BM_EINVAL, "band gap (%s): Eg0 = %g eV is outside the domain "
                       "|Eg| <= %g eV (gaps are a few eV, the widest crystals about 14 eV: "
                       "check the unit)", form, g->eg0_ev, BM_GAP_MAX_EV);
    if (g->kind == BM_GAP_VARSHNI) {
        if (!(g->alpha_ev_per_k >= 0.0) || !isfinite(g->alpha_ev_per_k))
            return bm_fail(err, BM_EINVAL, "band gap (Varshni): alpha = %g eV/K must be >= 0",
                           g->alpha_ev_per_k);
        if (!(g->beta_k > 0.0) || !isfinite(g->beta_k))
            return bm_fail(err, BM_EINVAL, "band gap (Varshni): beta = %g K must be > 0",
                           g->beta_k);
    } else if (g->kind == BM_GAP_BOSE_EINSTEIN) {
        if (!(g->a_b_ev >= 0.0) || !isfinite(g->a_b_ev))
            return bm_fail(err, BM_EINVAL, "band gap (Bose-Einstein): a_B = %g eV must be >= 0",
                           g->a_b_ev);
        if (!(g->theta_k > 0.0) || !isfinite(g->theta_k))
            return bm_fail(err, BM_EINVAL, "band gap (Bose-Einstein): Theta = %g K must be > 0",
                           g->theta_k);
    }
    return BM_OK;
}

bm_status bm_gap_at(const bm_gap_model *g, double t_k, double *eg_ev, bm_warnings *w,
                    bm_errbuf *err)
{
    if (!g || !eg_ev)
        return bm_fail(err, BM_EINVAL, "band gap: missing parameters or result");
    *eg_ev = NAN;
    if (g->kind != BM_GAP_VARSHNI && g->kind != BM_GAP_BOSE_EINSTEIN
        && g->kind != BM_GAP_FIXED)
        return bm_fail(err, BM_EINVAL, "band gap: no gap model given");
    bm_status s = bm_gap_model_check(g, err);
    if (s)
        return s;
    const char *form = form_name(g->kind);
    if (!(t_k >= 0.0) || !isfinite(t_k))
        return bm_fail(err, BM_EINVAL, "band gap (%s): temperature %g K must be "
                       "finite and >= 0", form, t_k);
    double eg = g->eg0_ev;
    if (g->kind == BM_GAP_VARSHNI) {
        eg = g->eg0_ev - g->alpha_ev_per_k * t_k * t_k / (t_k + g->beta_k);
    } else if (g->kind == BM_GAP_BOSE_EINSTEIN) {
        /* 1/(e^x - 1) -> 0 as T -> 0; expm1 keeps precision at high T. */
        double x = t_k > 0.0 ? g->theta_k / t_k : INFINITY;
        double occ = x > 700.0 ? 0.0 : 1.0 / expm1(x);
        eg = g->eg0_ev - 2.0 * g->a_b_ev * occ;
    }
    if (!(eg <= BM_GAP_MAX_EV && eg >= BM_GAP_MIN_EV))
        return bm_fail(err, BM_EINVAL, "band gap (%s): Eg(%g K) = %g eV is outside the domain "
                       "%g to %g eV (a semimetal's overlap at most): the parameters are used "
                       "far outside their range", form, t_k, eg, BM_GAP_MIN_EV, BM_GAP_MAX_EV);
    *eg_ev = eg;
    if (eg <= 0.0)
        bm_warn(w, BM_WARN_GAP_NOT_POSITIVE, "band gap (%s): Eg(%g K) = %g eV is not positive; the "
                "parameters are used outside their range", form, t_k, eg);
    return BM_OK;
}
