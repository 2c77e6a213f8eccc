/* bm-valleys.c: stars of valleys under a point group plus time reversal,
 * and population-weighted conductivity and density-of-states masses. */
#include "bm-valleys.h"
#include "bm-fermi.h"
#include "bm-linalg.h"
#include "bm-mat3.h"
#include "bm-units.h"

#include <math.h>
#include <string.h>

#define AXES_SNAP_TOL 1e-3     /* re-orthonormalise below, reject above */
#define POS_TOL 1e-6           /* equality of unit position vectors */
#define MASS_LOW 0.01          /* typical range, m_e (common practice, no source) */
#define MASS_HIGH 10.0

static bm_status check_mass(double m, const char *what, int i, bm_errbuf *err)
{
    if (!isfinite(m) || m <= 0.0)
        return bm_fail(err, BM_EINVAL,
                       "%s %d is %g m_e: masses must be positive and finite", what, i, m);
    return BM_OK;
}

bm_status bm_inv_mass_principal(const double *inv_mass, double masses[3],
                                double axes[3][3], bm_errbuf *err)
{
    double a[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            if (!isfinite(BM_M3(inv_mass, i, j)))
                return bm_fail(err, BM_EINVAL,
                               "inverse mass tensor entry [%d][%d] is not finite", i, j);
            a[i][j] = 0.5 * (BM_M3(inv_mass, i, j) + BM_M3(inv_mass, j, i));
        }
    double evals[3], evecs[3][3];
    if (bm_symeig(a, 3, evals, evecs) != 0)
        return bm_fail(err, BM_EINTERNAL, "inverse mass tensor: eigen-decomposition failed");
    /* Ascending inverse masses, taken from the largest, give ascending masses. */
    for (int i = 0; i < 3; i++) {
        double lam = evals[2 - i];
        if (!(lam > 0.0))
            return bm_fail(err, BM_EINVAL,
                           "inverse mass tensor is not positive definite "
                           "(eigenvalue %d is %g 1/m_e)", i, lam);
        masses[i] = 1.0 / lam;
        for (int j = 0; j < 3; j++)
            axes[i][j] = evecs[2 - i][j];
    }
    return BM_OK;
}

bm_status bm_valley_shape_spheroid(double m_long, double m_trans, const double axis[3],
                                   bm_valley_shape *out, bm_errbuf *err)
{
    if (!isfinite(m_long) || m_long <= 0.0)
        return bm_fail(err, BM_EINVAL,
                       "longitudinal mass is %g m_e: masses must be positive and finite",
                       m_long);
    if (!isfinite(m_trans) || m_trans <= 0.0)
        return bm_fail(err, BM_EINVAL,
                       "transverse mass is %g m_e: masses must be positive and finite",
                       m_trans);
    if (!axis)
        return bm_fail(err, BM_EINVAL, "spheroidal valley: no axis given");
    double len = bm_v3_norm(axis);
    if (!isfinite(len) || len < 1e-12)
        return bm_fail(err, BM_EINVAL,
                       "spheroidal valley: axis [%g, %g, %g] is zero or not finite",
                       axis[0], axis[1], axis[2]);
    double u[3] = {axis[0] / len, axis[1] / len, axis[2] / len};
    /* Two unit vectors across u: start from the Cartesian axis least aligned with u. */
    int k = 0;
    for (int i = 1; i < 3; i++)
        if (fabs(u[i]) < fabs(u[k]))
            k = i;
    double e[3] = {0, 0, 0};
    e[k] = 1.0;
    double d = bm_v3_dot(e, u);
    double v[3] = {e[0] - d * u[0], e[1] - d * u[1], e[2] - d * u[2]};
    double vl = bm_v3_norm(v);
    for (int i = 0; i < 3; i++)
        v[i] /= vl;
    double w[3] = {u[1] * v[2] - u[2] * v[1], u[2] * v[0] - u[0] * v[2],
                   u[0] * v[1] - u[1] * v[0]};
    out->masses[0] = m_long;
    out->masses[1] = m_trans;
    out->masses[2] = m_trans;
    memcpy(out->axes[0], u, sizeof u);
    memcpy(out->axes[1], v, sizeof v);
    memcpy(out->axes[2], w, sizeof w);
    return BM_OK;
}

bm_status bm_valley_shape_normalise(bm_valley_shape *shape, bm_warnings *warn,
                                    bm_errbuf *err)
{
    if (!shape)
        return bm_fail(err, BM_EINVAL, "valley: no shape given");
    for (int i = 0; i < 3; i++) {
        bm_status st = check_mass(shape->masses[i], "principal mass", i, err);
        if (st != BM_OK)
            return st;
        for (int j = 0; j < 3; j++)
            if (!isfinite(shape->axes[i][j]))
                return bm_fail(err, BM_EINVAL, "valley: axis %d component %d is not finite",
                               i, j);
    }
    double oe = bm_m3_orthogonality_error(BM_M3P(shape->axes));
    if (oe > AXES_SNAP_TOL)
        return bm_fail(err, BM_EINVAL,
                       "valley: principal axes are not orthonormal (largest entry of "
                       "A A^T - 1 is %.3g; at most %.0e is corrected)", oe, AXES_SNAP_TOL);
    double (*a)[3] = shape->axes;   /* Gram-Schmidt in the given order */
    for (int i = 0; i < 3; i++) {
        for (int j = 0; j < i; j++) {
            double d = bm_v3_dot(a[i], a[j]);
            for (int c = 0; c < 3; c++)
                a[i][c] -= d * a[j][c];
        }
        double l = bm_v3_norm(a[i]);
        for (int c = 0; c < 3; c++)
            a[i][c] /= l;
    }
    if (oe > 1e-9)
        bm_warn(warn, BM_WARN_AXES_REORTHONORMALISED, "valley principal axes were re-orthonormalised "
                "(largest entry of A A^T - 1 was %.2g)", oe);
    return BM_OK;
}

static void shape_inv_mass(const bm_valley_shape *s, double inv[3][3])
{
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double t = 0.0;
            for (int k = 0; k < 3; k++)
                t += s->axes[k][i] * s->axes[k][j] / s->masses[k];
            inv[i][j] = t;
        }
}

static bm_status check_shape(const bm_valley_shape *s, bm_errbuf *err)
{
    if (!s)
        return bm_fail(err, BM_EINVAL, "valley: no shape given");
    for (int i = 0; i < 3; i++) {
        bm_status st = check_mass(s->masses[i], "principal mass", i, err);
        if (st != BM_OK)
            return st;
    }
    double oe = bm_m3_orthogonality_error(BM_M3P(s->axes));
    if (!(oe <= 1e-6))
        return bm_fail(err, BM_EINVAL,
                       "valley: principal axes are not orthonormal (error %.3g); build the "
                       "shape with bm_valley_shape_general to correct small errors", oe);
    return BM_OK;
}

bm_status bm_valley_from_shape(const bm_valley_shape *shape, const double direction[3],
                               double weight, double energy_offset_ev,
                               bm_valley *out, bm_errbuf *err)
{
    bm_status st = check_shape(shape, err);
    if (st != BM_OK)
        return st;
    if (!isfinite(weight) || weight <= 0.0)
        return bm_fail(err, BM_EINVAL, "valley weight is %g: must be positive", weight);
    if (!isfinite(energy_offset_ev))
        return bm_fail(err, BM_EINVAL, "valley energy offset is not finite");
    memset(out, 0, sizeof *out);
    if (direction) {
        double l = bm_v3_norm(direction);
        if (!isfinite(l))
            return bm_fail(err, BM_EINVAL, "valley direction is not finite");
        if (l > 0.0)
            for (int i = 0; i < 3; i++)
                out->direction[i] = direction[i] / l;
    }
    shape_inv_mass(shape, out->inv_mass);
    st = bm_inv_mass_principal(BM_M3P(out->inv_mass), out->masses, out->axes, err);
    if (st != BM_OK)
        return st;
    out->weight = weight;
    out->energy_offset_ev = energy_offset_ev;
    return BM_OK;
}

bm_status bm_valley_snap_direction(double dir[3], const bm_point_group *g, double tol,
                                   double *moved, bm_errbuf *err)
{
    double n = sqrt(dir[0] * dir[0] + dir[1] * dir[1] + dir[2] * dir[2]);
    if (!(n > 0.0) || !isfinite(n))
        return bm_fail(err, BM_EINVAL, "valley: the direction to snap is zero or not finite");
    double d[3] = { dir[0] / n, dir[1] / n, dir[2] / n }, sum[3] = { 0, 0, 0 };
    for (int o = 0; o < g->order; o++)
        for (int tr = 1; tr >= -1; tr -= 2) {     /* time reversal: -R too */
            double r[3], diff = 0.0;
            for (int i = 0; i < 3; i++) {
                r[i] = tr * (g->ops[o][i][0] * d[0] + g->ops[o][i][1] * d[1]
                             + g->ops[o][i][2] * d[2]);
                diff += (r[i] - d[i]) * (r[i] - d[i]);
            }
            if (sqrt(diff) <= tol)
                for (int i = 0; i < 3; i++)
                    sum[i] += r[i];
        }
    double sn = sqrt(sum[0] * sum[0] + sum[1] * sum[1] + sum[2] * sum[2]);
    double dot = (sum[0] * d[0] + sum[1] * d[1] + sum[2] * d[2]) / sn;
    for (int i = 0; i < 3; i++)
        dir[i] = sum[i] / sn;
    *moved = acos(fmin(1.0, fmax(-1.0, dot)));
    return BM_OK;
}

bm_status bm_valley_star_build(const bm_valley_shape *shape, bm_valley_site site,
                               const double direction[3], const bm_point_group *g,
                               bm_valley_star *out, bm_errbuf *err)
{
    bm_status st = check_shape(shape, err);
    if (st != BM_OK)
        return st;
    if (!g || g->order < 1 || g->order > BM_POINT_GROUP_MAX_ORDER)
        return bm_fail(err, BM_EINVAL, "valley star: no valid point group given");
    if (!out)
        return bm_fail(err, BM_EINVAL, "valley star: no output given");
    if (site != BM_SITE_GAMMA && site != BM_SITE_INTERIOR && site != BM_SITE_FACE)
        return bm_fail(err, BM_EINVAL, "valley star: unknown site %d", (int)site);
    memset(out, 0, sizeof *out);

    double d[3] = {0, 0, 0};
    if (site != BM_SITE_GAMMA) {
        if (!direction)
            return bm_fail(err, BM_EINVAL, "valley star: a %s valley needs a position direction",
                           site == BM_SITE_FACE ? "face" : "interior");
        double l = bm_v3_norm(direction);
        if (!isfinite(l) || l < 1e-12)
            return bm_fail(err, BM_EINVAL,
                           "valley star: position direction [%g, %g, %g] is zero or not finite",
                           direction[0], direction[1], direction[2]);
        for (int i = 0; i < 3; i++)
            d[i] = direction[i] / l;
    }

    double inv0[3][3];
    shape_inv_mass(shape, inv0);

    double sum[BM_STAR_MAX][3][3];
    double first[BM_STAR_MAX][3][3];
    double spread[BM_STAR_MAX];
    int count[BM_STAR_MAX];
    size_t n = 0;

    /* The group plus time reversal: R and -R for every R (a set of at most
     * 2 |G| elements, repeats harmless since they give the same image). -R
     * maps the tensor exactly like R. */
    for (int o = 0; o < g->order; o++) {
        for (int sgn = 1; sgn >= -1; sgn -= 2) {
            double r[9];
            for (int i = 0; i < 9; i++)
                r[i] = sgn * BM_M3CP(g->ops[o])[i];
            double p[3];
            bm_m3_apply(p, r, d);
            double t[3][3];
            bm_m3_rotate_tensor(BM_M3P(t), r, BM_M3P(inv0));
            size_t slot = n;
            for (size_t s = 0; s < n; s++) {
                double diff = 0.0;
                for (int i = 0; i < 3; i++)
                    diff = fmax(diff, fabs(out->valleys[s].direction[i] - p[i]));
                if (diff < POS_TOL) {
                    slot = s;
                    break;
                }
            }
            if (slot == n) {
                if (n >= BM_STAR_MAX)
                    return bm_fail(err, BM_EINTERNAL, "valley star: more than %d positions",
                                   BM_STAR_MAX);
                memcpy(out->valleys[n].direction, p, sizeof p);
                memset(sum[n], 0, sizeof sum[n]);
                bm_m3_copy(BM_M3P(first[n]), BM_M3P(t));
                spread[n] = 0.0;
                count[n] = 0;
                n++;
            }
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++)
                    sum[slot][i][j] += t[i][j];
            spread[slot] = fmax(spread[slot], bm_m3_maxdiff(BM_M3P(t), BM_M3P(first[slot])));
            count[slot]++;
        }
    }

    double scale = 1.0 / fmin(fmin(shape->masses[0], shape->masses[1]), shape->masses[2]);
    double worst = 0.0;
    for (size_t s = 0; s < n; s++) {
        bm_valley *v = &out->valleys[s];
        for (int i = 0; i < 3; i++) {
            if (fabs(v->direction[i]) < 1e-15)
                v->direction[i] = 0.0;   /* no negative zeros in output */
            for (int j = 0; j < 3; j++)
                v->inv_mass[i][j] = sum[s][i][j] / count[s];
        }
        worst = fmax(worst, spread[s] / scale);
        st = bm_inv_mass_principal(BM_M3P(v->inv_mass), v->masses, v->axes, err);
        if (st != BM_OK)
            return st;
        v->weight = (site == BM_SITE_FACE) ? 0.5 : 1.0;
        v->energy_offset_ev = 0.0;
        v->population = 0.0;
        out->valley_count += v->weight;
    }
    out->n = n;
    if (worst > 1e-9)
        bm_warn(&out->warnings, BM_WARN_VALLEY_SYMMETRISED,
                "the valley's mass tensor is not invariant under the operations of %s that "
                "keep its position (relative change %.2g); each valley holds the "
                "symmetrised average", g->name[0] ? g->name : "the group", worst);
    return BM_OK;
}

/* Fractional coordinates of a Cartesian k against the reciprocal lattice of
 * lattice vectors a: f_i = k . a_i / (2 pi). */
static void k_fractional(const double a[3][3], const double k[3], double f[3])
{
    for (int i = 0; i < 3; i++)
        f[i] = (k[0] * a[i][0] + k[1] * a[i][1] + k[2] * a[i][2]) / (2.0 * M_PI);
}

static int integral(const double f[3], double tol)
{
    for (int i = 0; i < 3; i++)
        if (fabs(f[i] - nearbyint(f[i])) > tol)
            return 0;
    return 1;
}

/* The shortest image k + G (G a reciprocal-lattice vector): the first-zone image. */
static void first_zone(const double a[3][3], double b[3][3], const double k[3],
                       double out[3])
{
    double f[3], best = INFINITY;
    k_fractional(a, k, f);
    for (int i = 0; i < 3; i++)
        f[i] -= nearbyint(f[i]);
    for (int n0 = -2; n0 <= 2; n0++)
        for (int n1 = -2; n1 <= 2; n1++)
            for (int n2 = -2; n2 <= 2; n2++) {
                double c[3];
                for (int j = 0; j < 3; j++)
                    c[j] = (f[0] + n0) * b[0][j] + (f[1] + n1) * b[1][j] + (f[2] + n2) * b[2][j];
                double l = bm_v3_norm(c);
                if (l < best * (1.0 - 1e-12)) {
                    best = l;
                    memcpy(out, c, sizeof c);
                }
            }
}

bm_status bm_valley_star_zone(const bm_valley_shape *shape, const double k[3],
                              const double a[3][3], const bm_point_group *g,
                              double snap_tol, double *snapped_rad,
                              bm_valley_star *out, bm_errbuf *err)
{
    if (snapped_rad)
        *snapped_rad = 0.0;
    if (!k || !a || !g || !out)
        return bm_fail(err, BM_EINVAL, "valley star: k, lattice, group and output are needed");
    for (int i = 0; i < 3; i++) {
        if (!isfinite(k[i]))
            return bm_fail(err, BM_EINVAL, "valley star: k[%d] = %g is not finite", i, k[i]);
        for (int j = 0; j < 3; j++)
            if (!isfinite(a[i][j]))
                return bm_fail(err, BM_EINVAL, "valley star: lattice vector %d is not finite", i);
    }
    /* reciprocal vectors b_i (rows): b = 2 pi (a^-1)^T */
    double ai[3][3], b[3][3];
    double scale = bm_v3_norm(a[0]) * bm_v3_norm(a[1]) * bm_v3_norm(a[2]);
    if (!bm_m3_inverse(BM_M3P(ai), BM_M3CP(a), 1e-9 * scale))
        return bm_fail(err, BM_EINVAL, "valley star: the lattice vectors are linearly dependent");
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            b[i][j] = 2.0 * M_PI * ai[j][i];
    /* every operation must map the reciprocal lattice onto itself */
    for (int o = 0; o < g->order; o++)
        for (int i = 0; i < 3; i++) {
            double rb[3], f[3];
            bm_m3_apply(rb, BM_M3CP(g->ops[o]), b[i]);
            k_fractional(a, rb, f);
            if (!integral(f, 1e-6))
                return bm_fail(err, BM_EINVAL, "valley star: operation %d of %s does not map "
                               "the lattice onto itself (reciprocal vector %d goes to "
                               "(%.4g, %.4g, %.4g) in reciprocal-lattice units): give the "
                               "lattice vectors in the point group's frame (principal axis z, "
                               "cube axes x, y, z)", o, g->name, i + 1, f[0], f[1], f[2]);
        }
    double k0[3];
    first_zone(a, b, k, k0);
    double kl = bm_v3_norm(k0);
    double blen = fmin(fmin(bm_v3_norm(b[0]), bm_v3_norm(b[1])), bm_v3_norm(b[2]));
    int gamma = kl < 1e-9 * blen;
    if (!gamma && snap_tol > 0.0) {
        double d[3] = { k0[0] / kl, k0[1] / kl, k0[2] / kl }, moved = 0.0;
        bm_status st = bm_valley_snap_direction(d, g, snap_tol, &moved, err);
        if (st != BM_OK)
            return st;
        for (int j = 0; j < 3; j++)
            k0[j] = kl * d[j];
        if (snapped_rad)
            *snapped_rad = moved;
    }
    bm_status st = bm_valley_star_build(shape, gamma ? BM_SITE_GAMMA : BM_SITE_INTERIOR,
                                        gamma ? NULL : k0, g, out, err);
    if (st != BM_OK)
        return st;
    /* classes of star points equal modulo the reciprocal lattice */
    int cls[BM_STAR_MAX], size[BM_STAR_MAX] = { 0 }, nclass = 0;
    for (size_t s = 0; s < out->n; s++) {
        for (int j = 0; j < 3; j++)
            out->valleys[s].k[j] = gamma ? 0.0 : kl * out->valleys[s].direction[j];
        cls[s] = -1;
        for (size_t t = 0; t < s && cls[s] < 0; t++) {
            double d[3], f[3];
            for (int j = 0; j < 3; j++)
                d[j] = out->valleys[s].k[j] - out->valleys[t].k[j];
            k_fractional(a, d, f);
            if (integral(f, 1e-6))
                cls[s] = cls[t];
        }
        if (cls[s] < 0)
            cls[s] = nclass++;
        size[cls[s]]++;
    }
    for (size_t s = 0; s < out->n; s++)
        out->valleys[s].weight = 1.0 / size[cls[s]];
    out->valley_count = nclass;   /* the sum of the weights, exactly */
    return BM_OK;
}

bm_status bm_valley_confine(const bm_valley *v, const double normal[3], bm_confined_valley *out,
                            bm_errbuf *err)
{
    double nl = bm_v3_norm(normal);
    if (!isfinite(nl) || nl == 0.0)
        return bm_fail(err, BM_EINVAL, "confinement: the layer normal is zero or not finite");
    /* an orthonormal basis: e[0], e[1] in the plane, e[2] the normal */
    double e[3][3] = { { 0 } };
    for (int i = 0; i < 3; i++)
        e[0][i] = normal[i] / nl;
    bm_complete_basis(e, 1);
    double basis[3][3];
    memcpy(basis[0], e[1], sizeof basis[0]);
    memcpy(basis[1], e[2], sizeof basis[1]);
    memcpy(basis[2], e[0], sizeof basis[2]);
    double w[3][3];
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++) {
            double s = 0.0;
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++)
                    s += basis[a][i] * v->inv_mass[i][j] * basis[b][j];
            w[a][b] = s;
        }
    if (!(w[2][2] > 0.0))
        return bm_fail(err, BM_EINVAL, "confinement: the valley's inverse mass along the "
                       "normal is %g 1/m_e, not positive", w[2][2]);
    out->quantization_mass = 1.0 / w[2][2];
    double p[3][3] = { { 0 } }, ev[3], vec[3][3];
    for (int a = 0; a < 2; a++)
        for (int b = 0; b < 2; b++)
            p[a][b] = w[a][b] - w[a][2] * w[b][2] / w[2][2];
    if (bm_symeig(p, 2, ev, vec) != 0 || !(ev[0] > 0.0) || !(ev[1] > 0.0))
        return bm_fail(err, BM_EINVAL, "confinement: the in-plane inverse mass tensor is not "
                       "positive definite");
    out->dos_mass_2d = 1.0 / sqrt(ev[0] * ev[1]);
    /* ascending masses: the larger inverse mass first */
    int big = ev[0] >= ev[1] ? 0 : 1;
    for (int m = 0; m < 2; m++) {
        int o = m == 0 ? big : 1 - big;
        out->inplane_masses[m] = 1.0 / ev[o];
        for (int i = 0; i < 3; i++)
            out->inplane_axes[m][i] = vec[o][0] * basis[0][i] + vec[o][1] * basis[1][i];
    }
    return BM_OK;
}

bm_status bm_valley_average_compute(bm_valley *valleys, size_t n, const bm_population *pop,
                                    bm_valley_average *out, bm_errbuf *err)
{
    if (!valleys || n == 0)
        return bm_fail(err, BM_EINVAL, "valley average: no valleys given");
    if (!out)
        return bm_fail(err, BM_EINVAL, "valley average: no output given");
    memset(out, 0, sizeof *out);
    bm_population eq = {0, BM_FERMI_DIRAC, 0.0, 0.0};
    if (!pop)
        pop = &eq;

    double emin = INFINITY, emax = -INFINITY;
    for (size_t v = 0; v < n; v++) {
        const bm_valley *x = &valleys[v];
        if (!isfinite(x->weight) || x->weight <= 0.0)
            return bm_fail(err, BM_EINVAL, "valley %zu: weight is %g, must be positive",
                           v, x->weight);
        if (!isfinite(x->energy_offset_ev))
            return bm_fail(err, BM_EINVAL, "valley %zu: energy offset is not finite", v);
        for (int i = 0; i < 3; i++) {
            if (!isfinite(x->masses[i]) || x->masses[i] <= 0.0)
                return bm_fail(err, BM_EINVAL,
                               "valley %zu: principal mass %d is %g m_e, must be positive",
                               v, i, x->masses[i]);
            for (int j = 0; j < 3; j++)
                if (!isfinite(x->inv_mass[i][j]))
                    return bm_fail(err, BM_EINVAL,
                                   "valley %zu: inverse mass entry [%d][%d] is not finite",
                                   v, i, j);
        }
        emin = fmin(emin, x->energy_offset_ev);
        emax = fmax(emax, x->energy_offset_ev);
    }
    int offsets = emax > emin;

    double kt = 0.0;
    int fermi = pop->thermal && pop->statistics == BM_FERMI_DIRAC;
    if (!pop->thermal) {
        if (offsets)
            return bm_fail(err, BM_EINVAL,
                           "valley average: energy offsets span %g eV but equal populations "
                           "were asked for; give a temperature", emax - emin);
    } else {
        if (pop->statistics != BM_BOLTZMANN && pop->statistics != BM_FERMI_DIRAC)
            return bm_fail(err, BM_EINVAL, "valley average: unknown statistics %d",
                           (int)pop->statistics);
        if (!isfinite(pop->temperature_k) || pop->temperature_k < 0.0)
            return bm_fail(err, BM_EINVAL, "valley average: temperature %g K is not valid",
                           pop->temperature_k);
        if (pop->temperature_k == 0.0 && offsets)
            return bm_fail(err, BM_EINVAL,
                           "valley average: temperature is 0 K but the energy offsets differ "
                           "(by up to %g eV); populations need T > 0", emax - emin);
        if (fermi && !isfinite(pop->fermi_level_ev))
            return bm_fail(err, BM_EINVAL, "valley average: Fermi level is not finite");
        kt = BM_KB_EV * pop->temperature_k;
    }

    /* log occupation of each valley relative to one at the lowest edge */
    double lref = 0.0;
    if (fermi && kt > 0.0)
        lref = bm_fermi_dirac_half_log((pop->fermi_level_ev - emin) / kt, NULL);

    double ptot = 0.0;
    double inv[3][3] = {{0}};
    for (size_t v = 0; v < n; v++) {
        bm_valley *x = &valleys[v];
        double lr = 0.0;
        if (kt > 0.0) {
            if (!fermi)
                lr = -(x->energy_offset_ev - emin) / kt;
            else
                lr = bm_fermi_dirac_half_log((pop->fermi_level_ev - x->energy_offset_ev) / kt, NULL) - lref;
        }
        double p = x->weight * sqrt(x->masses[0] * x->masses[1] * x->masses[2]) * exp(lr);
        x->population = p;
        ptot += p;
        out->valley_count += x->weight;
        out->effective_valley_count += x->weight * exp(lr);
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                inv[i][j] += p * x->inv_mass[i][j];
    }
    if (!(ptot > 0.0) || !isfinite(ptot))
        return bm_fail(err, BM_EINVAL, "valley average: populations vanish or overflow "
                       "(offsets %g..%g eV at %g K)", emin, emax, pop->temperature_k);
    for (size_t v = 0; v < n; v++)
        valleys[v].population /= ptot;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            out->conductivity_inv_mass[i][j] = inv[i][j] / ptot;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < i; j++) {
            double s = 0.5 * (out->conductivity_inv_mass[i][j] + out->conductivity_inv_mass[j][i]);
            out->conductivity_inv_mass[i][j] = out->conductivity_inv_mass[j][i] = s;
        }

    bm_status st = bm_inv_mass_principal(BM_M3P(out->conductivity_inv_mass), out->conductivity_masses,
                                         out->conductivity_axes, err);
    if (st != BM_OK)
        return st;
    if (!bm_m3_inverse(BM_M3P(out->conductivity_mass_tensor), BM_M3P(out->conductivity_inv_mass), 0.0))
        return bm_fail(err, BM_EINTERNAL, "valley average: conductivity tensor is singular");
    double tr = out->conductivity_inv_mass[0][0] + out->conductivity_inv_mass[1][1]
              + out->conductivity_inv_mass[2][2];
    out->conductivity_mass = 3.0 / tr;
    double mlo = out->conductivity_masses[0], mhi = out->conductivity_masses[2];
    out->conductivity_isotropic = (mhi - mlo) <= 1e-9 * mhi;
    out->dos_mass = pow(ptot, 2.0 / 3.0);

    for (size_t v = 0; v < n; v++)
        for (int i = 0; i < 3; i++)
            if (valleys[v].masses[i] < MASS_LOW || valleys[v].masses[i] > MASS_HIGH) {
                bm_warn(&out->warnings, BM_WARN_MASS_OUT_OF_RANGE,
                        "valley %zu has a principal mass of %g m_e, outside the usual "
                        "%g..%g m_e", v, valleys[v].masses[i], MASS_LOW, MASS_HIGH);
                v = n;   /* once is enough */
                break;
            }
    if (fermi && kt > 0.0 && (pop->fermi_level_ev - emin) / kt > -3.0)
        bm_warn(&out->warnings, BM_WARN_DEGENERATE_STATISTICS,
                "the Fermi level lies %.3g kT from the lowest valley edge: degenerate "
                "statistics, masses depend on the Fermi level",
                (pop->fermi_level_ev - emin) / kt);
    return BM_OK;
}
