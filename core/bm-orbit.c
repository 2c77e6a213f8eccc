/* bm-orbit.c: sections, areas and cyclotron masses (bm-orbit.h). */
#include "bm-orbit.h"

#include <math.h>
#include <string.h>

#include "bm-linalg.h"
#include "bm-units.h"

typedef struct {
    const bm_grid *g;
    const bm_bandinterp *bi;
    size_t band;
    double binv[3][3];
    double c[3], u[3], v[3], b[3];   /* centre, in-plane basis, field unit vector */
    double reach;
    int sheet;
} ctx;

static double energy_at(const ctx *x, const double k[3])
{
    double f[3], e;
    for (int a = 0; a < 3; a++)
        f[a] = k[0] * x->binv[0][a] + k[1] * x->binv[1][a] + k[2] * x->binv[2][a];
    bm_bandinterp_eval(x->bi, x->band, f, &e, NULL, NULL);
    return e;
}

static void point(const ctx *x, double s, double th, double r, double k[3])
{
    double ct = cos(th), st = sin(th);
    for (int i = 0; i < 3; i++)
        k[i] = x->c[i] + s * x->b[i] + r * (ct * x->u[i] + st * x->v[i]);
}

/* Radius where the ray at angle th of the section at s crosses e, searched
 * from the guess r0 (the last ray's radius: neighbouring rays are close);
 * -1 when it does not cross within reach.  *again: it crosses back later
 * (not star-shaped). */
static double ray(const ctx *x, double s, double th, double e, int inside_below, double r0,
                  int *again)
{
    const int steps = 96;
    double dr = x->reach / steps, k[3];
    /* in(r): the point at r is inside the section */
#define INSIDE(r) (point(x, s, th, (r), k), (energy_at(x, k) - e < 0) == inside_below)
    double lo, hi;
    if (r0 > 0.0 && r0 < x->reach && INSIDE(r0)) {
        lo = r0;
        for (hi = r0 + dr; hi <= x->reach && INSIDE(hi); hi += dr)
            lo = hi;
        if (hi > x->reach)
            return -1.0;
    } else {
        hi = r0 > 0.0 && r0 < x->reach ? r0 : dr;
        if (!(r0 > 0.0 && r0 < x->reach)) {
            for (lo = 0.0; hi <= x->reach && INSIDE(hi); hi += dr)
                lo = hi;
            if (hi > x->reach)
                return -1.0;
        } else {
            for (lo = hi - dr; lo > 0.0 && !INSIDE(lo); lo -= dr)
                hi = lo;
            if (lo < 0.0)
                lo = 0.0;
        }
    }
    for (int it = 0; it < 36; it++) {
        double m = 0.5 * (lo + hi);
        if (INSIDE(m))
            lo = m;
        else
            hi = m;
    }
    double r = 0.5 * (lo + hi);
    if (again)
        for (double t = r + 4.0 * dr; t <= x->reach; t += 4.0 * dr)
            if (INSIDE(t)) {
                *again = 1;
                break;
            }
#undef INSIDE
    return r;
}

/* Area of the section at s (0 when the plane misses the pocket, -1 open). */
static double area(const ctx *x, double s, double e, int inside_below, int *irregular)
{
    double k[3];
    point(x, s, 0.0, 0.0, k);
    double d = energy_at(x, k) - e;
    if ((d < 0) != inside_below || d == 0.0)
        return 0.0;
    double sum = 0.0, r = 0.0;
    for (int j = 0; j < BM_ORBIT_RAYS; j++) {
        r = ray(x, s, 2.0 * M_PI * j / BM_ORBIT_RAYS, e, inside_below, r, irregular);
        if (r < 0.0)
            return -1.0;
        sum += r * r;
    }
    return 0.5 * sum * 2.0 * M_PI / BM_ORBIT_RAYS;
}

static bm_status setup(ctx *x, const bm_grid *g, const bm_bandinterp *bi, size_t band,
                       const double centre[3], const double field[3], bm_errbuf *err)
{
    memset(x, 0, sizeof *x);
    x->g = g, x->bi = bi, x->band = band;
    double rc[3][3];
    memcpy(rc, g->recip, sizeof rc);
    if (bm_inv3(rc, x->binv) != 0)
        return bm_fail(err, BM_EINVAL, "grid: singular reciprocal vectors");
    memcpy(x->c, centre, sizeof x->c);
    x->sheet = g->mesh[2] == 1;
    double f[3];
    memcpy(f, x->sheet ? g->recip[2] : field, sizeof f);
    double nf = bm_norm3(f);
    if (!(nf > 0.0) || !isfinite(nf))
        return bm_fail(err, BM_EINVAL, "field direction [%g, %g, %g]: not a direction",
                       field[0], field[1], field[2]);
    for (int i = 0; i < 3; i++)
        x->b[i] = f[i] / nf;
    /* in-plane basis: u along the axis least aligned with the field */
    int a = 0;
    for (int i = 1; i < 3; i++)
        if (fabs(x->b[i]) < fabs(x->b[a]))
            a = i;
    double e[3] = {0, 0, 0};
    e[a] = 1.0;
    bm_cross3(x->b, e, x->v);
    double nv = bm_norm3(x->v);
    for (int i = 0; i < 3; i++)
        x->v[i] /= nv;
    bm_cross3(x->v, x->b, x->u);
    x->reach = INFINITY;
    for (int i = 0; i < (x->sheet ? 2 : 3); i++)
        x->reach = fmin(x->reach, 0.5 * bm_norm3(g->recip[i]));
    return BM_OK;
}

/* Cyclotron mass at section s by central differences in energy at steps h
 * and 2h: the first, and their difference as its error. */
static void mass_at(const ctx *x, double s, double e, int inside_below, double h, bm_orbit *o)
{
    int irr = 0;
    double m[2];
    for (int q = 0; q < 2; q++) {
        double hh = h * (q + 1);
        double ap = area(x, s, e + hh, inside_below, &irr), am = area(x, s, e - hh, inside_below, &irr);
        m[q] = ap < 0 || am < 0 ? NAN : BM_CYCLOTRON_MASS_PER_DADE * (ap - am) / (2.0 * hh);
    }
    o->mass_me = m[0];
    o->mass_error_me = fabs(m[0] - m[1]);
    o->energy_step_ev = h;
    o->irregular |= irr;
}

bm_status bm_orbits_find(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                         const double centre[3], const double field[3], double e_ev, int sense,
                         bm_orbit_set *out, bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    ctx x;
    bm_status st = setup(&x, g, bi, band, centre, field, err);
    if (st != BM_OK)
        return st;
    out->reach = x.reach;
    double e0 = energy_at(&x, centre);
    int inside_below = e0 < e_ev;          /* an electron pocket about a minimum */
    double depth = fabs(e_ev - e0);
    double h = fmax(1e-4, 0.01 * depth);   /* energy step of the difference */
    if (depth == 0.0 || (sense > 0 && !inside_below) || (sense < 0 && inside_below)) {
        out->missed = 1;
        return BM_OK;
    }
    int irr = 0;
    double a0 = area(&x, 0.0, e_ev, inside_below, &irr);
    if (a0 < 0.0) {
        out->open = 1;
        return BM_OK;
    }
    if (a0 == 0.0) {
        out->missed = 1;
        return BM_OK;
    }
    if (x.sheet) {
        bm_orbit *o = &out->orbits[out->count++];
        o->area = a0;
        o->irregular = irr;
        mass_at(&x, 0.0, e_ev, inside_below, h, o);
        if (!inside_below)
            o->mass_me = -fabs(o->mass_me);
        return BM_OK;
    }
    /* A(s) on both sides until the plane leaves the pocket */
    enum { NS = 21 };
    double ds = x.reach / (NS - 1), as[2 * NS - 1], ss[2 * NS - 1];
    int n = 0;
    for (int i = -(NS - 1); i <= NS - 1; i++) {
        ss[n] = i * ds;
        as[n] = i == 0 ? a0 : area(&x, ss[n], e_ev, inside_below, &irr);
        if (as[n] < 0.0) {
            out->open = 1;   /* a section beside the centre is open: an open surface */
            return BM_OK;
        }
        n++;
    }
    /* this pocket only: the planes out to the first that misses it either way
     * (further on, the scan can meet another pocket, an image of this one) */
    int lo = NS - 1, hi = NS - 1;
    while (lo > 0 && as[lo - 1] > 0.0)
        lo--;
    while (hi + 1 < n && as[hi + 1] > 0.0)
        hi++;
    for (int i = 0; i < n; i++)
        if (i < lo || i > hi)
            as[i] = 0.0;
    for (int i = 1; i + 1 < n && out->count < BM_ORBIT_MAX; i++) {
        if (as[i] <= 0.0)
            continue;
        int is_max = as[i] >= as[i - 1] && as[i] > as[i + 1];
        int is_min = as[i] <= as[i - 1] && as[i] < as[i + 1] && as[i - 1] > 0 && as[i + 1] > 0;
        if (!is_max && !is_min)
            continue;
        /* parabola through the three, refined twice */
        double sa = ss[i - 1], sb = ss[i], sc = ss[i + 1];
        double fa = as[i - 1], fb = as[i], fc = as[i + 1], s0 = sb, a_ext = fb;
        for (int it = 0; it < 3; it++) {
            double den = (sb - sa) * (fb - fc) - (sb - sc) * (fb - fa);
            if (den == 0.0)
                break;
            double sv = sb - 0.5 * ((sb - sa) * (sb - sa) * (fb - fc) - (sb - sc) * (sb - sc) * (fb - fa)) / den;
            if (!(sv > sa && sv < sc))
                break;
            double av = area(&x, sv, e_ev, inside_below, &irr);
            if (av <= 0.0)
                break;
            s0 = sv, a_ext = av;
            double w = (sc - sa) / 4.0;
            sa = sv - w, sc = sv + w, sb = sv;
            fa = area(&x, sa, e_ev, inside_below, &irr);
            fc = area(&x, sc, e_ev, inside_below, &irr);
            fb = av;
            if (fa <= 0.0 || fc <= 0.0)
                break;
        }
        bm_orbit *o = &out->orbits[out->count++];
        o->k_parallel = fabs(s0) < 1e-12 ? 0.0 : s0;
        o->area = a_ext;
        o->extremum = is_max ? 1 : -1;
        o->irregular = irr;
        mass_at(&x, s0, e_ev, inside_below, h, o);
        if (!inside_below)
            o->mass_me = -fabs(o->mass_me);
    }
    return BM_OK;
}

bm_status bm_orbit_contour(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                           const double centre[3], const double field[3], double e_ev,
                           double k_parallel, double (*pts)[3], size_t n, bm_errbuf *err)
{
    ctx x;
    bm_status st = setup(&x, g, bi, band, centre, field, err);
    if (st != BM_OK)
        return st;
    int inside_below = energy_at(&x, centre) < e_ev;
    double r = 0.0;
    for (size_t j = 0; j < n; j++) {
        double th = 2.0 * M_PI * (double)j / (double)n;
        r = ray(&x, k_parallel, th, e_ev, inside_below, r > 0 ? r : 0.0, NULL);
        point(&x, k_parallel, th, r < 0 ? NAN : r, pts[j]);
    }
    return BM_OK;
}
