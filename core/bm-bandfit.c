/* bm-bandfit.c: local polynomial fits of a band around a mesh point, crossing-
 * aware: near a crossing of sorted bands the pair's sum and squared difference
 * are fitted instead of the band, because those stay smooth through the kink. */
#include "bm-bandfit.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>

#include "bm-linalg.h"

/* Chosen on the first-principles silicon corpus (tests/data/first-principles):
 * degree 4 needs about two mesh steps and degree 6 three for at least 1.5 mesh
 * points per coefficient; degree 4 over three steps is biased by the band's
 * non-parabolicity and would only widen the spread.  The spread of these
 * three covered the true error at every mesh of the corpus. */
const bm_bandfit_setting bm_bandfit_settings[BM_BANDFIT_NSETTINGS] = {
    { 4, 2.0 }, { 4, 2.5 }, { 6, 3.0 },
};

#define MAX_ORDER 6
#define MAX_TERMS 84            /* monomials of degree <= 6 in 3 variables */
#define MIN_POINTS_PER_TERM 1.5
#define NEWTON_MAX 60
#define STEP_CAP 0.3            /* largest Newton step, mesh steps */
#define STAY_WITHIN 0.7         /* the stationary point must lie within this part of the radius */

double bm_bandfit_step(const bm_grid *g)
{
    double step = 0.0;
    for (int a = 0; a < 3; a++)
        if (g->mesh[a] > 1)
            step = fmax(step, bm_norm3(g->recip[a]) / (double)g->mesh[a]);
    return step;
}

typedef struct {
    int n;                      /* monomials */
    int dims;
    unsigned char ex[MAX_TERMS][3];
} monomials;

static void monomials_make(monomials *m, int dims, int order)
{
    m->n = 0;
    m->dims = dims;
    for (int a = 0; a <= order; a++)
        for (int b = 0; b <= (dims > 1 ? order - a : 0); b++)
            for (int c = 0; c <= (dims > 2 ? order - a - b : 0); c++) {
                m->ex[m->n][0] = (unsigned char)a;
                m->ex[m->n][1] = (unsigned char)b;
                m->ex[m->n][2] = (unsigned char)c;
                m->n++;
            }
}

/* Value, gradient and Hessian (in u) of sum_j c_j u^ex_j. */
static void poly_eval(const monomials *m, const double *c, const double u[3], double *v,
                      double g[3], double h[3][3])
{
    double pw[3][MAX_ORDER + 1];
    for (int a = 0; a < 3; a++) {
        pw[a][0] = 1.0;
        for (int k = 1; k <= MAX_ORDER; k++)
            pw[a][k] = pw[a][k - 1] * u[a];
    }
    *v = 0.0;
    memset(g, 0, 3 * sizeof *g);
    memset(h, 0, 9 * sizeof **h);
    for (int j = 0; j < m->n; j++) {
        const unsigned char *e = m->ex[j];
        double term = c[j];
        *v += term * pw[0][e[0]] * pw[1][e[1]] * pw[2][e[2]];
        for (int a = 0; a < m->dims; a++) {
            if (!e[a])
                continue;
            int ea[3] = { e[0], e[1], e[2] };
            ea[a]--;
            g[a] += term * e[a] * pw[0][ea[0]] * pw[1][ea[1]] * pw[2][ea[2]];
            for (int b = 0; b < m->dims; b++) {
                if (!ea[b])
                    continue;
                int eb[3] = { ea[0], ea[1], ea[2] };
                eb[b]--;
                h[a][b] += term * e[a] * ea[b] * pw[0][eb[0]] * pw[1][eb[1]] * pw[2][eb[2]];
            }
        }
    }
}

/* Mesh points within radius of kc: their offsets in the basis p, over the
 * radius (u), and their linear mesh indices. */
typedef struct {
    size_t n, cap;
    double (*u)[3];
    size_t *idx;
} neighbourhood;

static void neighbourhood_free(neighbourhood *nb)
{
    free(nb->u);
    free(nb->idx);
}

static int neighbourhood_collect(const bm_grid *g, const double f0[3], const double kc[3],
                                 int dims, double p[3][3], double radius, neighbourhood *nb)
{
    memset(nb, 0, sizeof *nb);
    double b[3][3], binv[3][3];
    memcpy(b, g->recip, sizeof b);
    if (bm_inv3(b, binv) != 0)
        return -1;
    long reach[3], centre[3];
    size_t cap = 1;
    for (int a = 0; a < 3; a++) {
        long n = (long)g->mesh[a];
        double col = sqrt(binv[0][a] * binv[0][a] + binv[1][a] * binv[1][a]
                          + binv[2][a] * binv[2][a]);
        reach[a] = n > 1 ? (long)ceil(radius * (double)n * col) : 0;
        if (reach[a] > n / 2)
            reach[a] = n / 2;
        centre[a] = lround(f0[a] * (double)n);
        cap *= (size_t)(2 * reach[a] + 1);
    }
    nb->u = malloc(cap * sizeof *nb->u);
    nb->idx = malloc(cap * sizeof *nb->idx);
    if (!nb->u || !nb->idx)
        return -1;
    for (long o0 = -reach[0]; o0 <= reach[0]; o0++)
        for (long o1 = -reach[1]; o1 <= reach[1]; o1++)
            for (long o2 = -reach[2]; o2 <= reach[2]; o2++) {
                long id[3] = { centre[0] + o0, centre[1] + o1, centre[2] + o2 };
                double fp[3], k[3], dk[3];
                size_t w[3];
                for (int a = 0; a < 3; a++) {
                    long n = (long)g->mesh[a], r = id[a] % n;
                    w[a] = (size_t)(r < 0 ? r + n : r);
                    fp[a] = n > 1 ? (double)id[a] / (double)n : 0.0;
                }
                for (int i = 0; i < 3; i++) {
                    k[i] = fp[0] * b[0][i] + fp[1] * b[1][i] + fp[2] * b[2][i];
                    dk[i] = k[i] - kc[i];
                }
                if (bm_norm3(dk) > radius * (1.0 + 1e-9))
                    continue;
                for (int a = 0; a < 3; a++)
                    nb->u[nb->n][a] = a < dims ? bm_dot3(p[a], dk) / radius : 0.0;
                nb->idx[nb->n] = (w[0] * g->mesh[1] + w[1]) * g->mesh[2] + w[2];
                nb->n++;
            }
    return 0;
}

int bm_bandfit_partner(const bm_grid *g, size_t band, const double f0[3], const double kc[3],
                       double radius, double *min_gap, double *span)
{
    *min_gap = INFINITY;
    *span = 0.0;
    if (g->nbands < 2)
        return -1;
    double p[3][3] = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } };
    neighbourhood nb;
    if (neighbourhood_collect(g, f0, kc, 3, p, radius, &nb) != 0) {
        neighbourhood_free(&nb);
        return -1;
    }
    size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
    const double *e = g->energies + band * npt;
    int best = -1;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t q = 0; q < nb.n; q++) {
        lo = fmin(lo, e[nb.idx[q]]);
        hi = fmax(hi, e[nb.idx[q]]);
    }
    *span = nb.n ? hi - lo : 0.0;
    for (int side = -1; side <= 1; side += 2) {
        if ((side < 0 && band == 0) || (side > 0 && band + 1 >= g->nbands)
            || !bm_grid_same_channel(g, band, (size_t)((long)band + side)))
            continue;
        const double *o = g->energies + (size_t)((long)band + side) * npt;
        for (size_t q = 0; q < nb.n; q++) {
            double gap = fabs(o[nb.idx[q]] - e[nb.idx[q]]);
            if (gap < *min_gap) {
                *min_gap = gap;
                best = (int)((long)band + side);
            }
        }
    }
    neighbourhood_free(&nb);
    return best;
}


/* Fits ys (and yd, the squared pair difference, when given) at the n scaled
 * offsets u, then Newton from u = 0 to the stationary point of the model
 * (the band itself, or (ys + sign sqrt yd) / 2 for a pair); the result in
 * Cartesian terms around kc. Returns -1 on allocation or GSL failure. */
static double monomial(const monomials *mono, int j, const double u[3])
{
    double v = 1.0;
    for (int a = 0; a < mono->dims; a++)
        for (int k = 0; k < mono->ex[j][a]; k++)
            v *= u[a];
    return v;
}

static int fit_and_find(const monomials *mono, size_t n, const double (*uu)[3], const double *ys,
                        const double *yd, double sign, int dims, double p[3][3], double radius,
                        double cap, const double kc[3], bm_bandfit *out)
{
    /* monomials that vanish at every point (x y z on a stencil of axes and
     * face diagonals) are not determined by the data: left out, coefficient 0 */
    monomials used = { .n = 0, .dims = mono->dims };
    for (int j = 0; j < mono->n; j++) {
        double norm = 0.0;
        for (size_t q = 0; q < n; q++)
            norm = fmax(norm, fabs(monomial(mono, j, uu[q])));
        if (norm > 1e-9) {
            memcpy(used.ex[used.n], mono->ex[j], sizeof used.ex[0]);
            used.n++;
        }
    }
    mono = &used;
    size_t nc = (size_t)mono->n;
    /* least squares by column-pivoted QR, one factorisation for both
     * right-hand sides (a fifth of the cost of an SVD at this size) */
    gsl_matrix *x = gsl_matrix_alloc(n, nc);
    gsl_vector *y = gsl_vector_alloc(n), *res = gsl_vector_alloc(n);
    gsl_vector *cs = gsl_vector_alloc(nc), *cd = gsl_vector_alloc(nc);
    gsl_vector *tau = gsl_vector_alloc(nc), *norm = gsl_vector_alloc(nc);
    gsl_permutation *perm = gsl_permutation_alloc(nc);
    int rc = -1, signum;
    if (!x || !y || !res || !cs || !cd || !tau || !norm || !perm)
        goto done;
    for (size_t q = 0; q < n; q++)
        for (size_t j = 0; j < nc; j++)
            gsl_matrix_set(x, q, j, monomial(mono, (int)j, uu[q]));
    if (gsl_linalg_QRPT_decomp(x, tau, perm, &signum, norm) != GSL_SUCCESS)
        goto done;
    rc = 0;
    /* a design still near-singular (points on too few lines) gives no estimate */
    if (fabs(gsl_matrix_get(x, nc - 1, nc - 1)) < 1e-10 * fabs(gsl_matrix_get(x, 0, 0)))
        goto done;
    rc = -1;
    for (size_t q = 0; q < n; q++)
        gsl_vector_set(y, q, ys[q]);
    if (gsl_linalg_QRPT_lssolve(x, tau, perm, y, cs, res) != GSL_SUCCESS)
        goto done;
    if (yd) {
        for (size_t q = 0; q < n; q++)
            gsl_vector_set(y, q, yd[q]);
        if (gsl_linalg_QRPT_lssolve(x, tau, perm, y, cd, res) != GSL_SUCCESS)
            goto done;
    }
    rc = 0;
    double u[3] = { 0, 0, 0 }, val = 0.0, gu[3], hu[3][3];
    int converged = 0;
    for (int it = 0; it < NEWTON_MAX && !converged; it++) {
        double vs, gs[3], hs[3][3];
        poly_eval(mono, cs->data, u, &vs, gs, hs);
        if (yd) {
            double vd, gd[3], hd[3][3];
            poly_eval(mono, cd->data, u, &vd, gd, hd);
            if (!(vd > 0.0))
                goto done;      /* the pair closes here: a degenerate point, no fit */
            double r = sqrt(vd);
            val = 0.5 * vs + sign * 0.5 * r;
            for (int a = 0; a < 3; a++) {
                gu[a] = 0.5 * gs[a] + sign * gd[a] / (4.0 * r);
                for (int b2 = 0; b2 < 3; b2++)
                    hu[a][b2] = 0.5 * hs[a][b2]
                              + sign * (hd[a][b2] / (4.0 * r) - gd[a] * gd[b2] / (8.0 * r * vd));
            }
            out->gap_ev = r;
        } else {
            val = vs;
            memcpy(gu, gs, sizeof gu);
            memcpy(hu, hs, sizeof hu);
        }
        for (int a = dims; a < 3; a++) {
            gu[a] = 0.0;
            for (int b2 = 0; b2 < 3; b2++)
                hu[a][b2] = hu[b2][a] = 0.0;
            hu[a][a] = 1.0;
        }
        double hi[3][3], du[3], len = 0.0;
        if (bm_inv3(hu, hi) != 0)
            goto done;
        for (int a = 0; a < 3; a++) {
            du[a] = -(hi[a][0] * gu[0] + hi[a][1] * gu[1] + hi[a][2] * gu[2]);
            len += du[a] * du[a];
        }
        len = sqrt(len);
        double scale = len > cap ? cap / len : 1.0;
        double away = 0.0;
        for (int a = 0; a < 3; a++) {
            u[a] += scale * du[a];
            away += u[a] * u[a];
        }
        if (sqrt(away) > STAY_WITHIN)
            goto done;
        converged = len * radius < 1e-10;
    }
    if (!converged)
        goto done;
    for (int a = dims; a < 3; a++)
        hu[a][a] = 0.0;
    /* Cartesian: k = kc + R sum_a u_a p_a; H_k = P^T H_u P / R^2 */
    for (int i = 0; i < 3; i++) {
        out->k[i] = kc[i];
        for (int a = 0; a < dims; a++)
            out->k[i] += radius * u[a] * p[a][i];
    }
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double v = 0.0;
            for (int a = 0; a < dims; a++)
                for (int b2 = 0; b2 < dims; b2++)
                    v += p[a][i] * hu[a][b2] * p[b2][j];
            out->hessian[i][j] = v / (radius * radius);
        }
    out->energy_ev = val;
    out->ok = 1;
done:
    gsl_matrix_free(x);
    gsl_vector_free(y);
    gsl_vector_free(res);
    gsl_vector_free(cs);
    gsl_vector_free(cd);
    gsl_vector_free(tau);
    gsl_vector_free(norm);
    if (perm)
        gsl_permutation_free(perm);
    return rc;
}

int bm_bandfit_run(const bm_grid *g, size_t band, int partner, const double f0[3],
                   const double kc[3], int dims, double p[3][3],
                   const bm_bandfit_setting *s, bm_bandfit *out)
{
    memset(out, 0, sizeof *out);
    out->gap_ev = INFINITY;
    double radius = s->radius_steps * bm_bandfit_step(g);
    if (s->order < 2 || s->order > MAX_ORDER || !(radius > 0.0))
        return 0;
    monomials mono;
    monomials_make(&mono, dims, s->order);
    neighbourhood nb;
    if (neighbourhood_collect(g, f0, kc, dims, p, radius, &nb) != 0) {
        neighbourhood_free(&nb);
        return -1;
    }
    out->npoints = nb.n;
    if ((double)nb.n < MIN_POINTS_PER_TERM * mono.n) {
        neighbourhood_free(&nb);
        return 0;
    }
    size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
    const double *e = g->energies + band * npt;
    const double *o = partner >= 0 ? g->energies + (size_t)partner * npt : NULL;
    double *ys = malloc(nb.n * sizeof *ys), *yd = o ? malloc(nb.n * sizeof *yd) : NULL;
    int rc = -1;
    if (ys && (!o || yd)) {
        /* the lower band of a pair is (s - sqrt D) / 2, the upper (s + sqrt D) / 2;
         * which one this band is, the data say (bands need not be sorted) */
        double above = 0.0;
        for (size_t q = 0; q < nb.n; q++) {
            double eb = e[nb.idx[q]];
            ys[q] = o ? eb + o[nb.idx[q]] : eb;
            if (o) {
                yd[q] = (o[nb.idx[q]] - eb) * (o[nb.idx[q]] - eb);
                above += eb - o[nb.idx[q]];
            }
        }
        rc = fit_and_find(&mono, nb.n, (const double (*)[3])nb.u, ys, yd,
                          above < 0.0 ? -1.0 : 1.0, dims, p, radius,
                          STEP_CAP / s->radius_steps, kc, out);
    }
    free(ys);
    free(yd);
    neighbourhood_free(&nb);
    return rc;
}
