/* bm-cyclotron.c: cyclotron masses of ellipsoidal valleys (resonance lines of
 * a valley star) and of the warped heavy/light hole bands by orbit integration. */
#include "bm-cyclotron.h"
#include "bm-mat3.h"

#include <math.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_min.h>
#include <gsl/gsl_poly.h>

#define MASS_LOW 0.01          /* usual range of effective masses, m_e */
#define MASS_HIGH 10.0         /* (common practice, no source) */

static bm_status unit_field(const double b[3], double u[3], const char *what, bm_errbuf *err)
{
    if (!b)
        return bm_fail(err, BM_EINVAL, "%s: no field direction given", what);
    double l = sqrt(b[0] * b[0] + b[1] * b[1] + b[2] * b[2]);
    if (!isfinite(l) || l < 1e-12)
        return bm_fail(err, BM_EINVAL, "%s: field direction [%g, %g, %g] has zero length "
                       "or is not finite", what, b[0], b[1], b[2]);
    for (int i = 0; i < 3; i++)
        u[i] = b[i] / l;
    return BM_OK;
}

bm_status bm_cyclotron_ellipsoid_mass(const bm_valley *v, const double b[3], double *mass,
                                      bm_errbuf *err)
{
    double u[3];
    bm_status st = unit_field(b, u, "ellipsoid cyclotron mass", err);
    if (st != BM_OK)
        return st;
    if (!v || !mass)
        return bm_fail(err, BM_EINVAL, "ellipsoid cyclotron mass: no valley or output given");
    /* m_c^2 = m1 m2 m3 / sum_i m_i (a_i . b)^2, the principal form of
     * det M / (b^T M b) */
    double prod = 1.0, den = 0.0;
    for (int i = 0; i < 3; i++) {
        if (!(v->masses[i] > 0.0) || !isfinite(v->masses[i]))
            return bm_fail(err, BM_EINVAL, "ellipsoid cyclotron mass: principal mass %d is "
                           "%g m_e: must be positive", i, v->masses[i]);
        double c = bm_v3_dot(v->axes[i], u);
        prod *= v->masses[i];
        den += v->masses[i] * c * c;
    }
    *mass = sqrt(prod / den);
    return BM_OK;
}

bm_status bm_cyclotron_lines(const bm_valley *valleys, size_t n, const double b[3],
                             bm_cyclotron_line *lines, size_t *n_lines, bm_errbuf *err)
{
    if (!valleys || !lines || !n_lines || n == 0)
        return bm_fail(err, BM_EINVAL, "cyclotron lines: no valleys given");
    *n_lines = 0;
    for (size_t v = 0; v < n; v++) {
        double m;
        bm_status st = bm_cyclotron_ellipsoid_mass(&valleys[v], b, &m, err);
        if (st != BM_OK)
            return st;
        size_t l = 0;
        while (l < *n_lines && fabs(lines[l].mass - m) > BM_CYCLOTRON_LINE_TOL * m)
            l++;
        bm_cyclotron_line *line = &lines[l];
        if (l == *n_lines) {
            memset(line, 0, sizeof *line);
            (*n_lines)++;
        }
        /* running mean of the members' masses (equal to rounding) */
        line->mass = (line->mass * (double)line->members + m) / (double)(line->members + 1);
        if (line->members < BM_STAR_MAX)
            line->index[line->members] = v;
        line->members++;
        line->valley_count += valleys[v].weight;
    }
    /* increasing mass (insertion sort: a handful of lines) */
    for (size_t i = 1; i < *n_lines; i++) {
        bm_cyclotron_line t = lines[i];
        size_t j = i;
        for (; j > 0 && lines[j - 1].mass > t.mass; j--)
            lines[j] = lines[j - 1];
        lines[j] = t;
    }
    return BM_OK;
}

bm_status bm_direction_sweep(const double from[3], const double to[3], size_t steps,
                             double (*directions)[3], double *angle_deg, bm_errbuf *err)
{
    double a[3], c[3];
    bm_status st = unit_field(from, a, "field sweep \"from\"", err);
    if (st != BM_OK)
        return st;
    if (steps == 0 || !directions || !angle_deg)
        return bm_fail(err, BM_EINVAL, "field sweep: no steps");
    if (steps == 1) {
        memcpy(directions[0], a, sizeof a);
        angle_deg[0] = 0.0;
        return BM_OK;
    }
    st = unit_field(to, c, "field sweep \"to\"", err);
    if (st != BM_OK)
        return st;
    double cosang = bm_v3_dot(a, c);
    double perp[3];
    for (int i = 0; i < 3; i++)
        perp[i] = c[i] - cosang * a[i];
    double pl = bm_v3_norm(perp);
    if (pl < 1e-9)
        return bm_fail(err, BM_EINVAL, "field sweep: \"from\" [%g, %g, %g] and \"to\" "
                       "[%g, %g, %g] are parallel or antiparallel, so they span no plane",
                       from[0], from[1], from[2], to[0], to[1], to[2]);
    double theta = atan2(pl, cosang);
    for (int i = 0; i < 3; i++)
        perp[i] /= pl;
    for (size_t s = 0; s < steps; s++) {
        double t = theta * (double)s / (double)(steps - 1);
        for (int i = 0; i < 3; i++)
            directions[s][i] = cos(t) * a[i] + sin(t) * perp[i];
        angle_deg[s] = t * 180.0 / M_PI;
    }
    return BM_OK;
}

/* ---- warped hole bands ------------------------------------------------- */

/* The dispersion in units hbar^2 / 2 m_e = 1. */
typedef struct {
    double g1, g2sq4;            /* gamma1, B^2 = 4 gamma2^2 */
    double c2;                   /* C^2 = 12 (gamma3^2 - gamma2^2), may be negative */
    int band;                    /* bm_hole_band */
    double b[3], e1[3], e2[3];   /* field and an orthonormal pair across it */
    gsl_poly_complex_workspace *ws;
    int irregular;               /* set by a section with several crossings on a ray */
    bm_status status;            /* first failure inside a section */
} Warped;

/* The factor f(n) = gamma1 -/+ sqrt(4 g2^2 + C^2 s(n)) of a unit direction. */
static double warped_factor(const Warped *w, const double n[3])
{
    double s = n[0] * n[0] * n[1] * n[1] + n[1] * n[1] * n[2] * n[2]
             + n[2] * n[2] * n[0] * n[0];
    double r = sqrt(fmax(w->g2sq4 + w->c2 * s, 0.0));
    return w->band == BM_HOLE_HEAVY ? w->g1 - r : w->g1 + r;
}

/* p(x) q(x) for polynomials of degree 2 (coefficients ascending). */
static void mul2(const double p[3], const double q[3], double out[5])
{
    for (int i = 0; i < 5; i++)
        out[i] = 0.0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            out[i + j] += p[i] * q[j];
}

static double horner(const double *c, int deg, double x, double *deriv)
{
    double v = c[deg], d = 0.0;
    for (int i = deg - 1; i >= 0; i--) {
        d = d * x + v;
        v = v * x + c[i];
    }
    *deriv = d;
    return v;
}

/* Radius along ray u (unit, across b) from the section centre kappa b to
 * the band's surface at unit energy. The squared dispersion
 *   (g1 K - 1)^2 - 4 g2^2 K^2 - C^2 S(k) = 0,  K = kappa^2 + rho^2,
 * is a quartic in rho holding both bands; a root belongs to the heavy band
 * where g1 K - 1 >= 0 (the root is then + sqrt), to the light one where it
 * is <= 0. NAN when the ray has no crossing. */
static double ray_radius(Warped *w, double kappa, const double u[3])
{
    double sq[3][3], s[5] = {0}, t[5];
    for (int i = 0; i < 3; i++) {
        double p = kappa * w->b[i], q = u[i];
        sq[i][0] = p * p;
        sq[i][1] = 2.0 * p * q;
        sq[i][2] = q * q;
    }
    static const int pairs[3][2] = {{0, 1}, {1, 2}, {2, 0}};
    for (int k = 0; k < 3; k++) {
        mul2(sq[pairs[k][0]], sq[pairs[k][1]], t);
        for (int i = 0; i < 5; i++)
            s[i] += t[i];
    }
    double a = w->g1 * w->g1 - w->g2sq4, k2 = kappa * kappa;
    double c[5] = {
        a * k2 * k2 - 2.0 * w->g1 * k2 + 1.0, 0.0, 2.0 * a * k2 - 2.0 * w->g1, 0.0, a
    };
    for (int i = 0; i < 5; i++)
        c[i] -= w->c2 * s[i];
    double z[8];
    /* parameters so large that the coefficients overflow: refused before GSL
     * is asked (its error handler is the host's) */
    for (int i = 0; i < 5; i++)
        if (!isfinite(c[i])) {
            w->status = BM_EINVAL;
            return NAN;
        }
    if (c[4] == 0.0 || gsl_poly_complex_solve(c, 5, w->ws, z) != GSL_SUCCESS) {
        w->status = BM_EINTERNAL;
        return NAN;
    }
    double best = NAN;
    int found = 0;
    for (int r = 0; r < 4; r++) {
        double re = z[2 * r], im = z[2 * r + 1];
        if (fabs(im) > 1e-7 * (1.0 + fabs(re)) || re <= 0.0)
            continue;
        for (int it = 0; it < 2; it++) {   /* polish on the quartic */
            double d, v = horner(c, 4, re, &d);
            if (d != 0.0)
                re -= v / d;
        }
        double g = w->g1 * (k2 + re * re) - 1.0;
        int heavy_root = g >= 0.0;
        if (fabs(g) < 1e-12) {
            /* the two bands meet there: count it for both */
            heavy_root = w->band == BM_HOLE_HEAVY;
        }
        if (heavy_root != (w->band == BM_HOLE_HEAVY) || re <= 0.0)
            continue;
        found++;
        if (!(re >= best))
            best = re;
    }
    if (found > 1)
        w->irregular = 1;
    return best;
}

/* Area of the section k . b = kappa at unit energy with nrays rays. */
static double section_area(Warped *w, double kappa, size_t nrays)
{
    double sum = 0.0;
    for (size_t j = 0; j < nrays; j++) {
        double ph = 2.0 * M_PI * (double)j / (double)nrays;
        double u[3];
        for (int i = 0; i < 3; i++)
            u[i] = cos(ph) * w->e1[i] + sin(ph) * w->e2[i];
        double r = ray_radius(w, kappa, u);
        if (!isfinite(r)) {
            w->irregular = 1;
            return NAN;
        }
        sum += r * r;
    }
    return 0.5 * sum * (2.0 * M_PI / (double)nrays);
}

#define SCAN_SECTIONS 32
#define SCAN_RAYS 96
#define FINAL_RAYS_MIN 128
#define FINAL_RAYS_MAX 2048

typedef struct {
    Warped *w;
    double sign;   /* -1 to find a maximum with a minimiser */
} AreaFn;

static double area_fn(double kappa, void *p)
{
    AreaFn *f = p;
    return f->sign * section_area(f->w, kappa, SCAN_RAYS);
}

/* The area with rays doubled until it settles; *change the last change. */
static double converged_area(Warped *w, double kappa, double *change)
{
    size_t n = FINAL_RAYS_MIN;
    double a = section_area(w, kappa, n), prev;
    do {
        prev = a;
        n *= 2;
        a = section_area(w, kappa, n);
        *change = fabs(a - prev) / fabs(a);
    } while (*change > 1e-10 && n < FINAL_RAYS_MAX);
    return a;
}

/* Refines an interior extremum bracketed by (lo, hi) around mid. */
static double refine_extremum(Warped *w, double lo, double mid, double hi, int is_max)
{
    AreaFn fn = { w, is_max ? -1.0 : 1.0 };
    gsl_function F = { area_fn, &fn };
    gsl_min_fminimizer *m = gsl_min_fminimizer_alloc(gsl_min_fminimizer_brent);
    if (!m)
        return mid;
    double x = mid;
    if (gsl_min_fminimizer_set(m, &F, mid, lo, hi) == GSL_SUCCESS) {
        for (int it = 0; it < 60; it++) {
            if (gsl_min_fminimizer_iterate(m) != GSL_SUCCESS)
                break;
            x = gsl_min_fminimizer_x_minimum(m);
            double a = gsl_min_fminimizer_x_lower(m), b = gsl_min_fminimizer_x_upper(m);
            if (gsl_min_test_interval(a, b, 1e-9 * hi, 1e-7) == GSL_SUCCESS)
                break;
        }
    }
    gsl_min_fminimizer_free(m);
    return x;
}

static void band_orbits(Warped *w, bm_hole_band_orbits *o, bm_warnings *warn,
                        const char *name)
{
    memset(o, 0, sizeof *o);
    o->central_mass = NAN;
    double fb = warped_factor(w, w->b);
    o->k_parallel_max_reduced = 1.0 / sqrt(fb);
    double kmax = o->k_parallel_max_reduced;
    double scan[SCAN_SECTIONS];
    for (int i = 0; i < SCAN_SECTIONS; i++)
        scan[i] = section_area(w, kmax * (double)i / SCAN_SECTIONS, SCAN_RAYS);
    /* the central orbit, then interior extrema of the scan */
    double change = 0.0;
    bm_hole_orbit *c = &o->orbits[o->n_orbits++];
    c->k_parallel_reduced = 0.0;
    c->area_reduced = converged_area(w, 0.0, &change);
    c->is_maximum = scan[1] < scan[0];
    c->mass = c->area_reduced / M_PI;
    o->central_mass = c->mass;
    o->quadrature_change = change;
    for (int i = 1; i + 1 < SCAN_SECTIONS && o->n_orbits < BM_HOLE_ORBITS_MAX; i++) {
        int is_max = scan[i] > scan[i - 1] && scan[i] >= scan[i + 1];
        int is_min = scan[i] < scan[i - 1] && scan[i] <= scan[i + 1];
        if (!is_max && !is_min)
            continue;
        w->irregular = 0;
        double k = refine_extremum(w, kmax * (i - 1) / SCAN_SECTIONS,
                                   kmax * (double)i / SCAN_SECTIONS,
                                   kmax * (i + 1) / SCAN_SECTIONS, is_max);
        bm_hole_orbit *e = &o->orbits[o->n_orbits++];
        e->k_parallel_reduced = k;
        e->is_maximum = is_max;
        e->area_reduced = converged_area(w, k, &change);
        e->irregular = w->irregular;
        e->mass = e->irregular ? NAN : e->area_reduced / M_PI;
        if (e->irregular)
            bm_warn(warn, BM_WARN_ORBIT_IRREGULAR, "%s band: the extremal section at "
                    "k_parallel_reduced %.4f is not star-shaped about its centre: its area "
                    "by rays is unreliable and no mass is given", name, k);
        else
            o->quadrature_change = fmax(o->quadrature_change, change);
    }
    for (size_t i = 0; i < o->n_orbits; i++) {
        double m = o->orbits[i].mass;
        if (isfinite(m) && (m < MASS_LOW || m > MASS_HIGH))
            bm_warn(warn, BM_WARN_MASS_OUT_OF_RANGE, "%s-hole cyclotron mass %g m_e is "
                    "outside the usual %g..%g m_e", name, m, MASS_LOW, MASS_HIGH);
    }
    if (o->quadrature_change > 1e-8)
        bm_warn(warn, BM_WARN_QUADRATURE_INACCURATE, "%s band: orbit areas converged only "
                "to %.1e relative (strong warping)", name, o->quadrature_change);
    o->closed = 1;
}

bm_status bm_hole_cyclotron_compute(const bm_luttinger *L, const double b[3],
                                    bm_hole_cyclotron *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "hole cyclotron masses: no output given");
    memset(out, 0, sizeof *out);
    double u[3];
    bm_status st = unit_field(b, u, "hole cyclotron masses", err);
    if (st != BM_OK)
        return st;
    /* bm_luttinger_direction checks the parameters */
    double mh, ml;
    int concave;
    st = bm_luttinger_direction(L, u, &mh, &ml, &concave, err);
    if (st != BM_OK)
        return st;
    memcpy(out->field_direction, u, sizeof u);
    Warped w = { .g1 = L->g1, .g2sq4 = 4.0 * L->g2 * L->g2,
                 .c2 = 12.0 * (L->g3 * L->g3 - L->g2 * L->g2) };
    memcpy(w.b, u, sizeof u);
    /* e1: the axis least aligned with b, made orthogonal; e2 = b x e1 */
    int ax = fabs(u[0]) <= fabs(u[1]) && fabs(u[0]) <= fabs(u[2]) ? 0
           : fabs(u[1]) <= fabs(u[2]) ? 1 : 2;
    double t[3] = {0, 0, 0};
    t[ax] = 1.0;
    double d = bm_v3_dot(t, u);
    for (int i = 0; i < 3; i++)
        w.e1[i] = t[i] - d * u[i];
    double l = bm_v3_norm(w.e1);
    for (int i = 0; i < 3; i++)
        w.e1[i] /= l;
    w.e2[0] = u[1] * w.e1[2] - u[2] * w.e1[1];
    w.e2[1] = u[2] * w.e1[0] - u[0] * w.e1[2];
    w.e2[2] = u[0] * w.e1[1] - u[1] * w.e1[0];
    w.ws = gsl_poly_complex_workspace_alloc(5);
    if (!w.ws)
        return bm_fail(err, BM_ENOMEM, "hole cyclotron masses: workspace allocation failed");
    /* the heavy surface is closed only where gamma1 - sqrt(...) > 0 in every
     * direction: g1 > 2 max(|g2|, |g3|) (the root is monotone in s) */
    double fmin = L->g1 - 2.0 * fmax(fabs(L->g2), fabs(L->g3));
    for (int band = 0; band < 2; band++) {
        w.band = band;
        w.irregular = 0;
        w.status = BM_OK;
        if (band == BM_HOLE_HEAVY && !(fmin > 1e-12 * L->g1)) {
            memset(&out->band[band], 0, sizeof out->band[band]);
            out->band[band].central_mass = NAN;
            out->band[band].k_parallel_max_reduced = NAN;
            bm_warn(&out->warnings, BM_WARN_OPEN_SURFACE, "heavy-hole surface is open "
                    "(gamma1 - 2 max(|gamma2|, |gamma3|) = %g <= 0): its orbits are not "
                    "closed and have no cyclotron mass", fmin);
            continue;
        }
        band_orbits(&w, &out->band[band], &out->warnings,
                    band == BM_HOLE_HEAVY ? "heavy" : "light");
        if (w.status != BM_OK) {
            gsl_poly_complex_workspace_free(w.ws);
            bm_warnings_clear(&out->warnings);
            if (w.status == BM_EINVAL)
                return bm_fail(err, BM_EINVAL, "hole cyclotron masses: the Luttinger "
                               "parameters are too large (the section's quartic overflows "
                               "a double)");
            return bm_fail(err, BM_EINTERNAL, "hole cyclotron masses: the quartic of a "
                           "section could not be solved");
        }
    }
    gsl_poly_complex_workspace_free(w.ws);
    return BM_OK;
}
