/* bm-kp.c: k.p fits of degenerate extrema (see bm-kp.h).
 *
 * The fit is Gauss-Newton on the sorted model eigenvalues: the Hamiltonian is
 * linear in its parameters, so by Hellmann-Feynman the derivative of an
 * eigenvalue is v^T (dH/dp) v, and each step is a linear least-squares
 * problem, solved by truncated SVD so that parameters the points cannot
 * determine (quartic terms on a stencil along three lines) are dropped
 * instead of blowing up. */
#include "bm-kp.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_complex_math.h>
#include <gsl/gsl_eigen.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit.h>

#include "bm-holes.h"
#include "bm-linalg.h"
#include "bm-units.h"

#define NPAR_MAX 11             /* E0, L, M, N, six quartic invariants and (sixfold) the
                                   split-off gap Delta in eV, always the last */
#define NPAR_QUARTIC 10         /* E0, L, M, N and the six quartic invariants */
#define C_KIN (0.5 * BM_HBAR2_OVER_ME_EV_A2)   /* hbar^2 / 2 m_e, eV A^2 */

typedef struct {
    bm_kp_model model;
    int npar;                   /* including E0 */
    double x[NPAR_MAX];         /* E0 (eV), then the band parameters */
} kp_params;

/* dH/dp of threefold parameter p (1-based after E0) at k: a symmetric matrix. */
static void threefold_basis(int p, const double k[3], double b[3][3])
{
    memset(b, 0, 9 * sizeof(double));
    double q[3] = { k[0] * k[0], k[1] * k[1], k[2] * k[2] };
    for (int i = 0; i < 3; i++) {
        int j = (i + 1) % 3, l = (i + 2) % 3;
        switch (p) {
        case 1: b[i][i] = q[i]; break;                                  /* L */
        case 2: b[i][i] = q[j] + q[l]; break;                           /* M */
        case 3: b[i][j] = b[j][i] = k[i] * k[j]; break;                 /* N */
        case 4: b[i][i] = q[i] * q[i]; break;                           /* kx^4 */
        case 5: b[i][i] = q[j] * q[j] + q[l] * q[l]; break;             /* ky^4 + kz^4 */
        case 6: b[i][i] = q[i] * (q[j] + q[l]); break;                  /* kx^2 (ky^2 + kz^2) */
        case 7: b[i][i] = q[j] * q[l]; break;                           /* ky^2 kz^2 */
        case 8: b[i][j] = b[j][i] = k[i] * k[j] * (q[i] + q[j]); break; /* kx ky (kx^2 + ky^2) */
        case 9: b[i][j] = b[j][i] = k[i] * k[j] * q[l]; break;          /* kx ky kz^2 */
        default: break;
        }
    }
}

/* Eigenvalues of a symmetric 3x3 matrix, ascending, by the trigonometric
 * solution of the characteristic cubic (Smith, Commun. ACM 4, 168 (1961)):
 * the sphere averages need millions of them and no eigenvectors. */
static void symeig3_values(double h[3][3], double lam[3])
{
    double p1 = h[0][1] * h[0][1] + h[0][2] * h[0][2] + h[1][2] * h[1][2];
    double q = (h[0][0] + h[1][1] + h[2][2]) / 3.0;
    if (p1 <= 1e-30 * (q * q + 1e-300)) {
        double d[3] = { h[0][0], h[1][1], h[2][2] };
        for (int a = 0; a < 3; a++)
            for (int b = a + 1; b < 3; b++)
                if (d[b] < d[a]) {
                    double t = d[a]; d[a] = d[b]; d[b] = t;
                }
        memcpy(lam, d, sizeof d);
        return;
    }
    double p2 = (h[0][0] - q) * (h[0][0] - q) + (h[1][1] - q) * (h[1][1] - q)
              + (h[2][2] - q) * (h[2][2] - q) + 2.0 * p1;
    double p = sqrt(p2 / 6.0), b[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            b[i][j] = (h[i][j] - (i == j ? q : 0.0)) / p;
    double r = 0.5 * (b[0][0] * (b[1][1] * b[2][2] - b[1][2] * b[2][1])
                    - b[0][1] * (b[1][0] * b[2][2] - b[1][2] * b[2][0])
                    + b[0][2] * (b[1][0] * b[2][1] - b[1][1] * b[2][0]));
    double phi = r <= -1.0 ? M_PI / 3.0 : r >= 1.0 ? 0.0 : acos(r) / 3.0;
    lam[2] = q + 2.0 * p * cos(phi);
    lam[0] = q + 2.0 * p * cos(phi + 2.0 * M_PI / 3.0);
    lam[1] = 3.0 * q - lam[0] - lam[2];
}

/* Sorted model eigenvalues (units of hbar^2/2m_e) at k and, when d is not
 * NULL, their derivatives d[band][p] with respect to the band parameters
 * p = 1..npar-1. Returns the number of distinct bands, or -1. */
static int model_eval(const kp_params *m, const double k[3], double lam[3],
                      double d[3][NPAR_MAX]);

/* The sixfold model: H3(k) on each spin plus (Delta/3)(L.sigma - 1) in the
 * basis (x up, x down, y up, ...), in units of hbar^2/2m_e; the Kramers
 * pairs' eigenvalues (a pair's members are equal: the model has inversion and
 * time reversal) and, when d is not NULL, their derivatives by
 * Hellmann-Feynman, parameter 4 being Delta in eV. */
static int sixfold_eval(const kp_params *m, const double k[3], double lam[3],
                        double d[3][NPAR_MAX])
{
    const int nb = m->npar - 2;   /* band parameters 1 .. nb; Delta is x[nb + 1] */
    double b[NPAR_MAX][3][3];
    for (int p = 1; p <= nb; p++)
        threefold_basis(p, k, b[p]);
    /* L.sigma for l = 1 in the Cartesian p basis, (L_c)_ij = -i e_cij:
     * element ((i s), (j t)) = sum_c -i e_cij (sigma_c)_st */
    static const double sig_re[3][2][2] = { { { 0, 1 }, { 1, 0 } }, { { 0, 0 }, { 0, 0 } },
                                            { { 1, 0 }, { 0, -1 } } };
    static const double sig_im[3][2][2] = { { { 0, 0 }, { 0, 0 } }, { { 0, -1 }, { 1, 0 } },
                                            { { 0, 0 }, { 0, 0 } } };
    double so_re[6][6], so_im[6][6];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            for (int s = 0; s < 2; s++)
                for (int t = 0; t < 2; t++) {
                    double re = 0.0, im = 0.0;
                    for (int c = 0; c < 3; c++) {
                        double e = (c == i || c == j || i == j) ? 0.0
                                 : ((c + 1) % 3 == i ? 1.0 : -1.0);   /* e_cij */
                        /* -i e (re + i im) = e im - i e re */
                        re += e * sig_im[c][s][t];
                        im += -e * sig_re[c][s][t];
                    }
                    so_re[2 * i + s][2 * j + t] = re - (i == j && s == t);
                    so_im[2 * i + s][2 * j + t] = im;
                }
    gsl_matrix_complex *h = gsl_matrix_complex_alloc(6, 6);
    gsl_matrix_complex *v = gsl_matrix_complex_alloc(6, 6);
    gsl_vector *ev = gsl_vector_alloc(6);
    gsl_eigen_hermv_workspace *w = gsl_eigen_hermv_alloc(6);
    int ret = -1;
    if (!h || !v || !ev || !w)
        goto done;
    double so = m->x[nb + 1] / (3.0 * C_KIN);
    for (int a = 0; a < 6; a++)
        for (int c = 0; c < 6; c++) {
            double re = so * so_re[a][c], im = so * so_im[a][c];
            if (a % 2 == c % 2)
                for (int p = 1; p <= nb; p++)
                    re += m->x[p] * b[p][a / 2][c / 2];
            gsl_matrix_complex_set(h, a, c, gsl_complex_rect(re, im));
        }
    if (gsl_eigen_hermv(h, ev, v, w) != GSL_SUCCESS
        || gsl_eigen_hermv_sort(ev, v, GSL_EIGEN_SORT_VAL_ASC) != GSL_SUCCESS)
        goto done;
    for (int n = 0; n < 3; n++)
        lam[n] = 0.5 * (gsl_vector_get(ev, 2 * n) + gsl_vector_get(ev, 2 * n + 1));
    if (d)
        for (int n = 0; n < 3; n++) {
            for (int p = 1; p <= nb + 1; p++)
                d[n][p] = 0.0;
            for (int q = 2 * n; q < 2 * n + 2; q++)
                for (int a = 0; a < 6; a++)
                    for (int c = 0; c < 6; c++) {
                        gsl_complex va = gsl_matrix_complex_get(v, a, q);
                        gsl_complex vc = gsl_matrix_complex_get(v, c, q);
                        /* Re(conj(va) M_ac vc) for the real parts of M... */
                        double pr = GSL_REAL(va) * GSL_REAL(vc) + GSL_IMAG(va) * GSL_IMAG(vc);
                        double pi = GSL_REAL(va) * GSL_IMAG(vc) - GSL_IMAG(va) * GSL_REAL(vc);
                        if (a % 2 == c % 2)
                            for (int p = 1; p <= nb; p++)
                                d[n][p] += 0.5 * b[p][a / 2][c / 2] * pr;
                        d[n][nb + 1] += 0.5 * (so_re[a][c] * pr - so_im[a][c] * pi)
                                 / (3.0 * C_KIN);
                    }
        }
    ret = 3;
done:
    gsl_matrix_complex_free(h);
    gsl_matrix_complex_free(v);
    gsl_vector_free(ev);
    if (w)
        gsl_eigen_hermv_free(w);
    return ret;
}

static int model_eval(const kp_params *m, const double k[3], double lam[3],
                      double d[3][NPAR_MAX])
{
    if (m->model == BM_KP_SIXFOLD)
        return sixfold_eval(m, k, lam, d);
    if (m->model == BM_KP_FOURFOLD) {
        double g1 = m->x[1], g2 = m->x[2], g3 = m->x[3];
        double k2 = bm_dot3(k, k);
        double s = k[0] * k[0] * k[1] * k[1] + k[1] * k[1] * k[2] * k[2]
                 + k[2] * k[2] * k[0] * k[0];
        double r = sqrt(fmax(0.0, g2 * g2 * k2 * k2 + 3.0 * (g3 * g3 - g2 * g2) * s));
        lam[0] = -(g1 * k2 + 2.0 * r);   /* the lighter band of a maximum lies lower */
        lam[1] = -(g1 * k2 - 2.0 * r);
        if (d) {
            double dr2 = r > 0.0 ? (g2 * k2 * k2 - 3.0 * g2 * s) / r : 0.0;
            double dr3 = r > 0.0 ? 3.0 * g3 * s / r : 0.0;
            d[0][1] = d[1][1] = -k2;
            d[0][2] = -2.0 * dr2;
            d[1][2] = 2.0 * dr2;
            d[0][3] = -2.0 * dr3;
            d[1][3] = 2.0 * dr3;
        }
        return 2;
    }
    double h[3][3] = { { 0 } }, b[3][3], v[3][3];
    for (int p = 1; p < m->npar; p++) {
        threefold_basis(p, k, b);
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                h[i][j] += m->x[p] * b[i][j];
    }
    if (!d) {
        symeig3_values(h, lam);
        return 3;
    }
    if (bm_symeig(h, 3, lam, v) != 0)
        return -1;
    if (d)
        for (int p = 1; p < m->npar; p++) {
            threefold_basis(p, k, b);
            for (int n = 0; n < 3; n++) {
                double s = 0.0;
                for (int i = 0; i < 3; i++)
                    for (int j = 0; j < 3; j++)
                        s += v[n][i] * b[i][j] * v[n][j];
                d[n][p] = s;
            }
        }
    return 3;
}

/* Which distinct model band a data band is (fourfold: the pairs). */
static int distinct_of(bm_kp_model model, size_t band)
{
    return model == BM_KP_THREEFOLD ? (int)band : (int)band / 2;
}

typedef struct {
    double rss;
    double cov[NPAR_MAX][NPAR_MAX];
    size_t rank, neq;
} fit_stats;

static double weight(const bm_kp_data *d, size_t band, size_t point)
{
    return d->weights ? d->weights[band * d->npoints + point] : 1.0;
}

/* (Weighted) residual sum of squares of the points with |k| <= rmax; NAN on failure. */
static double model_rss(const bm_kp_data *d, double rmax, const kp_params *m)
{
    double rss = 0.0;
    for (size_t i = 0; i < d->npoints; i++) {
        const double *k = d->k + 3 * i;
        double lam[3];
        if (bm_norm3(k) > rmax)
            continue;
        if (model_eval(m, k, lam, NULL) < 0)
            return NAN;
        for (size_t b = 0; b < d->nbands; b++) {
            double res = d->energies[b * d->npoints + i]
                       - (m->x[0] + C_KIN * lam[distinct_of(m->model, b)]);
            res *= weight(d, b, i);
            rss += res * res;
        }
    }
    return rss;
}

/* One Gauss-Newton fit of the points with |k| <= rmax from the start m, with
 * step halving; the covariance is that of the final point. Returns 0, -1 when
 * the points do not determine L, M, N, -2 on a failure. */
static int gauss_newton(const bm_kp_data *d, double rmax, kp_params *m, fit_stats *fs)
{
    size_t use = 0;
    for (size_t i = 0; i < d->npoints; i++)
        use += bm_norm3(d->k + 3 * i) <= rmax;
    size_t neq = use * d->nbands, np = (size_t)m->npar;
    if (neq < np + 1)
        return -1;
    gsl_matrix *J = gsl_matrix_alloc(neq, np), *cov = gsl_matrix_alloc(np, np);
    gsl_vector *r = gsl_vector_alloc(neq), *dx = gsl_vector_alloc(np);
    gsl_multifit_linear_workspace *w = gsl_multifit_linear_alloc(neq, np);
    int ret = -2;
    if (!J || !cov || !r || !dx || !w)
        goto done;
    int settled = 0;
    for (int it = 0; it < 80; it++) {
        size_t row = 0;
        double rss = 0.0;
        for (size_t i = 0; i < d->npoints; i++) {
            const double *k = d->k + 3 * i;
            if (bm_norm3(k) > rmax)
                continue;
            double lam[3], der[3][NPAR_MAX];
            if (model_eval(m, k, lam, der) < 0)
                goto done;
            for (size_t b = 0; b < d->nbands; b++, row++) {
                int n = distinct_of(m->model, b);
                double wt = weight(d, b, i);
                double res = wt * (d->energies[b * d->npoints + i] - (m->x[0] + C_KIN * lam[n]));
                gsl_vector_set(r, row, res);
                gsl_matrix_set(J, row, 0, wt);
                for (size_t p = 1; p < np; p++)
                    gsl_matrix_set(J, row, p, wt * C_KIN * der[n][p]);
                rss += res * res;
            }
        }
        double chisq;
        size_t rank;
        if (gsl_multifit_linear_tsvd(J, r, 1e-9, dx, cov, &chisq, &rank, w) != GSL_SUCCESS)
            goto done;
        /* GSL scales the covariance by the residual variance chisq / (neq - rank) */
        fs->rss = rss;
        fs->rank = rank;
        fs->neq = neq;
        for (size_t p = 0; p < np; p++)
            for (size_t q = 0; q < np; q++)
                fs->cov[p][q] = gsl_matrix_get(cov, p, q);
        if (rank < 4) {
            ret = -1;
            goto done;
        }
        ret = 0;
        if (settled)
            break;               /* the covariance is now that of the final point */
        double t = 1.0;
        int accepted = 0;
        for (int h = 0; h < 12 && !accepted; h++, t *= 0.5) {
            kp_params trial = *m;
            for (size_t p = 0; p < np; p++)
                trial.x[p] += t * gsl_vector_get(dx, p);
            double rt = model_rss(d, rmax, &trial);
            if (rt <= rss) {
                accepted = 1;
                double step = 0.0, size = 0.0;
                for (size_t p = 0; p < np; p++) {
                    step = fmax(step, fabs(trial.x[p] - m->x[p]));
                    size = fmax(size, fabs(m->x[p]));
                }
                *m = trial;
                settled = step <= 1e-10 * (1.0 + size) || rss - rt <= 1e-14 * rss;
            }
        }
        if (!accepted)
            break;               /* no step improves: the covariance is this point's */
    }
done:
    gsl_matrix_free(J);
    gsl_matrix_free(cov);
    gsl_vector_free(r);
    gsl_vector_free(dx);
    if (w)
        gsl_multifit_linear_free(w);
    return ret;
}

/* The split-off gap at the point nearest the centre: the mean of the J = 3/2
 * bands (the upper four at a maximum, the lower four at a minimum) less the
 * split-off pair's, signed so that the pair lies at E0 - Delta. */
static double split_off_start(const bm_kp_data *d, double rmax)
{
    size_t best = 0;
    for (size_t i = 1; i < d->npoints; i++)
        if (bm_norm3(d->k + 3 * i) < bm_norm3(d->k + 3 * best))
            best = i;
    (void)rmax;
    const double *e = d->energies;
    size_t n = d->npoints;
    double lo = 0.5 * (e[0 * n + best] + e[1 * n + best]);
    double hi = 0.5 * (e[4 * n + best] + e[5 * n + best]);
    double mid = 0.5 * (e[2 * n + best] + e[3 * n + best]);
    /* a maximum has the pair below (mid close to hi), a minimum above */
    return fabs(hi - mid) < fabs(mid - lo) ? hi - lo : -(hi - lo);
}

/* The best of several starts: a model of sorted eigenvalues has more than one
 * local optimum (the sign of N, which band is which). */
static int fit_model(const bm_kp_data *d, bm_kp_model model, int quartic, double rmax,
                     kp_params *best, fit_stats *best_fs)
{
    /* isotropic start from the mean band energy against k^2 */
    double sxx = 0.0, sxy = 0.0, sx = 0.0, sy = 0.0;
    size_t n = 0;
    for (size_t i = 0; i < d->npoints; i++) {
        const double *k = d->k + 3 * i;
        if (bm_norm3(k) > rmax)
            continue;
        double e = 0.0;
        for (size_t b = 0; b < d->nbands; b++)
            e += d->energies[b * d->npoints + i] / (double)d->nbands;
        double x = C_KIN * bm_dot3(k, k);
        sxx += x * x; sxy += x * e; sx += x; sy += e;
        n++;
    }
    double den = (double)n * sxx - sx * sx;
    double s = den > 0.0 ? ((double)n * sxy - sx * sy) / den : -1.0;
    double e0 = n ? (sy - s * sx) / (double)n : 0.0;
    if (!(fabs(s) > 1e-6))
        s = -1.0;
    int found = -1;
    static const double nstart[] = { 1.5, -1.5, 0.5, -0.5 };
    for (size_t t = 0; t < sizeof nstart / sizeof nstart[0]; t++) {
        kp_params m = { .model = model };
        fit_stats fs = { 0 };
        m.x[0] = e0;
        if (model == BM_KP_FOURFOLD) {
            m.npar = 4;
            m.x[1] = -s;                 /* gamma1 */
            m.x[2] = 0.2 * fabs(s);
            m.x[3] = 0.3 * nstart[t] * fabs(s);
        } else if (model == BM_KP_SIXFOLD) {
            m.npar = quartic ? NPAR_QUARTIC + 1 : 5;
            m.x[1] = m.x[2] = s;
            m.x[3] = nstart[t] * s;
            m.x[m.npar - 1] = split_off_start(d, rmax);
        } else {
            m.npar = quartic ? NPAR_QUARTIC : 4;
            m.x[1] = m.x[2] = s;
            m.x[3] = nstart[t] * s;
        }
        int rc = gauss_newton(d, rmax, &m, &fs);
        if (rc == -2)
            return -2;
        if (rc == 0 && (found < 0 || fs.rss < best_fs->rss)) {
            *best = m;
            *best_fs = fs;
            found = 0;
        }
    }
    return found;
}

/* A refit of other points or a smaller model from the main fit's parameters
 * (one start is enough there). */
static int refit_from(const bm_kp_data *d, const kp_params *from, int quartic, double rmax,
                      kp_params *m, fit_stats *fs)
{
    *m = *from;
    if (m->model == BM_KP_THREEFOLD) {
        int np = quartic ? NPAR_QUARTIC : 4;
        for (int p = m->npar; p < np; p++)
            m->x[p] = 0.0;
        m->npar = np;
    } else if (m->model == BM_KP_SIXFOLD) {
        /* the band parameters, then Delta last */
        int np = quartic ? NPAR_QUARTIC + 1 : 5;
        double delta = from->x[from->npar - 1];
        for (int p = 4; p < NPAR_MAX; p++)
            m->x[p] = p < from->npar - 1 ? from->x[p] : 0.0;
        m->npar = np;
        m->x[np - 1] = delta;
    }
    return gauss_newton(d, rmax, m, fs);
}

/* ------------------------------------------------------------ derived values */

static const double dirs[3][3] = {
    { 1, 0, 0 },
    { M_SQRT1_2, M_SQRT1_2, 0 },
    { 1 / 1.7320508075688772, 1 / 1.7320508075688772, 1 / 1.7320508075688772 },
};

/* Only the quadratic part gives the masses at the degenerate point. */
static kp_params quadratic_part(const kp_params *m)
{
    kp_params q = *m;
    if (q.model == BM_KP_THREEFOLD)
        q.npar = 4;
    return q;
}

typedef struct {
    const kp_params *m;
    int ndist;
} octant_ctx;

/* |lambda|^(-3/2) of each distinct band along n, and the sign of lambda in
 * two more slots per band (to detect an open surface). */
static void dos_integrand(const double n[3], void *vctx, double *vals)
{
    const octant_ctx *c = vctx;
    double lam[3];
    if (model_eval(c->m, n, lam, NULL) < 0) {
        for (int b = 0; b < 3 * c->ndist; b++)
            vals[b] = NAN;
        return;
    }
    for (int b = 0; b < c->ndist; b++) {
        vals[b] = lam[b] != 0.0 ? pow(fabs(lam[b]), -1.5) : INFINITY;
        vals[c->ndist + b] = lam[b] > 0.0;
        vals[2 * c->ndist + b] = lam[b] < 0.0;
    }
}

/* Signed DOS masses of the distinct bands of the quadratic model, with the
 * change on doubling the quadrature in *change. */
static int dos_masses(const kp_params *mq, int ndist, double out[3], double *change)
{
    octant_ctx c = { mq, ndist };
    double coarse[9], fine[9];
    bm_errbuf e;
    if (bm_octant_means(dos_integrand, &c, (size_t)(3 * ndist), 48, coarse, &e) != BM_OK
        || bm_octant_means(dos_integrand, &c, (size_t)(3 * ndist), 96, fine, &e) != BM_OK)
        return -1;
    *change = 0.0;
    for (int b = 0; b < ndist; b++) {
        double pos = fine[ndist + b], neg = fine[2 * ndist + b];
        if (pos > 0.0 && neg > 0.0) {
            out[b] = INFINITY;   /* the curvature changes sign: an open surface */
            continue;
        }
        out[b] = (pos > 0.0 ? 1.0 : -1.0) * pow(fine[b], 2.0 / 3.0);
        *change = fmax(*change, fabs(fine[b] - coarse[b]) / fine[b]);
    }
    return 0;
}

typedef struct {
    double lmn[3], gamma[3], dir[3][3], dos[3];
} derived;

static void lmn_from_gamma(const double g[3], double lmn[3])
{
    lmn[0] = -g[0] - 4.0 * g[1];
    lmn[1] = -g[0] + 2.0 * g[1];
    lmn[2] = -6.0 * g[2];
}

static void gamma_from_lmn(const double l[3], double g[3])
{
    g[0] = -(l[0] + 2.0 * l[1]) / 3.0;
    g[1] = -(l[0] - l[1]) / 6.0;
    g[2] = -l[2] / 6.0;
}

static int derive(const kp_params *m, int ndist, derived *dv, double *qchange)
{
    kp_params q = quadratic_part(m);
    if (m->model == BM_KP_SIXFOLD) {
        /* at the point: the J = 3/2 projection (the fourfold model of these
         * gamma) and the split-off pair's isotropic curvature (L + 2M)/3 */
        memcpy(dv->lmn, m->x + 1, sizeof dv->lmn);
        gamma_from_lmn(dv->lmn, dv->gamma);
        kp_params f = { .model = BM_KP_FOURFOLD, .npar = 4 };
        memcpy(f.x + 1, dv->gamma, sizeof dv->gamma);
        derived d4;
        if (derive(&f, 2, &d4, qchange) != 0)
            return -1;
        double so = (dv->lmn[0] + 2.0 * dv->lmn[1]) / 3.0;
        double mso = so != 0.0 ? 1.0 / so : INFINITY;
        int up = so > 0.0;   /* a minimum: the split-off pair lies above */
        for (int t = 0; t < 3; t++) {
            dv->dir[t][up ? 2 : 0] = mso;
            dv->dir[t][up ? 0 : 1] = d4.dir[t][0];
            dv->dir[t][up ? 1 : 2] = d4.dir[t][1];
        }
        dv->dos[up ? 2 : 0] = mso;
        dv->dos[up ? 0 : 1] = d4.dos[0];
        dv->dos[up ? 1 : 2] = d4.dos[1];
        (void)ndist;
        return 0;
    }
    if (m->model == BM_KP_FOURFOLD) {
        memcpy(dv->gamma, q.x + 1, sizeof dv->gamma);
        lmn_from_gamma(dv->gamma, dv->lmn);
    } else {
        memcpy(dv->lmn, q.x + 1, sizeof dv->lmn);
        gamma_from_lmn(dv->lmn, dv->gamma);
    }
    for (int t = 0; t < 3; t++) {
        double lam[3];
        if (model_eval(&q, dirs[t], lam, NULL) < 0)
            return -1;
        for (int b = 0; b < ndist; b++)
            dv->dir[t][b] = lam[b] != 0.0 ? 1.0 / lam[b] : INFINITY;
    }
    return dos_masses(&q, ndist, dv->dos, qchange);
}

/* Standard errors of the derived values by first-order propagation of the
 * covariance of the band parameters (numerical derivatives). */
static int propagate(const kp_params *m, const fit_stats *fs, int ndist, derived *sd)
{
    enum { NV = 3 + 3 + 9 + 3 };
    double grad[NV][3];
    derived base;
    double qc;
    if (derive(m, ndist, &base, &qc) != 0)
        return -1;
    for (int p = 1; p <= 3; p++) {
        kp_params up = *m, dn = *m;
        double h = 1e-5 * fmax(1.0, fabs(m->x[p]));
        up.x[p] += h;
        dn.x[p] -= h;
        derived a, b;
        if (derive(&up, ndist, &a, &qc) != 0 || derive(&dn, ndist, &b, &qc) != 0)
            return -1;
        const double *pa = (const double *)&a, *pb = (const double *)&b;
        for (int v = 0; v < NV; v++)
            grad[v][p - 1] = (pa[v] - pb[v]) / (2.0 * h);
    }
    double *ps = (double *)sd;
    for (int v = 0; v < NV; v++) {
        double var = 0.0;
        for (int p = 0; p < 3; p++)
            for (int q = 0; q < 3; q++)
                var += grad[v][p] * fs->cov[p + 1][q + 1] * grad[v][q];
        ps[v] = sqrt(fmax(0.0, var));
    }
    return 0;
}

/* The output of a fit: the values the main model m1 gives, each with its
 * total error (the statistical part from f1's covariance and the largest
 * change against the independent fits m2 and m3, either may be NULL, in
 * quadrature). */
static bm_status report(const kp_params *m1, const fit_stats *f1, const kp_params *m2,
                        double inner_scale, const kp_params *m3, int quartic, double rfit,
                        size_t npoints, double rms, bm_kp_fit *out, bm_errbuf *err)
{
    bm_kp_model model = m1->model;
    int ndist = model == BM_KP_FOURFOLD ? 2 : 3;
    derived v1, v2, v3, s1;
    double qchange = 0.0, qc2;
    if (derive(m1, ndist, &v1, &qchange) != 0 || propagate(m1, f1, ndist, &s1) != 0)
        return bm_fail(err, BM_EINTERNAL, "k.p fit: eigenvalues of the fitted model failed");
    int have2 = m2 && derive(m2, ndist, &v2, &qc2) == 0;
    int have3 = m3 && derive(m3, ndist, &v3, &qc2) == 0;

    out->model = model;
    out->quartic = quartic;
    out->radius = rfit;
    out->e0_ev = m1->x[0];
    out->split_off_ev = out->split_off_error_ev = NAN;
    if (model == BM_KP_SIXFOLD) {
        double sys = 0.0;
        if (have2)
            sys = fmax(sys, inner_scale * fabs(m2->x[m2->npar - 1] - m1->x[m1->npar - 1]));
        if (have3)
            sys = fmax(sys, fabs(m3->x[m3->npar - 1] - m1->x[m1->npar - 1]));
        int q = m1->npar - 1;
        out->split_off_ev = m1->x[q];
        out->split_off_error_ev = hypot(sqrt(fmax(0.0, f1->cov[q][q])), sys);
    }
    out->rms_ev = rms;
    out->npoints = npoints;
    out->ndistinct = (size_t)ndist;
    /* total error: statistical and the independent fit's change, in quadrature */
    const double *a1 = (const double *)&v1, *a2 = (const double *)&v2;
    const double *a3 = (const double *)&v3, *as = (const double *)&s1;
    double tot[sizeof(derived) / sizeof(double)];
    for (size_t v = 0; v < sizeof(derived) / sizeof(double); v++) {
        double sys = have2 ? inner_scale * fabs(a1[v] - a2[v]) : 0.0;
        if (have3)
            sys = fmax(sys, fabs(a1[v] - a3[v]));
        tot[v] = have2 || have3 ? hypot(as[v], sys) : NAN;
    }
    const derived *te = (const derived *)tot;
    memcpy(out->lmn, v1.lmn, sizeof out->lmn);
    memcpy(out->lmn_error, te->lmn, sizeof out->lmn_error);
    memcpy(out->gamma, v1.gamma, sizeof out->gamma);
    memcpy(out->gamma_error, te->gamma, sizeof out->gamma_error);
    out->rel_error = have2 || have3 ? 0.0 : NAN;
    for (int t = 0; t < 3; t++)
        for (int b = 0; b < 3; b++) {
            out->directional[t][b] = b < ndist ? v1.dir[t][b] : NAN;
            out->directional_error[t][b] = b < ndist ? te->dir[t][b] : NAN;
            if (b < ndist && isfinite(v1.dir[t][b]))
                out->rel_error = fmax(out->rel_error, te->dir[t][b] / fabs(v1.dir[t][b]));
        }
    for (int b = 0; b < 3; b++) {
        out->dos_mass[b] = b < ndist ? v1.dos[b] : NAN;
        out->dos_mass_error[b] = b < ndist && isfinite(v1.dos[b])
            ? hypot(te->dos[b], qchange * fabs(v1.dos[b])) : NAN;
        if (b < ndist && !isfinite(v1.dos[b]))
            bm_warn(&out->warnings, BM_WARN_OPEN_SURFACE, "degenerate band %d of the k.p fit "
                    "curves both ways (an open constant-energy surface): no finite "
                    "density-of-states mass", b);
    }
    out->luttinger_dos_mass = NAN;
    if (out->gamma[0] > 0.0) {
        bm_luttinger L = { out->gamma[0], out->gamma[1], out->gamma[2] };
        double md;
        bm_errbuf e2;
        if (bm_band_edge_hole_dos_mass(&L, 0.0, 0.0, 0.0, &md, NULL, &e2) == BM_OK)
            out->luttinger_dos_mass = md;
    }
    if (!have2 && !have3)
        bm_warn(&out->warnings, BM_WARN_NO_ERROR_ESTIMATE, "k.p fit: too few points for an "
                "independent check of the fit; its masses carry the statistical error only");
    return BM_OK;
}

bm_status bm_kp_fit_bands(const bm_kp_data *d, bm_kp_fit *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "k.p fit: no output given");
    memset(out, 0, sizeof *out);
    if (!d || (d->nbands != 3 && d->nbands != 4 && d->nbands != 6))
        return bm_fail(err, BM_EINVAL, "k.p fit: %zu touching bands; the cubic models take "
                       "3 (no spin-orbit coupling), 4 (two Kramers pairs) or 6 (with the "
                       "split-off pair)", d ? d->nbands : 0);
    double rmax = 0.0;
    for (size_t i = 0; i < d->npoints; i++) {
        for (int a = 0; a < 3; a++)
            if (!isfinite(d->k[3 * i + a]))
                return bm_fail(err, BM_EINVAL, "k.p fit: point %zu has a non-finite k", i);
        for (size_t b = 0; b < d->nbands; b++)
            if (!isfinite(d->energies[b * d->npoints + i]))
                return bm_fail(err, BM_EINVAL, "k.p fit: band %zu has a non-finite energy at "
                               "point %zu", b, i);
        rmax = fmax(rmax, bm_norm3(d->k + 3 * i));
    }
    double rfit = d->radius > 0.0 && d->radius < rmax ? d->radius : rmax;
    bm_kp_model model = d->nbands == 3 ? BM_KP_THREEFOLD
                      : d->nbands == 4 ? BM_KP_FOURFOLD : BM_KP_SIXFOLD;
    /* the main fit: every point, with the quartic invariants if they fit */
    kp_params m1, m2;
    fit_stats f1, f2;
    int quartic = model == BM_KP_THREEFOLD;   /* the sixfold model stays quadratic */
    int rc = fit_model(d, model, quartic, rfit, &m1, &f1);
    /* the quartic model wants some redundancy (six equations beyond its
     * parameters) and points that determine every invariant */
    if (rc == 0 && quartic && (f1.neq < (size_t)m1.npar + 6 || f1.rank < (size_t)m1.npar))
        rc = -1;
    if (rc == -1 && quartic) {
        quartic = 0;
        rc = fit_model(d, model, 0, rfit, &m1, &f1);
    }
    if (rc == -2)
        return bm_fail(err, BM_ENOMEM, "k.p fit: out of memory");
    if (rc != 0)
        return bm_fail(err, BM_EINVAL, "k.p fit: the %zu points do not determine the "
                       "parameters (sample at least two of [100], [110], [111] from the "
                       "degenerate point)", d->npoints);
    /* the independent checks: the quadratic model on the inner points (or on
     * every point when the main fit is quadratic already), and the main model
     * on every point given when the main radius leaves some out */
    kp_params m3;
    fit_stats f3;
    int rc2 = refit_from(d, &m1, 0, 0.7 * rfit, &m2, &f2);
    if (rc2 != 0 && quartic)
        rc2 = refit_from(d, &m1, 0, rfit, &m2, &f2);
    int rc3 = rfit < rmax ? refit_from(d, &m1, quartic, rmax, &m3, &f3) : -1;
    if (rc2 == -2 || rc3 == -2)
        return bm_fail(err, BM_ENOMEM, "k.p fit: out of memory");

    size_t used = 0;
    for (size_t i = 0; i < d->npoints; i++)
        used += bm_norm3(d->k + 3 * i) <= rfit;
    /* a quadratic model's truncation bias grows as the radius squared: the
     * fit at 0.7 of it carries about half of it, so the difference is
     * doubled to estimate the whole; a quartic main fit is checked against
     * the smaller model instead, whose difference is taken as it is */
    double inner_scale = quartic ? 1.0 : 2.0;
    return report(&m1, &f1, rc2 == 0 ? &m2 : NULL, inner_scale, rc3 == 0 ? &m3 : NULL,
                  quartic, rfit, used, sqrt(f1.rss / (double)f1.neq), out, err);
}

/* ------------------------------------------------------------ lines */

/* d/dt at t = 0 of the polynomial through (t[j], e[j]), j = 0 .. n-1, with
 * t[0] = 0: in Newton's form a_0 + a_1 t + a_2 t (t - t_1) + ..., term k
 * contributes a_k times the product of -t_m over m = 1 .. k-1. */
static double slope_at_zero(const double *t, const double *e, int n)
{
    double a[8];
    for (int j = 0; j < n; j++)
        a[j] = e[j];
    for (int k = 1; k < n; k++)
        for (int j = n - 1; j >= k; j--)
            a[j] = (a[j] - a[j - 1]) / (t[j] - t[j - k]);
    double slope = 0.0, prod = 1.0;
    for (int k = 1; k < n; k++) {
        slope += a[k] * prod;
        prod *= -t[k];
    }
    return slope;
}

bm_status bm_kp_fit_lines(const bm_kp_lines *l, bm_kp_fit *out, bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "k.p fit: no output given");
    memset(out, 0, sizeof *out);
    if (!l || (l->nbands != 3 && l->nbands != 4))
        return bm_fail(err, BM_EINVAL, "k.p fit: %zu touching bands; the cubic models take "
                       "3 (no spin-orbit coupling) or 4 (two Kramers pairs)", l ? l->nbands : 0);
    if (l->npoints < 3 || l->npoints > 6 || l->nlines < 2)
        return bm_fail(err, BM_EINVAL, "k.p fit: %zu lines of %zu points; the line fit takes "
                       "at least two lines of 3 to 6 points", l->nlines, l->npoints);
    const size_t nl = l->nlines, nb = l->nbands, np1 = l->npoints + 1;
    double kappa = INFINITY, reach = 0.0, centre = 0.0;
    for (size_t i = 0; i < nl; i++) {
        if (!(l->step[i] > 0.0) || !isfinite(l->step[i]))
            return bm_fail(err, BM_EINVAL, "k.p fit: line %zu has a step of %g", i, l->step[i]);
        kappa = fmin(kappa, l->step[i]);
        reach = fmax(reach, l->step[i] * (double)l->npoints);
    }
    for (size_t v = 0; v < nb * nl * np1; v++)
        if (!isfinite(l->energies[v]))
            return bm_fail(err, BM_EINVAL, "k.p fit: a non-finite energy on line %zu",
                           (v / np1) % nl);
    for (size_t b = 0; b < nb; b++)
        centre += l->energies[b * nl * np1] / (double)nb;
    /* pseudo-points: the centre, and kappa along each line with the energy the
     * extrapolated curvature gives there (eV, from the centre) */
    const size_t npts = 1 + nl;
    double *k = calloc(3 * npts, sizeof *k);
    double *e1 = calloc(nb * npts, sizeof *e1), *e2 = calloc(nb * npts, sizeof *e2);
    double *w = calloc(nb * npts, sizeof *w);
    bm_status st = BM_OK;
    if (!k || !e1 || !e2 || !w) {
        st = bm_fail(err, BM_ENOMEM, "k.p fit: out of memory");
        goto done;
    }
    double wsum = 0.0;
    for (size_t i = 0; i < nl; i++) {
        for (int a = 0; a < 3; a++)
            k[3 * (i + 1) + a] = kappa * l->dir[3 * i + a];
        double t[8];
        for (size_t j = 0; j < np1; j++)
            t[j] = (double)(j * j) * l->step[i] * l->step[i];
        for (size_t b = 0; b < nb; b++) {
            const double *e = l->energies + (b * nl + i) * np1;
            int n = (int)np1;
            double c0 = slope_at_zero(t, e, n), c1 = slope_at_zero(t, e, n - 1);
            double c2 = slope_at_zero(t, e, n - 2);
            /* each order's change is the error of the one before: the last
             * change, with a share of the one before against a lucky match */
            double sig = hypot(c0 - c1, 0.2 * (c1 - c2));
            sig = fmax(sig, 1e-4 * fabs(c0) + 1e-9);
            e1[b * npts + i + 1] = c0 * kappa * kappa;
            e2[b * npts + i + 1] = c1 * kappa * kappa;
            w[b * npts + i + 1] = 1.0 / (sig * kappa * kappa);
            wsum += w[b * npts + i + 1];
        }
    }
    for (size_t b = 0; b < nb; b++)
        w[b * npts] = wsum / (double)(nb * nl);
    bm_kp_model model = nb == 3 ? BM_KP_THREEFOLD : BM_KP_FOURFOLD;
    bm_kp_data d1 = { .npoints = npts, .k = k, .nbands = nb, .energies = e1, .weights = w };
    bm_kp_data d2 = d1;
    d2.energies = e2;
    kp_params m1, m2;
    fit_stats f1, f2;
    int rc = fit_model(&d1, model, 0, 2.0 * kappa, &m1, &f1);
    int rc2 = rc == 0 ? refit_from(&d2, &m1, 0, 2.0 * kappa, &m2, &f2) : -1;
    if (rc == -2 || rc2 == -2) {
        st = bm_fail(err, BM_ENOMEM, "k.p fit: out of memory");
        goto done;
    }
    if (rc != 0) {
        st = bm_fail(err, BM_EINVAL, "k.p fit: the %zu lines do not determine the parameters "
                     "(lines of one family only)", nl);
        goto done;
    }
    /* the weights are the curvatures' errors, so the covariance is the
     * unscaled one, widened where the lines scatter more than they say */
    double dof = (double)f1.neq - (double)f1.rank;
    double chi2 = dof > 0.0 ? f1.rss / dof : 0.0;
    double widen = chi2 > 0.0 ? fmax(1.0, chi2) / chi2 : 1.0;
    for (int p = 0; p < NPAR_MAX; p++)
        for (int q = 0; q < NPAR_MAX; q++)
            f1.cov[p][q] *= widen;
    d1.weights = NULL;
    double rms = sqrt(model_rss(&d1, 2.0 * kappa, &m1) / (double)(nb * npts));
    m1.x[0] += centre;
    if (rc2 == 0)
        m2.x[0] += centre;
    st = report(&m1, &f1, rc2 == 0 ? &m2 : NULL, 1.0, NULL, 0, reach,
                1 + 2 * nl * l->npoints, rms, out, err);
done:
    free(k);
    free(e1);
    free(e2);
    free(w);
    return st;
}

/* ------------------------------------------------------------ cubic frame */

int bm_kp_cubic_frame(const double recip[3][3])
{
    double b[3][3], binv[3][3];
    memcpy(b, recip, sizeof b);
    if (bm_inv3(b, binv) != 0)
        return 0;
    /* generators of the cube's group: a fourfold turn about z, the threefold
     * turn about [111], and inversion is implied for a lattice */
    static const double gen[2][3][3] = {
        { { 0, -1, 0 }, { 1, 0, 0 }, { 0, 0, 1 } },
        { { 0, 0, 1 }, { 1, 0, 0 }, { 0, 1, 0 } },
    };
    for (int g = 0; g < 2; g++)
        for (int i = 0; i < 3; i++) {
            double rb[3] = { 0, 0, 0 };
            for (int a = 0; a < 3; a++)
                for (int c = 0; c < 3; c++)
                    rb[a] += gen[g][a][c] * recip[i][c];
            /* fractional coordinates f with f . B = rb */
            for (int j = 0; j < 3; j++) {
                double f = 0.0;
                for (int a = 0; a < 3; a++)
                    f += rb[a] * binv[a][j];
                if (fabs(f - nearbyint(f)) > 1e-6)
                    return 0;
            }
        }
    return 1;
}
