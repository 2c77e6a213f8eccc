/* bm-cuts.c: samples near a line through an extremum, and the quadric's
 * energies on it (bm-cuts.h). */
#include "bm-cuts.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bm-bandinterp.h"
#include "bm-linalg.h"
#include "bm-units.h"

void bm_line_samples_clear(bm_line_samples *s)
{
    free(s->q);
    free(s->e);
    memset(s, 0, sizeof *s);
}

typedef struct { double q, e; } sample;

static int by_q(const void *a, const void *b)
{
    double d = ((const sample *)a)->q - ((const sample *)b)->q;
    return d < 0 ? -1 : d > 0;
}

/* Sorts the n samples into out (which takes the memory of its own copies). */
static bm_status finish(sample *s, size_t n, bm_line_samples *out, bm_errbuf *err)
{
    qsort(s, n, sizeof *s, by_q);
    out->n = n;
    out->q = malloc((n ? n : 1) * sizeof(double));
    out->e = malloc((n ? n : 1) * sizeof(double));
    if (!out->q || !out->e) {
        bm_line_samples_clear(out);
        return bm_fail(err, BM_ENOMEM, "band cut: out of memory");
    }
    for (size_t i = 0; i < n; i++) {
        out->q[i] = s[i].q;
        out->e[i] = s[i].e;
    }
    return BM_OK;
}

static int unit(const double a[3], double u[3])
{
    double n = sqrt(a[0] * a[0] + a[1] * a[1] + a[2] * a[2]);
    if (!(n > 0) || !isfinite(n))
        return 0;
    for (int i = 0; i < 3; i++)
        u[i] = a[i] / n;
    return 1;
}

/* Adds (q, e) for dk when it lies within tol of the line and reach along it. */
static int near_line(const double dk[3], const double u[3], double reach, double tol, double *q)
{
    *q = dk[0] * u[0] + dk[1] * u[1] + dk[2] * u[2];
    double p2 = 0;
    for (int i = 0; i < 3; i++) {
        double p = dk[i] - *q * u[i];
        p2 += p * p;
    }
    return fabs(*q) <= reach && sqrt(p2) <= tol;
}

double bm_grid_mesh_step(const bm_grid *g)
{
    double step = INFINITY;
    for (int a = 0; a < 3; a++) {
        if (g->mesh[a] < 2)
            continue;   /* a sheet's third axis */
        const double *b = g->recip[a];
        step = fmin(step, sqrt(b[0] * b[0] + b[1] * b[1] + b[2] * b[2]) / (double)g->mesh[a]);
    }
    return step;
}

bm_status bm_grid_line_samples(const bm_grid *g, size_t band, const double k0[3],
                               const double axis[3], double reach, bm_line_samples *out,
                               bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    double u[3], b[3][3], binv[3][3];
    if (!unit(axis, u))
        return bm_fail(err, BM_EINVAL, "band cut: the direction has no length");
    if (band >= g->nbands)
        return bm_fail(err, BM_EINVAL, "band cut: band %zu of %zu", band, g->nbands);
    if (!(reach > 0) || !isfinite(reach))
        return bm_fail(err, BM_EINVAL, "band cut: reach %g 1/Angstrom", reach);
    memcpy(b, g->recip, sizeof b);
    if (bm_inv3(b, binv) != 0)
        return bm_fail(err, BM_EINVAL, "band cut: the reciprocal vectors are singular");
    double tol = 0.5 * bm_grid_mesh_step(g);
    size_t total = g->mesh[0] * g->mesh[1] * g->mesh[2], cap = 64, n = 0;
    sample *s = malloc(cap * sizeof *s);
    if (!s)
        return bm_fail(err, BM_ENOMEM, "band cut: out of memory");
    for (size_t idx = 0; idx < total; idx++) {
        size_t i = idx / (g->mesh[1] * g->mesh[2]), j = idx / g->mesh[2] % g->mesh[1],
               l = idx % g->mesh[2];
        double f[3] = { (i + g->offset[0]) / g->mesh[0], (j + g->offset[1]) / g->mesh[1],
                        (l + g->offset[2]) / g->mesh[2] };
        /* the offset from k0 in fractional coordinates, to the nearest image,
         * and its neighbours (a skewed cell's nearest image may be one off) */
        double df[3];
        for (int a = 0; a < 3; a++) {
            double f0 = k0[0] * binv[0][a] + k0[1] * binv[1][a] + k0[2] * binv[2][a];
            df[a] = f[a] - f0;
            df[a] -= floor(df[a] + 0.5);
        }
        for (int m = 0; m < 27; m++) {
            double sh[3] = { m % 3 - 1, m / 3 % 3 - 1, m / 9 - 1 }, dk[3], q;
            if (g->mesh[2] < 2 && sh[2] != 0)
                continue;
            for (int c = 0; c < 3; c++)
                dk[c] = (df[0] + sh[0]) * b[0][c] + (df[1] + sh[1]) * b[1][c]
                      + (df[2] + sh[2]) * b[2][c];
            if (!near_line(dk, u, reach, tol, &q))
                continue;
            if (n == cap) {
                sample *more = realloc(s, 2 * cap * sizeof *s);
                if (!more) {
                    free(s);
                    return bm_fail(err, BM_ENOMEM, "band cut: out of memory");
                }
                s = more;
                cap *= 2;
            }
            s[n].q = q;
            s[n].e = g->energies[band * total + idx];
            n++;
        }
    }
    bm_status st = finish(s, n, out, err);
    free(s);
    return st;
}

bm_status bm_ktable_line_samples(const bm_ktable *t, size_t band, const double k0[3],
                                 const double axis[3], double reach, double tolerance,
                                 bm_line_samples *out, bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    double u[3];
    if (!unit(axis, u))
        return bm_fail(err, BM_EINVAL, "band cut: the direction has no length");
    if (band >= t->nbands)
        return bm_fail(err, BM_EINVAL, "band cut: band %zu of %zu", band, t->nbands);
    if (!(reach > 0) || !isfinite(reach) || !(tolerance >= 0) || !isfinite(tolerance))
        return bm_fail(err, BM_EINVAL, "band cut: reach %g, tolerance %g 1/Angstrom", reach,
                       tolerance);
    sample *s = malloc((t->npoints ? t->npoints : 1) * sizeof *s);
    if (!s)
        return bm_fail(err, BM_ENOMEM, "band cut: out of memory");
    size_t n = 0;
    for (size_t i = 0; i < t->npoints; i++) {
        double dk[3], q;
        for (int c = 0; c < 3; c++)
            dk[c] = t->k[3 * i + c] - k0[c];
        if (near_line(dk, u, reach, tolerance, &q)) {
            s[n].q = q;
            s[n].e = t->energies[band * t->npoints + i];
            n++;
        }
    }
    bm_status st = finish(s, n, out, err);
    free(s);
    return st;
}

double bm_mass_tensor_energy(const bm_mass_tensor *t, const double dk[3])
{
    double quad = 0;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            quad += dk[i] * t->inv_mass[i][j] * dk[j];
    return t->energy_ev + 0.5 * BM_HBAR2_OVER_ME_EV_A2 * quad;
}

double bm_quadric_reach(double mass_me, double energy_ev)
{
    return sqrt(2.0 * fabs(mass_me) * energy_ev / BM_HBAR2_OVER_ME_EV_A2);
}

bm_status bm_grid_line_band(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                            const double k0[3], const double axis[3], const double *q,
                            size_t n, double *e, bm_errbuf *err)
{
    double u[3], b[3][3], binv[3][3];
    if (!unit(axis, u))
        return bm_fail(err, BM_EINVAL, "band cut: the direction has no length");
    if (band >= g->nbands)
        return bm_fail(err, BM_EINVAL, "band cut: band %zu of %zu", band, g->nbands);
    memcpy(b, g->recip, sizeof b);
    if (bm_inv3(b, binv) != 0)
        return bm_fail(err, BM_EINVAL, "band cut: the reciprocal vectors are singular");
    for (size_t i = 0; i < n; i++) {
        double k[3], f[3];
        for (int c = 0; c < 3; c++)
            k[c] = k0[c] + q[i] * u[c];
        for (int a = 0; a < 3; a++)
            f[a] = k[0] * binv[0][a] + k[1] * binv[1][a] + k[2] * binv[2][a];
        bm_bandinterp_eval(bi, band, f, &e[i], NULL, NULL);
    }
    return BM_OK;
}
