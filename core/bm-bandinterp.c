/* bm-bandinterp.c: periodic cubic B-splines of the bands of a grid, with the
 * crossing-aware pair blend (bm-bandinterp.h says why). */
#include "bm-bandinterp.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

struct bm_bandinterp {
    size_t mesh[3], npt, nbands;
    double offset[3];
    double pair_gap;        /* eV; 0: no pairs */
    double *single;         /* [band][npt] spline coefficients of each band */
    /* the pair's sum E_b + E_{b+1} needs no spline of its own: the spline
     * is linear in the data, so its coefficients are single[b] + single[b+1] */
    double *sqdiff;         /* [band][npt] of (E_{b+1} - E_b)^2 */
    unsigned char *paired;  /* [band]: 1 when b and b + 1 may pair (same spin channel) */
};

/* Periodic cubic B-spline prefilter along the first index of v[n][m], for
 * all m columns at once (contiguous rows: cache-friendly for every axis): the
 * recursive filter pair with pole z = sqrt(3) - 2, its periodic start values
 * summed in closed form over the period.  acc: m doubles of scratch. */
static void prefilter_rows(double *v, size_t n, size_t m, double *acc)
{
    if (n < 2)
        return;   /* one point: the spline of a constant is the constant */
    const double z = sqrt(3.0) - 2.0;
    double zn = pow(z, (double)n), zj = 1.0;
    /* causal start: sum_j z^j v[-j mod n] / (1 - z^n) */
    memset(acc, 0, m * sizeof *acc);
    for (size_t j = 0; j < n; j++, zj *= z) {
        const double *row = v + ((n - j) % n) * m;
        for (size_t c = 0; c < m; c++)
            acc[c] += zj * row[c];
    }
    for (size_t c = 0; c < m; c++)
        v[c] = acc[c] / (1.0 - zn);
    for (size_t i = 1; i < n; i++) {
        double *row = v + i * m;
        const double *prev = row - m;
        for (size_t c = 0; c < m; c++)
            row[c] += z * prev[c];
    }
    /* anticausal start: -z / (1 - z^n) sum_j z^j c+[(n - 1 + j) mod n] */
    memset(acc, 0, m * sizeof *acc);
    zj = 1.0;
    for (size_t j = 0; j < n; j++, zj *= z) {
        const double *row = v + ((n - 1 + j) % n) * m;
        for (size_t c = 0; c < m; c++)
            acc[c] += zj * row[c];
    }
    double *last = v + (n - 1) * m;
    for (size_t c = 0; c < m; c++)
        last[c] = -z * acc[c] / (1.0 - zn);
    for (size_t i = n - 1; i-- > 0;) {
        double *row = v + i * m;
        const double *next = row + m;
        for (size_t c = 0; c < m; c++)
            row[c] = z * (next[c] - row[c]);
    }
    for (size_t i = 0; i < n * m; i++)
        v[i] *= 6.0;
}

/* The three passes; the last axis is filtered as rows of a transposed copy
 * would be, line by line (its lines are contiguous and short). */
static int spline_of(double *c, const size_t n[3])
{
    size_t m = n[1] * n[2];
    double *acc = malloc((m > n[2] ? m : n[2]) * sizeof *acc);
    if (!acc)
        return -1;
    prefilter_rows(c, n[0], m, acc);
    for (size_t i = 0; i < n[0]; i++)
        prefilter_rows(c + i * m, n[1], n[2], acc);
    if (n[2] > 1) {
        double *t = malloc(n[2] * n[1] * sizeof *t);
        if (!t) {
            free(acc);
            return -1;
        }
        for (size_t i = 0; i < n[0]; i++) {
            double *plane = c + i * m;   /* [n1][n2] -> t[n2][n1], filter, back */
            for (size_t j = 0; j < n[1]; j++)
                for (size_t l = 0; l < n[2]; l++)
                    t[l * n[1] + j] = plane[j * n[2] + l];
            prefilter_rows(t, n[2], n[1], acc);
            for (size_t j = 0; j < n[1]; j++)
                for (size_t l = 0; l < n[2]; l++)
                    plane[j * n[2] + l] = t[l * n[1] + j];
        }
        free(t);
    }
    free(acc);
    return 0;
}

bm_bandinterp *bm_bandinterp_new(const bm_grid *g, double pair_gap_ev)
{
    bm_bandinterp *bi = calloc(1, sizeof *bi);
    if (!bi)
        return NULL;
    memcpy(bi->mesh, g->mesh, sizeof bi->mesh);
    memcpy(bi->offset, g->offset, sizeof bi->offset);
    bi->npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
    bi->nbands = g->nbands;
    bi->pair_gap = g->nbands > 1 && pair_gap_ev > 0.0 ? pair_gap_ev : 0.0;
    size_t np = bi->pair_gap > 0.0 ? g->nbands - 1 : 0, npt = bi->npt;
    bi->single = malloc(g->nbands * npt * sizeof *bi->single);
    bi->paired = calloc(g->nbands, 1);
    if (np)
        bi->sqdiff = malloc(np * npt * sizeof *bi->sqdiff);
    if (!bi->single || !bi->paired || (np && !bi->sqdiff)) {
        bm_bandinterp_free(bi);
        return NULL;
    }
    memcpy(bi->single, g->energies, g->nbands * npt * sizeof *bi->single);
    int failed = 0;
    for (size_t b = 0; b < g->nbands; b++)
        failed |= spline_of(bi->single + b * npt, bi->mesh);
    for (size_t b = 0; b < np; b++) {
        if (!bm_grid_same_channel(g, b, b + 1))
            continue;
        bi->paired[b] = 1;
        const double *lo = g->energies + b * npt, *hi = lo + npt;
        double *d = bi->sqdiff + b * npt;
        for (size_t m = 0; m < npt; m++)
            d[m] = (hi[m] - lo[m]) * (hi[m] - lo[m]);
        failed |= spline_of(d, bi->mesh);
    }
    if (failed) {
        bm_bandinterp_free(bi);
        return NULL;
    }
    return bi;
}

void bm_bandinterp_free(bm_bandinterp *bi)
{
    if (!bi)
        return;
    free(bi->single);
    free(bi->sqdiff);
    free(bi->paired);
    free(bi);
}

/* The 4 nodes and B-spline weights (value, first and second derivative with
 * respect to f) along one axis. */
typedef struct {
    size_t count, idx[4];
    double w[3][4];
} axis_weights;

static void weights(size_t n, double off, double f, axis_weights *a)
{
    if (n == 1) {
        a->count = 1;
        a->idx[0] = 0;
        a->w[0][0] = 1.0;
        a->w[1][0] = a->w[2][0] = 0.0;
        return;
    }
    double x = f * (double)n - off, fl = floor(x), t = x - fl, dn = (double)n;
    double r = fmod(fl, dn);
    if (r < 0.0)
        r += dn;
    size_t i0 = (size_t)r;   /* fmod keeps any finite x in range before the cast */
    double u = 1.0 - t;
    a->count = 4;
    for (int m = 0; m < 4; m++)
        a->idx[m] = (i0 + n - 1 + (size_t)m) % n;
    a->w[0][0] = u * u * u / 6.0;
    a->w[0][1] = (3.0 * t * t * t - 6.0 * t * t + 4.0) / 6.0;
    a->w[0][2] = (-3.0 * t * t * t + 3.0 * t * t + 3.0 * t + 1.0) / 6.0;
    a->w[0][3] = t * t * t / 6.0;
    a->w[1][0] = -0.5 * u * u * dn;
    a->w[1][1] = (1.5 * t * t - 2.0 * t) * dn;
    a->w[1][2] = (-1.5 * t * t + t + 0.5) * dn;
    a->w[1][3] = 0.5 * t * t * dn;
    a->w[2][0] = u * dn * dn;
    a->w[2][1] = (3.0 * t - 2.0) * dn * dn;
    a->w[2][2] = (-3.0 * t + 1.0) * dn * dn;
    a->w[2][3] = t * dn * dn;
}

typedef struct {
    double e, g[3], h[3][3];
} jet;

/* Value, gradient and (when want_h) Hessian of the spline with coefficients c. */
static void spline_eval(const bm_bandinterp *bi, const double *c, const axis_weights a[3],
                        int want_h, jet *out)
{
    const size_t n1 = bi->mesh[1], n2 = bi->mesh[2];
    memset(out, 0, sizeof *out);
    for (size_t p = 0; p < a[0].count; p++) {
        /* inner sums over axes 2 and 3 for this node of axis 1 */
        double e23 = 0.0, e2 = 0.0, e3 = 0.0, e22 = 0.0, e33 = 0.0, e23m = 0.0;
        for (size_t q = 0; q < a[1].count; q++) {
            const double *row = c + (a[0].idx[p] * n1 + a[1].idx[q]) * n2;
            double v = 0.0, d = 0.0, dd = 0.0;
            for (size_t r = 0; r < a[2].count; r++) {
                double x = row[a[2].idx[r]];
                v += a[2].w[0][r] * x;
                d += a[2].w[1][r] * x;
                dd += a[2].w[2][r] * x;
            }
            e23 += a[1].w[0][q] * v;
            e2 += a[1].w[1][q] * v;
            e3 += a[1].w[0][q] * d;
            e22 += a[1].w[2][q] * v;
            e33 += a[1].w[0][q] * dd;
            e23m += a[1].w[1][q] * d;
        }
        double w0 = a[0].w[0][p], w1 = a[0].w[1][p], w2 = a[0].w[2][p];
        out->e += w0 * e23;
        out->g[0] += w1 * e23;
        out->g[1] += w0 * e2;
        out->g[2] += w0 * e3;
        if (want_h) {
            out->h[0][0] += w2 * e23;
            out->h[1][1] += w0 * e22;
            out->h[2][2] += w0 * e33;
            out->h[0][1] += w1 * e2;
            out->h[0][2] += w1 * e3;
            out->h[1][2] += w0 * e23m;
        }
    }
    out->h[1][0] = out->h[0][1];
    out->h[2][0] = out->h[0][2];
    out->h[2][1] = out->h[1][2];
}

/* Smooth step 1 -> 0 as x goes from 1 to 3 (x: gap over pair gap), and its
 * first two derivatives with respect to x. */
static void blend_weight(double x, double *w, double *dw, double *ddw)
{
    double t = (x - 1.0) / 2.0;
    if (t <= 0.0) {
        *w = 1.0, *dw = *ddw = 0.0;
    } else if (t >= 1.0) {
        *w = 0.0, *dw = *ddw = 0.0;
    } else {
        *w = 1.0 - t * t * (3.0 - 2.0 * t);
        *dw = -6.0 * t * (1.0 - t) / 2.0;
        *ddw = -(6.0 - 12.0 * t) / 4.0;
    }
}

/* The band from the pair splines: the lower (upper) root of the pair, for
 * band = pair (band = pair + 1); one and two are the two bands' own spline
 * jets, whose sum is the spline of the pair's sum.  The square root is held
 * away from zero so that its derivatives stay finite at a touching point. */
static void pair_eval(const bm_bandinterp *bi, size_t pair, int upper, const jet *one,
                      const jet *two, const axis_weights a[3], int want_h, jet *out)
{
    jet s, d;
    memset(out, 0, sizeof *out);
    s.e = one->e + two->e;
    for (int i = 0; i < 3; i++) {
        s.g[i] = one->g[i] + two->g[i];
        for (int j = 0; j < 3; j++)
            s.h[i][j] = want_h ? one->h[i][j] + two->h[i][j] : 0.0;
    }
    spline_eval(bi, bi->sqdiff + pair * bi->npt, a, want_h, &d);
    const double floor_sq = 1e-12;   /* (1 micro-eV)^2 */
    double dv = d.e > floor_sq ? d.e : floor_sq;
    double r = sqrt(dv), sg = upper ? 0.5 : -0.5;
    out->e = 0.5 * s.e + sg * r;
    for (int i = 0; i < 3; i++) {
        double ri = d.e > floor_sq ? d.g[i] / (2.0 * r) : 0.0;
        out->g[i] = 0.5 * s.g[i] + sg * ri;
    }
    if (!want_h)
        return;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double rij = d.e > floor_sq
                             ? d.h[i][j] / (2.0 * r) - d.g[i] * d.g[j] / (4.0 * r * dv)
                             : 0.0;
            out->h[i][j] = 0.5 * s.h[i][j] + sg * rij;
        }
}

void bm_bandinterp_eval(const bm_bandinterp *bi, size_t band, const double f[3], double *e,
                        double grad[3], double hess[3][3])
{
    axis_weights a[3];
    for (int ax = 0; ax < 3; ax++)
        weights(bi->mesh[ax], bi->offset[ax], f[ax], &a[ax]);
    int want_h = hess != NULL;
    jet self;
    spline_eval(bi, bi->single + band * bi->npt, a, want_h, &self);
    jet out = self;

    if (bi->pair_gap > 0.0) {
        /* the closer neighbour in the same spin channel, by the interpolated gap */
        jet nb[2];
        int have[2] = {0, 0};
        double gap[2] = {INFINITY, INFINITY};
        for (int side = 0; side < 2; side++) {
            size_t other;
            if (side == 0 && band > 0 && bi->paired[band - 1])
                other = band - 1;
            else if (side == 1 && band + 1 < bi->nbands && bi->paired[band])
                other = band + 1;
            else
                continue;
            spline_eval(bi, bi->single + other * bi->npt, a, want_h, &nb[side]);
            gap[side] = fabs(nb[side].e - self.e);
            have[side] = gap[side] < 3.0 * bi->pair_gap;
        }
        /* each close neighbour pulls the band toward its pair recovery; two at
         * once (a triple point) share the pull so the weights never exceed 1 */
        double wsum = 0.0, w[2] = {0}, dw[2] = {0}, ddw[2] = {0};
        for (int side = 0; side < 2; side++)
            if (have[side]) {
                blend_weight(gap[side] / bi->pair_gap, &w[side], &dw[side], &ddw[side]);
                wsum += w[side];
            }
        double scale = wsum > 1.0 ? 1.0 / wsum : 1.0;
        for (int side = 0; side < 2; side++) {
            if (!have[side] || (w[side] == 0.0 && dw[side] == 0.0))
                continue;
            size_t pair = side == 0 ? band - 1 : band;
            jet p;
            pair_eval(bi, pair, side == 0, &self, &nb[side], a, want_h, &p);
            /* gap = |E_other - E_self|: its derivatives, in units of the pair gap */
            double sgn = nb[side].e >= self.e ? 1.0 : -1.0, inv = 1.0 / bi->pair_gap;
            double gg[3], diff = p.e - self.e;
            for (int i = 0; i < 3; i++)
                gg[i] = sgn * (nb[side].g[i] - self.g[i]) * inv;
            /* the normalisation of a triple point is held fixed in the
             * derivatives: it only acts where two gaps are both small */
            double ws = w[side] * scale, dws = dw[side] * scale, ddws = ddw[side] * scale;
            out.e += ws * diff;
            for (int i = 0; i < 3; i++)
                out.g[i] += ws * (p.g[i] - self.g[i]) + dws * gg[i] * diff;
            if (want_h)
                for (int i = 0; i < 3; i++)
                    for (int j = 0; j < 3; j++) {
                        double hg = sgn * (nb[side].h[i][j] - self.h[i][j]) * inv;
                        out.h[i][j] += ws * (p.h[i][j] - self.h[i][j])
                                       + dws * (gg[i] * (p.g[j] - self.g[j])
                                                + gg[j] * (p.g[i] - self.g[i]))
                                       + diff * (ddws * gg[i] * gg[j] + dws * hg);
                    }
        }
    }
    *e = out.e;
    if (grad)
        memcpy(grad, out.g, sizeof out.g);
    if (hess)
        memcpy(hess, out.h, sizeof out.h);
}

void bm_bandinterp_cell_bounds(const bm_bandinterp *bi, size_t band, const size_t cell[3],
                               double *lo, double *hi)
{
    const double *c = bi->single + band * bi->npt;
    size_t idx[3][4], cnt[3];
    for (int a = 0; a < 3; a++) {
        size_t n = bi->mesh[a];
        cnt[a] = n == 1 ? 1 : 4;
        for (size_t m = 0; m < cnt[a]; m++)
            idx[a][m] = n == 1 ? 0 : (cell[a] + n - 1 + m) % n;
    }
    double l = INFINITY, h = -INFINITY;
    for (size_t p = 0; p < cnt[0]; p++)
        for (size_t q = 0; q < cnt[1]; q++)
            for (size_t r = 0; r < cnt[2]; r++) {
                double v = c[(idx[0][p] * bi->mesh[1] + idx[1][q]) * bi->mesh[2] + idx[2][r]];
                l = v < l ? v : l;   /* not fmin: no NaN here, and no call */
                h = v > h ? v : h;
            }
    double reach = 3.0 * bi->pair_gap;
    *lo = l - reach;
    *hi = h + reach;
}
