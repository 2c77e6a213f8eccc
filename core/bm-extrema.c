/* bm-extrema.c: band extrema on a periodic mesh or in a scattered k-table, refined
 * below the mesh spacing, with inertial mass tensors, classification and warnings. */
#include "bm-extrema.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <stdio.h>
#include <string.h>

#include "bm-bandfit.h"
#include "bm-crystal.h"
#include "bm-linalg.h"
#include "bm-quadric.h"
#include "bm-spectral.h"
#include "bm-units.h"

#define DEFAULT_DEGENERACY_TOL_EV 1e-3
/* |1/m| below this (|m| above 1e4 m_e) counts as vanishing curvature. */
#define FLAT_INV_MASS 1e-4
#define MASS_MIN 0.01
#define MASS_MAX 10.0
/* Weighted fit residual above this fraction of the fitted energy range
 * flags a non-parabolic band within the fit radius. */
#define NONPARABOLIC_REL 0.02
/* table fits: the automatic window grows by this factor while the terms
 * beyond quadratic stay below significance at this level */
#define WINDOW_GROWTH 1.25
#define BEYOND_LEVEL 0.01
/* E(2s) - E0 over E(s) - E0 is 4 for a parabola and 2 for a cone; a mean over
 * the sampled directions below this flags a conical point. */
#define CONE_RATIO 2.5
/* The domain of the inputs: band energies in eV and k in 1/Angstrom far
 * beyond any crystal's (and far inside the range where the interpolant's
 * sums stay finite). */
#define BM_ENERGY_MAX_EV 1e6
#define BM_K_MAX_INV_A 1e3
#define NEWTON_MAX_ITER 50
#define DEFAULT_CONVERGENCE_TOL 0.02
/* A neighbouring band closer than this part of the band's own energy range
 * near the extremum counts as crossing it: sorted bands have kinks there,
 * and an interpolant of the band alone rings at them. */
#define CROSSING_GAP_REL 0.25
/* Where to look for that neighbour, in mesh steps: as far as the search's
 * interpolant reaches (BM_LOCAL_POINTS / 2 on fine axes, from a point
 * anywhere in its cell), so no kink it rings at goes unseen.  At 3.5 the
 * silicon minimum on a 48^3 mesh, 3.75 steps from the crossing at X, was
 * fitted across the kink: m_l 0.931 +- 0.076. */
#define PARTNER_RADIUS_STEPS (0.5 * BM_LOCAL_POINTS + 0.5)

static const char *kind_name(bm_extremum_kind k)
{
    return k == BM_EXTREMUM_MINIMUM ? "minimum" : k == BM_EXTREMUM_MAXIMUM ? "maximum"
         : k == BM_EXTREMUM_SADDLE ? "saddle point" : "non-stationary point";
}

/* ---------------------------------------------------------------- tensor */

/* A cleared result: no partner band, errors not assessed. */
static void tensor_init(bm_mass_tensor *t, int dims, bm_tensor_method method)
{
    memset(t, 0, sizeof *t);
    t->dims = dims;
    t->method = method;
    t->partner_band = -1;
    t->k_error = NAN;
    t->sample_spacing = NAN;
    t->converged = -1;
    for (int m = 0; m < 3; m++)
        t->mass_errors[m] = t->mass_stderr[m] = NAN;
    t->window.beyond_p = t->window.noise_ev = NAN;
}

/* Fills inv_mass, masses, axes, kind and divergent from the Cartesian Hessian
 * hk (eV A^2) restricted to the span of the first dims rows of the orthonormal
 * basis p. Masses are ordered by increasing |m|; unsampled directions get NAN
 * masses and the remaining basis rows as axes. */
static int finish_tensor(bm_mass_tensor *t, double hk[3][3], double p[3][3],
                         int dims, bm_extremum_kind hint)
{
    double hp[3][3] = { { 0 } };
    for (int a = 0; a < dims; a++)
        for (int b = 0; b < dims; b++) {
            double s = 0.0;
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++)
                    s += p[a][i] * hk[i][j] * p[b][j];
            hp[a][b] = s;
        }
    double ev[3], vec[3][3];
    if (bm_symeig(hp, dims, ev, vec) != 0)
        return -1;
    /* order by decreasing |curvature| = increasing |mass| */
    int order[3] = { 0, 1, 2 };
    for (int a = 0; a < dims; a++)
        for (int b = a + 1; b < dims; b++)
            if (fabs(ev[order[b]]) > fabs(ev[order[a]])) {
                int tmp = order[a];
                order[a] = order[b];
                order[b] = tmp;
            }
    memset(t->inv_mass, 0, sizeof t->inv_mass);
    int npos = 0, nneg = 0, nflat = 0;
    for (int m = 0; m < dims; m++) {
        int o = order[m];
        double inv = ev[o] / BM_HBAR2_OVER_ME_EV_A2;
        for (int c = 0; c < 3; c++) {
            double s = 0.0;
            for (int a = 0; a < dims; a++)
                s += vec[o][a] * p[a][c];
            t->axes[m][c] = s;
        }
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                t->inv_mass[i][j] += inv * t->axes[m][i] * t->axes[m][j];
        if (fabs(inv) < FLAT_INV_MASS) {
            t->masses[m] = INFINITY;
            nflat++;
            t->divergent = 1;
            bm_warn(&t->warnings, BM_WARN_FLAT_DIRECTION, "near-zero curvature along (%.4f, %.4f, %.4f): "
                    "|1/m| = %.3g 1/m_e is below %.0e, the band is flat there; mass reported as infinite",
                    t->axes[m][0], t->axes[m][1], t->axes[m][2], fabs(inv), FLAT_INV_MASS);
        } else {
            t->masses[m] = 1.0 / inv;
            if (inv > 0)
                npos++;
            else
                nneg++;
        }
    }
    for (int m = dims; m < 3; m++) {
        t->masses[m] = NAN;
        memcpy(t->axes[m], p[m], sizeof t->axes[m]);
    }
    if (npos && nneg) {
        t->kind = BM_EXTREMUM_SADDLE;
        bm_warn(&t->warnings, BM_WARN_SADDLE_POINT, "saddle point: the curvature changes sign (%d positive, %d negative "
                "principal masses), so this is not a band extremum", npos, nneg);
    } else if (npos) {
        t->kind = BM_EXTREMUM_MINIMUM;
    } else if (nneg) {
        t->kind = BM_EXTREMUM_MAXIMUM;
    } else {
        t->kind = hint;
    }
    (void)nflat;
    return 0;
}

static void range_warnings(bm_mass_tensor *t)
{
    for (int m = 0; m < t->dims; m++) {
        double am = fabs(t->masses[m]);
        if (isfinite(am) && (am < MASS_MIN || am > MASS_MAX))
            bm_warn(&t->warnings, BM_WARN_MASS_OUT_OF_RANGE, "principal mass %d is %.4g m_e, outside the usual range "
                    "%.2g..%.3g m_e", m + 1, t->masses[m], MASS_MIN, MASS_MAX);
    }
}

static void mark_conical(bm_mass_tensor *t, double ratio, double slope)
{
    t->divergent = 1;
    for (int m = 0; m < t->dims; m++)
        t->masses[m] = NAN;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            t->inv_mass[i][j] = NAN;
    bm_warn(&t->warnings, BM_WARN_CONICAL_POINT, "conical point: E - E0 grows linearly with |k - k0| (ratio %.2f "
            "on doubling the distance, 4 for a parabola; slope about %.3g eV Angstrom); "
            "no finite inertial mass", ratio, slope);
}

/* At a point where other bands touch this one, a sorted band is not smooth
 * and its Hessian means nothing (a degenerate valence top would come out as a
 * "saddle" with positive masses): no tensor, and the kind the search found. */
/* Removes t's warnings with that code (they spoke of a tensor now withdrawn). */
static void drop_warnings(bm_mass_tensor *t, bm_warn_code code)
{
    size_t keep = 0;
    for (size_t i = 0; i < t->warnings.count; i++) {
        if (t->warnings.items[i].code == code) {
            free(t->warnings.items[i].text);
            continue;
        }
        t->warnings.items[keep++] = t->warnings.items[i];
    }
    t->warnings.count = keep;
}

static void mark_degenerate(bm_mass_tensor *t, bm_extremum_kind hint, int touching)
{
    static const bm_warn_code withdrawn[] = {
        BM_WARN_SADDLE_POINT, BM_WARN_FLAT_DIRECTION, BM_WARN_CONICAL_POINT,
        BM_WARN_MASS_OUT_OF_RANGE, BM_WARN_NOT_CONVERGED, BM_WARN_KIND_UNCERTAIN,
        BM_WARN_NO_ERROR_ESTIMATE,
    };
    for (size_t i = 0; i < sizeof withdrawn / sizeof withdrawn[0]; i++)
        drop_warnings(t, withdrawn[i]);
    t->divergent = 0;
    t->degenerate = 1;
    t->kind = hint;
    t->converged = 0;
    t->k_error = NAN;
    for (int m = 0; m < 3; m++) {
        t->masses[m] = NAN;
        t->mass_errors[m] = NAN;
        for (int j = 0; j < 3; j++)
            t->inv_mass[m][j] = NAN;
    }
    bm_warn(&t->warnings, BM_WARN_DEGENERATE_EXTREMUM, "degenerate %s: %d other band%s touch%s "
            "this one here, so one sorted band has no mass tensor (none is given); the "
            "directional masses of the touching bands need a k.p fit (hole-mass with Luttinger "
            "parameters, or DFT energies along [100], [110] and [111] fitted as k-tables; "
            "if a touching band is the other spin channel of a collinear calculation, give "
            "the grid 'spin_channels': 2)",
            kind_name(hint), touching, touching == 1 ? "" : "s", touching == 1 ? "es" : "");
}

/* The k.p fit of the bands that touch at a degenerate extremum: on lines of
 * mesh points through it where it is a mesh point (lines, or NULL), else on
 * the points k ([n][3], relative to it) with energies [nb][n] of the
 * touching bands in ascending order. On success the degeneracy warning
 * points to the fit and an unconverged fit says what would converge it. */
static void degenerate_kp(bm_mass_tensor *t, const bm_kp_lines *lines, const double *k,
                          const double *e, size_t n, double radius, const size_t *group,
                          size_t nb, double tol, const char *frame_note)
{
    bm_kp_data d = { .npoints = n, .k = k, .nbands = nb, .energies = e, .radius = radius };
    bm_errbuf err;
    bm_status s = BM_EINVAL;
    if (lines) {
        s = bm_kp_fit_lines(lines, &t->kp, &err);
        if (s != BM_OK)
            bm_warnings_clear(&t->kp.warnings);
    }
    int on_lines = s == BM_OK;
    if (s == BM_EINVAL && n)
        s = bm_kp_fit_bands(&d, &t->kp, &err);
    if (s != BM_OK) {
        bm_warnings_clear(&t->kp.warnings);
        memset(&t->kp, 0, sizeof t->kp);
        bm_warn(&t->warnings, BM_WARN_FIT_UNDETERMINED, "no k.p fit of the %zu touching "
                "bands: %s", nb, err.message);
        return;
    }
    t->kp.nbands = nb;
    memcpy(t->kp.band_index, group, nb * sizeof *group);
    for (size_t i = 0; i < t->kp.warnings.count; i++)
        bm_warn(&t->warnings, t->kp.warnings.items[i].code, "%s", t->kp.warnings.items[i].text);
    drop_warnings(t, BM_WARN_DEGENERATE_EXTREMUM);
    bm_warn(&t->warnings, BM_WARN_DEGENERATE_EXTREMUM, "degenerate %s: %zu bands touch here, "
            "so one sorted band has no mass tensor (none is given); their masses come from "
            "the %s k.p fit of the %zu bands (degenerate_kp_fit)%s",
            kind_name(t->kind), nb == 6 ? (size_t)4 : nb, t->kp.model == BM_KP_THREEFOLD
            ? "threefold (no spin-orbit coupling)" : t->kp.model == BM_KP_FOURFOLD
            ? "fourfold (Luttinger)" : "sixfold (spin-orbit coupling, the split-off pair "
            "beside them included)", nb, frame_note);
    if (t->kp.rel_error <= tol)
        return;
    char how[160];
    if (on_lines)
        snprintf(how, sizeof how, "curvatures of %zu lines of mesh points, out to %.3g "
                 "1/Angstrom, extrapolated to the point, against one order lower",
                 lines->nlines, t->kp.radius);
    else
        snprintf(how, sizeof how, "the fit over %zu points within %.3g 1/Angstrom against an "
                 "independent fit", t->kp.npoints, t->kp.radius);
    bm_warn(&t->warnings, BM_WARN_NOT_CONVERGED, "the k.p fit of the degenerate bands "
            "is not converged: its directional masses are uncertain by up to %.3g %% "
            "(tolerance %.3g %%; %s); a finer mesh, or the directional refinement stencil "
            "(stencil: true) computed with the band code and fitted as a k-table, "
            "converges them", 100.0 * t->kp.rel_error, 100.0 * tol, how);
}

static void nonparabolic_check(bm_mass_tensor *t, const bm_quadric *q, double span, double radius)
{
    if (span > 0.0 && q->rms > NONPARABOLIC_REL * span)
        bm_warn(&t->warnings, BM_WARN_NON_PARABOLIC, "non-parabolic band: quadratic fit residual %.3g eV is %.1f%% "
                "of the energy range %.3g eV within %.3g 1/Angstrom",
                q->rms, 100.0 * q->rms / span, span, radius);
}

static int check_options(const bm_fit_options *opt, bm_search which, const double *k_at,
                         double *radius, double *degen, double *conv, bm_errbuf *err)
{
    *radius = 0.0;
    *degen = DEFAULT_DEGENERACY_TOL_EV;
    *conv = DEFAULT_CONVERGENCE_TOL;
    if (which != BM_SEARCH_MINIMUM && which != BM_SEARCH_MAXIMUM && which != BM_SEARCH_ALL)
        return bm_fail(err, BM_EINVAL, "search mode %d is not one of minimum, maximum, all", (int)which);
    if (opt) {
        if (!isfinite(opt->fit_radius_inv_angstrom) || opt->fit_radius_inv_angstrom < 0.0)
            return bm_fail(err, BM_EINVAL, "fit radius %g 1/Angstrom must be finite and >= 0 (0: automatic)",
                           opt->fit_radius_inv_angstrom);
        if (!isfinite(opt->degeneracy_tol_ev) || opt->degeneracy_tol_ev < 0.0)
            return bm_fail(err, BM_EINVAL, "degeneracy tolerance %g eV must be finite and >= 0 (0: 1 meV)",
                           opt->degeneracy_tol_ev);
        if (!isfinite(opt->convergence_tol) || opt->convergence_tol < 0.0)
            return bm_fail(err, BM_EINVAL, "convergence tolerance %g must be finite and >= 0 "
                           "(0: 0.02)", opt->convergence_tol);
        *radius = opt->fit_radius_inv_angstrom;
        if (opt->degeneracy_tol_ev > 0.0)
            *degen = opt->degeneracy_tol_ev;
        if (opt->convergence_tol > 0.0)
            *conv = opt->convergence_tol;
    }
    for (int c = 0; k_at && c < 3; c++) {
        if (!isfinite(k_at[c]))
            return bm_fail(err, BM_EINVAL, "evaluation point k[%d] = %g is not finite", c, k_at[c]);
        if (fabs(k_at[c]) > BM_K_MAX_INV_A)
            return bm_fail(err, BM_EINVAL, "evaluation point k[%d] = %g 1/Angstrom is outside "
                           "the domain |k_i| <= 1e3 1/Angstrom (a few hundred reciprocal-lattice "
                           "vectors at most)", c, k_at[c]);
    }
    return BM_OK;
}

/* ------------------------------------------------------------------ grid */

static bm_status grid_geometry(const bm_grid *g, bm_errbuf *err)
{
    if (!g)
        return bm_fail(err, BM_EINVAL, "grid is NULL");
    static const char *const nn[3] = { "n1", "n2", "n3" };
    for (int a = 0; a < 3; a++)
        if (g->mesh[a] == 0)
            return bm_fail(err, BM_EINVAL, "mesh size %s is 0; every mesh size must be >= 1 (n3 = 1 for a sheet)", nn[a]);
    if (g->nbands == 0)
        return bm_fail(err, BM_EINVAL, "grid has no bands (nbands = 0)");
    if (!g->energies)
        return bm_fail(err, BM_EINVAL, "grid energies are NULL");
    size_t npt = g->mesh[0];
    if (g->mesh[1] > SIZE_MAX / npt)
        return bm_fail(err, BM_EINVAL, "mesh %zu x %zu x %zu is too large", g->mesh[0], g->mesh[1], g->mesh[2]);
    npt *= g->mesh[1];
    if (g->mesh[2] > SIZE_MAX / npt || g->nbands > SIZE_MAX / sizeof(double) / (npt * g->mesh[2]))
        return bm_fail(err, BM_EINVAL, "mesh %zu x %zu x %zu with %zu bands is too large",
                       g->mesh[0], g->mesh[1], g->mesh[2], g->nbands);
    for (int a = 0; a < 3; a++)
        for (int c = 0; c < 3; c++)
            if (!isfinite(g->recip[a][c]))
                return bm_fail(err, BM_EINVAL, "reciprocal vector b%d component %d is not finite", a + 1, c);
    /* the domain of a crystal: lattice periods from about 6 mA to 6 um
     * (|b| from 1e-4 to 1e3 1/A); beyond it a value is a unit mistake, and
     * fit radii and stencil reaches computed from it overflow */
    for (int a = 0; a < 3; a++) {
        double l = bm_norm3(g->recip[a]);
        if (l > 1e3 || (g->mesh[a] > 1 && l < 1e-4))
            return bm_fail(err, BM_EINVAL, "reciprocal vector b%d has length %g 1/Angstrom, "
                           "outside the domain 1e-4 to 1e3 1/Angstrom (lattice periods of 6 mA "
                           "to 6 um; a unit mistake?)", a + 1, l);
    }
    if (g->channel_bands && g->nbands % g->channel_bands != 0)
        return bm_fail(err, BM_EINVAL, "%zu bands do not split into spin channels of %zu",
                       g->nbands, g->channel_bands);
    for (int a = 0; a < 3; a++)
        if (!(g->offset[a] >= 0.0 && g->offset[a] < 1.0))
            return bm_fail(err, BM_EINVAL, "mesh offset o%d = %g steps: expected 0 <= o < 1", a + 1,
                           g->offset[a]);
    double b[3][3];
    memcpy(b, g->recip, sizeof b);
    if (g->mesh[2] == 1) {
        double cr[3];
        bm_cross3(b[0], b[1], cr);
        if (!(bm_norm3(cr) > 1e-12 * bm_norm3(b[0]) * bm_norm3(b[1])))
            return bm_fail(err, BM_EINVAL, "reciprocal vectors b1 and b2 are parallel or zero "
                           "(|b1 x b2| = %g 1/Angstrom^2): the sheet has no area", bm_norm3(cr));
    } else {
        double inv[3][3];
        if (bm_inv3(b, inv) != 0)
            return bm_fail(err, BM_EINVAL, "reciprocal vectors b1, b2, b3 are singular "
                           "(det = %g 1/Angstrom^3)", bm_det3(b));
    }
    return BM_OK;
}

static bm_status band_finite(const bm_grid *g, size_t band, bm_errbuf *err)
{
    size_t n1 = g->mesh[0], n2 = g->mesh[1], n3 = g->mesh[2];
    size_t npt = n1 * n2 * n3;
    const double *e = g->energies + band * npt;
    /* x - x is 0 for finite x and NaN otherwise: a branch-free pass that
     * vectorises; the slow search for the culprit runs only on failure. */
    double acc[4] = { 0.0, 0.0, 0.0, 0.0 };   /* independent chains pipeline */
    long over[4] = { 0, 0, 0, 0 };            /* and the domain, by comparisons */
    size_t p4 = npt - npt % 4;
    for (size_t p = 0; p < p4; p += 4)
        for (int u = 0; u < 4; u++) {
            acc[u] += e[p + u] - e[p + u];
            over[u] += fabs(e[p + u]) > BM_ENERGY_MAX_EV;
        }
    for (size_t p = p4; p < npt; p++) {
        acc[0] += e[p] - e[p];
        over[0] += fabs(e[p]) > BM_ENERGY_MAX_EV;
    }
    if (acc[0] + acc[1] + acc[2] + acc[3] == 0.0 && !(over[0] + over[1] + over[2] + over[3]))
        return BM_OK;
    for (size_t p = 0; p < npt; p++)
        if (!isfinite(e[p]) || fabs(e[p]) > BM_ENERGY_MAX_EV)
            return bm_fail(err, BM_EINVAL, "band %zu, mesh index (i, j, l) = (%zu, %zu, %zu): "
                           "energy %g %s", band, p / (n2 * n3), (p / n3) % n2, p % n3, e[p],
                           isfinite(e[p]) ? "eV is outside the domain |E| <= 1e6 eV (band "
                           "energies are eV; a unit mistake?)" : "is not finite");
    return BM_OK;
}

bm_status bm_grid_validate(const bm_grid *g, bm_errbuf *err)
{
    bm_status s = grid_geometry(g, err);
    for (size_t b = 0; s == BM_OK && b < g->nbands; b++)
        s = band_finite(g, b, err);
    return s;
}

typedef struct {
    const bm_grid *g;
    size_t band;
    size_t npt;
    int dims;
    double b[3][3];      /* rows b1 b2 and b3 (b3: unit normal for a sheet) */
    double binv[3][3];
    double p[3][3];      /* orthonormal basis: sampled directions first */
    double radius;       /* fit radius, 0 automatic */
    double degen;
    double conv;         /* convergence tolerance, relative */
    bm_interp *ip;
    bm_interp *ip_reduced;   /* the same without its top harmonics: error estimates */
} grid_ctx;

static void grid_eval(grid_ctx *c, size_t band, const double f[3], double *e, double g[3], double h[3][3])
{
    bm_interp_eval(c->ip, c->g->energies + band * c->npt, f, e, g, h);
}

static void grid_eval_with(grid_ctx *c, bm_interp *ip, const double f[3], double *e, double g[3],
                           double h[3][3])
{
    bm_interp_eval(ip, c->g->energies + c->band * c->npt, f, e, g, h);
}

/* Local quadric fit of the mesh data around fractional point f (for the
 * residual and non-parabolicity check). */
static void grid_fit(grid_ctx *c, const double f[3], const double k0[3], double e0, bm_mass_tensor *t)
{
    const size_t *n = c->g->mesh;
    int reach[3];
    for (int a = 0; a < 3; a++) {
        reach[a] = n[a] > 1 ? 1 : 0;
        if (c->radius > 0.0 && n[a] > 1) {
            double col = sqrt(c->binv[0][a] * c->binv[0][a] + c->binv[1][a] * c->binv[1][a]
                              + c->binv[2][a] * c->binv[2][a]);
            double r = ceil(c->radius * (double)n[a] * col);
            reach[a] = (int)fmin(fmax(r, 1.0), 6.0);
        }
        if (n[a] > 1 && 2 * reach[a] + 1 > (int)n[a])
            reach[a] = (int)(n[a] - 1) / 2;
    }
    size_t cap = (size_t)(2 * reach[0] + 1) * (size_t)(2 * reach[1] + 1) * (size_t)(2 * reach[2] + 1);
    double (*u)[3] = malloc(cap * sizeof *u);
    double *e = malloc(cap * sizeof *e), *w = malloc(cap * sizeof *w), *d = malloc(cap * sizeof *d);
    if (!u || !e || !w || !d)
        goto done;
    long cidx[3];
    for (int a = 0; a < 3; a++)
        cidx[a] = lround(f[a] * (double)n[a]);
    const double *band = c->g->energies + c->band * c->npt;
    size_t m = 0;
    double dmax = 0.0;
    for (int o0 = -reach[0]; o0 <= reach[0]; o0++)
        for (int o1 = -reach[1]; o1 <= reach[1]; o1++)
            for (int o2 = -reach[2]; o2 <= reach[2]; o2++) {
                long id[3] = { cidx[0] + o0, cidx[1] + o1, cidx[2] + o2 };
                double fp[3], kp[3] = { 0, 0, 0 }, dk[3];
                size_t wrapped[3];
                for (int a = 0; a < 3; a++) {
                    fp[a] = (double)id[a] / (double)n[a];
                    long r = id[a] % (long)n[a];
                    wrapped[a] = (size_t)(r < 0 ? r + (long)n[a] : r);
                }
                if (n[2] == 1)
                    fp[2] = 0.0;
                for (int i = 0; i < 3; i++)
                    kp[i] = fp[0] * c->b[0][i] + fp[1] * c->b[1][i] + fp[2] * c->b[2][i];
                for (int i = 0; i < 3; i++)
                    dk[i] = kp[i] - k0[i];
                double dist = bm_norm3(dk);
                if (c->radius > 0.0 && dist > c->radius)
                    continue;
                for (int a = 0; a < 3; a++)
                    u[m][a] = bm_dot3(c->p[a], dk);
                e[m] = band[(wrapped[0] * n[1] + wrapped[1]) * n[2] + wrapped[2]];
                d[m] = dist;
                dmax = fmax(dmax, dist);
                m++;
            }
    double span = 0.0;
    for (size_t q = 0; q < m; q++) {
        w[q] = exp(-(d[q] / dmax) * (d[q] / dmax));
        span = fmax(span, fabs(e[q] - e0));
    }
    bm_quadric qf;
    int rc = bm_quadric_fit(m, c->dims, (const double (*)[3])u, e, w, &qf);
    if (rc == 0) {
        t->fit_rms_ev = qf.rms;
        nonparabolic_check(t, &qf, span, dmax);
    } else {
        t->fit_rms_ev = NAN;
        bm_warn(&t->warnings, BM_WARN_FIT_UNDETERMINED, "local quadratic fit not determined: %zu mesh points within %.3g "
                "1/Angstrom give rank %zu of %zu parameters", m, dmax, qf.rank, qf.nparams);
    }
done:
    free(u);
    free(e);
    free(w);
    free(d);
}

/* Ratio (E(f+-2s) - E0) / (E(f+-s) - E0) along the sampled mesh axes
 * (through the interpolant, so s need not be a mesh step). */
static int grid_cone(grid_ctx *c, const double f[3], double e0, double *ratio, double *slope)
{
    double rsum = 0.0, ssum = 0.0;
    int count = 0;
    for (int a = 0; a < 3; a++) {
        if (c->g->mesh[a] == 1)
            continue;
        /* one mesh step, but never beyond an eighth of the cell: on a coarse
         * mesh the doubled step would reach round the zone (a cosine band on
         * a 4-point axis compared E at a quarter and a half of the period) */
        double step = fmin(1.0 / (double)c->g->mesh[a], 0.125);
        double de[3] = { 0, 0, 0 };
        for (int s = 1; s <= 2; s++)
            for (int sg = -1; sg <= 1; sg += 2) {
                double fp[3] = { f[0], f[1], f[2] }, e;
                fp[a] += sg * s * step;
                grid_eval(c, c->band, fp, &e, NULL, NULL);
                de[s] += 0.5 * (e - e0);
            }
        if (fabs(de[1]) <= 1e-9 * (1.0 + fabs(e0)))
            continue;
        rsum += de[2] / de[1];
        ssum += fabs(de[1]) / (step * bm_norm3(c->b[a]));
        count++;
    }
    if (!count)
        return 0;
    *ratio = rsum / count;
    *slope = ssum / count;
    return *ratio < CONE_RATIO;
}

/* The mass along the unit axis a of the Cartesian Hessian h (eV A^2). */
static double axis_mass(double h[3][3], const double a[3])
{
    double c = 0.0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            c += a[i] * h[i][j] * a[j];
    return BM_HBAR2_OVER_ME_EV_A2 / c;
}

/* +1 when every sampled curvature of h is positive, -1 when every one is
 * negative, 0 for mixed signs. */
static int curvature_sign(double h[3][3], double p[3][3], int dims)
{
    double hp[3][3] = { { 0 } }, ev[3], vec[3][3];
    for (int a = 0; a < dims; a++)
        for (int b = 0; b < dims; b++)
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++)
                    hp[a][b] += p[a][i] * h[i][j] * p[b][j];
    if (bm_symeig(hp, dims, ev, vec) != 0)
        return 0;
    int pos = 0, neg = 0;
    for (int a = 0; a < dims; a++) {
        pos += ev[a] > 0.0;
        neg += ev[a] < 0.0;
    }
    return pos == dims ? 1 : neg == dims ? -1 : 0;
}

/* Errors of t from independent estimates: the local fits that held, beside
 * t's own tensor (kc: t's unwrapped Cartesian point).  A mass's error is
 * widen times the spread (largest minus smallest) of its value along t's axis
 * over all of them, k's the largest distance between two positions; converged when every
 * error is within the tolerance, at least two estimates exist and all agree
 * on the kind. */
static void assess_in(double p[3][3], int dims, double conv, double widen,
                      const bm_bandfit *fits, int nfits, const double kc[3], bm_mass_tensor *t)
{
    double lo[3], hi[3];
    for (int m = 0; m < t->dims; m++)
        lo[m] = hi[m] = t->masses[m];
    int want = t->kind == BM_EXTREMUM_MINIMUM ? 1 : t->kind == BM_EXTREMUM_MAXIMUM ? -1 : 0;
    int agree = 0, held = 0;
    t->k_error = 0.0;
    for (int f = 0; f < nfits; f++) {
        if (!fits[f].ok)
            continue;
        held++;
        double h[3][3], dk[3];
        memcpy(h, fits[f].hessian, sizeof h);
        agree += curvature_sign(h, p, dims) == want;
        for (int m = 0; m < t->dims; m++) {
            double mm = axis_mass(h, t->axes[m]);
            lo[m] = fmin(lo[m], mm);
            hi[m] = fmax(hi[m], mm);
        }
        /* the spread of the positions: the largest distance between two of them */
        for (int i = 0; i < 3; i++)
            dk[i] = fits[f].k[i] - kc[i];
        t->k_error = fmax(t->k_error, bm_norm3(dk));
        for (int g2 = 0; g2 < f; g2++) {
            if (!fits[g2].ok)
                continue;
            for (int i = 0; i < 3; i++)
                dk[i] = fits[f].k[i] - fits[g2].k[i];
            t->k_error = fmax(t->k_error, bm_norm3(dk));
        }
    }
    t->nfits = held + (t->method != BM_METHOD_CROSSING_FIT);
    if (t->nfits < 2 || t->divergent) {
        t->converged = 0;
        t->k_error = NAN;
        bm_warn(&t->warnings, BM_WARN_NO_ERROR_ESTIMATE, "no error estimate: %s; a finer mesh or DFT energies at a "
                "refinement stencil around this point would give one",
                t->divergent ? "the mass is divergent here"
                : "too few points near this point for independent local fits");
        return;
    }
    int ok = want != 0 && agree == held;
    double worst = 0.0;
    for (int m = 0; m < t->dims; m++) {
        t->mass_errors[m] = widen * (hi[m] - lo[m]);
        if (!isfinite(t->mass_errors[m]) || !isfinite(t->masses[m])) {
            t->mass_errors[m] = NAN;
            ok = 0;
            continue;
        }
        double rel = t->mass_errors[m] / fabs(t->masses[m]);
        worst = fmax(worst, rel);
        if (rel > conv)
            ok = 0;
    }
    t->converged = ok;
    if (want != 0 && agree != held)
        bm_warn(&t->warnings, BM_WARN_KIND_UNCERTAIN, "the kind of this point is not certain: %d of %d independent "
                "local fits give a %s, the others do not (ringing or a nearby feature); a "
                "finer mesh or a refinement stencil would settle it", agree, held,
                kind_name(t->kind));
    else if (!ok)
        bm_warn(&t->warnings, BM_WARN_NOT_CONVERGED, "masses not converged: the estimated error reaches %.1f%% of "
                "a mass (tolerance %.1f%%); a finer mesh, or DFT energies at a refinement "
                "stencil around this point fitted as a k-table, would converge them",
                100.0 * worst, 100.0 * conv);
}

static void assess(grid_ctx *c, const bm_bandfit *fits, int nfits, const double kc[3],
                   bm_mass_tensor *t)
{
    assess_in(c->p, c->dims, c->conv, 1.0, fits, nfits, kc, t);
}

/* Fractional coordinates of the Cartesian k. */
static void to_fractional(grid_ctx *c, const double k[3], double f[3])
{
    for (int a = 0; a < 3; a++)
        f[a] = k[0] * c->binv[0][a] + k[1] * c->binv[1][a] + k[2] * c->binv[2][a];
    if (c->dims == 2)
        f[2] = 0.0;
}

/* Reports f as its image in the first Brillouin zone: the k - G of least
 * length (ties go to the first G tried, so equivalent inputs agree), with its
 * fractional coordinates, so that k = k_frac B holds and a valley on the far
 * side of the cell is not reported a reciprocal vector away. */
static void set_position(grid_ctx *c, const double f[3], bm_mass_tensor *t)
{
    double w[3];
    for (int a = 0; a < 3; a++) {
        /* f counts mesh indices; a shifted mesh's point 0 is not Gamma. Wrap
         * into [0, 1); a value a rounding error below 1 is the point 0 */
        double fa = f[a] + c->g->offset[a] / (double)c->g->mesh[a];
        w[a] = fa - floor(fa);
        if (1.0 - w[a] < 1e-9)
            w[a] = 0.0;
    }
    double best = INFINITY;
    int reach2 = c->dims == 2 ? 0 : 1;
    for (int n0 = -1; n0 <= 2; n0++)
        for (int n1 = -1; n1 <= 2; n1++)
            for (int n2 = -reach2; n2 <= 2 * reach2; n2++) {
                double fr[3] = { w[0] - n0, w[1] - n1, w[2] - n2 }, k[3];
                for (int i = 0; i < 3; i++)
                    k[i] = fr[0] * c->b[0][i] + fr[1] * c->b[1][i] + fr[2] * c->b[2][i];
                double len = bm_norm3(k);
                if (len < best * (1.0 - 1e-12)) {
                    best = len;
                    memcpy(t->k_frac, fr, sizeof fr);
                    memcpy(t->k, k, sizeof k);
                }
            }
}

/* The k.p line fit's data at mesh point base: the lines of mesh points
 * through it along the shortest mesh directions (up to 1.8 times the
 * shortest: [100], [110] and [111] on the cubic lattices), KP_LINE_POINTS
 * points each way, the two senses averaged. Returns the number of lines
 * (0: none fit on this mesh); the caller frees dir, step and en. */
#define KP_LINE_POINTS 3
#define KP_LINES_MAX 32
static size_t mesh_lines(const bm_grid *g, const long base[3], const size_t *group, size_t nb,
                         double **dir_out, double **step_out, double **en_out)
{
    const int P = KP_LINE_POINTS, R = 4;
    long cand[KP_LINES_MAX][3];
    double len[KP_LINES_MAX], shortest = INFINITY;
    size_t nc = 0;
    for (long i = -R; i <= R; i++)
        for (long j = -R; j <= R; j++)
            for (long l = -R; l <= R; l++) {
                long p[3] = { i, j, l };
                long first = i ? i : j ? j : l;
                long gcd = 0;
                for (int a = 0; a < 3; a++) {
                    long x = labs(p[a]), y = gcd;
                    while (y) {
                        long r = x % y;
                        x = y;
                        y = r;
                    }
                    gcd = x;
                }
                if (first <= 0 || gcd != 1)
                    continue;   /* one sense of each primitive direction */
                int distinct = 1;
                for (int a = 0; a < 3; a++)
                    distinct &= 2 * P * labs(p[a]) < (long)g->mesh[a];
                if (!distinct)
                    continue;   /* the line would wrap onto itself */
                double v[3] = { 0, 0, 0 };
                for (int a = 0; a < 3; a++)
                    for (int b = 0; b < 3; b++)
                        v[b] += (double)p[a] * g->recip[a][b] / (double)g->mesh[a];
                double n = bm_norm3(v);
                shortest = fmin(shortest, n);
                /* keep the shortest KP_LINES_MAX (replace the longest kept) */
                size_t at = nc;
                if (nc == KP_LINES_MAX) {
                    at = 0;
                    for (size_t q = 1; q < nc; q++)
                        if (len[q] > len[at])
                            at = q;
                    if (len[at] <= n)
                        continue;
                } else {
                    nc++;
                }
                memcpy(cand[at], p, sizeof p);
                len[at] = n;
            }
    size_t nl = 0;
    for (size_t q = 0; q < nc; q++)
        nl += len[q] <= 1.8 * shortest;
    double *dir = malloc(nl * 3 * sizeof *dir), *step = malloc(nl * sizeof *step);
    double *en = malloc(nb * nl * (size_t)(P + 1) * sizeof *en);
    if (!nl || !dir || !step || !en) {
        free(dir);
        free(step);
        free(en);
        return 0;
    }
    size_t line = 0;
    for (size_t q = 0; q < nc; q++) {
        if (len[q] > 1.8 * shortest)
            continue;
        for (int b = 0; b < 3; b++) {
            double v = 0.0;
            for (int a = 0; a < 3; a++)
                v += (double)cand[q][a] * g->recip[a][b] / (double)g->mesh[a];
            dir[3 * line + b] = v / len[q];
        }
        step[line] = len[q];
        for (int j = 0; j <= P; j++) {
            size_t lin[2];
            for (int sense = 0; sense < 2; sense++) {
                size_t w[3];
                for (int a = 0; a < 3; a++) {
                    long m = (long)g->mesh[a];
                    long x = base[a] + (sense ? -1 : 1) * j * cand[q][a];
                    w[a] = (size_t)(((x % m) + m) % m);
                }
                lin[sense] = (w[0] * g->mesh[1] + w[1]) * g->mesh[2] + w[2];
            }
            size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
            for (size_t b = 0; b < nb; b++)
                en[(b * nl + line) * (size_t)(P + 1) + (size_t)j]
                    = 0.5 * (g->energies[group[b] * npt + lin[0]]
                             + g->energies[group[b] * npt + lin[1]]);
        }
        line++;
    }
    *dir_out = dir;
    *step_out = step;
    *en_out = en;
    return nl;
}

/* Four touching bands with a Kramers pair beside them within SPLIT_OFF_MAX_EV
 * (below a maximum, above a minimum) take the pair in: the sixfold model
 * with spin-orbit coupling and the split-off band. e_at(b) is band b's
 * energy at the point (NAN where b may not join: another spin channel);
 * group is ascending. Returns the new band count. */
#define SPLIT_OFF_MAX_EV 1.0
static size_t with_split_off(size_t *group, size_t nb, const double *e_at, size_t nbands,
                             bm_extremum_kind kind, double degen)
{
    if (nb != 4 || (kind != BM_EXTREMUM_MAXIMUM && kind != BM_EXTREMUM_MINIMUM))
        return nb;
    int below = kind == BM_EXTREMUM_MAXIMUM;
    if (below ? group[0] < 2 : group[3] + 2 >= nbands)
        return nb;
    size_t p1 = below ? group[0] - 2 : group[3] + 1, p2 = p1 + 1;
    double e1 = e_at[p1], e2 = e_at[p2], edge = below ? e_at[group[0]] : e_at[group[3]];
    double gap = below ? edge - e2 : e1 - edge;
    if (!isfinite(e1) || !isfinite(e2) || fabs(e2 - e1) > degen || !(gap > degen)
        || gap > SPLIT_OFF_MAX_EV)
        return nb;
    if (below) {
        memmove(group + 2, group, 4 * sizeof *group);
        group[0] = p1, group[1] = p2;
    } else {
        group[4] = p1, group[5] = p2;
    }
    return 6;
}

/* The k.p fit at a degenerate point f (fractional) of a grid: the mesh
 * energies themselves (no interpolant: it is not smooth where bands touch)
 * of the touching bands within 2.6 of the longest mesh steps. */
static void grid_kp(grid_ctx *c, const double f[3], double e0, bm_mass_tensor *t)
{
    const bm_grid *g = c->g;
    size_t group[6], nb = 0;
    double *e_at = malloc(g->nbands * sizeof *e_at);
    if (!e_at)
        return;
    for (size_t b = 0; b < g->nbands; b++) {
        e_at[b] = NAN;
        if (bm_grid_same_channel(g, b, c->band))
            grid_eval(c, b, f, &e_at[b], NULL, NULL);
    }
    for (size_t b = 0; b < g->nbands && nb < 5; b++)
        if (isfinite(e_at[b]) && fabs(e_at[b] - e0) <= c->degen) {
            if (nb == 4)
                nb = 5;
            else
                group[nb++] = b;
        }
    nb = nb <= 4 ? with_split_off(group, nb, e_at, g->nbands, t->kind, c->degen) : nb;
    free(e_at);
    if (c->dims < 3 || nb < 3 || nb == 5 || nb > 6)
        return;
    if (!bm_kp_cubic_frame(g->recip)) {
        bm_warn(&t->warnings, BM_WARN_FIT_UNDETERMINED, "no k.p fit of the %zu touching bands: "
                "the Cartesian axes of this lattice are not cubic axes (the cubic models need "
                "them; give the lattice in a frame aligned with the cube)", nb);
        return;
    }
    double h = 0.0;
    for (int a = 0; a < 3; a++)
        h = fmax(h, bm_norm3(g->recip[a]) / (double)g->mesh[a]);
    /* the fit within 2.6 steps; the points out to 3.6 steps check it */
    double rfit = 2.6 * h, rmax = 3.6 * h;
    long base[3], span[3];
    for (int a = 0; a < 3; a++) {
        base[a] = lround(f[a] * (double)g->mesh[a] - g->offset[a]);
        /* mesh steps along axis a that can lie within rmax: |b_a|/n_a times
         * the steps is at least their distance over the cell's obliqueness */
        span[a] = (long)ceil(rmax * bm_norm3(c->binv[a]) * (double)g->mesh[a]) + 1;
    }
    size_t cap = (size_t)((2 * span[0] + 1) * (2 * span[1] + 1) * (2 * span[2] + 1));
    double *k = malloc(cap * 3 * sizeof *k), *en = malloc(cap * nb * sizeof *en);
    size_t n = 0;
    if (!k || !en)
        goto done;
    double kc[3];
    for (int a = 0; a < 3; a++)
        kc[a] = f[0] * g->recip[0][a] + f[1] * g->recip[1][a] + f[2] * g->recip[2][a];
    for (long i = base[0] - span[0]; i <= base[0] + span[0]; i++)
        for (long j = base[1] - span[1]; j <= base[1] + span[1]; j++)
            for (long l = base[2] - span[2]; l <= base[2] + span[2]; l++) {
                long idx[3] = { i, j, l };
                double fr[3], dk[3];
                size_t w[3];
                for (int a = 0; a < 3; a++) {
                    long m = (long)g->mesh[a];
                    fr[a] = ((double)idx[a] + g->offset[a]) / (double)m;
                    w[a] = (size_t)(((idx[a] % m) + m) % m);
                }
                for (int a = 0; a < 3; a++)
                    dk[a] = fr[0] * g->recip[0][a] + fr[1] * g->recip[1][a]
                          + fr[2] * g->recip[2][a] - kc[a];
                if (bm_norm3(dk) > rmax * (1.0 + 1e-9))
                    continue;
                size_t lin = (w[0] * g->mesh[1] + w[1]) * g->mesh[2] + w[2];
                memcpy(k + 3 * n, dk, sizeof dk);
                for (size_t q = 0; q < nb; q++)
                    en[q * cap + n] = g->energies[group[q] * c->npt + lin];
                n++;
            }
    /* compact the band rows to n points */
    for (size_t q = 1; q < nb; q++)
        memmove(en + q * n, en + q * cap, n * sizeof *en);
    /* on a mesh point (most degenerate extrema are: Gamma), lines of mesh
     * points through it extrapolate the curvatures to the point itself */
    int on_mesh = 1;
    for (int a = 0; a < 3; a++)
        on_mesh &= fabs(f[a] * (double)g->mesh[a] - g->offset[a] - (double)base[a]) < 1e-6;
    double *ldir = NULL, *lstep = NULL, *len = NULL;
    size_t nl = on_mesh ? mesh_lines(g, base, group, nb, &ldir, &lstep, &len) : 0;
    bm_kp_lines lines = { .nlines = nl, .dir = ldir, .step = lstep,
                          .npoints = KP_LINE_POINTS, .nbands = nb, .energies = len };
    degenerate_kp(t, nl ? &lines : NULL, k, en, n, rfit, group, nb, c->conv, "");
    free(ldir);
    free(lstep);
    free(len);
done:
    free(k);
    free(en);
}

/* Across a crossing: the mean of the local fits of the band and its partner. */
static int crossing_analyse(grid_ctx *c, const bm_bandfit *fits, int partner,
                            bm_extremum_kind hint, bm_mass_tensor *t)
{
    double k[3] = { 0, 0, 0 }, h[3][3] = { { 0 } }, e = 0.0, gap = 0.0;
    int held = 0;
    for (int f = 0; f < BM_BANDFIT_NSETTINGS; f++) {
        if (!fits[f].ok)
            continue;
        held++;
        e += fits[f].energy_ev;
        gap += fits[f].gap_ev;
        for (int i = 0; i < 3; i++) {
            k[i] += fits[f].k[i];
            for (int j = 0; j < 3; j++)
                h[i][j] += fits[f].hessian[i][j];
        }
    }
    for (int i = 0; i < 3; i++) {
        k[i] /= held;
        for (int j = 0; j < 3; j++)
            h[i][j] /= held;
    }
    e /= held;
    gap /= held;
    t->method = BM_METHOD_CROSSING_FIT;
    t->partner_band = partner;
    double f[3];
    to_fractional(c, k, f);
    set_position(c, f, t);
    t->energy_ev = e;
    if (finish_tensor(t, h, c->p, c->dims, hint) != 0)
        return -1;
    assess(c, fits, BM_BANDFIT_NSETTINGS, k, t);
    grid_fit(c, f, k, e, t);
    range_warnings(t);
    if (gap <= c->degen)
        bm_warn(&t->warnings, BM_WARN_DEGENERATE_BAND, "band %d lies %.3g meV from band %zu at this %s (E = %.6f eV; "
                "tolerance %.3g meV): the bands are degenerate here and the mass tensor is ill-defined",
                partner, 1e3 * gap, c->band, kind_name(t->kind), e, 1e3 * c->degen);
    return 0;
}

static int grid_analyse(grid_ctx *c, const double f_start[3], int refine,
                        bm_extremum_kind hint, bm_mass_tensor *t)
{
    tensor_init(t, c->dims, BM_METHOD_INTERPOLANT);
    const size_t *n = c->g->mesh;
    double f[3] = { f_start[0], f_start[1], f_start[2] };
    double e, gf[3], hf[3][3];
    /* Independent local fits around the start point: across a crossing with a
     * neighbouring band they give the tensor, elsewhere its error estimate. */
    bm_bandfit fits[BM_BANDFIT_NSETTINGS];
    double kstart[3];
    for (int i = 0; i < 3; i++)
        kstart[i] = f[0] * c->b[0][i] + f[1] * c->b[1][i] + f[2] * c->b[2][i];
    if (refine) {
        double gap, span;
        int partner = bm_bandfit_partner(c->g, c->band, f, kstart,
                                         PARTNER_RADIUS_STEPS * bm_bandfit_step(c->g),
                                         &gap, &span);
        if (partner >= 0 && !(gap < CROSSING_GAP_REL * span))
            partner = -1;
        if (partner >= 0) {
            int held = 0;
            for (int s = 0; s < BM_BANDFIT_NSETTINGS; s++) {
                if (bm_bandfit_run(c->g, c->band, partner, f, kstart, c->dims, c->p,
                                   &bm_bandfit_settings[s], &fits[s]) != 0)
                    return -1;
                held += fits[s].ok;
            }
            if (held >= 2)
                return crossing_analyse(c, fits, partner, hint, t);
            /* the pair closes (a degenerate or conical point): the band alone */
        }
    }
    if (refine) {
        int converged = 0, flat = 0;
        double last = 0.0;
        for (int it = 0; it < NEWTON_MAX_ITER && !converged; it++) {
            grid_eval(c, c->band, f, &e, gf, hf);
            if (c->dims == 2) {
                hf[2][2] = 1.0;
                hf[0][2] = hf[2][0] = hf[1][2] = hf[2][1] = 0.0;
                gf[2] = 0.0;
            }
            double hi[3][3];
            if (bm_inv3(hf, hi) != 0) {
                flat = 1;   /* vanishing curvature: stay where we are */
                break;
            }
            double df[3], big = 0.0;
            for (int a = 0; a < 3; a++) {
                df[a] = -(hi[a][0] * gf[0] + hi[a][1] * gf[1] + hi[a][2] * gf[2]);
                big = fmax(big, fabs(df[a]) * (double)n[a]);
            }
            double shrink = big > 1.0 ? 1.0 / big : 1.0;
            double away = 0.0;
            for (int a = 0; a < 3; a++) {
                f[a] += shrink * df[a];
                away = fmax(away, fabs(f[a] - f_start[a]) * (double)n[a]);
            }
            if (away > 2.0) {
                bm_warn(&t->warnings, BM_WARN_REFINEMENT_ESCAPED, "refinement left the neighbourhood of mesh point "
                        "(%.4f, %.4f, %.4f) (fractional); reported at the mesh point",
                        f_start[0], f_start[1], f_start[2]);
                memcpy(f, f_start, sizeof f);
                converged = 1;
                break;
            }
            /* The local stencil is re-centred at mesh nodes, so the fine-mesh
             * interpolant is only C0 there; steps then stall near 1e-9 of a
             * spacing instead of shrinking further (1e-10 Angstrom^-1 or less). */
            last = big;
            if (big < 1e-7)
                converged = 1;
        }
        if (!converged && !flat && last > 1e-4)
            bm_warn(&t->warnings, BM_WARN_REFINEMENT_NOT_CONVERGED, "refinement did not converge in %d Newton steps", NEWTON_MAX_ITER);
    }
    grid_eval(c, c->band, f, &e, gf, hf);
    if (c->dims == 2) {
        f[2] = 0.0;
        gf[2] = 0.0;
        hf[2][2] = hf[0][2] = hf[2][0] = hf[1][2] = hf[2][1] = 0.0;
    }
    set_position(c, f, t);
    t->energy_ev = e;
    /* the unwrapped Cartesian point: the local fits see the mesh around f */
    double kf[3];
    for (int i = 0; i < 3; i++)
        kf[i] = f[0] * c->b[0][i] + f[1] * c->b[1][i] + f[2] * c->b[2][i];
    /* Cartesian: g_k = B^-1 g_f, H_k = B^-1 H_f B^-T */
    double hk[3][3], tmp[3][3], binvt[3][3], gk[3];
    bm_matmul3(c->binv, hf, tmp);
    bm_transpose3(c->binv, binvt);
    bm_matmul3(tmp, binvt, hk);
    for (int i = 0; i < 3; i++)
        gk[i] = c->binv[i][0] * gf[0] + c->binv[i][1] * gf[1] + c->binv[i][2] * gf[2];
    if (finish_tensor(t, hk, c->p, c->dims, hint) != 0)
        return -1;
    if (!refine && bm_norm3(gk) > 1e-6)
        bm_warn(&t->warnings, BM_WARN_NOT_STATIONARY, "|dE/dk| = %.3g eV Angstrom at the given point: not a stationary "
                "point, the tensor is the local curvature there", bm_norm3(gk));
    grid_fit(c, f, kf, e, t);
    double ratio, slope;
    int conical = grid_cone(c, f, e, &ratio, &slope);
    if (conical)
        mark_conical(t, ratio, slope);
    else
        range_warnings(t);
    if (refine) {
        /* the reduced interpolant at the same point is the independent estimate */
        double er, gr[3], hr[3][3], hrk[3][3], tmp2[3][3];
        grid_eval_with(c, c->ip_reduced, f, &er, gr, hr);
        if (c->dims == 2)
            hr[2][2] = hr[0][2] = hr[2][0] = hr[1][2] = hr[2][1] = 0.0;
        bm_matmul3(c->binv, hr, tmp2);
        bm_matmul3(tmp2, binvt, hrk);
        fits[0].ok = 1;
        memcpy(fits[0].k, kf, sizeof fits[0].k);
        memcpy(fits[0].hessian, hrk, sizeof hrk);
        assess(c, fits, 1, kf, t);
        /* the kind needs a check that does not share the interpolant's
         * ringing: a local fit of the mesh data around the start point */
        bm_bandfit local;
        int want = t->kind == BM_EXTREMUM_MINIMUM ? 1 : t->kind == BM_EXTREMUM_MAXIMUM ? -1 : 0;
        if (bm_bandfit_run(c->g, c->band, -1, f_start, kstart, c->dims, c->p,
                           &bm_bandfit_settings[0], &local) == 0 && local.ok
            && curvature_sign(local.hessian, c->p, c->dims) != want) {
            t->converged = 0;
            bm_warn(&t->warnings, BM_WARN_KIND_UNCERTAIN, "the kind of this point is not "
                    "certain: a local fit of the mesh data around it does not give a %s "
                    "(ringing of the interpolant, or a nearby feature); a finer mesh or a "
                    "refinement stencil would settle it", kind_name(t->kind));
        }
    }
    /* a search that lands where bands touch has no single-band tensor */
    int touching = 0;
    for (size_t b = 0; b < c->g->nbands; b++) {
        double eb;
        grid_eval(c, b, f, &eb, NULL, NULL);
        touching += b != c->band && bm_grid_same_channel(c->g, b, c->band) && isfinite(eb)
                 && fabs(eb - e) <= c->degen;
    }
    /* a conical point is the more specific finding where two bands touch */
    if (touching && refine && !conical) {
        mark_degenerate(t, hint, touching);
        grid_kp(c, f, e, t);
    }
    for (size_t b = 0; touching && b < c->g->nbands; b++) {
        double eb;
        grid_eval(c, b, f, &eb, NULL, NULL);
        if (b != c->band && bm_grid_same_channel(c->g, b, c->band) && isfinite(eb)
            && fabs(eb - e) <= c->degen)
            bm_warn(&t->warnings, BM_WARN_DEGENERATE_BAND, "band %zu lies %.3g meV from band %zu at this %s (E = %.6f eV; "
                    "tolerance %.3g meV): the bands are degenerate here and the mass tensor is ill-defined",
                    b, 1e3 * fabs(eb - e), c->band, kind_name(t->kind), e, 1e3 * c->degen);
    }
    return 0;
}

/* Periodic neighbour scan: a point is a candidate minimum (maximum) when it
 * beats every mesh neighbour; equal energies are broken by the lower linear
 * index so a plateau yields one candidate. The six face neighbours are tested
 * first and the loop bails out as soon as both roles are ruled out. */
typedef struct {
    size_t p;
    int is_min;
} candidate;

static int grid_scan(const bm_grid *g, const double *band, candidate **list, size_t *count)
{
    size_t n1 = g->mesh[0], n2 = g->mesh[1], n3 = g->mesh[2];
    size_t cap = 64, cnt = 0;
    candidate *cl = malloc(cap * sizeof *cl);
    if (!cl)
        return -1;
    int use[3] = { n1 > 1, n2 > 1, n3 > 1 };
    for (size_t i = 0; i < n1; i++) {
        size_t ip = (i + 1) % n1, im = (i + n1 - 1) % n1;
        for (size_t j = 0; j < n2; j++) {
            size_t jp = (j + 1) % n2, jm = (j + n2 - 1) % n2;
            const double *row = band + (i * n2 + j) * n3;
            /* Along the row, a point where the band rises (or falls) on both
             * sides cannot be an extremum: one subtraction and one product per
             * point rule out almost all of them. Ties and tiny differences
             * pass on to the full test, so nothing is missed. */
            int prefilter = use[2] && n3 > 2;
            double dprev = prefilter ? row[1] - row[0] : 0.0;
            for (size_t l = 0; l < n3; l++) {
                /* tight skip over the monotone run; stops at a sign change
                 * or at the last point, which wraps and gets the full test */
                while (prefilter && l > 0 && l + 1 < n3) {
                    double dn = row[l + 1] - row[l];
                    int monotone = dprev * dn > 0.0;
                    dprev = dn;
                    if (!monotone)
                        break;
                    l++;
                }
                size_t p = (i * n2 + j) * n3 + l;
                double ep = row[l];
                int mn = 1, mx = 1;
#define BM_CMP(q)                                                  \
    do {                                                           \
        size_t q_ = (q);                                           \
        double eq_ = band[q_];                                     \
        if (q_ != p) {                                             \
            if (ep == eq_) {                                       \
                if (p > q_)                                        \
                    mn = mx = 0;                                   \
            } else if (ep > eq_) {                                 \
                mn = 0;                                            \
            } else {                                               \
                mx = 0;                                            \
            }                                                      \
        }                                                          \
    } while (0)
                if (use[2]) {
                    size_t lp = l + 1 == n3 ? 0 : l + 1, lm = l == 0 ? n3 - 1 : l - 1;
                    BM_CMP((i * n2 + j) * n3 + lp);
                    BM_CMP((i * n2 + j) * n3 + lm);
                    if (!mn && !mx)
                        continue;
                }
                if (use[1]) {
                    BM_CMP((i * n2 + jp) * n3 + l);
                    if (!mn && !mx)
                        continue;
                    BM_CMP((i * n2 + jm) * n3 + l);
                    if (!mn && !mx)
                        continue;
                }
                if (use[0]) {
                    BM_CMP((ip * n2 + j) * n3 + l);
                    if (!mn && !mx)
                        continue;
                    BM_CMP((im * n2 + j) * n3 + l);
                    if (!mn && !mx)
                        continue;
                }
                /* edges and corners */
                size_t ii[3] = { im, i, ip }, jj[3] = { jm, j, jp };
                size_t ll[3] = { l == 0 ? n3 - 1 : l - 1, l, l + 1 == n3 ? 0 : l + 1 };
                for (int a = 0; a < 3 && (mn || mx); a++)
                    for (int b2 = 0; b2 < 3 && (mn || mx); b2++)
                        for (int c2 = 0; c2 < 3 && (mn || mx); c2++) {
                            int faces = (a != 1) + (b2 != 1) + (c2 != 1);
                            if (faces < 2)
                                continue;
                            BM_CMP((ii[a] * n2 + jj[b2]) * n3 + ll[c2]);
                        }
#undef BM_CMP
                if (!mn && !mx)
                    continue;
                if (cnt == cap) {
                    cap *= 2;
                    candidate *nl = realloc(cl, cap * sizeof *cl);
                    if (!nl) {
                        free(cl);
                        return -1;
                    }
                    cl = nl;
                }
                cl[cnt].p = p;
                cl[cnt].is_min = mn;
                cnt++;
            }
        }
    }
    *list = cl;
    *count = cnt;
    return 0;
}

static int by_energy(const void *a, const void *b)
{
    double ea = ((const bm_mass_tensor *)a)->energy_ev, eb = ((const bm_mass_tensor *)b)->energy_ev;
    return (ea > eb) - (ea < eb);
}

/* Snaps a refined extremum onto the symmetry element it lies on. The
 * rotations R of the lattice that map k onto itself (modulo a reciprocal
 * vector) within tol form its site group; the average of R k - G over them is
 * the nearest point they fix exactly. The tensor is averaged over the same
 * rotations, but only where that changes no mass by more than twice its
 * error: a crystal of lower symmetry than its lattice keeps its own tensor
 * (and its k). */
static void snap_to_symmetry(grid_ctx *c, const double rot[][3][3], size_t nrot,
                             bm_mass_tensor *t)
{
    if (t->degenerate || t->divergent || c->dims != 3 || !isfinite(t->k_error))
        return;
    double h = INFINITY;
    for (int a = 0; a < 3; a++)
        h = fmin(h, bm_norm3(c->g->recip[a]) / (double)c->g->mesh[a]);
    /* within twice the error of k, at least the Newton refinement's own
     * resolution (1e-6 of a mesh step), never beyond a quarter of a step */
    double tol = fmin(fmax(2.0 * t->k_error, 1e-6 * h), 0.25 * h);
    double ksum[3] = { 0, 0, 0 }, msum[3][3] = { { 0 } };
    int nsite = 0;
    for (size_t o = 0; o < nrot; o++) {
        double rk[3], d[3], fr[3], gk[3];
        for (int i = 0; i < 3; i++)
            rk[i] = bm_dot3(rot[o][i], t->k);
        for (int i = 0; i < 3; i++)
            d[i] = rk[i] - t->k[i];
        for (int j = 0; j < 3; j++)
            fr[j] = nearbyint(d[0] * c->binv[0][j] + d[1] * c->binv[1][j] + d[2] * c->binv[2][j]);
        for (int i = 0; i < 3; i++)
            gk[i] = fr[0] * c->g->recip[0][i] + fr[1] * c->g->recip[1][i] + fr[2] * c->g->recip[2][i];
        double off[3] = { d[0] - gk[0], d[1] - gk[1], d[2] - gk[2] };
        if (bm_norm3(off) > tol)
            continue;
        nsite++;
        for (int i = 0; i < 3; i++)
            ksum[i] += rk[i] - gk[i];
        /* R M R^T */
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++) {
                double v = 0.0;
                for (int a = 0; a < 3; a++)
                    for (int b = 0; b < 3; b++)
                        v += rot[o][i][a] * t->inv_mass[a][b] * rot[o][j][b];
                msum[i][j] += v;
            }
    }
    if (nsite < 2)
        return;   /* a general point: nothing to snap to */
    double ms[3][3], ev[3], vec[3][3], ks[3];
    for (int i = 0; i < 3; i++) {
        ks[i] = ksum[i] / nsite;
        for (int j = 0; j < 3; j++)
            ms[i][j] = msum[i][j] / nsite;
    }
    double work[3][3];
    memcpy(work, ms, sizeof work);
    if (bm_symeig(work, 3, ev, vec) != 0)
        return;
    /* order by decreasing |curvature| (increasing |m|), as finish_tensor does */
    int order[3] = { 0, 1, 2 };
    for (int a = 0; a < 3; a++)
        for (int b = a + 1; b < 3; b++)
            if (fabs(ev[order[b]]) > fabs(ev[order[a]])) {
                int tmp = order[a];
                order[a] = order[b];
                order[b] = tmp;
            }
    for (int m = 0; m < 3; m++) {
        double mm = 1.0 / ev[order[m]];
        double allowed = 2.0 * (isfinite(t->mass_errors[m]) ? t->mass_errors[m] : 0.0)
                       + 1e-9 * fabs(t->masses[m]);
        if (!(fabs(mm - t->masses[m]) <= allowed) || (mm > 0) != (t->masses[m] > 0))
            return;   /* the tensor breaks the site symmetry beyond its errors */
    }
    for (int i = 0; i < 3; i++)
        if (fabs(ks[i]) < 1e-12 * h)
            ks[i] = 0.0;   /* rounding of the average, not a coordinate */
    double dk[3] = { ks[0] - t->k[0], ks[1] - t->k[1], ks[2] - t->k[2] };
    t->snap_shift = bm_norm3(dk);
    memcpy(t->k, ks, sizeof ks);
    for (int j = 0; j < 3; j++)
        t->k_frac[j] = ks[0] * c->binv[0][j] + ks[1] * c->binv[1][j] + ks[2] * c->binv[2][j];
    memcpy(t->inv_mass, ms, sizeof ms);
    for (int m = 0; m < 3; m++) {
        t->masses[m] = 1.0 / ev[order[m]];
        memcpy(t->axes[m], vec[order[m]], sizeof t->axes[m]);
    }
    t->symmetry_snapped = 1;
    t->site_rotations = nsite;
}

/* 1 when a and b are images of one point (a reciprocal vector apart within tol). */
static int same_point(grid_ctx *c, const double a[3], const double b[3], double tol)
{
    double d[3] = { a[0] - b[0], a[1] - b[1], a[2] - b[2] }, fr[3], off[3];
    for (int j = 0; j < 3; j++)
        fr[j] = nearbyint(d[0] * c->binv[0][j] + d[1] * c->binv[1][j] + d[2] * c->binv[2][j]);
    for (int i = 0; i < 3; i++)
        off[i] = d[i] - (fr[0] * c->g->recip[0][i] + fr[1] * c->g->recip[1][i]
                         + fr[2] * c->g->recip[2][i]);
    return bm_norm3(off) <= tol;
}

/* Extrema (sorted by energy) that rotations of the lattice map onto each
 * other are one star and should agree; where the kinds differ (an interpolant that breaks the
 * symmetry: three L points minima and the fourth a saddle), none of them is
 * asserted. A crystal of lower symmetry than its lattice can differ for real:
 * the warning says so. */
static void check_stars(grid_ctx *c, const double rot[][3][3], size_t nrot,
                        bm_mass_tensor *res, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        int clash = 0;
        size_t lo = i;
        while (lo > 0 && res[i].energy_ev - res[lo - 1].energy_ev <= c->degen)
            lo--;
        for (size_t j = lo; j < n && !clash
             && res[j].energy_ev - res[i].energy_ev <= c->degen; j++) {
            if (j == i || res[j].kind == res[i].kind || res[i].degenerate || res[j].degenerate)
                continue;
            double ei = isfinite(res[i].k_error) ? res[i].k_error : 0.0;
            double ej = isfinite(res[j].k_error) ? res[j].k_error : 0.0;
            double tol = fmax(2.0 * (ei + ej), 1e-7);
            for (size_t o = 0; o < nrot && !clash; o++) {
                double rk[3];
                for (int a = 0; a < 3; a++)
                    rk[a] = bm_dot3(rot[o][a], res[i].k);
                clash = same_point(c, rk, res[j].k, tol);
            }
        }
        if (clash)
            res[i].converged = 0;
        if (clash && !bm_warnings_has(&res[i].warnings, BM_WARN_KIND_UNCERTAIN))
            bm_warn(&res[i].warnings, BM_WARN_KIND_UNCERTAIN, "the kind of this point is not "
                    "certain: a point that a rotation of the lattice maps it onto, at the same "
                    "energy, came out as another kind (the band interpolant breaks the "
                    "symmetry here, unless the crystal has less symmetry than its lattice); a "
                    "finer mesh or a refinement stencil would settle it");
    }
}

/* ------------------------------------------------------------ line fits */

/* Coefficients c[0..n-1] of the polynomial through (x[i], y[i]), i < n <= 8,
 * by Gaussian elimination with partial pivoting on the Vandermonde system
 * (x within a few units of 0: well conditioned). Returns 0, or -1. */
static int poly_through(const double *x, const double *y, int n, double *c)
{
    double a[8][9];
    for (int i = 0; i < n; i++) {
        double v = 1.0;
        for (int j = 0; j < n; j++, v *= x[i])
            a[i][j] = v;
        a[i][n] = y[i];
    }
    for (int col = 0; col < n; col++) {
        int piv = col;
        for (int r = col + 1; r < n; r++)
            if (fabs(a[r][col]) > fabs(a[piv][col]))
                piv = r;
        if (!(fabs(a[piv][col]) > 1e-300))
            return -1;
        for (int j = 0; j <= n; j++) {
            double tmp = a[col][j];
            a[col][j] = a[piv][j];
            a[piv][j] = tmp;
        }
        for (int r = col + 1; r < n; r++) {
            double f = a[r][col] / a[col][col];
            for (int j = col; j <= n; j++)
                a[r][j] -= f * a[col][j];
        }
    }
    for (int i = n - 1; i >= 0; i--) {
        double v = a[i][n];
        for (int j = i + 1; j < n; j++)
            v -= a[i][j] * c[j];
        c[i] = v / a[i][i];
    }
    return 0;
}

/* Value and first two derivatives of the polynomial c (n terms) at x. */
static void poly_eval(const double *c, int n, double x, double v[3])
{
    v[0] = v[1] = v[2] = 0.0;
    for (int i = n - 1; i >= 0; i--) {
        v[2] = v[2] * x + 2.0 * v[1];
        v[1] = v[1] * x + v[0];
        v[0] = v[0] * x + c[i];
    }
}

/* The band along the line from the polynomials of the sum S and the squared
 * difference D of the band and its partner (root -1: the lower, +1: the
 * upper), or of the band alone (d NULL): value and two derivatives. */
static void line_band(const double *cs, const double *cd, int n, int root, double x,
                      double e[3])
{
    double sv[3];
    poly_eval(cs, n, x, sv);
    if (!cd) {
        memcpy(e, sv, sizeof sv);
        return;
    }
    double dv[3];
    poly_eval(cd, n, x, dv);
    double q = sqrt(fmax(dv[0], 1e-30));
    e[0] = 0.5 * (sv[0] + root * q);
    e[1] = 0.5 * (sv[1] + root * dv[1] / (2.0 * q));
    e[2] = 0.5 * (sv[2] + root * (dv[2] / (2.0 * q) - dv[1] * dv[1] / (4.0 * q * q * q)));
}

/* The line fit settings: exact polynomials through the nearest 5, 6 and 7
 * mesh points of the line (degrees 4 to 6). */
#define LINE_SETTINGS 3
#define LINE_MAX_POINTS 7

/* An extremum on a line of mesh points along one of its principal axes (a
 * minimum on a symmetry axis of the zone, as silicon's on Gamma-X): the mesh
 * energies along that line resolve the position and the mass along the axis
 * far better than a fit over a ball of mesh points, which on a coarse mesh
 * reaches across the crossing at the zone face. Each setting interpolates
 * the band along the line (with its crossing partner: their sum and squared
 * difference, which stay smooth through the crossing) and finds its
 * stationary point within a mesh step of the estimate, recentred once; the
 * mean of the settings moves k along the axis and gives the axial mass,
 * their spread is the error. Only where symmetry has fixed k across the
 * axis (snapped), so the position along it is the one unknown. */
static void line_refine(grid_ctx *c, bm_mass_tensor *t)
{
    const bm_grid *g = c->g;
    if (!t->symmetry_snapped || t->degenerate || t->divergent || c->dims != 3
        || (t->kind != BM_EXTREMUM_MINIMUM && t->kind != BM_EXTREMUM_MAXIMUM))
        return;
    double x[3];   /* k in mesh-index coordinates */
    for (int a = 0; a < 3; a++)
        x[a] = t->k_frac[a] * (double)g->mesh[a] - g->offset[a];
    int on_mesh = 1;
    for (int a = 0; a < 3; a++)
        on_mesh &= fabs(x[a] - nearbyint(x[a])) < 1e-6;
    if (on_mesh)
        return;   /* the local fits are centred on it already */
    for (int m = 0; m < 3; m++) {
        /* the shortest mesh direction p along axis m */
        long p[3] = { 0, 0, 0 };
        double pc[3] = { 0, 0, 0 }, plen = INFINITY;
        for (long i = -3; i <= 3; i++)
            for (long j = -3; j <= 3; j++)
                for (long l = -3; l <= 3; l++) {
                    long q[3] = { i, j, l };
                    double v[3] = { 0, 0, 0 };
                    for (int a = 0; a < 3; a++)
                        for (int b = 0; b < 3; b++)
                            v[b] += (double)q[a] * g->recip[a][b] / (double)g->mesh[a];
                    double n = bm_norm3(v);
                    if (n == 0.0 || n >= plen
                        || fabs(fabs(bm_dot3(v, t->axes[m])) - n) > 1e-9 * n)
                        continue;
                    memcpy(p, q, sizeof q);
                    memcpy(pc, v, sizeof v);
                    plen = n;
                }
        if (!isfinite(plen))
            continue;
        /* a mesh point on the line through k: x - s p integral */
        int a0 = 0;
        for (int a = 1; a < 3; a++)
            if (labs(p[a]) > labs(p[a0]))
                a0 = a;
        double s0 = NAN;
        long base[3];
        for (long q = -3; q <= 3 && !isfinite(s0); q++) {
            double s = (x[a0] - (nearbyint(x[a0]) + (double)q)) / (double)p[a0];
            int integral = 1;
            for (int a = 0; a < 3; a++) {
                double v = x[a] - s * (double)p[a];
                integral &= fabs(v - nearbyint(v)) < 1e-6;
                base[a] = lround(v);
            }
            if (integral)
                s0 = s;
        }
        if (!isfinite(s0))
            continue;
        size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
        int partner = t->partner_band;
        int root = partner >= 0 && (size_t)partner > c->band ? -1 : 1;
        double pos[LINE_SETTINGS], mass[LINE_SETTINGS];
        int held = 0;
        for (int st = 0; st < LINE_SETTINGS; st++) {
            int n = 5 + st;
            double s = s0;
            int ok = 0;
            for (int round = 0; round < 2; round++) {
                long lo = (long)floor(s - (n - 1) / 2.0 + 0.5);
                double xs[LINE_MAX_POINTS], ys[LINE_MAX_POINTS], yd[LINE_MAX_POINTS];
                for (int i = 0; i < n; i++) {
                    long j = lo + i;
                    size_t w[3];
                    for (int a = 0; a < 3; a++) {
                        long mm = (long)g->mesh[a], v = base[a] + j * p[a];
                        w[a] = (size_t)(((v % mm) + mm) % mm);
                    }
                    size_t lin = (w[0] * g->mesh[1] + w[1]) * g->mesh[2] + w[2];
                    double e1 = g->energies[c->band * npt + lin];
                    xs[i] = (double)j - s;
                    if (partner >= 0) {
                        double e2 = g->energies[(size_t)partner * npt + lin];
                        ys[i] = e1 + e2;
                        yd[i] = (e2 - e1) * (e2 - e1);
                    } else {
                        ys[i] = e1;
                    }
                }
                double cs[LINE_MAX_POINTS], cd[LINE_MAX_POINTS];
                if (poly_through(xs, ys, n, cs) != 0
                    || (partner >= 0 && poly_through(xs, yd, n, cd) != 0))
                    break;
                const double *cdp = partner >= 0 ? cd : NULL;
                /* the stationary point of the right kind within a step: a
                 * scan for the start, then Newton on the slope */
                double best = 0.0, bestv = NAN, sign = t->kind == BM_EXTREMUM_MINIMUM ? 1 : -1;
                for (int i = 0; i <= 200; i++) {
                    double u = -1.0 + i / 100.0, e[3];
                    line_band(cs, cdp, n, root, u, e);
                    if (!(sign * e[0] >= sign * bestv))
                        bestv = e[0], best = u;
                }
                double u = best, e[3];
                for (int it = 0; it < 30; it++) {
                    line_band(cs, cdp, n, root, u, e);
                    if (!(sign * e[2] > 0.0))
                        break;
                    double du = -e[1] / e[2];
                    u += du;
                    if (fabs(du) < 1e-12)
                        break;
                }
                line_band(cs, cdp, n, root, u, e);
                ok = fabs(u) < 1.0 && sign * e[2] > 0.0 && fabs(e[1]) < 1e-9 * fabs(e[2]) + 1e-12;
                if (!ok)
                    break;
                s += u;
                /* d2E/dk2 = d2E/dj2 / |p|^2 */
                mass[held] = BM_HBAR2_OVER_ME_EV_A2 * plen * plen / e[2];
            }
            if (ok)
                pos[held++] = s;
        }
        if (held < 2)
            continue;
        double ps = 0.0, ms = 0.0, plo = pos[0], phi = pos[0], mlo = mass[0], mhi = mass[0];
        for (int i = 0; i < held; i++) {
            ps += pos[i] / held;
            ms += mass[i] / held;
            plo = fmin(plo, pos[i]), phi = fmax(phi, pos[i]);
            mlo = fmin(mlo, mass[i]), mhi = fmax(mhi, mass[i]);
        }
        double shift[3];
        for (int a = 0; a < 3; a++) {
            shift[a] = (ps - s0) * pc[a];
            t->k[a] += shift[a];
        }
        for (int j = 0; j < 3; j++)
            t->k_frac[j] = t->k[0] * c->binv[0][j] + t->k[1] * c->binv[1][j]
                         + t->k[2] * c->binv[2][j];
        t->line_fitted = 1;
        for (int a = 0; a < 3; a++)
            t->line_axis[a] = pc[a] / plen;
        t->line_shift = bm_norm3(shift);
        t->line_points = 4 + LINE_SETTINGS;
        t->masses[m] = ms;
        t->mass_errors[m] = fmax(mhi - mlo, 1e-6 * fabs(ms));
        t->k_error = (phi - plo) * plen;
        /* the tensor from its principal values, reordered by |m| */
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++) {
                t->inv_mass[i][j] = 0.0;
                for (int q = 0; q < 3; q++)
                    t->inv_mass[i][j] += t->axes[q][i] * t->axes[q][j] / t->masses[q];
            }
        for (int a = 0; a < 3; a++)
            for (int b = a + 1; b < 3; b++)
                if (fabs(t->masses[b]) < fabs(t->masses[a])) {
                    double tm = t->masses[a], te = t->mass_errors[a], tv[3];
                    t->masses[a] = t->masses[b], t->mass_errors[a] = t->mass_errors[b];
                    t->masses[b] = tm, t->mass_errors[b] = te;
                    memcpy(tv, t->axes[a], sizeof tv);
                    memcpy(t->axes[a], t->axes[b], sizeof tv);
                    memcpy(t->axes[b], tv, sizeof tv);
                }
        /* convergence anew: the line fit may have settled what the ball could not */
        double worst = 0.0;
        int ok = 1;
        for (int q = 0; q < 3; q++) {
            double rel = t->mass_errors[q] / fabs(t->masses[q]);
            ok &= rel <= c->conv;
            worst = fmax(worst, isfinite(rel) ? rel : INFINITY);
        }
        if (!bm_warnings_has(&t->warnings, BM_WARN_KIND_UNCERTAIN)) {
            drop_warnings(t, BM_WARN_NOT_CONVERGED);
            t->converged = ok;
            if (!ok)
                bm_warn(&t->warnings, BM_WARN_NOT_CONVERGED, "masses not converged: the "
                        "estimated error reaches %.1f%% of a mass (tolerance %.1f%%); a finer "
                        "mesh, or DFT energies at a refinement stencil around this point "
                        "fitted as a k-table, would converge them", 100.0 * worst,
                        100.0 * c->conv);
        }
        return;
    }
}

/* Snaps every refined extremum (see snap_to_symmetry) and merges the images
 * of one extremum that separate refinements reached, keeping the first. */
static void snap_and_merge(grid_ctx *c, bm_mass_tensor *res, size_t *nres)
{
    double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3];
    size_t nrot = 0;
    bm_errbuf err;
    if (c->dims == 3 && bm_lattice_rotations_cartesian(c->g->recip, rot, &nrot, &err) != BM_OK)
        nrot = 0;
    for (size_t i = 0; i < *nres; i++) {
        snap_to_symmetry(c, (const double (*)[3][3])rot, nrot, &res[i]);
        line_refine(c, &res[i]);
    }
    /* sorted by energy, only neighbours within the degeneracy tolerance can
     * be images of one point or members of one star: linear in practice */
    if (*nres > 1)
        qsort(res, *nres, sizeof *res, by_energy);
    size_t keep = 0;
    for (size_t i = 0; i < *nres; i++) {
        int dup = 0;
        for (size_t j = keep; j-- > 0 && !dup
             && res[i].energy_ev - res[j].energy_ev <= c->degen;) {
            double ei = isfinite(res[i].k_error) ? res[i].k_error : 0.0;
            double ej = isfinite(res[j].k_error) ? res[j].k_error : 0.0;
            double tol = fmax(2.0 * (ei + ej), 1e-7);
            dup = res[i].kind == res[j].kind && same_point(c, res[i].k, res[j].k, tol)
               && fabs(res[i].energy_ev - res[j].energy_ev) <= c->degen;
        }
        if (dup) {
            bm_warnings_clear(&res[i].warnings);
            bm_warnings_clear(&res[i].kp.warnings);
            continue;
        }
        if (keep != i)
            res[keep] = res[i];
        keep++;
    }
    *nres = keep;
    check_stars(c, (const double (*)[3][3])rot, nrot, res, keep);
}

/* A rough band can have a local extremum at every few mesh points, and each
 * candidate costs its fits: beyond BM_GRID_MAX_EXTREMA candidates only those
 * closest in energy to the band's lowest minimum (for minima) or highest
 * maximum (for maxima) are kept, ties in mesh order, so the cost of an "all"
 * search is bounded. */
typedef struct {
    double key;
    size_t q;
} edge_key;

static int by_edge_key(const void *pa, const void *pb)
{
    const edge_key *a = pa, *b = pb;
    if (a->key != b->key)
        return (a->key > b->key) - (a->key < b->key);
    return (a->q > b->q) - (a->q < b->q);
}

/* Returns 0, or -1 when out of memory. */
static int cap_candidates(const double *e, candidate *cl, size_t *ncand)
{
    size_t n = *ncand;
    if (n <= BM_GRID_MAX_EXTREMA)
        return 0;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t q = 0; q < n; q++) {
        lo = fmin(lo, e[cl[q].p]);
        hi = fmax(hi, e[cl[q].p]);
    }
    edge_key *k = malloc(n * sizeof *k);
    candidate *kept = malloc(BM_GRID_MAX_EXTREMA * sizeof *kept);
    if (!k || !kept) {
        free(k);
        free(kept);
        return -1;
    }
    for (size_t q = 0; q < n; q++) {
        k[q].key = cl[q].is_min ? e[cl[q].p] - lo : hi - e[cl[q].p];
        k[q].q = q;
    }
    qsort(k, n, sizeof *k, by_edge_key);
    for (size_t i = 0; i < BM_GRID_MAX_EXTREMA; i++)
        kept[i] = cl[k[i].q];
    memcpy(cl, kept, BM_GRID_MAX_EXTREMA * sizeof *cl);
    *ncand = BM_GRID_MAX_EXTREMA;
    free(k);
    free(kept);
    return 0;
}

bm_status bm_grid_mass_tensors(const bm_grid *g, size_t band, bm_search which,
                               const double *k_at, const bm_fit_options *opt,
                               bm_mass_tensor **out, size_t *n_out, bm_errbuf *err)
{
    if (!out || !n_out)
        return bm_fail(err, BM_EINVAL, "output pointers are NULL");
    *out = NULL;
    *n_out = 0;
    bm_status s = grid_geometry(g, err);
    if (s != BM_OK)
        return s;
    if (band >= g->nbands)
        return bm_fail(err, BM_EINVAL, "band index %zu is out of range: the grid has %zu band%s (0..%zu)",
                       band, g->nbands, g->nbands == 1 ? "" : "s", g->nbands - 1);
    grid_ctx c;
    memset(&c, 0, sizeof c);
    if ((s = check_options(opt, which, k_at, &c.radius, &c.degen, &c.conv, err)) != BM_OK)
        return s;
    if ((s = band_finite(g, band, err)) != BM_OK)
        return s;
    c.g = g;
    c.band = band;
    c.npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
    c.dims = g->mesh[2] == 1 ? 2 : 3;
    memcpy(c.b, g->recip, sizeof c.b);
    /* basis: b1 direction, in-plane (b1, b2) orthogonal, normal */
    double n0 = bm_norm3(c.b[0]);
    for (int i = 0; i < 3; i++)
        c.p[0][i] = c.b[0][i] / n0;
    double d = bm_dot3(c.b[1], c.p[0]);
    for (int i = 0; i < 3; i++)
        c.p[1][i] = c.b[1][i] - d * c.p[0][i];
    double n1 = bm_norm3(c.p[1]);
    for (int i = 0; i < 3; i++)
        c.p[1][i] /= n1;
    bm_complete_basis(c.p, 2);
    if (c.dims == 2)
        memcpy(c.b[2], c.p[2], sizeof c.b[2]);
    /* f = k B^-1 as a row vector; binv here is (B^-1) so that f_a = sum_i k_i binv[i][a] */
    if (bm_inv3(c.b, c.binv) != 0)
        return bm_fail(err, BM_EINVAL, "reciprocal vectors are singular");
    c.ip = bm_interp_new(g->mesh);
    c.ip_reduced = bm_interp_new_reduced(g->mesh);
    if (!c.ip || !c.ip_reduced) {
        bm_interp_free(c.ip);
        bm_interp_free(c.ip_reduced);
        return bm_fail(err, BM_ENOMEM, "out of memory for the interpolation workspace");
    }
    const double *e = g->energies + band * c.npt;
    bm_mass_tensor *res = NULL;
    size_t nres = 0;
    s = BM_OK;
    if (k_at) {
        double f[3];
        for (int a = 0; a < 3; a++)
            f[a] = k_at[0] * c.binv[0][a] + k_at[1] * c.binv[1][a] + k_at[2] * c.binv[2][a]
                 - g->offset[a] / (double)g->mesh[a];
        if (c.dims == 2)
            f[2] = 0.0;
        res = malloc(sizeof *res);
        if (!res) {
            s = bm_fail(err, BM_ENOMEM, "out of memory");
        } else if (grid_analyse(&c, f, 0, BM_EXTREMUM_MINIMUM, res) != 0) {
            bm_warnings_clear(&res->warnings);
            s = bm_fail(err, BM_EINTERNAL, "eigen-decomposition failed at the given point");
        } else
            nres = 1;
    } else {
        candidate *cl = NULL;
        size_t ncand = 0;
        size_t nfound = 0;
        if (which == BM_SEARCH_ALL) {
            if (grid_scan(g, e, &cl, &ncand) != 0)
                s = bm_fail(err, BM_ENOMEM, "out of memory in the extremum scan");
            nfound = ncand;
            if (s == BM_OK && cap_candidates(e, cl, &ncand) != 0)
                s = bm_fail(err, BM_ENOMEM, "out of memory choosing among %zu extrema", nfound);
        } else {
            cl = malloc(sizeof *cl);
            if (!cl) {
                s = bm_fail(err, BM_ENOMEM, "out of memory");
            } else {
                size_t best = 0;
                double eb = e[0];
                if (which == BM_SEARCH_MINIMUM) {
                    for (size_t p = 1; p < c.npt; p++)
                        if (e[p] < eb) {
                            eb = e[p];
                            best = p;
                        }
                } else {
                    for (size_t p = 1; p < c.npt; p++)
                        if (e[p] > eb) {
                            eb = e[p];
                            best = p;
                        }
                }
                cl[0].p = best;
                cl[0].is_min = which == BM_SEARCH_MINIMUM;
                ncand = 1;
            }
        }
        if (s == BM_OK && ncand) {
            res = malloc(ncand * sizeof *res);
            if (!res)
                s = bm_fail(err, BM_ENOMEM, "out of memory for %zu results", ncand);
        }
        for (size_t q = 0; s == BM_OK && q < ncand; q++) {
            size_t p = cl[q].p, n2 = g->mesh[1], n3 = g->mesh[2];
            double f[3] = { (double)(p / (n2 * n3)) / (double)g->mesh[0],
                            (double)((p / n3) % n2) / (double)n2,
                            (double)(p % n3) / (double)n3 };
            if (grid_analyse(&c, f, 1, cl[q].is_min ? BM_EXTREMUM_MINIMUM : BM_EXTREMUM_MAXIMUM,
                             &res[nres]) != 0) {
                bm_warnings_clear(&res[nres].warnings);
                s = bm_fail(err, BM_EINTERNAL, "eigen-decomposition failed at mesh point %zu", p);
            } else
                nres++;
        }
        free(cl);
        if (s == BM_OK)
            snap_and_merge(&c, res, &nres);
        if (s == BM_OK && nres > 1)
            qsort(res, nres, sizeof *res, by_energy);
        if (s == BM_OK && nres && nfound > ncand)
            bm_warn(&res[0].warnings, BM_WARN_EXTREMA_CAPPED, "the band has %zu local "
                    "extrema on the mesh (a rough or noisy band): only the %d closest in "
                    "energy to its lowest minimum or highest maximum are fitted and "
                    "reported", nfound, BM_GRID_MAX_EXTREMA);
    }
    bm_interp_free(c.ip);
    bm_interp_free(c.ip_reduced);
    if (s != BM_OK) {
        bm_mass_tensors_free(res, nres);
        return s;
    }
    *out = res;
    *n_out = nres;
    return BM_OK;
}

/* ---------------------------------------------------------------- ktable */

typedef struct {
    const bm_ktable *t;
    size_t band;
    int dims;
    double p[3][3];
    double radius;
    double degen;
    double conv;         /* convergence tolerance, relative */
    size_t nfit;         /* automatic point count */
    int npar_short;      /* fewer points than a quadric has parameters */
    double *dist;        /* scratch [npoints] */
    size_t *order;       /* scratch [npoints] */
    struct dist_pair { double d; size_t i; } *pairs;
    double (*u)[3];
    double *e, *w;
} table_ctx;

static int by_pair_dist(const void *a, const void *b)
{
    double da = ((const struct dist_pair *)a)->d, db = ((const struct dist_pair *)b)->d;
    return (da > db) - (da < db);
}

static const double *tk(const table_ctx *c, size_t m)
{
    return c->t->k + 3 * m;
}

/* Nearest points to centre: within radius if given, else the nfit_want nearest
 * plus any tied with the last one. Fills c->order[0..count-1]; returns count
 * and the largest distance used. */
static size_t table_select(table_ctx *c, const double centre[3], double radius,
                           size_t nfit_want, double *dmax)
{
    size_t np = c->t->npoints;
    for (size_t m = 0; m < np; m++) {
        double dk[3];
        for (int i = 0; i < 3; i++)
            dk[i] = tk(c, m)[i] - centre[i];
        c->dist[m] = bm_norm3(dk);
        c->pairs[m].d = c->dist[m];
        c->pairs[m].i = m;
    }
    qsort(c->pairs, np, sizeof *c->pairs, by_pair_dist);
    for (size_t m = 0; m < np; m++)
        c->order[m] = c->pairs[m].i;
    size_t count;
    if (radius > 0.0) {
        count = 0;
        while (count < np && c->dist[c->order[count]] <= radius)
            count++;
    } else {
        count = nfit_want < np ? nfit_want : np;
        while (count > 0 && count < np
               && c->dist[c->order[count]] <= c->dist[c->order[count - 1]] * (1.0 + 1e-9))
            count++;
    }
    *dmax = count ? c->dist[c->order[count - 1]] : 0.0;
    return count;
}

static int table_fit(table_ctx *c, const double centre[3], double radius, size_t want,
                     bm_quadric *q, double *dmax, double *span, size_t *count)
{
    size_t m = table_select(c, centre, radius, want, dmax);
    *count = m;
    const double *eb = c->t->energies + c->band * c->t->npoints;
    double e_near = m ? eb[c->order[0]] : 0.0;
    *span = 0.0;
    for (size_t q2 = 0; q2 < m; q2++) {
        size_t id = c->order[q2];
        double dk[3];
        for (int i = 0; i < 3; i++)
            dk[i] = tk(c, id)[i] - centre[i];
        for (int a = 0; a < 3; a++)
            c->u[q2][a] = bm_dot3(c->p[a], dk);
        c->e[q2] = eb[id];
        double r = *dmax > 0.0 ? c->dist[id] / *dmax : 0.0;
        c->w[q2] = exp(-r * r);
        *span = fmax(*span, fabs(eb[id] - e_near));
    }
    return bm_quadric_fit(m, c->dims, (const double (*)[3])c->u, c->e, c->w, q);
}

static double quad_norm(const bm_quadric *q)
{
    double s = 0.0;
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++)
            s += q->h[a][b] * q->h[a][b];
    return sqrt(s);
}

/* An independent estimate from a quadric fit of fewer or more points around
 * centre: its stationary point (one Newton step) and Hessian. */
static void table_estimate(table_ctx *c, const double centre[3], double radius, size_t want,
                           bm_bandfit *out)
{
    memset(out, 0, sizeof *out);
    bm_quadric q;
    double dmax, span;
    size_t count;
    if (table_fit(c, centre, radius, want, &q, &dmax, &span, &count) != 0)
        return;
    double h3[3][3] = { { 0 } }, hi[3][3];
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++)
            h3[a][b] = a < c->dims && b < c->dims ? q.h[a][b] : (a == b ? 1.0 : 0.0);
    if (bm_inv3(h3, hi) != 0)
        return;
    memcpy(out->k, centre, sizeof out->k);
    for (int a = 0; a < c->dims; a++) {
        double du = 0.0;
        for (int b = 0; b < c->dims; b++)
            du -= hi[a][b] * q.g[b];
        for (int i = 0; i < 3; i++)
            out->k[i] += du * c->p[a][i];
    }
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            out->hessian[i][j] = 0.0;
            for (int a = 0; a < c->dims; a++)
                for (int b = 0; b < c->dims; b++)
                    out->hessian[i][j] += c->p[a][i] * q.h[a][b] * c->p[b][j];
        }
    out->npoints = count;
    out->ok = 1;
}

/* The index of the sampled point nearest centre, and its distance. */
static size_t nearest_sample(table_ctx *c, const double centre[3], double *dist)
{
    size_t near = 0;
    double dn = INFINITY;
    for (size_t m = 0; m < c->t->npoints; m++) {
        double dk[3];
        for (int i = 0; i < 3; i++)
            dk[i] = tk(c, m)[i] - centre[i];
        if (bm_norm3(dk) < dn) {
            dn = bm_norm3(dk);
            near = m;
        }
    }
    *dist = dn;
    return near;
}

/* The distance from sample i to the nearest other sample. */
static double nearest_spacing(table_ctx *c, size_t i)
{
    double best = INFINITY;
    for (size_t m = 0; m < c->t->npoints; m++) {
        if (m == i)
            continue;
        double dk[3];
        for (int a = 0; a < 3; a++)
            dk[a] = tk(c, m)[a] - tk(c, i)[a];
        best = fmin(best, bm_norm3(dk));
    }
    return best;
}

/* Masses along the lines of samples through the degenerate sample i0: for
 * each direction holding two samples at steps s1 < s2 (the nearest two),
 * E - E0 = c2 s^2 + c4 s^4 through both gives m = hbar^2 / (2 c2 m_e); the
 * error is the quartic correction, the change from the inner step alone. */
static void directional_masses(table_ctx *c, size_t i0, bm_mass_tensor *t)
{
    const double *k0 = tk(c, i0), *eb = c->t->energies + c->band * c->t->npoints;
    t->ndirectional = 0;
    for (size_t m1 = 0; m1 < c->t->npoints && t->ndirectional < BM_DIRECTIONAL_MAX; m1++) {
        double d1[3], s1, u[3];
        for (int a = 0; a < 3; a++)
            d1[a] = tk(c, m1)[a] - k0[a];
        s1 = bm_norm3(d1);
        if (m1 == i0 || !(s1 > 0.0))
            continue;
        for (int a = 0; a < 3; a++)
            u[a] = d1[a] / s1;
        /* the direction once, from its nearest sample */
        int seen = 0, nearer = 0;
        for (size_t q = 0; q < t->ndirectional; q++)
            seen |= bm_dot3(t->directional[q].direction, u) > 1.0 - 1e-9;
        size_t m2 = SIZE_MAX;
        double s2 = INFINITY;
        for (size_t m = 0; m < c->t->npoints && !seen; m++) {
            double d[3];
            for (int a = 0; a < 3; a++)
                d[a] = tk(c, m)[a] - k0[a];
            double s = bm_norm3(d);
            if (m == m1 || m == i0 || !(s > 0.0) || bm_dot3(d, u) < s * (1.0 - 1e-9))
                continue;
            if (s < s1)
                nearer = 1;
            else if (s < s2) {
                s2 = s;
                m2 = m;
            }
        }
        if (seen || nearer || m2 == SIZE_MAX || s2 < s1 * (1.0 + 1e-6))
            continue;
        double a1 = eb[m1] - eb[i0], a2 = eb[m2] - eb[i0];
        double c4 = (a2 / (s2 * s2) - a1 / (s1 * s1)) / (s2 * s2 - s1 * s1);
        double c2 = a1 / (s1 * s1) - c4 * s1 * s1;
        double m = BM_HBAR2_OVER_ME_EV_A2 / (2.0 * c2);
        double m_inner = BM_HBAR2_OVER_ME_EV_A2 / (2.0 * a1 / (s1 * s1));
        size_t q = t->ndirectional++;
        memcpy(t->directional[q].direction, u, sizeof u);
        t->directional[q].mass = m;
        t->directional[q].error = fabs(m_inner - m);
    }
}

/* The k.p fit at the degenerate sample i0 of a table: every sample, the
 * touching bands in index order (sorted tables give them ascending). */
static void table_kp(table_ctx *c, size_t i0, bm_mass_tensor *t)
{
    const double *e = c->t->energies, *k0 = tk(c, i0);
    size_t np = c->t->npoints, group[6], nb = 0;
    double *e_at = malloc(c->t->nbands * sizeof *e_at);
    if (!e_at)
        return;
    for (size_t b = 0; b < c->t->nbands; b++)
        e_at[b] = e[b * np + i0];
    for (size_t b = 0; b < c->t->nbands && nb < 5; b++)
        if (fabs(e_at[b] - e_at[c->band]) <= c->degen) {
            if (nb == 4)
                nb = 5;
            else
                group[nb++] = b;
        }
    nb = nb <= 4 ? with_split_off(group, nb, e_at, c->t->nbands, t->kind, c->degen) : nb;
    free(e_at);
    if (c->dims < 3 || nb < 3 || nb == 5 || nb > 6)
        return;   /* the cubic models need three dimensions and 3, 4 or 6 bands */
    double *k = malloc(np * 3 * sizeof *k), *en = malloc(np * nb * sizeof *en);
    if (k && en) {
        for (size_t i = 0; i < np; i++) {
            for (int a = 0; a < 3; a++)
                k[3 * i + a] = tk(c, i)[a] - k0[a];
            for (size_t q = 0; q < nb; q++)
                en[q * np + i] = e[group[q] * np + i];
        }
        degenerate_kp(t, NULL, k, en, np, 0.0, group, nb, c->conv, "; a table has no lattice: its Cartesian "
                      "axes are taken as the cubic axes");
    }
    free(k);
    free(en);
}

/* 1 when x lies outside the data: beyond every sample along one of the
 * directions of the principal frame (axes, face and body diagonals) or the
 * direction from the samples' centre to x. A cheap, slightly generous
 * stand-in for the convex hull. */
static int outside_data(const table_ctx *c, const double x[3])
{
    double dirs[27][3], cen[3] = { 0, 0, 0 };
    size_t np = c->t->npoints, nd = 0;
    for (size_t m = 0; m < np; m++)
        for (int i = 0; i < 3; i++)
            cen[i] += tk(c, m)[i] / (double)np;
    for (int a = -1; a <= 1; a++)
        for (int b = -1; b <= 1; b++)
            for (int d = -1; d <= 1; d++) {
                int w[3] = { a, b, d };
                if (!a && !b && !d)
                    continue;
                int skip = 0;
                for (int q = c->dims; q < 3; q++)
                    skip |= w[q] != 0;
                if (skip)
                    continue;
                for (int i = 0; i < 3; i++)
                    dirs[nd][i] = w[0] * c->p[0][i] + w[1] * c->p[1][i] + w[2] * c->p[2][i];
                nd++;
            }
    for (int i = 0; i < 3; i++)
        dirs[nd][i] = x[i] - cen[i];
    nd++;
    double scale = 0.0;
    for (size_t m = 0; m < np; m++)
        scale = fmax(scale, fabs(tk(c, m)[0] - cen[0]) + fabs(tk(c, m)[1] - cen[1])
                            + fabs(tk(c, m)[2] - cen[2]));
    for (size_t q = 0; q < nd; q++) {
        double best = -INFINITY;
        for (size_t m = 0; m < np; m++)
            best = fmax(best, bm_dot3(dirs[q], tk(c, m)));
        if (bm_dot3(dirs[q], x) > best + 1e-9 * scale * bm_norm3(dirs[q]))
            return 1;
    }
    return 0;
}

/* The statistical error of each principal mass: the variance of the curvature
 * along its axis from the fit's covariance (first order in the scatter), so
 * |dm / m| = sd(lambda) / |lambda|. */
static void table_stderr(const table_ctx *c, const bm_quadric *q, bm_mass_tensor *t)
{
    for (int m = 0; m < c->dims; m++) {
        double v[3];
        for (int a = 0; a < 3; a++)
            v[a] = bm_dot3(c->p[a], t->axes[m]);
        double lam = 0.0;
        for (int a = 0; a < c->dims; a++)
            for (int b = 0; b < c->dims; b++)
                lam += v[a] * q->h[a][b] * v[b];
        double var = bm_quadric_curvature_var(q, v);
        t->mass_stderr[m] = isfinite(t->masses[m]) && lam != 0.0 && var >= 0.0
                          ? fabs(t->masses[m]) * sqrt(var) / fabs(lam) : NAN;
    }
}

/* A residual large against the energy range is blamed on its cause: on
 * non-parabolicity where the terms beyond quadratic are significant (or could
 * not be tested), on scatter where they are not. */
static void table_residual_check(bm_mass_tensor *t, const bm_quadric *q,
                                 const bm_quadric_beyond *b, double span, double radius)
{
    if (!(span > 0.0 && q->rms > NONPARABOLIC_REL * span))
        return;
    if (b->degree && b->p_value >= BEYOND_LEVEL)
        bm_warn(&t->warnings, BM_WARN_SCATTERED_DATA, "scattered data: the fit residual "
                "%.3g meV (%.1f%% of the energy range %.3g eV within %.3g 1/Angstrom) is "
                "scatter, not non-parabolicity (terms up to degree %d are not significant: "
                "p = %.2f); the masses carry its standard errors (principal_masses_stderr_me)",
                1e3 * q->rms, 100.0 * q->rms / span, span, radius, b->degree, b->p_value);
    else if (b->degree)
        bm_warn(&t->warnings, BM_WARN_NON_PARABOLIC, "non-parabolic band: quadratic fit "
                "residual %.3g eV is %.1f%% of the energy range %.3g eV within %.3g 1/Angstrom, "
                "and terms up to degree %d are significant (p = %.2g)", q->rms,
                100.0 * q->rms / span, span, radius, b->degree, b->p_value);
    else
        nonparabolic_check(t, q, span, radius);
}

static int has_warning(const bm_mass_tensor *t, bm_warn_code code)
{
    for (size_t i = 0; i < t->warnings.count; i++)
        if (t->warnings.items[i].code == code)
            return 1;
    return 0;
}

/* The systematic errors of a window where the data show nothing beyond
 * quadratic (grown, or given): the fits over fewer and more points differ from it by
 * their extra scatter as well, whose part, twice the standard deviation of the
 * difference (sqrt|s_f^2 - s^2| for nested windows), is no error of the mass;
 * what exceeds it, doubled as for any window (bias ~ r^2), is. The total error
 * is that and the statistical error in quadrature. */
static void table_quiet_errors(table_ctx *c, const double centre[3], size_t count,
                               bm_mass_tensor *t)
{
    size_t npar = bm_quadric_nparams(c->dims), sizes[2];
    sizes[0] = (size_t)(0.6 * (double)count);
    if (sizes[0] < npar + 2)
        sizes[0] = npar + 2;
    sizes[1] = (size_t)(1.7 * (double)count);
    double syst[3] = { 0, 0, 0 };
    for (int f = 0; f < 2; f++) {
        bm_quadric q;
        double dmax, span;
        size_t n;
        if (table_fit(c, centre, 0.0, sizes[f], &q, &dmax, &span, &n) != 0 || n == count)
            continue;
        for (int m = 0; m < c->dims; m++) {
            double v[3], lam = 0.0;
            for (int a = 0; a < 3; a++)
                v[a] = bm_dot3(c->p[a], t->axes[m]);
            for (int a = 0; a < c->dims; a++)
                for (int b = 0; b < c->dims; b++)
                    lam += v[a] * q.h[a][b] * v[b];
            if (lam == 0.0 || !isfinite(t->masses[m]) || !isfinite(t->mass_stderr[m]))
                continue;
            double mf = BM_HBAR2_OVER_ME_EV_A2 / lam;
            double sf = fabs(mf) * sqrt(fmax(0.0, bm_quadric_curvature_var(&q, v))) / fabs(lam);
            double sd = sqrt(fabs(sf * sf - t->mass_stderr[m] * t->mass_stderr[m]));
            syst[m] = fmax(syst[m], fabs(mf - t->masses[m]) - 2.0 * sd);
        }
    }
    if (has_warning(t, BM_WARN_NO_ERROR_ESTIMATE))
        return;
    drop_warnings(t, BM_WARN_NOT_CONVERGED);
    int ok = !has_warning(t, BM_WARN_KIND_UNCERTAIN) && t->converged >= 0;
    for (int m = 0; m < c->dims; m++) {
        if (!isfinite(t->mass_stderr[m]) || !isfinite(t->masses[m])) {
            ok = 0;
            continue;
        }
        double sy = 2.0 * fmax(0.0, syst[m]);
        t->mass_errors[m] = sqrt(t->mass_stderr[m] * t->mass_stderr[m] + sy * sy);
        ok &= t->mass_errors[m] <= c->conv * fabs(t->masses[m]);
    }
    if (t->converged >= 0)
        t->converged = ok;
}

/* The total error of a mass is never below its statistical part; a mass that
 * misses the tolerance is worded by the cause of most of its error (where the
 * scatter makes most of it: more or less noisy data, not a finer mesh). */
static void table_error_floor(const table_ctx *c, bm_mass_tensor *t)
{
    int noisy = 0, over = 0;
    double worst = 0.0;
    for (int m = 0; m < c->dims; m++) {
        if (!isfinite(t->mass_stderr[m]) || !isfinite(t->mass_errors[m]))
            continue;
        if (t->mass_errors[m] < t->mass_stderr[m])
            t->mass_errors[m] = t->mass_stderr[m];
        double rel = t->mass_errors[m] / fabs(t->masses[m]);
        worst = fmax(worst, rel);
        if (rel > c->conv) {
            t->converged = 0;
            over = 1;
            noisy |= t->mass_stderr[m] >= 0.5 * t->mass_errors[m];
        }
    }
    int said = has_warning(t, BM_WARN_NOT_CONVERGED);
    if (!said && !(over && !has_warning(t, BM_WARN_KIND_UNCERTAIN)))
        return;
    drop_warnings(t, BM_WARN_NOT_CONVERGED);
    if (!noisy) {
        bm_warn(&t->warnings, BM_WARN_NOT_CONVERGED, "masses not converged: the estimated "
                "error reaches %.1f%% of a mass (tolerance %.1f%%); points sampled closer "
                "around the extremum (the refinement stencil, with \"stencil\": true) would "
                "converge them", 100.0 * worst, 100.0 * c->conv);
        return;
    }
    bm_warn(&t->warnings, BM_WARN_NOT_CONVERGED, "masses not converged: the estimated error "
            "reaches %.1f%% of a mass (tolerance %.1f%%), most of it the scatter of the "
            "energies (noise %.3g meV over %zu points); more points around the extremum, or "
            "less noisy data, would reduce it", 100.0 * worst, 100.0 * c->conv,
            1e3 * t->window.noise_ev, t->window.points);
}

/* The test for terms beyond quadratic of the window around centre (the
 * radius given, or the n nearest samples); *m is its count. */
static int window_test(table_ctx *c, const double centre[3], double radius, size_t n,
                       bm_quadric_beyond *b, size_t *m)
{
    const double *eb = c->t->energies + c->band * c->t->npoints;
    double dmax, dk[3];
    *m = table_select(c, centre, radius, n, &dmax);
    for (size_t q = 0; q < *m; q++) {
        size_t id = c->order[q];
        for (int i = 0; i < 3; i++)
            dk[i] = tk(c, id)[i] - centre[i];
        for (int a = 0; a < 3; a++)
            c->u[q][a] = bm_dot3(c->p[a], dk);
        c->e[q] = eb[id];
    }
    return bm_quadric_beyond_test(*m, c->dims, (const double (*)[3])c->u, c->e, b);
}

/* The automatic window of a table fit. From the default count (three times
 * the quadric's parameters) the window grows by a quarter at a time while its
 * energies show nothing beyond quadratic (the F test of a quartic, or of a
 * cubic where the points are few, at 1 %): scatter then averages out over
 * more points, and growth stops where non-parabolicity becomes visible (two
 * windows in a row significant), so
 * the quadric's bias stays within what the data can show. Returns the count;
 * *chosen is the test of that window (degree 0 when none could be made). */
static size_t table_window(table_ctx *c, const double centre[3], size_t from,
                           bm_quadric_beyond *chosen)
{
    size_t np = c->t->npoints, n = from, best = from;
    memset(chosen, 0, sizeof *chosen);
    chosen->p_value = NAN;
    int tested = 0, significant = 0;
    for (;;) {
        bm_quadric_beyond b;
        size_t m;
        if (window_test(c, centre, 0.0, n, &b, &m) != 0)
            break;
        if (b.degree) {
            if (!tested)
                *chosen = b;          /* the default window's own test */
            tested = 1;
            if (b.p_value < BEYOND_LEVEL) {
                /* one window in a hundred shows this by chance: growth stops
                 * at the second in a row (or at the default window itself) */
                if (m == from || ++significant == 2)
                    break;
            } else {
                significant = 0;
                best = m;
                *chosen = b;
            }
        }
        if (m >= np)
            break;
        size_t next = (size_t)ceil(WINDOW_GROWTH * (double)m);
        n = next > m ? next : m + 1;
    }
    return best;
}

static bm_status table_analyse(table_ctx *c, const double start[3], int refine,
                               bm_extremum_kind hint, bm_mass_tensor *t, int *left,
                               bm_errbuf *err)
{
    tensor_init(t, c->dims, BM_METHOD_TABLE_FIT);
    if (refine) {
        /* a search that starts where bands touch (the sample at a degenerate
         * valence top): no quadric, directional masses along the sampled lines */
        double d0;
        size_t i0 = nearest_sample(c, start, &d0);
        const double *e = c->t->energies;
        size_t np = c->t->npoints;
        int touching = 0;
        for (size_t b = 0; b < c->t->nbands; b++)
            touching += b != c->band && fabs(e[b * np + i0] - e[c->band * np + i0]) <= c->degen;
        if (touching && d0 == 0.0) {
            mark_degenerate(t, hint, touching);
            memcpy(t->k, tk(c, i0), sizeof t->k);
            t->k_frac[0] = t->k_frac[1] = t->k_frac[2] = NAN;
            t->energy_ev = e[c->band * np + i0];
            t->fit_rms_ev = NAN;
            directional_masses(c, i0, t);
            table_kp(c, i0, t);
            return BM_OK;
        }
    }
    if (c->npar_short) {
        size_t npar = bm_quadric_nparams(c->dims);
        return bm_fail(err, BM_EINVAL, "k-table has %zu points but a %d-dimensional quadric needs at "
                       "least %zu (rank-deficient fit)", c->t->npoints, c->dims, npar);
    }
    double centre[3] = { start[0], start[1], start[2] };
    bm_quadric q;
    double dmax, span;
    size_t count;
    /* the window: the radius given, or grown from the default count where
     * the data allow (chosen where the walk starts and again where it ends) */
    int automatic = c->radius == 0.0;
    bm_quadric_beyond beyond = { .p_value = NAN };
    size_t want = automatic ? table_window(c, centre, c->nfit, &beyond) : c->nfit;
    for (int round = 0; round < 2; round++) {
    for (int it = 0;; it++) {
        int rc = table_fit(c, centre, c->radius, want, &q, &dmax, &span, &count);
        if (rc == -2)
            return bm_fail(err, BM_EINTERNAL, "quadric fit failed (GSL)");
        if (rc == -1)
            return bm_fail(err, BM_EINVAL, "quadric fit around k = (%.5g, %.5g, %.5g) 1/Angstrom is "
                           "rank-deficient: %zu points within %.3g 1/Angstrom determine only %zu of the "
                           "%zu parameters of a %d-dimensional quadric", centre[0], centre[1], centre[2],
                           count, dmax, q.rank, q.nparams, c->dims);
        if (!refine || it >= 40)
            break;
        double h3[3][3] = { { 0 } }, hi[3][3];
        for (int a = 0; a < 3; a++)
            for (int b = 0; b < 3; b++)
                h3[a][b] = a < c->dims && b < c->dims ? q.h[a][b] : (a == b ? 1.0 : 0.0);
        if (bm_inv3(h3, hi) != 0)
            break;
        double du[3] = { 0, 0, 0 };
        for (int a = 0; a < c->dims; a++)
            for (int b = 0; b < c->dims; b++)
                du[a] -= hi[a][b] * q.g[b];
        double step = sqrt(du[0] * du[0] + du[1] * du[1] + du[2] * du[2]);
        /* a step beyond the fit window moves the window (half its radius
         * towards the stationary point) and refits there: the walk */
        double scale_step = step > dmax ? 0.5 * dmax / step : 1.0;
        double next[3];
        for (int i = 0; i < 3; i++) {
            next[i] = centre[i];
            for (int a = 0; a < c->dims; a++)
                next[i] += scale_step * du[a] * c->p[a][i];
        }
        if (outside_data(c, next)) {
            /* the fit's stationary point lies beyond the data: its estimate is
             * the last fit inside extrapolated (refits out there would stand
             * on the edge of the data alone) */
            *left = 1;
            for (int i = 0; i < 3; i++)
                for (int a = 0; a < c->dims; a++)
                    centre[i] += du[a] * c->p[a][i];
            break;
        }
        memcpy(centre, next, sizeof centre);
        if (scale_step == 1.0 && step <= 1e-10 * (dmax > 0 ? dmax : 1.0))
            break;
        if (it == 40)
            bm_warn(&t->warnings, BM_WARN_REFINEMENT_NOT_CONVERGED, "the walk to the "
                    "stationary point did not converge in 40 refits; reported where it stopped");
    }
    /* a window of every point tests the same where the walk ended (the
     * polynomials of a degree are the same about any centre) */
    if (!automatic || !refine || *left || round == 1 || count >= c->t->npoints)
        break;
    size_t again = table_window(c, centre, c->nfit, &beyond);
    if (again == want)
        break;
    want = again;   /* the window where the walk ended differs: walk once more */
    }
    if (!automatic) {
        /* the window given is tested as it is, for the wording of warnings */
        size_t m;
        window_test(c, centre, c->radius, want, &beyond, &m);
    }
    t->window.points = count;
    t->window.radius = dmax;
    t->window.chosen = !automatic ? 0 : want > c->nfit ? 2 : 1;
    t->window.beyond_degree = beyond.degree;
    t->window.beyond_p = beyond.degree ? beyond.p_value : NAN;
    t->window.noise_ev = q.sigma;
    memcpy(t->k, centre, sizeof t->k);
    t->k_frac[0] = t->k_frac[1] = t->k_frac[2] = NAN;
    t->outside_data = *left;
    t->energy_ev = q.e0;
    t->fit_rms_ev = q.rms;
    double hk[3][3] = { { 0 } };
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            for (int a = 0; a < c->dims; a++)
                for (int b = 0; b < c->dims; b++)
                    hk[i][j] += c->p[a][i] * q.h[a][b] * c->p[b][j];
    if (finish_tensor(t, hk, c->p, c->dims, hint) != 0)
        return bm_fail(err, BM_EINTERNAL, "eigen-decomposition of the fitted Hessian failed");
    double gnorm = sqrt(q.g[0] * q.g[0] + q.g[1] * q.g[1] + q.g[2] * q.g[2]);
    if (!refine && gnorm > 1e-6) {
        /* the fit's stationary point is away from the given point: neither an
         * extremum nor a saddle there, only the local curvature */
        double h3[3][3] = { { 0 } }, hi[3][3], du = 0.0;
        for (int a = 0; a < 3; a++)
            for (int b = 0; b < 3; b++)
                h3[a][b] = a < c->dims && b < c->dims ? q.h[a][b] : (a == b ? 1.0 : 0.0);
        if (bm_inv3(h3, hi) == 0)
            for (int a = 0; a < c->dims; a++) {
                double s = 0.0;
                for (int b = 0; b < c->dims; b++)
                    s += hi[a][b] * q.g[b];
                du += s * s;
            }
        else
            du = INFINITY;
        if (sqrt(du) > 0.05 * dmax) {
            drop_warnings(t, BM_WARN_SADDLE_POINT);
            t->kind = BM_EXTREMUM_NOT_STATIONARY;
        }
        bm_warn(&t->warnings, BM_WARN_NOT_STATIONARY, "|dE/dk| = %.3g eV Angstrom at the given point: not a stationary "
                "point (the fit's stationary point is %.3g 1/Angstrom away), the tensor is the "
                "local curvature there", gnorm, sqrt(du));
    }
    table_stderr(c, &q, t);
    table_residual_check(t, &q, &beyond, span, dmax);
    if (refine) {
        /* errors: the same fit over about 0.6 and 1.7 times the points (or radius) */
        bm_bandfit est[3];
        size_t npar = bm_quadric_nparams(c->dims);
        size_t fewer = (size_t)(0.6 * (double)count);
        if (fewer < npar + 2)
            fewer = npar + 2;
        table_estimate(c, centre, c->radius > 0.0 ? 0.7 * c->radius : 0.0, fewer, &est[0]);
        table_estimate(c, centre, c->radius > 0.0 ? 1.4 * c->radius : 0.0,
                       (size_t)(1.7 * (double)count), &est[1]);
        if (est[0].ok && est[1].ok && est[0].npoints == est[1].npoints)
            est[1].ok = 0;   /* the table holds no more points: one estimate, not two */
        /* a quadric's bias grows with the square of its radius, so the spread
         * of two fits over fewer and more points understates the error of
         * either: twice the spread (Richardson's estimate for radii 1 : 2
         * gives 4/3) */
        /* and the same points centred on the sampled point nearest the
         * extremum: points lopsided about the extremum (a stencil centred on
         * an earlier estimate) let the quadric take up the band's cubic terms
         * as curvature, and the two then differ */
        double dn;
        table_estimate(c, tk(c, nearest_sample(c, centre, &dn)), c->radius, count, &est[2]);
        assess_in(c->p, c->dims, c->conv, 2.0, est, 3, centre, t);
        if (beyond.degree && beyond.p_value >= BEYOND_LEVEL)
            table_quiet_errors(c, centre, count, t);
        table_error_floor(c, t);
    }
    /* Conical test: refit with the radius doubled (or the point count grown by
     * 2^dims); curvature ~ 1/radius means E ~ |k|. */
    double r1 = dmax;
    bm_quadric q2;
    double dmax2, span2;
    size_t count2;
    int cone = 0;
    double ratio = NAN;
    if (r1 > 0.0 && table_fit(c, centre, 2.0 * r1, 0, &q2, &dmax2, &span2, &count2) == 0
        && count2 > count && dmax2 > 1.5 * r1) {
        double hn1 = quad_norm(&q), hn2 = quad_norm(&q2);
        double expo = hn2 > 0.0 ? log(hn1 / hn2) / log(dmax2 / r1) : 0.0;
        ratio = pow(2.0, 2.0 - expo);   /* equivalent E(2s)/E(s) ratio */
        cone = expo > 0.5;
    }
    if (cone) {
        /* slope: mean |E - E0| / |k - k0| over the first fit set */
        double s = 0.0;
        size_t m = 0;
        table_select(c, centre, r1, 0, &dmax);
        const double *eb = c->t->energies + c->band * c->t->npoints;
        for (size_t q3 = 0; q3 < c->t->npoints && c->dist[c->order[q3]] <= r1; q3++)
            if (c->dist[c->order[q3]] > 0.0) {
                s += fabs(eb[c->order[q3]] - t->energy_ev) / c->dist[c->order[q3]];
                m++;
            }
        mark_conical(t, ratio, m ? s / (double)m : NAN);
    } else {
        range_warnings(t);
    }
    /* degeneracy: other bands at the sampled point nearest the extremum */
    double dn;
    size_t near = nearest_sample(c, centre, &dn);
    t->sample_spacing = nearest_spacing(c, near);
    double e_self = c->t->energies[c->band * c->t->npoints + near];
    int touching = 0;
    for (size_t b = 0; b < c->t->nbands; b++)
        touching += b != c->band
                 && fabs(c->t->energies[b * c->t->npoints + near] - e_self) <= c->degen;
    /* bands that touch at the sample nearest the extremum, closer to it than
     * to any other sample: the degenerate point is that sample */
    if (touching && refine && !cone && dn <= 0.5 * nearest_spacing(c, near)) {
        mark_degenerate(t, hint, touching);
        memcpy(t->k, tk(c, near), sizeof t->k);
        t->energy_ev = e_self;
        directional_masses(c, near, t);
        table_kp(c, near, t);
    }
    for (size_t b = 0; b < c->t->nbands; b++) {
        if (b == c->band)
            continue;
        double eb = c->t->energies[b * c->t->npoints + near];
        if (fabs(eb - e_self) <= c->degen)
            bm_warn(&t->warnings, BM_WARN_DEGENERATE_BAND, "band %zu lies %.3g meV from band %zu at this %s (point %zu, "
                    "E = %.6f eV; tolerance %.3g meV): the bands are degenerate here and the mass "
                    "tensor is ill-defined", b, 1e3 * fabs(eb - e_self), c->band, kind_name(t->kind),
                    near, e_self, 1e3 * c->degen);
    }
    return BM_OK;
}

bm_status bm_ktable_mass_tensors(const bm_ktable *t, size_t band, bm_search which,
                                 const double *k_at, const bm_fit_options *opt,
                                 bm_mass_tensor **out, size_t *n_out, bm_warnings *notes,
                                 bm_errbuf *err)
{
    if (!out || !n_out)
        return bm_fail(err, BM_EINVAL, "output pointers are NULL");
    *out = NULL;
    *n_out = 0;
    if (!t)
        return bm_fail(err, BM_EINVAL, "k-table is NULL");
    if (t->npoints == 0 || !t->k || !t->energies)
        return bm_fail(err, BM_EINVAL, "k-table is empty (%zu points)", t->npoints);
    if (t->nbands == 0)
        return bm_fail(err, BM_EINVAL, "k-table has no bands (nbands = 0)");
    if (band >= t->nbands)
        return bm_fail(err, BM_EINVAL, "band index %zu is out of range: the table has %zu band%s (0..%zu)",
                       band, t->nbands, t->nbands == 1 ? "" : "s", t->nbands - 1);
    table_ctx c;
    memset(&c, 0, sizeof c);
    bm_status s = check_options(opt, which, k_at, &c.radius, &c.degen, &c.conv, err);
    if (s != BM_OK)
        return s;
    size_t np = t->npoints;
    for (size_t m = 0; m < np; m++) {
        for (int i = 0; i < 3; i++)
            if (!isfinite(t->k[3 * m + i]))
                return bm_fail(err, BM_EINVAL, "k-table point %zu: k[%d] = %g is not finite", m, i, t->k[3 * m + i]);
        if (!isfinite(t->energies[band * np + m]))
            return bm_fail(err, BM_EINVAL, "k-table point %zu, band %zu: energy %g is not finite",
                           m, band, t->energies[band * np + m]);
        if (fabs(t->energies[band * np + m]) > BM_ENERGY_MAX_EV)
            return bm_fail(err, BM_EINVAL, "k-table point %zu, band %zu: energy %g eV is "
                           "outside the domain |E| <= 1e6 eV (a unit mistake?)", m, band,
                           t->energies[band * np + m]);
        for (int i = 0; i < 3; i++)
            if (fabs(t->k[3 * m + i]) > BM_K_MAX_INV_A)
                return bm_fail(err, BM_EINVAL, "k-table point %zu: k[%d] = %g 1/Angstrom is "
                               "outside the domain |k_i| <= 1e3 1/Angstrom", m, i, t->k[3 * m + i]);
    }
    /* principal directions of the sampled points: a line, a plane or a volume */
    double cen[3] = { 0, 0, 0 }, cov[3][3] = { { 0 } };
    for (size_t m = 0; m < np; m++)
        for (int i = 0; i < 3; i++)
            cen[i] += t->k[3 * m + i] / (double)np;
    for (size_t m = 0; m < np; m++)
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                cov[i][j] += (t->k[3 * m + i] - cen[i]) * (t->k[3 * m + j] - cen[j]);
    double ev[3], vec[3][3];
    if (bm_symeig(cov, 3, ev, vec) != 0)
        return bm_fail(err, BM_EINTERNAL, "eigen-decomposition of the point spread failed");
    if (!(ev[2] > 0.0))
        return bm_fail(err, BM_EINVAL, "all %zu k-table points coincide: no curvature can be fitted", np);
    c.dims = 0;
    for (int a = 2; a >= 0; a--) {
        if (ev[a] > 1e-12 * ev[2]) {
            memcpy(c.p[c.dims], vec[a], sizeof c.p[0]);
            c.dims++;
        }
    }
    bm_complete_basis(c.p, c.dims);
    size_t npar = bm_quadric_nparams(c.dims);
    c.npar_short = np < npar;   /* only a degenerate extremum can do with fewer points */
    c.t = t;
    c.band = band;
    c.nfit = 3 * npar;
    c.dist = malloc(np * sizeof *c.dist);
    c.order = malloc(np * sizeof *c.order);
    c.pairs = malloc(np * sizeof *c.pairs);
    c.u = malloc(np * sizeof *c.u);
    c.e = malloc(np * sizeof *c.e);
    c.w = malloc(np * sizeof *c.w);
    bm_mass_tensor *res = malloc(2 * sizeof *res);
    size_t nres = 0;
    if (!c.dist || !c.order || !c.pairs || !c.u || !c.e || !c.w || !res) {
        s = bm_fail(err, BM_ENOMEM, "out of memory for a k-table of %zu points", np);
        goto done;
    }
    const double *eb = t->energies + band * np;
    if (k_at) {
        int left = 0;
        s = table_analyse(&c, k_at, 0, BM_EXTREMUM_MINIMUM, &res[0], &left, err);
        nres = s == BM_OK;
        if (s != BM_OK)
            bm_warnings_clear(&res[nres].warnings);
    } else {
        size_t lo = 0, hi = 0;
        for (size_t m = 1; m < np; m++) {
            if (eb[m] < eb[lo])
                lo = m;
            if (eb[m] > eb[hi])
                hi = m;
        }
        for (int pass = 0; pass < 2 && s == BM_OK; pass++) {
            int want_min = pass == 0;
            if ((want_min && which == BM_SEARCH_MAXIMUM) || (!want_min && which == BM_SEARCH_MINIMUM))
                continue;
            size_t from = want_min ? lo : hi;
            bm_extremum_kind want = want_min ? BM_EXTREMUM_MINIMUM : BM_EXTREMUM_MAXIMUM;
            const char *what = want_min ? "minimum" : "maximum";
            int left = 0;
            bm_mass_tensor *r = &res[nres];
            s = table_analyse(&c, t->k + 3 * from, 1, want, r, &left, err);
            if (s != BM_OK) {
                bm_warnings_clear(&r->warnings);
                break;
            }
            int drop = 0;
            if (!r->degenerate && r->kind != want && r->kind != BM_EXTREMUM_SADDLE) {
                drop = 1;
                if (notes)
                    bm_warn(notes, BM_WARN_NO_EXTREMUM, "no %s reported: from the %s sample "
                            "(point %zu) the fit reaches a %s, not a %s (the %s sample lies "
                            "on the boundary of the table; the band spans %.6f to %.6f eV over "
                            "it)", what, want_min ? "lowest" : "highest",
                            from, kind_name(r->kind), what, want_min ? "lowest" : "highest",
                            eb[lo], eb[hi]);
            } else if (nres == 1 && r->kind == BM_EXTREMUM_SADDLE && res[0].kind == BM_EXTREMUM_SADDLE) {
                double d[3] = { r->k[0] - res[0].k[0], r->k[1] - res[0].k[1], r->k[2] - res[0].k[2] };
                double tol = 1e-6 * fmax(1.0, bm_norm3(res[0].k));
                if (isfinite(r->k_error) && isfinite(res[0].k_error))
                    tol = fmax(tol, r->k_error + res[0].k_error);
                drop = bm_norm3(d) <= tol;   /* one saddle reached from both ends */
            }
            if (!drop && left) {
                /* kept apart from the extrema: an estimate to refine, never converged */
                r->converged = 0;
                bm_warn(&r->warnings, BM_WARN_NO_EXTREMUM, "beyond the data: the %s sample "
                        "(point %zu) lies on the boundary of the table and the fit's stationary "
                        "point is outside the points given, at about (%.5g, %.5g, %.5g) "
                        "1/Angstrom (an extrapolation, not an extremum: sample around it)",
                        want_min ? "lowest" : "highest", from, r->k[0], r->k[1], r->k[2]);
                if (notes)
                    bm_warn(notes, BM_WARN_NO_EXTREMUM, "no %s reported: the %s sample (point "
                            "%zu, E = %.6f eV; the band spans %.6f to %.6f eV over the table) "
                            "lies on the boundary of the table and the fit's "
                            "stationary point is beyond the points given; its estimate is under "
                            "beyond_data (sample around it, or extend the table)", what,
                            want_min ? "lowest" : "highest", from, eb[from], eb[lo], eb[hi]);
            }
            if (drop) {
                bm_warnings_clear(&r->warnings);
                bm_warnings_clear(&r->kp.warnings);
            } else {
                nres++;
            }
        }
        /* extrema inside the data first, estimates beyond it after them */
        if (nres == 2 && res[0].outside_data && !res[1].outside_data) {
            bm_mass_tensor tmp = res[0];
            res[0] = res[1];
            res[1] = tmp;
        }
    }
done:
    free(c.dist);
    free(c.order);
    free(c.pairs);
    free(c.u);
    free(c.e);
    free(c.w);
    if (s != BM_OK) {
        bm_mass_tensors_free(res, nres);
        return s;
    }
    *out = res;
    *n_out = nres;
    return BM_OK;
}

void bm_mass_tensors_free(bm_mass_tensor *t, size_t n)
{
    for (size_t i = 0; t && i < n; i++) {
        bm_warnings_clear(&t[i].warnings);
        bm_warnings_clear(&t[i].kp.warnings);
    }
    free(t);
}
