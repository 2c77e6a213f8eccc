/* bm-holes.c: hole DOS mass from heavy, light and split-off bands, and
 * directional and angle-averaged masses of the Luttinger warped bands. */
#include "bm-holes.h"
#include "bm-units.h"

#include <math.h>
#include <string.h>
#include <gsl/gsl_integration.h>

#define MASS_LOW 0.01    /* usual range of effective masses, m_e */
#define MASS_HIGH 10.0   /* (common practice, no source) */

static void warn_range(bm_warnings *w, const char *what, double m)
{
    if (isfinite(m) && m > 0.0 && (m < MASS_LOW || m > MASS_HIGH))
        bm_warn(w, BM_WARN_MASS_OUT_OF_RANGE, "%s is %g m_e, outside the usual %g..%g m_e", what, m, MASS_LOW, MASS_HIGH);
}

bm_status bm_hole_dos_mass(const bm_hole_bands *b, bm_hole_dos *out, bm_errbuf *err)
{
    if (!b || !out)
        return bm_fail(err, BM_EINVAL, "hole masses: no input or output given");
    memset(out, 0, sizeof *out);
    if (!isfinite(b->m_hh) || b->m_hh <= 0.0)
        return bm_fail(err, BM_EINVAL, "heavy-hole mass is %g m_e: must be positive", b->m_hh);
    if (!isfinite(b->m_lh) || b->m_lh <= 0.0)
        return bm_fail(err, BM_EINVAL, "light-hole mass is %g m_e: must be positive", b->m_lh);
    if (!isfinite(b->m_so) || b->m_so < 0.0)
        return bm_fail(err, BM_EINVAL,
                       "split-off mass is %g m_e: must be positive (or 0 to leave it out)",
                       b->m_so);
    double so = 0.0;
    if (b->m_so > 0.0) {
        if (!isfinite(b->delta_so_ev) || b->delta_so_ev < 0.0)
            return bm_fail(err, BM_EINVAL,
                           "spin-orbit splitting is %g eV: must be zero or positive",
                           b->delta_so_ev);
        if (!isfinite(b->temperature_k) || b->temperature_k <= 0.0)
            return bm_fail(err, BM_EINVAL,
                           "temperature is %g K: the split-off population needs T > 0",
                           b->temperature_k);
        so = pow(b->m_so, 1.5) * exp(-b->delta_so_ev / (BM_KB_EV * b->temperature_k));
    }
    double hh = pow(b->m_hh, 1.5), lh = pow(b->m_lh, 1.5);
    double tot = hh + lh + so;
    out->dos_mass = pow(tot, 2.0 / 3.0);
    out->fraction_hh = hh / tot;
    out->fraction_lh = lh / tot;
    out->fraction_so = so / tot;
    if (b->m_lh > b->m_hh)
        bm_warn(&out->warnings, BM_WARN_MASS_ORDER, "light-hole mass %g m_e exceeds heavy-hole mass %g m_e: "
                "are they swapped?", b->m_lh, b->m_hh);
    warn_range(&out->warnings, "heavy-hole mass", b->m_hh);
    warn_range(&out->warnings, "light-hole mass", b->m_lh);
    warn_range(&out->warnings, "split-off mass", b->m_so);
    return BM_OK;
}

static bm_status check_luttinger(const bm_luttinger *L, bm_errbuf *err)
{
    if (!L)
        return bm_fail(err, BM_EINVAL, "Luttinger parameters: none given");
    if (!isfinite(L->g1) || !isfinite(L->g2) || !isfinite(L->g3))
        return bm_fail(err, BM_EINVAL, "Luttinger parameters: gamma1..3 must be finite "
                       "(got %g, %g, %g)", L->g1, L->g2, L->g3);
    if (L->g1 <= 0.0)
        return bm_fail(err, BM_EINVAL, "Luttinger parameter gamma1 is %g: must be positive "
                       "for a valence-band maximum", L->g1);
    return BM_OK;
}

/* The root of the warped form for a unit direction (the argument is linear in
 * s = nx^2 ny^2 + ..., s in [0, 1/3], and equals 4 g2^2 at s = 0 and 4 g3^2 at
 * s = 1/3, so it is never negative). */
static double warp_root(const bm_luttinger *L, double nx, double ny, double nz)
{
    double s = nx * nx * ny * ny + ny * ny * nz * nz + nz * nz * nx * nx;
    double a = 4.0 * L->g2 * L->g2 + 12.0 * (L->g3 * L->g3 - L->g2 * L->g2) * s;
    return sqrt(fmax(a, 0.0));
}

/* 1/f, or INFINITY where f vanishes to rounding (relative to g1). */
static double inv_or_inf(double f, double g1)
{
    return fabs(f) <= 1e-12 * g1 ? INFINITY : 1.0 / f;
}

bm_status bm_luttinger_direction(const bm_luttinger *L, const double n[3],
                                 double *m_heavy, double *m_light, int *concave,
                                 bm_errbuf *err)
{
    bm_status st = check_luttinger(L, err);
    if (st != BM_OK)
        return st;
    if (!n)
        return bm_fail(err, BM_EINVAL, "Luttinger masses: no direction given");
    double l = sqrt(n[0] * n[0] + n[1] * n[1] + n[2] * n[2]);
    if (!isfinite(l) || l < 1e-12)
        return bm_fail(err, BM_EINVAL, "Luttinger masses: direction [%g, %g, %g] is zero "
                       "or not finite", n[0], n[1], n[2]);
    double r = warp_root(L, n[0] / l, n[1] / l, n[2] / l);
    double fh = L->g1 - r, fl = L->g1 + r;
    if (m_heavy)
        *m_heavy = inv_or_inf(fh, L->g1);
    if (m_light)
        *m_light = inv_or_inf(fl, L->g1);
    if (concave)
        *concave = !(fh > 1e-12 * L->g1);
    return BM_OK;
}

/* Density-of-states mass of a warped band.
 * With hole energy E(k) = (hbar^2 k^2 / 2 m_e) f(n) along unit direction n,
 * the constant-energy surface is k(n) = (2 m_e E / hbar^2)^(1/2) f(n)^(-1/2).
 * The k-volume it encloses is
 *     V(E) = int dOmega int_0^k(n) k^2 dk = (1/3) int dOmega k(n)^3
 *          = (4 pi / 3) (2 m_e E / hbar^2)^(3/2) < f^(-3/2) >,
 * with < . > the mean over the unit sphere. A parabolic band of mass m_d has
 * V(E) = (4 pi / 3) (2 m_d E / hbar^2)^(3/2); equal state counts at every E
 * give  (m_d / m_e)^(3/2) = < f^(-3/2) >.  For g2 = g3 the factor is constant
 * and m_d is the directional mass (a check the tests make).
 * Quadrature: f depends on squares of the components only, so one octant
 * suffices: u = cos(theta) in [0, 1] by Gauss-Legendre (GSL glfixed), phi in
 * [0, pi/2) by the midpoint rule, which is spectrally accurate because the
 * integrand is smooth and periodic in phi with period pi/2. */
bm_status bm_octant_means(void (*f)(const double n[3], void *ctx, double *vals), void *ctx,
                          size_t nvals, size_t nu, double *means, bm_errbuf *err)
{
    if (nvals == 0 || nvals > BM_OCTANT_MAX_VALUES || nu == 0)
        return bm_fail(err, BM_EINVAL, "octant means: %zu values, %zu nodes", nvals, nu);
    gsl_integration_glfixed_table *t = gsl_integration_glfixed_table_alloc(nu);
    if (!t)
        return bm_fail(err, BM_ENOMEM, "octant means: quadrature table allocation failed");
    size_t nphi = 2 * nu;
    double vals[BM_OCTANT_MAX_VALUES], row[BM_OCTANT_MAX_VALUES];
    for (size_t v = 0; v < nvals; v++)
        means[v] = 0.0;
    for (size_t i = 0; i < nu; i++) {
        double u, wu;
        if (gsl_integration_glfixed_point(0.0, 1.0, i, &u, &wu, t) != 0) {
            gsl_integration_glfixed_table_free(t);
            return bm_fail(err, BM_EINTERNAL, "octant means: quadrature node %zu failed", i);
        }
        double st = sqrt(fmax(0.0, 1.0 - u * u));
        for (size_t v = 0; v < nvals; v++)
            row[v] = 0.0;
        for (size_t j = 0; j < nphi; j++) {
            double phi = (j + 0.5) * (M_PI / 2.0) / (double)nphi;
            double n[3] = { st * cos(phi), st * sin(phi), u };
            f(n, ctx, vals);
            for (size_t v = 0; v < nvals; v++)
                row[v] += vals[v];
        }
        for (size_t v = 0; v < nvals; v++)
            means[v] += wu * row[v] / (double)nphi;   /* weights over [0, 1] sum to 1 */
    }
    gsl_integration_glfixed_table_free(t);
    return BM_OK;
}

/* The heavy and light integrands f^(-3/2) (an open heavy surface adds 0). */
static void luttinger_integrand(const double n[3], void *ctx, double *vals)
{
    const bm_luttinger *L = ctx;
    double r = warp_root(L, n[0], n[1], n[2]);
    double fh = L->g1 - r;
    vals[0] = fh > 0.0 ? pow(fh, -1.5) : 0.0;
    vals[1] = pow(L->g1 + r, -1.5);
}

static bm_status warped_means(const bm_luttinger *L, size_t nu, double *heavy, double *light,
                              bm_errbuf *err)
{
    double m[2] = { NAN, NAN };
    bm_status st = bm_octant_means(luttinger_integrand, (void *)L, 2, nu, m, err);
    *heavy = m[0];
    *light = m[1];
    return st;
}

bm_status bm_luttinger_masses_compute(const bm_luttinger *L, bm_luttinger_masses *out,
                                      bm_errbuf *err)
{
    bm_status st = check_luttinger(L, err);
    if (st != BM_OK)
        return st;
    if (!out)
        return bm_fail(err, BM_EINVAL, "Luttinger masses: no output given");
    memset(out, 0, sizeof *out);

    static const double dirs[3][3] = {{1, 0, 0}, {1, 1, 0}, {1, 1, 1}};
    static const char *names[3] = {"[100]", "[110]", "[111]"};
    for (int d = 0; d < 3; d++) {
        int conc = 0;
        st = bm_luttinger_direction(L, dirs[d], &out->heavy[d], &out->light[d], &conc, err);
        if (st != BM_OK)
            return st;
        if (conc)
            bm_warn(&out->warnings, BM_WARN_NOT_A_MAXIMUM, "heavy-hole band is not a maximum along %s "
                    "(1/m = %g 1/m_e)", names[d],
                    isinf(out->heavy[d]) ? 0.0 : 1.0 / out->heavy[d]);
    }
    /* The root is largest at s = 0 or s = 1/3 (it is monotone in s), so the
     * smallest heavy factor is g1 - 2 max(|g2|, |g3|). */
    out->heavy_factor_min = L->g1 - 2.0 * fmax(fabs(L->g2), fabs(L->g3));
    out->heavy_convex = out->heavy_factor_min > 1e-12 * L->g1;

    /* In an open heavy-hole surface the heavy sums are meaningless and are
     * discarded below; the light-hole ones are always finite (g1 > 0). */
    double mheavy_c = 0.0, mheavy_f = 0.0, mlight_c = 0.0, mlight_f = 0.0;
    size_t nu = 16;
    st = warped_means(L, nu, &mheavy_c, &mlight_c, err);
    /* Double the rule until the means settle (strong warping with small
     * gamma2 or a nearly flat heavy band converges more slowly). */
    while (st == BM_OK) {
        nu *= 2;
        st = warped_means(L, nu, &mheavy_f, &mlight_f, err);
        if (st != BM_OK)
            break;
        double ch = fabs(mlight_f - mlight_c) / mlight_f;
        if (out->heavy_convex)
            ch = fmax(ch, fabs(mheavy_f - mheavy_c) / mheavy_f);
        if (ch < 1e-12 || nu >= 512)
            break;
        mheavy_c = mheavy_f;
        mlight_c = mlight_f;
    }
    if (st != BM_OK)
        return st;
    out->light_dos_mass = pow(mlight_f, 2.0 / 3.0);
    double change = fabs(mlight_f - mlight_c) / mlight_f;
    if (out->heavy_convex) {
        out->heavy_dos_mass = pow(mheavy_f, 2.0 / 3.0);
        out->combined_dos_mass = pow(mheavy_f + mlight_f, 2.0 / 3.0);
        change = fmax(change, fabs(mheavy_f - mheavy_c) / mheavy_f);
    } else {
        out->heavy_dos_mass = INFINITY;
        out->combined_dos_mass = INFINITY;
        bm_warn(&out->warnings, BM_WARN_OPEN_SURFACE,
                "heavy-hole surface is open (gamma1 - 2 max(|gamma2|, |gamma3|) = %g <= 0): "
                "no finite heavy-hole density-of-states mass", out->heavy_factor_min);
    }
    out->quadrature_change = change;
    if (change > 1e-8)
        bm_warn(&out->warnings, BM_WARN_QUADRATURE_INACCURATE, "warped-surface quadrature converged only to %.1e relative "
                "(strong warping)", change);
    if (out->heavy_convex) {
        warn_range(&out->warnings, "heavy-hole DOS mass", out->heavy_dos_mass);
        if (out->heavy_factor_min < 0.05 * L->g1)
            bm_warn(&out->warnings, BM_WARN_FLAT_DIRECTION, "heavy-hole band is nearly flat in some direction "
                    "(smallest 1/m = %g 1/m_e)", out->heavy_factor_min);
    }
    warn_range(&out->warnings, "light-hole DOS mass", out->light_dos_mass);
    return BM_OK;
}

bm_status bm_band_edge_hole_dos_mass(const bm_luttinger *L, double m_so, double delta_so_ev,
                                     double t_k, double *mass, bm_warnings *w,
                                     bm_errbuf *err)
{
    if (!mass)
        return bm_fail(err, BM_EINVAL, "band-edge hole DOS mass: no place for the result");
    *mass = NAN;
    bm_luttinger_masses lm;
    bm_status st = bm_luttinger_masses_compute(L, &lm, err);
    if (st != BM_OK)
        return st;
    for (size_t i = 0; w && i < lm.warnings.count; i++)
        bm_warn(w, lm.warnings.items[i].code, "%s", lm.warnings.items[i].text);
    bm_warnings_clear(&lm.warnings);
    if (!lm.heavy_convex)
        return bm_fail(err, BM_EINVAL, "band-edge hole DOS mass: the heavy-hole surface is "
                       "open (gamma1 - 2 max(|gamma2|, |gamma3|) = %g <= 0)",
                       lm.heavy_factor_min);
    if (!(m_so >= 0.0) || !isfinite(m_so))
        return bm_fail(err, BM_EINVAL, "band-edge hole DOS mass: split-off mass %g m_e must "
                       "be positive (or 0 to leave it out)", m_so);
    double tot = pow(lm.heavy_dos_mass, 1.5) + pow(lm.light_dos_mass, 1.5);
    if (m_so > 0.0) {
        if (!(delta_so_ev >= 0.0) || !isfinite(delta_so_ev))
            return bm_fail(err, BM_EINVAL, "band-edge hole DOS mass: split-off energy %g eV "
                           "must be zero or positive", delta_so_ev);
        if (!(t_k > 0.0) || !isfinite(t_k))
            return bm_fail(err, BM_EINVAL, "band-edge hole DOS mass: temperature %g K: the "
                           "split-off population needs T > 0", t_k);
        tot += pow(m_so, 1.5) * exp(-delta_so_ev / (BM_KB_EV * t_k));
    }
    *mass = pow(tot, 2.0 / 3.0);
    return BM_OK;
}
