/* bm-bandinterp.c: the smooth Fourier series of the bands of a grid, carried
 * on a finer mesh by periodic cubic B-splines, with the crossing-aware pair
 * blend (bm-bandinterp.h says why). */
#include "bm-bandinterp.h"

#include <gsl/gsl_errno.h>
#include <gsl/gsl_fft_complex.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bm-mat3.h"

struct bm_bandinterp {
    size_t mesh[3], npt;           /* the spline's mesh: the grid's, times up */
    size_t first, nbands;          /* the grid's bands first .. first + nbands - 1 */
    size_t up[3];                  /* fine mesh steps per grid step, each axis */
    double offset[3];              /* in fine mesh steps */
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

/* The smooth Fourier series of a band, sampled on the finer mesh.  The grid
 * fixes one coefficient sum per class of lattice vectors R that alias onto
 * each other on its mesh; each sum is spread over the class's members inside
 * the fine mesh's frequency box in proportion to 1 / rho(|R|), with
 * rho = (1 - c x^2)^2 + c x^6, x = |R| / R_min, c = 3/4: the roughness of
 * Pickett, Krakauer & Allen, Phys. Rev. B 38, 2721 (1988).  The result is the
 * series of least roughness through the mesh values: it passes through each
 * of them, and being weighed by Cartesian |R| it is equally smooth in every
 * direction of the zone, which a spline on skewed fractional axes is not.
 * The mesh offset drops out: its phase enters the coefficients and the
 * evaluation with opposite signs. */
typedef struct {
    size_t n[3], m[3];
    double metric[3][3];   /* a_i . a_j / R_min^2 */
    /* per axis, the grid's and the fine mesh's (GSL wants a workspace of
     * the transform's own length) */
    gsl_fft_complex_wavetable *wg[3], *wf[3];
    gsl_fft_complex_workspace *sg[3], *sf[3];
    double *z, *zf;        /* interleaved complex: the grid's and the fine mesh's */
    double *share;         /* [fine frequency]: 1 / rho, normalised over its class */
    size_t *class_of;      /* [fine frequency]: the grid frequency it aliases onto */
} smoother;

/* Signed frequency of FFT index i of n, in [-n/2, n - n/2). */
static long freq(size_t i, size_t n)
{
    return i < n - n / 2 ? (long)i : (long)i - (long)n;
}

static int fft3(double *z, const size_t n[3], gsl_fft_complex_wavetable *const wt[3],
                gsl_fft_complex_workspace *const ws[3], gsl_fft_direction dir)
{
    size_t stride[3] = { n[1] * n[2], n[2], 1 }, total = n[0] * n[1] * n[2];
    for (int a = 0; a < 3; a++) {
        if (n[a] == 1)
            continue;
        for (size_t start = 0; start < total; start++) {
            /* one line per start index whose coordinate along a is 0 */
            if ((start / stride[a]) % n[a] != 0)
                continue;
            if (gsl_fft_complex_transform(z + 2 * start, stride[a], n[a], wt[a], ws[a], dir) != GSL_SUCCESS)
                return -1;
        }
    }
    return 0;
}

static void smoother_free(smoother *s)
{
    for (int a = 0; a < 3; a++) {
        if (s->wg[a])
            gsl_fft_complex_wavetable_free(s->wg[a]);
        if (s->wf[a])
            gsl_fft_complex_wavetable_free(s->wf[a]);
        if (s->sg[a])
            gsl_fft_complex_workspace_free(s->sg[a]);
        if (s->sf[a])
            gsl_fft_complex_workspace_free(s->sf[a]);
    }
    free(s->z);
    free(s->zf);
    free(s->share);
    free(s->class_of);
}

static int smoother_init(smoother *s, const bm_grid *g, const size_t up[3])
{
    memset(s, 0, sizeof *s);
    for (int a = 0; a < 3; a++) {
        s->n[a] = g->mesh[a];
        s->m[a] = g->mesh[a] * up[a];
        if (s->n[a] == 1)
            continue;   /* no transform along a flat axis */
        s->wg[a] = gsl_fft_complex_wavetable_alloc(s->n[a]);
        s->wf[a] = gsl_fft_complex_wavetable_alloc(s->m[a]);
        s->sg[a] = gsl_fft_complex_workspace_alloc(s->n[a]);
        s->sf[a] = gsl_fft_complex_workspace_alloc(s->m[a]);
        if (!s->wg[a] || !s->wf[a] || !s->sg[a] || !s->sf[a])
            return -1;
    }
    s->z = malloc(2 * s->n[0] * s->n[1] * s->n[2] * sizeof *s->z);
    s->zf = malloc(2 * s->m[0] * s->m[1] * s->m[2] * sizeof *s->zf);
    if (!s->z || !s->zf)
        return -1;
    /* real-space metric 4 pi^2 (B B^T)^-1, scaled by the shortest lattice
     * vector among the axes that have a mesh */
    double bbt[9], inv[9] = { 0 };
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            bbt[3 * i + j] = bm_v3_dot(g->recip[i], g->recip[j]);
    if (!bm_m3_inverse(inv, bbt, 0.0))
        return -1;
    double rmin2 = INFINITY;
    for (int c = 1; c < 27; c++) {
        int v[3] = { c % 3 - 1, (c / 3) % 3 - 1, c / 9 - 1 };
        int skip = v[0] == 0 && v[1] == 0 && v[2] == 0;
        for (int a = 0; a < 3; a++)
            skip |= v[a] != 0 && g->mesh[a] == 1;
        if (skip)
            continue;
        double q = 0.0;
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                q += 4.0 * M_PI * M_PI * inv[3 * i + j] * v[i] * v[j];
        rmin2 = q < rmin2 ? q : rmin2;
    }
    if (!(rmin2 > 0.0 && isfinite(rmin2)))
        return -1;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            s->metric[i][j] = 4.0 * M_PI * M_PI * inv[3 * i + j] / rmin2;
    /* the fine mesh's frequencies R (its FFT indices, signed) are the members
     * of the classes: R aliases onto R mod n on the grid */
    size_t np = s->n[0] * s->n[1] * s->n[2], nf = s->m[0] * s->m[1] * s->m[2];
    double *total = calloc(np, sizeof *total);
    s->share = malloc(nf * sizeof *s->share);
    s->class_of = malloc(nf * sizeof *s->class_of);
    if (!total || !s->share || !s->class_of) {
        free(total);
        return -1;
    }
    for (size_t d = 0; d < nf; d++) {
        size_t idx[3] = { d / (s->m[1] * s->m[2]), (d / s->m[2]) % s->m[1], d % s->m[2] }, c[3];
        double r[3], x2 = 0.0;
        for (int a = 0; a < 3; a++) {
            long f = freq(idx[a], s->m[a]), na = (long)s->n[a];
            r[a] = (double)f;
            c[a] = (size_t)((f % na + na) % na);
        }
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                x2 += s->metric[i][j] * r[i] * r[j];
        double t = 1.0 - 0.75 * x2;
        s->share[d] = 1.0 / (t * t + 0.75 * x2 * x2 * x2);
        s->class_of[d] = (c[0] * s->n[1] + c[1]) * s->n[2] + c[2];
        total[s->class_of[d]] += s->share[d];
    }
    for (size_t d = 0; d < nf; d++)
        s->share[d] /= total[s->class_of[d]];
    free(total);
    return 0;
}

/* in: the band on the grid's mesh; out: its series on the fine mesh. */
static int smooth_band(smoother *s, const double *in, double *out)
{
    const size_t *n = s->n, *m = s->m;
    size_t np = n[0] * n[1] * n[2], nf = m[0] * m[1] * m[2];
    for (size_t i = 0; i < np; i++) {
        s->z[2 * i] = in[i] / (double)np;
        s->z[2 * i + 1] = 0.0;
    }
    if (fft3(s->z, n, s->wg, s->sg, gsl_fft_forward) != 0)
        return -1;
    /* each fine frequency takes its share of its class's sum */
    for (size_t d = 0; d < nf; d++) {
        size_t c = s->class_of[d];
        s->zf[2 * d] = s->z[2 * c] * s->share[d];
        s->zf[2 * d + 1] = s->z[2 * c + 1] * s->share[d];
    }
    if (fft3(s->zf, m, s->wf, s->sf, gsl_fft_backward) != 0)
        return -1;
    for (size_t d = 0; d < nf; d++)
        out[d] = s->zf[2 * d];
    return 0;
}

/* Fine mesh steps per grid step along an axis of n points: enough for
 * BM_BANDINTERP_FINE_MIN points, none on meshes that have them already. */
static size_t fine_factor(size_t n)
{
    if (n == 1 || n >= BM_BANDINTERP_FINE_MIN)
        return 1;
    return (BM_BANDINTERP_FINE_MIN + n - 1) / n;
}

static bm_bandinterp *new_range(const bm_grid *g, double pair_gap_ev, size_t first,
                                size_t count)
{
    bm_bandinterp *bi = calloc(1, sizeof *bi);
    if (!bi)
        return NULL;
    bi->first = first;
    bi->nbands = count;
    bi->pair_gap = count > 1 && pair_gap_ev > 0.0 ? pair_gap_ev : 0.0;
    size_t np = bi->pair_gap > 0.0 ? count - 1 : 0;
    /* the finer mesh, coarsened again while its bands and pairs would pass
     * the memory budget */
    for (int a = 0; a < 3; a++)
        bi->up[a] = fine_factor(g->mesh[a]);
    for (;;) {
        double total = (double)(count + np);
        for (int a = 0; a < 3; a++)
            total *= (double)(g->mesh[a] * bi->up[a]);
        if (total <= BM_BANDINTERP_FINE_BUDGET || (bi->up[0] == 1 && bi->up[1] == 1 && bi->up[2] == 1))
            break;
        for (int a = 0; a < 3; a++)
            bi->up[a] = bi->up[a] > 1 ? bi->up[a] - 1 : 1;
    }
    int smooth = bi->up[0] > 1 || bi->up[1] > 1 || bi->up[2] > 1;
    for (int a = 0; a < 3; a++) {
        bi->mesh[a] = g->mesh[a] * bi->up[a];
        bi->offset[a] = g->offset[a] * (double)bi->up[a];
    }
    size_t npt = bi->npt = bi->mesh[0] * bi->mesh[1] * bi->mesh[2];
    size_t ngrid = g->mesh[0] * g->mesh[1] * g->mesh[2];
    bi->single = malloc(count * npt * sizeof *bi->single);
    bi->paired = calloc(count, 1);
    if (np)
        bi->sqdiff = malloc(np * npt * sizeof *bi->sqdiff);
    if (!bi->single || !bi->paired || (np && !bi->sqdiff)) {
        bm_bandinterp_free(bi);
        return NULL;
    }
    /* each band, and each pair's squared difference taken on the grid (where
     * it is smooth through a crossing; from the fine bands it would not be),
     * as their series on the fine mesh */
    int failed = 0;
    smoother sm;
    double *sq = NULL;
    if (smooth) {
        failed = smoother_init(&sm, g, bi->up);
        if (!failed && np && !(sq = malloc(ngrid * sizeof *sq)))
            failed = 1;
    }
    for (size_t b = 0; b < count && !failed; b++) {
        const double *band = g->energies + (first + b) * ngrid;
        if (smooth)
            failed = smooth_band(&sm, band, bi->single + b * npt);
        else
            memcpy(bi->single + b * npt, band, npt * sizeof *bi->single);
        if (failed || b + 1 >= count || !np || !bm_grid_same_channel(g, first + b, first + b + 1))
            continue;
        bi->paired[b] = 1;
        double *d = smooth ? sq : bi->sqdiff + b * npt;
        for (size_t m = 0; m < ngrid; m++)
            d[m] = (band[m + ngrid] - band[m]) * (band[m + ngrid] - band[m]);
        if (smooth)
            failed = smooth_band(&sm, sq, bi->sqdiff + b * npt);
        failed |= spline_of(bi->sqdiff + b * npt, bi->mesh);
    }
    if (smooth)
        smoother_free(&sm);
    free(sq);
    for (size_t b = 0; b < count && !failed; b++)
        failed |= spline_of(bi->single + b * npt, bi->mesh);
    if (failed) {
        bm_bandinterp_free(bi);
        return NULL;
    }
    return bi;
}

bm_bandinterp *bm_bandinterp_new(const bm_grid *g, double pair_gap_ev)
{
    return new_range(g, pair_gap_ev, 0, g->nbands);
}

bm_bandinterp *bm_bandinterp_new_bands(const bm_grid *g, double pair_gap_ev, size_t lo,
                                       size_t hi)
{
    if (lo > hi || hi >= g->nbands)
        return NULL;
    /* a band's pair blend reads its two neighbours: two more on each side
     * make the neighbours themselves complete */
    size_t first = lo >= 2 ? lo - 2 : 0, last = hi + 2 < g->nbands ? hi + 2 : g->nbands - 1;
    return new_range(g, pair_gap_ev, first, last - first + 1);
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
    band -= bi->first;
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
    /* the grid cell holds up^3 fine cells, carried by up + 3 coefficients
     * along each axis */
    const double *c = bi->single + (band - bi->first) * bi->npt;
    size_t first[3], cnt[3];
    for (int a = 0; a < 3; a++) {
        size_t n = bi->mesh[a];
        cnt[a] = n == 1 ? 1 : bi->up[a] + 3;
        first[a] = n == 1 ? 0 : (cell[a] * bi->up[a] + n - 1) % n;
    }
    double l = INFINITY, h = -INFINITY;
    for (size_t p = 0; p < cnt[0]; p++) {
        size_t i = (first[0] + p) % bi->mesh[0];
        for (size_t q = 0; q < cnt[1]; q++) {
            const double *row = c + (i * bi->mesh[1] + (first[1] + q) % bi->mesh[1]) * bi->mesh[2];
            for (size_t r = 0; r < cnt[2]; r++) {
                double v = row[(first[2] + r) % bi->mesh[2]];
                l = v < l ? v : l;   /* not fmin: no NaN here, and no call */
                h = v > h ? v : h;
            }
        }
    }
    double reach = 3.0 * bi->pair_gap;
    *lo = l - reach;
    *hi = h + reach;
}
