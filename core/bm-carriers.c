/* bm-carriers.c: effective densities of states, intrinsic density, the
 * charge-neutrality Fermi level (3D, many dopants) and 2D subband filling. */
#include "bm-carriers.h"

#include <math.h>
#include "bm-fermi.h"
#include "bm-units.h"

#define GAMMA_5_2 1.3293403881791355   /* Gamma(5/2) = 3 sqrt(pi) / 4 */
#define LN_TINY (-575.0)               /* below: work in logarithms */

const char *bm_regime_name(bm_regime r)
{
    switch (r) {
    case BM_REGIME_FREEZE_OUT:     return "freeze-out";
    case BM_REGIME_EXTRINSIC:      return "extrinsic";
    case BM_REGIME_INTRINSIC:      return "intrinsic";
    case BM_REGIME_DEGENERATE:     return "degenerate";
    case BM_REGIME_COMPENSATED:    return "compensated";
    case BM_REGIME_PARTIAL:        return "partial-ionization";
    case BM_REGIME_NEAR_INTRINSIC: return "near-intrinsic";
    }
    return "unknown";
}

/* ---- heavy doping ---- */

/* Rydberg energy in eV and Bohr radius in cm (GSL's CODATA values). */
#define RYDBERG_EV (GSL_CONST_MKSA_RYDBERG / GSL_CONST_MKSA_ELECTRON_VOLT)
#define BOHR_CM (GSL_CONST_MKSA_BOHR_RADIUS * 100.0)

const char *bm_ionisation_kind_name(bm_ionisation_kind k)
{
    switch (k) {
    case BM_IONISATION_SINGLE_LEVEL:    return "single-level";
    case BM_IONISATION_PEARSON_BARDEEN: return "pearson-bardeen";
    case BM_IONISATION_MOTT:            return "mott";
    }
    return "unknown";
}

bm_status bm_ionisation_energy(const bm_ionisation_model *m, double e0_ev, double density_cm3,
                               double *energy_ev, int *fully_ionised, bm_errbuf *err)
{
    if (!m || !energy_ev || !fully_ionised)
        return bm_fail(err, BM_EINVAL, "ionisation energy: missing model or result");
    *energy_ev = e0_ev;
    *fully_ionised = 0;
    if (!isfinite(e0_ev))
        return bm_fail(err, BM_EINVAL, "ionisation energy: %g eV is not finite", e0_ev);
    if (!(density_cm3 >= 0.0) || !isfinite(density_cm3))
        return bm_fail(err, BM_EINVAL, "ionisation energy: density %g cm^-3 must be finite "
                       "and >= 0", density_cm3);
    switch (m->kind) {
    case BM_IONISATION_SINGLE_LEVEL:
        return BM_OK;
    case BM_IONISATION_PEARSON_BARDEEN: {
        if (!(m->alpha_ev_cm > 0.0) || !isfinite(m->alpha_ev_cm))
            return bm_fail(err, BM_EINVAL, "ionisation energy: Pearson-Bardeen alpha %g eV cm "
                           "must be finite and > 0", m->alpha_ev_cm);
        double e = e0_ev - m->alpha_ev_cm * cbrt(density_cm3);
        if (e <= 0.0) {
            *energy_ev = 0.0;
            *fully_ionised = 1;
        } else {
            *energy_ev = e;
        }
        return BM_OK;
    }
    case BM_IONISATION_MOTT:
        if (!(m->mott_density_cm3 > 0.0) || !isfinite(m->mott_density_cm3))
            return bm_fail(err, BM_EINVAL, "ionisation energy: Mott density %g cm^-3 must be "
                           "finite and > 0", m->mott_density_cm3);
        *fully_ionised = density_cm3 >= m->mott_density_cm3;
        return BM_OK;
    }
    return bm_fail(err, BM_EINVAL, "ionisation energy: unknown model %d", (int)m->kind);
}

bm_status bm_hydrogenic_impurity(double mass, double eps_r, double *binding_ev,
                                 double *bohr_radius_angstrom, double *mott_density_cm3,
                                 bm_errbuf *err)
{
    if (binding_ev)
        *binding_ev = NAN;
    if (bohr_radius_angstrom)
        *bohr_radius_angstrom = NAN;
    if (mott_density_cm3)
        *mott_density_cm3 = NAN;
    if (!(mass > 0.0) || !isfinite(mass))
        return bm_fail(err, BM_EINVAL, "hydrogenic impurity: mass %g m_e must be finite and "
                       "> 0", mass);
    if (!(eps_r > 0.0) || !isfinite(eps_r))
        return bm_fail(err, BM_EINVAL, "hydrogenic impurity: relative permittivity %g must "
                       "be finite and > 0", eps_r);
    double a_cm = BOHR_CM * eps_r / mass;
    if (binding_ev)
        *binding_ev = RYDBERG_EV * mass / (eps_r * eps_r);
    if (bohr_radius_angstrom)
        *bohr_radius_angstrom = a_cm * 1e8;
    if (mott_density_cm3) {
        double x = BM_MOTT_CONSTANT / a_cm;
        *mott_density_cm3 = x * x * x;
    }
    return BM_OK;
}

const char *bm_bgn_kind_name(bm_bgn_kind k)
{
    switch (k) {
    case BM_BGN_NONE:     return "none";
    case BM_BGN_SLOTBOOM: return "slotboom";
    }
    return "unknown";
}

static bm_status bgn_check(const bm_bgn_model *m, bm_errbuf *err)
{
    if (m->kind == BM_BGN_NONE)
        return BM_OK;
    if (m->kind != BM_BGN_SLOTBOOM)
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: unknown model %d", (int)m->kind);
    if (!(m->e1_ev > 0.0) || !isfinite(m->e1_ev))
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: E1 %g eV must be finite and > 0",
                       m->e1_ev);
    if (!(m->n0_cm3 > 0.0) || !isfinite(m->n0_cm3))
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: N0 %g cm^-3 must be finite and > 0",
                       m->n0_cm3);
    if (!(m->c >= 0.0) || !isfinite(m->c))
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: C %g must be finite and >= 0",
                       m->c);
    return BM_OK;
}

bm_status bm_bgn_value(const bm_bgn_model *m, double n_cm3, double *dEg_ev, bm_errbuf *err)
{
    if (!m || !dEg_ev)
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: missing model or result");
    *dEg_ev = 0.0;
    bm_status st = bgn_check(m, err);
    if (st)
        return st;
    if (!(n_cm3 >= 0.0) || !isfinite(n_cm3))
        return bm_fail(err, BM_EINVAL, "band-gap narrowing: density %g cm^-3 must be finite "
                       "and >= 0", n_cm3);
    if (m->kind == BM_BGN_NONE || n_cm3 == 0.0)
        return BM_OK;
    double l = log(n_cm3 / m->n0_cm3);
    /* l + sqrt(l^2 + C) without cancellation for l << 0: C / (sqrt(l^2 + C) - l) */
    double r = sqrt(l * l + m->c);
    *dEg_ev = m->e1_ev * (l >= 0.0 ? l + r : m->c / (r - l));
    return BM_OK;
}

/* 2 (2 pi m k T / h^2)^(3/2) in cm^-3 (the prefactor lives in bm-units.h). */
static double nc_of(double mass, double t_k)
{
    double mt = mass * t_k;
    return BM_NC_PREFACTOR_CM3 * mt * sqrt(mt);
}

bm_status bm_effective_dos(double mass, double t_k, double *n_cm3, bm_errbuf *err)
{
    if (!n_cm3)
        return bm_fail(err, BM_EINVAL, "effective density of states: no place for the result");
    *n_cm3 = NAN;
    if (!(mass > 0.0) || !isfinite(mass))
        return bm_fail(err, BM_EINVAL,
                       "effective density of states: mass %g m_e must be finite and > 0", mass);
    if (!(t_k > 0.0) || !isfinite(t_k))
        return bm_fail(err, BM_EINVAL,
                       "effective density of states: temperature %g K must be finite and > 0",
                       t_k);
    *n_cm3 = nc_of(mass, t_k);
    return BM_OK;
}

/* ---------------------------------------------------------------------------
 * Neutrality solver.  The unknown is u = EF / kT.  With P = p + sum N_D+ and
 * N = n + sum N_A-, P falls and N rises with EF, so g(u) = ln(P / N) is
 * strictly decreasing with slope of order -1 (exactly -1 or -2 in the
 * Boltzmann limits): Newton on g converges in a few steps from the
 * Boltzmann-limit guess, and the bracket from physical bounds catches the
 * rest by bisection (the safeguarded Newton of Numerical Recipes' rtsafe). */

typedef struct {
    int boltzmann;
    double eg_kt, nc, nv, lnnc, lnnv;
    size_t nd, na;
    double dens_d[BM_MAX_DOPANTS], off_d[BM_MAX_DOPANTS];  /* x = u - off_d */
    double dens_a[BM_MAX_DOPANTS], off_a[BM_MAX_DOPANTS];  /* x = off_a - u */
    double sum_d, sum_a;
    /* ionisation energies / kT, ln g, and the heavy-doping flags (1: every dopant
     * of the species counts ionised: offset +-infinity, occupation exactly 0) */
    double ion_d[BM_MAX_DOPANTS], lng_d[BM_MAX_DOPANTS];
    double ion_a[BM_MAX_DOPANTS], lng_a[BM_MAX_DOPANTS];
    int full_d[BM_MAX_DOPANTS], full_a[BM_MAX_DOPANTS];
    double eg0_kt;                 /* the gap before narrowing, / kT */
} nctx;

/* Level offsets for the current gap c->eg_kt. */
static void place_levels(nctx *c)
{
    for (size_t i = 0; i < c->nd; i++)
        c->off_d[i] = c->full_d[i] ? INFINITY : c->eg_kt - c->ion_d[i] - c->lng_d[i];
    for (size_t i = 0; i < c->na; i++)
        c->off_a[i] = c->full_a[i] ? -INFINITY : c->ion_a[i] + c->lng_a[i];
}

/* Occupation split of 1/(1 + e^x) without overflow: s = 1/(1+e^x), c = 1 - s. */
static inline void fermi_split(double x, double *s, double *c)
{
    if (x > 0.0) {
        double t = exp(-x);
        *s = t / (1.0 + t);
        *c = 1.0 / (1.0 + t);
    } else {
        double t = exp(x);
        *s = 1.0 / (1.0 + t);
        *c = t / (1.0 + t);
    }
}

static inline double softplus(double x)   /* ln(1 + e^x) */
{
    return x > 0.0 ? x + log1p(exp(-x)) : log1p(exp(x));
}

static inline void band_density(const nctx *c, double eta, double *f, double *df)
{
    if (c->boltzmann) {
        *f = exp(eta);
        *df = *f;
    } else {
        bm_fermi_dirac_half_pair(eta, f, df);
    }
}

static inline double band_log(const nctx *c, double eta, double *dlog)
{
    if (c->boltzmann) {
        *dlog = 1.0;
        return eta;
    }
    return bm_fermi_dirac_half_log(eta, dlog);
}

/* g(u) and dg/du; with dens != NULL also n, p and the ionised densities. */
typedef struct {
    double n, p, d[BM_MAX_DOPANTS], a[BM_MAX_DOPANTS];
} ndens;

/* ln sum_i exp(lt_i) and its derivative, given each term's d(lt_i)/du in dl,
 * without overflow: the largest term is factored out. */
static void log_sum_exp(const double *lt, const double *dl, size_t k, double *ln, double *dln)
{
    double m = lt[0];
    for (size_t i = 1; i < k; i++)
        m = fmax(m, lt[i]);
    double s = 0.0, ds = 0.0;
    for (size_t i = 0; i < k; i++) {
        double w = exp(lt[i] - m);
        s += w;
        ds += w * dl[i];
    }
    *ln = m + log(s);
    *dln = ds / s;
}

static void neutrality_eval(const nctx *c, double u, double *g, double *gp, ndens *dens)
{
    double eta_n = u - c->eg_kt, eta_p = -u;
    double fn, dfn, fp, dfp;
    band_density(c, eta_n, &fn, &dfn);
    band_density(c, eta_p, &fp, &dfp);
    double n = c->nc * fn, p = c->nv * fp;
    double P = p, dP = -c->nv * dfp, N = n, dN = c->nc * dfn;
    double sd[BM_MAX_DOPANTS], cd[BM_MAX_DOPANTS], sa[BM_MAX_DOPANTS], ca[BM_MAX_DOPANTS];
    for (size_t i = 0; i < c->nd; i++) {
        fermi_split(u - c->off_d[i], &sd[i], &cd[i]);
        double d = c->dens_d[i] * sd[i];
        P += d;
        dP -= d * cd[i];
        if (dens)
            dens->d[i] = d;
    }
    for (size_t i = 0; i < c->na; i++) {
        fermi_split(c->off_a[i] - u, &sa[i], &ca[i]);
        double a = c->dens_a[i] * sa[i];
        N += a;
        dN += a * ca[i];
        if (dens)
            dens->a[i] = a;
    }
    if (dens) {
        dens->n = n;
        dens->p = p;
    }
    if (P > 1e-250 && N > 1e-250 && P < 1e300 && N < 1e300) {
        *g = log(P / N);
        *gp = dP / P - dN / N;
        return;
    }
    /* Log space: ln P and ln N as log-sum-exp over their terms. */
    double lt[BM_MAX_DOPANTS + 1], dl[BM_MAX_DOPANTS + 1];
    double lnP, dlnP, lnN, dlnN;
    {
        size_t k = 0;
        double r;
        lt[k] = c->lnnv + band_log(c, eta_p, &r);
        dl[k++] = -r;
        for (size_t i = 0; i < c->nd; i++) {
            if (!(c->dens_d[i] > 0.0))
                continue;
            lt[k] = log(c->dens_d[i]) - softplus(u - c->off_d[i]);
            dl[k++] = -cd[i];
        }
        log_sum_exp(lt, dl, k, &lnP, &dlnP);
    }
    {
        size_t k = 0;
        double r;
        lt[k] = c->lnnc + band_log(c, eta_n, &r);
        dl[k++] = r;
        for (size_t i = 0; i < c->na; i++) {
            if (!(c->dens_a[i] > 0.0))
                continue;
            lt[k] = log(c->dens_a[i]) - softplus(c->off_a[i] - u);
            dl[k++] = ca[i];
        }
        log_sum_exp(lt, dl, k, &lnN, &dlnN);
    }
    *g = lnP - lnN;
    *gp = dlnP - dlnN;
}

/* Reduced energy for a carrier density ratio r = n / Nc (Boltzmann limit, or
 * Nilsson's degenerate-range approximation inside bm_fermi_dirac_half_inverse
 * when r is large and the statistics are Fermi-Dirac). */
static double guess_eta(const nctx *c, double r)
{
    if (!c->boltzmann && r > 1.0) {
        double v = pow(GAMMA_5_2 * r, 2.0 / 3.0);
        return log(r) / (1.0 - r * r) + v / (1.0 + 1.0 / ((0.24 + 1.08 * v) * (0.24 + 1.08 * v)));
    }
    return log(r);
}

/* Bracket from physical bounds: at u_hi, n >= Nc F(eta_up) > sum N_D + Nv >= P
 * (F_1/2(eta) > eta^(3/2) / Gamma(5/2) for eta > 0, and p < Nv for EF > Ev);
 * symmetrically at u_lo. */
static double bound_eta(const nctx *c, double ratio)
{
    if (c->boltzmann)
        return fmax(40.0, log(ratio) + 1.0);
    return fmax(40.0, pow(GAMMA_5_2 * ratio, 2.0 / 3.0) * 1.0001);
}

static double initial_u(const nctx *c)
{
    double net = c->sum_d - c->sum_a;
    double ln_ni = 0.5 * (c->lnnc + c->lnnv) - 0.5 * c->eg_kt;
    double ni = exp(fmin(ln_ni, 600.0));
    double u_int = 0.5 * c->eg_kt + 0.5 * (c->lnnv - c->lnnc);
    double scale = fmax(c->sum_d, c->sum_a);
    if (!(fabs(net) > 1e-12 * scale) || scale == 0.0)
        return u_int;
    int ntype = net > 0.0;
    /* The most abundant species of the majority kind sets the freeze-out
     * estimate: n (n + N_A) = (n1 / g) (N_D - N_A - n), n1 = Nc e^(-E_ion/kT). */
    size_t nk = ntype ? c->nd : c->na, k = 0;
    const double *dens = ntype ? c->dens_d : c->dens_a;
    for (size_t i = 1; i < nk; i++)
        if (dens[i] > dens[k])
            k = i;
    double ln_band = ntype ? c->lnnc : c->lnnv;
    double ion = ntype ? c->ion_d[k] : c->ion_a[k];
    double lng = ntype ? c->lng_d[k] : c->lng_a[k];
    int full = ntype ? c->full_d[k] : c->full_a[k];
    double n1g = exp(fmax(fmin(ln_band - ion - lng, 650.0), -650.0));
    double comp = ntype ? c->sum_a : c->sum_d;
    double b = comp + n1g, cc = n1g * fabs(net);
    double n_ext = full ? fabs(net) : 2.0 * cc / (b + sqrt(b * b + 4.0 * cc));
    double n0 = 0.5 * n_ext + hypot(0.5 * n_ext, ni);
    double band = ntype ? c->nc : c->nv;
    double eta;
    if (n0 > 1e-280 && isfinite(n0))
        eta = guess_eta(c, n0 / band);
    else
        eta = full ? 0.0 : -ion;   /* at the dopant level */
    return ntype ? c->eg_kt + eta : -eta;
}

static bm_status solve_u(const nctx *c, double u0, double *u_out, int *iters)
{
    double lo = fmin(c->eg_kt, 0.0) - bound_eta(c, (c->sum_a + c->nc) / c->nv);
    double hi = fmax(c->eg_kt, 0.0) + bound_eta(c, (c->sum_d + c->nv) / c->nc);
    double u = (u0 > lo && u0 < hi) ? u0 : 0.5 * (lo + hi);
    double dxold = hi - lo;
    int it;
    for (it = 1; it <= 400; it++) {
        double g, gp;
        neutrality_eval(c, u, &g, &gp, NULL);
        if (g == 0.0)
            break;
        if (g > 0.0)
            lo = u;
        else
            hi = u;
        double step = -g / gp;
        if (gp < 0.0 && fabs(step) < 1e-7) {
            u += step;   /* converged: the error is now of order step^2 */
            break;
        }
        double un = u + step;
        if (!(gp < 0.0) || !(un > lo && un < hi) || fabs(2.0 * g) > fabs(dxold * gp))
            un = 0.5 * (lo + hi);
        double dx = un - u;
        dxold = dx;
        u = un;
        if (hi - lo < 4e-16 * fmax(1.0, fabs(u)))
            break;
    }
    *u_out = u;
    *iters = it;
    if (it > 400 || !isfinite(u))
        return BM_ENOCONV;
    return BM_OK;
}

static bm_status check_dopants(const char *kind, const bm_dopant *d, size_t nd, bm_errbuf *err)
{
    if (nd > BM_MAX_DOPANTS)
        return bm_fail(err, BM_EINVAL, "carrier statistics: %zu %s species, at most %d",
                       nd, kind, BM_MAX_DOPANTS);
    if (nd > 0 && !d)
        return bm_fail(err, BM_EINVAL, "carrier statistics: %zu %s species but no array",
                       nd, kind);
    for (size_t i = 0; i < nd; i++) {
        if (!(d[i].density_cm3 >= 0.0) || !(d[i].density_cm3 <= BM_CARRIERS_MAX_DENSITY_CM3))
            return bm_fail(err, BM_EINVAL, "carrier statistics: %s %zu density %g cm^-3 "
                           "must be >= 0 and at most %g (beyond the atomic density of "
                           "any solid)", kind, i, d[i].density_cm3,
                           BM_CARRIERS_MAX_DENSITY_CM3);
        if (!isfinite(d[i].ionisation_ev))
            return bm_fail(err, BM_EINVAL, "carrier statistics: %s %zu ionisation energy "
                           "%g eV is not finite", kind, i, d[i].ionisation_ev);
        if (!(d[i].degeneracy >= 0.0) || !isfinite(d[i].degeneracy))
            return bm_fail(err, BM_EINVAL, "carrier statistics: %s %zu degeneracy factor %g "
                           "must be > 0 (or 0 for the default)", kind, i, d[i].degeneracy);
    }
    return BM_OK;
}

/* Validates s and fills the context; masses may come from the hook. */
/* The gap c->eg_kt after a narrowing dEg (eV), and what depends on it. */
static void set_narrowing(nctx *c, bm_carrier_state *out, double deg)
{
    out->band_gap_narrowing_ev = deg;
    out->effective_band_gap_ev = out->band_gap_ev - deg;
    c->eg_kt = c->eg0_kt - deg / out->kt_ev;
    out->nie_cm3 = exp(0.5 * (c->lnnc + c->lnnv) - 0.5 * c->eg_kt);
    place_levels(c);
}

/* Heavy-doping energies of one kind; the above-mott-density warning. */
static bm_status heavy_levels(const char *kind, const bm_ionisation_model *m,
                              const bm_dopant *d, size_t nd, double total, double kt,
                              double *ion_kt, int *full, double *used_ev,
                              int *full_out, bm_warnings *w, bm_errbuf *err)
{
    for (size_t i = 0; i < nd; i++) {
        double e = NAN;
        int f = 0;
        bm_errbuf local = {0};
        bm_status st = bm_ionisation_energy(m, d[i].ionisation_ev, total, &e, &f, &local);
        if (st)
            return bm_fail(err, st, "carrier statistics: %s %zu: %s", kind, i, local.message);
        ion_kt[i] = e / kt;
        full[i] = f;
        used_ev[i] = e;
        full_out[i] = f;
    }
    if (m->kind == BM_IONISATION_SINGLE_LEVEL && m->mott_density_cm3 > 0.0 && nd > 0
        && total >= m->mott_density_cm3)
        bm_warn(w, BM_WARN_ABOVE_MOTT_DENSITY, "%s density %.3g cm^-3 is at or above the Mott "
                "density %.3g cm^-3, but the single-level model counts the %ss as isolated "
                "levels: it underestimates their ionisation", kind, total,
                m->mott_density_cm3, kind);
    return BM_OK;
}

static bm_status setup(const bm_semiconductor *s, double t_k, bm_statistics stats,
                       nctx *c, bm_carrier_state *out, bm_errbuf *err)
{
    if (!s || !out)
        return bm_fail(err, BM_EINVAL, "carrier statistics: missing input or result");
    out->warnings = (bm_warnings){0};
    if (!(t_k >= BM_CARRIERS_MIN_T_K) || !(t_k <= BM_CARRIERS_MAX_T_K))
        return bm_fail(err, BM_EINVAL, "carrier statistics: temperature %g K must lie "
                       "between %g and %g K", t_k, BM_CARRIERS_MIN_T_K, BM_CARRIERS_MAX_T_K);
    double eg = s->band_gap_ev;
    if (s->gap) {
        /* the gap model's own warning stands for the overlap warning below */
        bm_status st = bm_gap_at(s->gap, t_k, &eg, &out->warnings, err);
        if (st)
            return st;
    }
    if (!isfinite(eg))
        return bm_fail(err, BM_EINVAL, "carrier statistics: band gap %g eV is not finite", eg);
    double me = s->m_dos_electron, mh = s->m_dos_hole;
    if (s->dos_mass_hook) {
        bm_status st = s->dos_mass_hook(t_k, &me, &mh, s->hook_data);
        if (st)
            return bm_fail(err, st, "carrier statistics: the DOS-mass hook failed at %g K",
                           t_k);
    }
    if (s->electron_dos_mass) {
        bm_status st = bm_dos_mass_at(s->electron_dos_mass, t_k, "electron DOS mass", &me, err);
        if (st)
            return st;
    }
    if (s->hole_dos_mass) {
        bm_status st = bm_dos_mass_at(s->hole_dos_mass, t_k, "hole DOS mass", &mh, err);
        if (st)
            return st;
    }
    /* one domain for every source of the masses (fixed, table, fit, hook):
     * beyond it the neutrality solve has no meaningful root to find */
    if (!(me >= BM_DOS_MASS_MIN_ME && me <= BM_DOS_MASS_MAX_ME))
        return bm_fail(err, BM_EINVAL, "carrier statistics: electron DOS mass %g m_e at %g K "
                       "is outside the domain %g to %g m_e", me, t_k, BM_DOS_MASS_MIN_ME,
                       BM_DOS_MASS_MAX_ME);
    if (!(mh >= BM_DOS_MASS_MIN_ME && mh <= BM_DOS_MASS_MAX_ME))
        return bm_fail(err, BM_EINVAL, "carrier statistics: hole DOS mass %g m_e at %g K is "
                       "outside the domain %g to %g m_e", mh, t_k, BM_DOS_MASS_MIN_ME,
                       BM_DOS_MASS_MAX_ME);
    bm_status st = check_dopants("donor", s->donors, s->ndonors, err);
    if (st)
        return st;
    st = check_dopants("acceptor", s->acceptors, s->nacceptors, err);
    if (st)
        return st;

    double kt = BM_KB_EV * t_k;
    out->temperature_k = t_k;
    out->kt_ev = kt;
    out->band_gap_ev = eg;
    out->m_dos_electron = me;
    out->m_dos_hole = mh;
    out->statistics = stats;
    c->boltzmann = stats == BM_BOLTZMANN;
    c->eg_kt = eg / kt;
    c->nc = nc_of(me, t_k);
    c->nv = nc_of(mh, t_k);
    c->lnnc = log(c->nc);
    c->lnnv = log(c->nv);
    out->nc_cm3 = c->nc;
    out->nv_cm3 = c->nv;
    out->ni_cm3 = exp(0.5 * (c->lnnc + c->lnnv) - 0.5 * c->eg_kt);
    c->nd = s->ndonors;
    c->na = s->nacceptors;
    c->sum_d = c->sum_a = 0.0;
    for (size_t i = 0; i < c->nd; i++) {
        double g = s->donors[i].degeneracy > 0.0 ? s->donors[i].degeneracy : 2.0;
        c->lng_d[i] = log(g);
        c->dens_d[i] = s->donors[i].density_cm3;
        c->sum_d += c->dens_d[i];
    }
    for (size_t i = 0; i < c->na; i++) {
        double g = s->acceptors[i].degeneracy > 0.0 ? s->acceptors[i].degeneracy : 4.0;
        c->lng_a[i] = log(g);
        c->dens_a[i] = s->acceptors[i].density_cm3;
        c->sum_a += c->dens_a[i];
    }
    st = heavy_levels("donor", &s->donor_ionisation, s->donors, c->nd, c->sum_d, kt, c->ion_d,
                      c->full_d, out->donor_ionisation_ev, out->donor_fully_ionised,
                      &out->warnings, err);
    if (!st)
        st = heavy_levels("acceptor", &s->acceptor_ionisation, s->acceptors, c->na, c->sum_a,
                          kt, c->ion_a, c->full_a, out->acceptor_ionisation_ev,
                          out->acceptor_fully_ionised, &out->warnings, err);
    double app = 0.0;
    if (!st && s->band_gap_narrowing)
        st = bm_bgn_value(s->band_gap_narrowing, c->sum_d + c->sum_a, &app, err);
    if (st) {
        bm_warnings_clear(&out->warnings);
        return st;
    }
    out->apparent_narrowing_ev = app;
    c->eg0_kt = c->eg_kt;
    set_narrowing(c, out, app);
    return BM_OK;
}

static void fill_state(const nctx *c, double u, bm_carrier_state *out)
{
    double g, gp;
    ndens d;
    neutrality_eval(c, u, &g, &gp, &d);
    out->fermi_level_ev = u * out->kt_ev;
    out->n_cm3 = d.n;
    out->p_cm3 = d.p;
    out->donors_ionised_cm3 = 0.0;
    out->acceptors_ionised_cm3 = 0.0;
    for (size_t i = 0; i < c->nd; i++) {
        out->donor_ionised_cm3[i] = d.d[i];
        out->donors_ionised_cm3 += d.d[i];
    }
    for (size_t i = 0; i < c->na; i++) {
        out->acceptor_ionised_cm3[i] = d.a[i];
        out->acceptors_ionised_cm3 += d.a[i];
    }
    /* the regimes of bm-carriers.h, first match wins */
    double nd = c->sum_d, na = c->sum_a, nnet = fabs(nd - na), ntot = nd + na;
    double ni = out->nie_cm3;
    double f = nd != na ? (d.n - d.p) / (nd - na) : NAN;
    out->ionised_fraction = f;
    if (u > c->eg_kt - 3.0 || u < 3.0)
        out->regime = BM_REGIME_DEGENERATE;
    else if (ni >= 10.0 * nnet && ni >= 0.1 * ntot)
        out->regime = BM_REGIME_INTRINSIC;
    else if (nd > 0.0 && na > 0.0 && nnet < 0.1 * ntot)
        out->regime = BM_REGIME_COMPENSATED;
    else if (!(f >= 0.5))
        out->regime = BM_REGIME_FREEZE_OUT;
    else if (f < 0.9)
        out->regime = BM_REGIME_PARTIAL;
    else if (ni >= nnet)
        out->regime = BM_REGIME_NEAR_INTRINSIC;
    else
        out->regime = BM_REGIME_EXTRINSIC;
    out->other_fermi_level_ev = out->other_n_cm3 = out->other_p_cm3 = NAN;
    out->boltzmann_deviation = NAN;
    out->boltzmann_inaccurate = 0;
}

static void common_warnings(const bm_semiconductor *s, const bm_carrier_state *o,
                            bm_carrier_state *out)
{
    if (o->m_dos_electron < 0.01 || o->m_dos_electron > 10.0)
        bm_warn(&out->warnings, BM_WARN_MASS_OUT_OF_RANGE, "electron DOS mass %g m_e is outside 0.01..10 m_e",
                o->m_dos_electron);
    if (o->m_dos_hole < 0.01 || o->m_dos_hole > 10.0)
        bm_warn(&out->warnings, BM_WARN_MASS_OUT_OF_RANGE, "hole DOS mass %g m_e is outside 0.01..10 m_e",
                o->m_dos_hole);
    if (o->band_gap_ev <= 0.0 && !s->gap)
        bm_warn(&out->warnings, BM_WARN_GAP_NOT_POSITIVE, "band gap %g eV is not positive: bands overlap",
                o->band_gap_ev);
}

static double rel_dev(double a, double b)
{
    if (!(b > 0.0) || !(a > 0.0))
        return 0.0;   /* underflowed densities carry no comparison */
    return fabs(a / b - 1.0);
}

/* Neutrality in c from u0.  An apparent (Boltzmann-fitted) narrowing under
 * Fermi-Dirac statistics is made consistent by the fixed point
 * dEg = dEg_app + kT [F_1/2^-1(r) - ln r], r the majority density over its
 * band's effective density of states (bm-carriers.h); the narrowing fields of
 * out follow the gap used. */
static bm_status solve_state(const bm_semiconductor *s, nctx *c, bm_carrier_state *out,
                             double u0, double *u, int *iters)
{
    const bm_bgn_model *m = s->band_gap_narrowing;
    double app = out->apparent_narrowing_ev, deg = app;
    int fd_fix = !c->boltzmann && m && m->kind != BM_BGN_NONE && m->apparent && app > 0.0;
    set_narrowing(c, out, deg);
    *iters = 0;
    for (int k = 0; k < 100; k++) {
        int it;
        bm_status st = solve_u(c, u0, u, &it);
        *iters += it;
        if (st || !fd_fix)
            return st;
        double g, gp, eta, corr = 0.0;
        ndens d;
        neutrality_eval(c, *u, &g, &gp, &d);
        double r = d.n >= d.p ? d.n / c->nc : d.p / c->nv;
        if (r > 0.0 && isfinite(r) && bm_fermi_dirac_half_inverse(r, &eta, NULL) == BM_OK)
            corr = out->kt_ev * (eta - log(r));
        double next = app + corr;
        if (fabs(next - deg) <= 1e-12 + 1e-12 * deg)
            return BM_OK;
        deg = next;
        set_narrowing(c, out, deg);
        u0 = *u;
    }
    return BM_ENOCONV;
}

bm_status bm_carriers_solve(const bm_semiconductor *s, double t_k,
                            bm_carrier_state *out, bm_errbuf *err)
{
    nctx c;
    bm_statistics stats = s && s->statistics == BM_BOLTZMANN ? BM_BOLTZMANN : BM_FERMI_DIRAC;
    bm_status st = setup(s, t_k, stats, &c, out, err);
    if (st)
        return st;
    double u;
    st = solve_state(s, &c, out, initial_u(&c), &u, &out->iterations);
    if (st) {
        bm_warnings_clear(&out->warnings);
        return bm_fail(err, st, "carrier statistics: neutrality did not converge at %g K",
                       t_k);
    }
    fill_state(&c, u, out);
    common_warnings(s, out, out);
    if (s->skip_statistics_check)
        return BM_OK;

    /* Re-solve with the other statistics and the same gap (narrowing included):
     * the deviation measures the counting of the band states alone. */
    nctx o = c;
    o.boltzmann = !c.boltzmann;
    double uo;
    int it2;
    if (solve_u(&o, u, &uo, &it2)) {
        bm_warnings_clear(&out->warnings);
        return bm_fail(err, BM_ENOCONV, "carrier statistics: the comparison solve did not "
                       "converge at %g K", t_k);
    }
    double g, gp;
    ndens d;
    neutrality_eval(&o, uo, &g, &gp, &d);
    out->other_fermi_level_ev = uo * out->kt_ev;
    out->other_n_cm3 = d.n;
    out->other_p_cm3 = d.p;
    const double nb = c.boltzmann ? out->n_cm3 : d.n, nf = c.boltzmann ? d.n : out->n_cm3;
    const double pb = c.boltzmann ? out->p_cm3 : d.p, pf = c.boltzmann ? d.p : out->p_cm3;
    out->boltzmann_deviation = fmax(rel_dev(nb, nf), rel_dev(pb, pf));
    if (out->boltzmann_deviation > 0.05) {
        out->boltzmann_inaccurate = 1;
        bm_warn(&out->warnings, BM_WARN_BOLTZMANN_DEVIATION, "Boltzmann statistics would be off by %.0f %% at %g K "
                "(degenerate carriers)", 100.0 * out->boltzmann_deviation, t_k);
    }
    return BM_OK;
}

bm_status bm_carriers_at_fermi_level(const bm_semiconductor *s, double t_k,
                                     double fermi_level_ev, bm_carrier_state *out,
                                     bm_errbuf *err)
{
    nctx c;
    bm_statistics stats = s && s->statistics == BM_BOLTZMANN ? BM_BOLTZMANN : BM_FERMI_DIRAC;
    bm_status st = setup(s, t_k, stats, &c, out, err);
    if (st)
        return st;
    if (!isfinite(fermi_level_ev)) {
        bm_warnings_clear(&out->warnings);
        return bm_fail(err, BM_EINVAL, "carrier statistics: Fermi level %g eV is not finite",
                       fermi_level_ev);
    }
    /* at a given Fermi level the narrowing is the model's own value (no
     * neutrality, hence no self-consistent majority density) */
    out->iterations = 0;
    fill_state(&c, fermi_level_ev / out->kt_ev, out);
    out->fermi_level_ev = fermi_level_ev;
    common_warnings(s, out, out);
    return BM_OK;
}

bm_status bm_carriers_intrinsic(const bm_semiconductor *s, double t_k,
                                double *ni_textbook_cm3, double *ni_fd_cm3,
                                double *ei_ev, bm_errbuf *err)
{
    if (!s)
        return bm_fail(err, BM_EINVAL, "intrinsic density: missing input");
    bm_semiconductor bare = *s;
    bare.ndonors = bare.nacceptors = 0;
    bare.statistics = BM_FERMI_DIRAC;
    bare.skip_statistics_check = 1;
    bm_carrier_state st;
    bm_status r = bm_carriers_solve(&bare, t_k, &st, err);
    bm_warnings_clear(&st.warnings);
    if (r)
        return r;
    if (ni_textbook_cm3)
        *ni_textbook_cm3 = st.ni_cm3;
    if (ni_fd_cm3)
        *ni_fd_cm3 = sqrt(st.n_cm3) * sqrt(st.p_cm3);
    if (ei_ev)
        *ei_ev = st.fermi_level_ev;
    return BM_OK;
}

/* ------------------------------------------------------------------------ 2D */

bm_status bm_2d_dos(double mass, double valley_degeneracy, double *dos_cm2_ev,
                    bm_errbuf *err)
{
    if (!dos_cm2_ev)
        return bm_fail(err, BM_EINVAL, "2D density of states: no place for the result");
    *dos_cm2_ev = NAN;
    if (!(mass > 0.0) || !isfinite(mass))
        return bm_fail(err, BM_EINVAL, "2D density of states: mass %g m_e must be finite "
                       "and > 0", mass);
    if (!(valley_degeneracy >= 0.0) || !isfinite(valley_degeneracy))
        return bm_fail(err, BM_EINVAL, "2D density of states: valley degeneracy %g must "
                       "be >= 1 (0 for 1)", valley_degeneracy);
    double gv = valley_degeneracy > 0.0 ? valley_degeneracy : 1.0;
    *dos_cm2_ev = gv * mass * BM_DOS2D_PER_EV_CM2;
    return BM_OK;
}

/* The checks both 2D functions make; *result (the place for the answer) is
 * set to NaN first. */
static bm_status check_subbands(const bm_subband *sub, size_t nsub, double t_k,
                                double *result, bm_errbuf *err)
{
    if (!result)
        return bm_fail(err, BM_EINVAL, "2D gas: no place for the result");
    *result = NAN;
    if (nsub == 0 || !sub)
        return bm_fail(err, BM_EINVAL, "2D gas: no subbands given");
    if (nsub > BM_MAX_SUBBANDS)
        return bm_fail(err, BM_EINVAL, "2D gas: %zu subbands, at most %d", nsub,
                       BM_MAX_SUBBANDS);
    if (!(t_k > 0.0) || !isfinite(t_k))
        return bm_fail(err, BM_EINVAL, "2D gas: temperature %g K must be finite and > 0",
                       t_k);
    for (size_t i = 0; i < nsub; i++) {
        if (!isfinite(sub[i].energy_ev))
            return bm_fail(err, BM_EINVAL, "2D gas: subband %zu energy %g eV is not finite",
                           i, sub[i].energy_ev);
        if (!(sub[i].mass > 0.0) || !isfinite(sub[i].mass))
            return bm_fail(err, BM_EINVAL, "2D gas: subband %zu mass %g m_e must be "
                           "finite and > 0", i, sub[i].mass);
        if (!(sub[i].valley_degeneracy >= 0.0) || !isfinite(sub[i].valley_degeneracy))
            return bm_fail(err, BM_EINVAL, "2D gas: subband %zu valley degeneracy %g must "
                           "be >= 1 (0 for 1)", i, sub[i].valley_degeneracy);
    }
    return BM_OK;
}

/* ln n_i and d ln n_i / d(EF/kT) for subband i at reduced Fermi level u. */
static double sub_log(const bm_subband *s, double kt, double u, double *dlog)
{
    double gv = s->valley_degeneracy > 0.0 ? s->valley_degeneracy : 1.0;
    double x = u - s->energy_ev / kt;
    double sp = softplus(x), occ, one_minus;
    fermi_split(-x, &occ, &one_minus);   /* occ = 1/(1+e^-x) = e^x/(1+e^x) */
    /* d ln(softplus x)/dx = sigma(x) / softplus(x); softplus ~ e^x far below. */
    *dlog = x < -700.0 ? 1.0 : occ / sp;
    double lsp = x < -700.0 ? x : log(sp);
    return log(gv * s->mass * BM_DOS2D_PER_EV_CM2 * kt) + lsp;
}

/* Total sheet density at reduced Fermi level u, and each subband's share in
 * per_subband (may be NULL). */
static double sheet_at(const bm_subband *sub, size_t nsub, double kt, double u,
                       double *per_subband)
{
    double total = 0.0, d;
    for (size_t i = 0; i < nsub; i++) {
        double ni = exp(sub_log(&sub[i], kt, u, &d));
        if (per_subband)
            per_subband[i] = ni;
        total += ni;
    }
    return total;
}

bm_status bm_2d_sheet_density(const bm_subband *sub, size_t nsub, double t_k,
                              double fermi_level_ev, double *sheet_cm2,
                              double *per_subband, bm_errbuf *err)
{
    bm_status st = check_subbands(sub, nsub, t_k, sheet_cm2, err);
    if (st)
        return st;
    if (!isfinite(fermi_level_ev))
        return bm_fail(err, BM_EINVAL, "2D gas: Fermi level %g eV is not finite",
                       fermi_level_ev);
    double kt = BM_KB_EV * t_k;
    *sheet_cm2 = sheet_at(sub, nsub, kt, fermi_level_ev / kt, per_subband);
    return BM_OK;
}

bm_status bm_2d_fermi_level(const bm_subband *sub, size_t nsub, double t_k,
                            double sheet_cm2, double *fermi_level_ev,
                            double *per_subband, bm_errbuf *err)
{
    bm_status st = check_subbands(sub, nsub, t_k, fermi_level_ev, err);
    if (st)
        return st;
    if (!(sheet_cm2 > 0.0) || !isfinite(sheet_cm2))
        return bm_fail(err, BM_EINVAL, "2D gas: sheet density %g cm^-2 must be finite "
                       "and > 0", sheet_cm2);
    double kt = BM_KB_EV * t_k, target = log(sheet_cm2);
    /* h(u) = ln(sum n_i) - ln ns rises monotonically with u = EF/kT.  Bounds:
     * all electrons in the lowest-DOS subband at its own edge (upper), or
     * Boltzmann occupation of every subband at the highest DOS (lower). */
    double emin = sub[0].energy_ev, emax = sub[0].energy_ev, dmin = INFINITY, dmax = 0.0;
    for (size_t i = 0; i < nsub; i++) {
        double gv = sub[i].valley_degeneracy > 0.0 ? sub[i].valley_degeneracy : 1.0;
        double dk = gv * sub[i].mass * BM_DOS2D_PER_EV_CM2 * kt;
        emin = fmin(emin, sub[i].energy_ev);
        emax = fmax(emax, sub[i].energy_ev);
        dmin = fmin(dmin, dk);
        dmax = fmax(dmax, dk);
    }
    /* sum n_i >= n_lowest >= dmin (x_lowest) for x > 0 (softplus x > x). */
    double hi = emin / kt + fmax(sheet_cm2 / dmin, 1.0) + 1.0;
    /* sum n_i <= nsub dmax e^(u - emin/kT) (softplus x < e^x). */
    double lo = emin / kt + target - log(nsub * dmax) - 1.0;
    double u = 0.5 * (lo + hi), dxold = hi - lo;
    /* start from the one-subband inversion of the lowest subband */
    {
        double x = sheet_cm2 / dmax;
        double guess = emin / kt + (x > 30.0 ? x : log(expm1(x)));
        if (guess > lo && guess < hi)
            u = guess;
    }
    int it;
    for (it = 0; it < 300; it++) {
        double h = -target, dh = 0.0, s = 0.0, d;
        double lt[BM_MAX_SUBBANDS], dl[BM_MAX_SUBBANDS], m = -INFINITY;
        for (size_t i = 0; i < nsub; i++) {
            lt[i] = sub_log(&sub[i], kt, u, &dl[i]);
            m = fmax(m, lt[i]);
        }
        for (size_t i = 0; i < nsub; i++) {
            d = exp(lt[i] - m);
            s += d;
            dh += d * dl[i];
        }
        h += m + log(s);
        dh /= s;
        if (h == 0.0)
            break;
        if (h < 0.0)
            lo = u;
        else
            hi = u;
        double step = -h / dh;
        if (dh > 0.0 && fabs(step) < 1e-9) {
            u += step;
            break;
        }
        double un = u + step;
        if (!(dh > 0.0) || !(un > lo && un < hi) || fabs(2.0 * h) > fabs(dxold * dh))
            un = 0.5 * (lo + hi);
        double dx = un - u;
        dxold = dx;
        u = un;
        if (hi - lo < 4e-16 * fmax(1.0, fabs(u)))
            break;
    }
    if (it >= 300 || !isfinite(u))
        return bm_fail(err, BM_ENOCONV, "2D gas: Fermi level for %g cm^-2 did not converge",
                       sheet_cm2);
    *fermi_level_ev = u * kt;
    if (per_subband)
        sheet_at(sub, nsub, kt, u, per_subband);
    return BM_OK;
}

/* ---- DOS-mass models ---- */

const char *bm_dos_mass_kind_name(bm_dos_mass_kind kind)
{
    switch (kind) {
    case BM_DOS_MASS_FIXED: return "fixed";
    case BM_DOS_MASS_TABLE: return "table";
    case BM_DOS_MASS_FIT:   return "fit";
    case BM_DOS_MASS_NONE:  break;
    }
    return "none";
}

bm_status bm_dos_mass_check(const bm_dos_mass_model *m, const char *what, bm_errbuf *err)
{
    if (!what)
        what = "DOS mass";
    if (!m)
        return bm_fail(err, BM_EINVAL, "%s: none given", what);
    switch (m->kind) {
    case BM_DOS_MASS_FIXED:
        if (!(m->value > 0.0) || !isfinite(m->value))
            return bm_fail(err, BM_EINVAL, "%s: %g m_e must be finite and > 0", what, m->value);
        return BM_OK;
    case BM_DOS_MASS_TABLE:
        if (m->n == 0 || !m->t_k || !m->mass)
            return bm_fail(err, BM_EINVAL, "%s: the temperature table has no entries", what);
        for (size_t i = 0; i < m->n; i++) {
            if (!(m->t_k[i] > 0.0) || !isfinite(m->t_k[i]))
                return bm_fail(err, BM_EINVAL, "%s: entry %zu temperature %g K must be finite "
                               "and > 0", what, i, m->t_k[i]);
            if (i > 0 && !(m->t_k[i] > m->t_k[i - 1]))
                return bm_fail(err, BM_EINVAL, "%s: entry %zu temperature %g K is not above "
                               "the previous one (%g K)", what, i, m->t_k[i], m->t_k[i - 1]);
            if (!(m->mass[i] > 0.0) || !isfinite(m->mass[i]))
                return bm_fail(err, BM_EINVAL, "%s: entry %zu mass %g m_e must be finite "
                               "and > 0", what, i, m->mass[i]);
        }
        return BM_OK;
    case BM_DOS_MASS_FIT:
        for (int i = 0; i < BM_DOS_FIT_NUMERATOR; i++)
            if (!isfinite(m->fit_numerator[i]))
                return bm_fail(err, BM_EINVAL, "%s: fit numerator coefficient %d is not "
                               "finite", what, i);
        for (int i = 0; i < BM_DOS_FIT_DENOMINATOR; i++)
            if (!isfinite(m->fit_denominator[i]))
                return bm_fail(err, BM_EINVAL, "%s: fit denominator coefficient %d is not "
                               "finite", what, i + 1);
        if (!(m->fit_numerator[0] > 0.0))
            return bm_fail(err, BM_EINVAL, "%s: fit numerator a0 = %g must be > 0 (the 0 K "
                           "mass is a0^(2/3))", what, m->fit_numerator[0]);
        return BM_OK;
    case BM_DOS_MASS_NONE:
        break;
    }
    return bm_fail(err, BM_EINVAL, "%s: none given", what);
}

bm_status bm_dos_mass_at(const bm_dos_mass_model *m, double t_k, const char *what,
                         double *mass, bm_errbuf *err)
{
    if (!what)
        what = "DOS mass";
    if (!mass)
        return bm_fail(err, BM_EINVAL, "%s: no place for the result", what);
    *mass = NAN;
    bm_status st = bm_dos_mass_check(m, what, err);
    if (st)
        return st;
    if (!(t_k >= 0.0) || !isfinite(t_k))
        return bm_fail(err, BM_EINVAL, "%s: temperature %g K must be finite and >= 0", what,
                       t_k);
    if (m->kind == BM_DOS_MASS_FIXED) {
        *mass = m->value;
        return BM_OK;
    }
    if (m->kind == BM_DOS_MASS_TABLE) {
        size_t n = m->n;
        if (!(t_k >= m->t_k[0] && t_k <= m->t_k[n - 1]))
            return bm_fail(err, BM_EINVAL, "%s: temperature %g K is outside the tabulated "
                           "range %g..%g K (table: %s)", what, t_k, m->t_k[0], m->t_k[n - 1],
                           m->source ? m->source : "no source given");
        size_t i = 0;
        while (i + 1 < n && m->t_k[i + 1] < t_k)
            i++;
        if (i + 1 >= n || t_k == m->t_k[i]) {
            *mass = m->mass[i];
            return BM_OK;
        }
        double f = (t_k - m->t_k[i]) / (m->t_k[i + 1] - m->t_k[i]);
        *mass = m->mass[i] + f * (m->mass[i + 1] - m->mass[i]);
        return BM_OK;
    }
    /* FIT, Horner in T */
    double num = 0.0, den = 0.0;
    for (int i = BM_DOS_FIT_NUMERATOR - 1; i >= 0; i--)
        num = num * t_k + m->fit_numerator[i];
    for (int i = BM_DOS_FIT_DENOMINATOR - 1; i >= 0; i--)
        den = den * t_k + m->fit_denominator[i];
    den = 1.0 + den * t_k;
    double r = num / den;
    if (!(r > 0.0) || !isfinite(r))
        return bm_fail(err, BM_EINVAL, "%s: the fit gives no positive mass at %g K", what,
                       t_k);
    *mass = pow(r, 2.0 / 3.0);
    return BM_OK;
}
