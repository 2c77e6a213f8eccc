/* bm-symmetry.c: point-group tables built from generators; closure by
 * repeated products; lookup by Schoenflies or Hermann-Mauguin symbol. */
#include "bm-symmetry.h"
#include "bm-mat3.h"

#include <math.h>
#include <gsl/gsl_math.h>
#include <stdio.h>
#include <string.h>

#define BM_SYM_TOL 1e-9

/* Generators, Cartesian. Rotations act on column vectors: x' = R x. */
static const double E_[3][3]   = {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}};
static const double INV[3][3]  = {{-1, 0, 0}, {0, -1, 0}, {0, 0, -1}};
static const double C2Z[3][3]  = {{-1, 0, 0}, {0, -1, 0}, {0, 0, 1}};
static const double C2X[3][3]  = {{1, 0, 0}, {0, -1, 0}, {0, 0, -1}};
static const double C4Z[3][3]  = {{0, -1, 0}, {1, 0, 0}, {0, 0, 1}};
static const double S4Z[3][3]  = {{0, -1, 0}, {1, 0, 0}, {0, 0, -1}};
static const double SIGX[3][3] = {{-1, 0, 0}, {0, 1, 0}, {0, 0, 1}};   /* mirror x = 0 */
static const double SIGH[3][3] = {{1, 0, 0}, {0, 1, 0}, {0, 0, -1}};   /* mirror z = 0 */
static const double C3D[3][3]  = {{0, 0, 1}, {1, 0, 0}, {0, 1, 0}};    /* 120 deg about [111] */
/* 120 and 60 degrees about z: filled at run time from cos/sin (no table of
 * rounded irrationals). */

typedef enum {
    G_E, G_INV, G_C2Z, G_C2X, G_C4Z, G_S4Z, G_SIGX, G_SIGH, G_C3D, G_C3Z, G_C6Z
} gen_id;

typedef struct {
    const char *schoenflies;
    const char *hm;           /* international short symbol */
    const char *laue;         /* the group with inversion added: its Laue class */
    int n;
    gen_id gens[3];
} group_def;

/* All 32 crystallographic point groups. */
static const group_def GROUPS[] = {
    {"C1",  "1",      "-1",     1, {G_E}},
    {"Ci",  "-1",     "-1",     1, {G_INV}},
    {"C2",  "2",      "2/m",    1, {G_C2Z}},
    {"Cs",  "m",      "2/m",    1, {G_SIGH}},
    {"C2h", "2/m",    "2/m",    2, {G_C2Z, G_INV}},
    {"D2",  "222",    "mmm",    2, {G_C2Z, G_C2X}},
    {"C2v", "mm2",    "mmm",    2, {G_C2Z, G_SIGX}},
    {"D2h", "mmm",    "mmm",    3, {G_C2Z, G_C2X, G_INV}},
    {"C4",  "4",      "4/m",    1, {G_C4Z}},
    {"S4",  "-4",     "4/m",    1, {G_S4Z}},
    {"C4h", "4/m",    "4/m",    2, {G_C4Z, G_INV}},
    {"D4",  "422",    "4/mmm",  2, {G_C4Z, G_C2X}},
    {"C4v", "4mm",    "4/mmm",  2, {G_C4Z, G_SIGX}},
    {"D2d", "-42m",   "4/mmm",  2, {G_S4Z, G_C2X}},
    {"D4h", "4/mmm",  "4/mmm",  3, {G_C4Z, G_C2X, G_INV}},
    {"C3",  "3",      "-3",     1, {G_C3Z}},
    {"S6",  "-3",     "-3",     2, {G_C3Z, G_INV}},
    {"C3v", "3m",     "-3m",    2, {G_C3Z, G_SIGX}},
    {"D3",  "32",     "-3m",    2, {G_C3Z, G_C2X}},
    {"D3d", "-3m",    "-3m",    3, {G_C3Z, G_C2X, G_INV}},
    {"C6",  "6",      "6/m",    1, {G_C6Z}},
    {"C3h", "-6",     "6/m",    2, {G_C3Z, G_SIGH}},
    {"C6h", "6/m",    "6/m",    2, {G_C6Z, G_INV}},
    {"D6",  "622",    "6/mmm",  2, {G_C6Z, G_C2X}},
    {"C6v", "6mm",    "6/mmm",  2, {G_C6Z, G_SIGX}},
    {"D3h", "-6m2",   "6/mmm",  3, {G_C3Z, G_C2X, G_SIGH}},
    {"D6h", "6/mmm",  "6/mmm",  3, {G_C6Z, G_C2X, G_INV}},
    {"T",   "23",     "m-3",    2, {G_C2Z, G_C3D}},
    {"Th",  "m-3",    "m-3",    3, {G_C2Z, G_C3D, G_INV}},
    {"O",   "432",    "m-3m",   2, {G_C4Z, G_C3D}},
    {"Td",  "-43m",   "m-3m",   2, {G_S4Z, G_C3D}},
    {"Oh",  "m-3m",   "m-3m",   3, {G_C4Z, G_C3D, G_INV}},
};
/* other names in use for the same groups */
static const struct { const char *alias, *name; } ALIASES[] = {
    {"C1h", "Cs"}, {"C3i", "S6"}, {"Vd", "D2d"}, {"V", "D2"}, {"Vh", "D2h"},
};
#define N_GROUPS (sizeof GROUPS / sizeof GROUPS[0])

static void rot_z(double r[3][3], double angle)
{
    bm_m3_identity(BM_M3P(r));
    r[0][0] = cos(angle); r[0][1] = -sin(angle);
    r[1][0] = sin(angle); r[1][1] = cos(angle);
}

static void gen_matrix(gen_id id, double r[3][3])
{
    switch (id) {
    case G_E:    bm_m3_copy(BM_M3P(r), BM_M3CP(E_)); break;
    case G_INV:  bm_m3_copy(BM_M3P(r), BM_M3CP(INV)); break;
    case G_C2Z:  bm_m3_copy(BM_M3P(r), BM_M3CP(C2Z)); break;
    case G_C2X:  bm_m3_copy(BM_M3P(r), BM_M3CP(C2X)); break;
    case G_C4Z:  bm_m3_copy(BM_M3P(r), BM_M3CP(C4Z)); break;
    case G_S4Z:  bm_m3_copy(BM_M3P(r), BM_M3CP(S4Z)); break;
    case G_SIGX: bm_m3_copy(BM_M3P(r), BM_M3CP(SIGX)); break;
    case G_SIGH: bm_m3_copy(BM_M3P(r), BM_M3CP(SIGH)); break;
    case G_C3D:  bm_m3_copy(BM_M3P(r), BM_M3CP(C3D)); break;
    case G_C3Z:  rot_z(r, 2.0 * M_PI / 3.0); break;
    case G_C6Z:  rot_z(r, M_PI / 3.0); break;
    }
}

int bm_point_group_find(const bm_point_group *g, const double *r, double tol)
{
    for (int i = 0; i < g->order; i++)
        if (bm_m3_maxdiff(BM_M3CP(g->ops[i]), r) <= tol)
            return i;
    return -1;
}

/* Appends r unless present; returns 0 on success, -1 when full. */
static int add_op(bm_point_group *g, const double *r)
{
    if (bm_point_group_find(g, r, 1e-6) >= 0)
        return 0;
    if (g->order >= BM_POINT_GROUP_MAX_ORDER)
        return -1;
    /* Snap entries within rounding of 0, +-1/2, +-1 to the exact values so
     * products of many operations do not drift. */
    double *s = BM_M3P(g->ops[g->order]);
    for (int i = 0; i < 9; i++) {
        double h = nearbyint(2.0 * r[i]) / 2.0;
        s[i] = (fabs(r[i] - h) < 1e-12) ? h : r[i];
    }
    g->order++;
    return 0;
}

bm_status bm_point_group_generate(const double *gens, int n_gens,
                                  const char *name, bm_point_group *out,
                                  bm_errbuf *err)
{
    if (!out)
        return bm_fail(err, BM_EINVAL, "point group: no output given");
    if (n_gens < 0 || (n_gens > 0 && !gens))
        return bm_fail(err, BM_EINVAL, "point group: %d generators but no array", n_gens);
    memset(out, 0, sizeof *out);
    snprintf(out->name, sizeof out->name, "%s", name ? name : "");
    bm_m3_identity(BM_M3P(out->ops[0]));
    out->order = 1;

    for (int k = 0; k < n_gens; k++) {
        const double *gk = gens + 9 * k;
        for (int i = 0; i < 9; i++)
            if (!isfinite(gk[i]))
                return bm_fail(err, BM_EINVAL,
                               "point group: generator %d has a non-finite entry [%d][%d]",
                               k, i / 3, i % 3);
        double oe = bm_m3_orthogonality_error(gk);
        if (oe > BM_SYM_TOL)
            return bm_fail(err, BM_EINVAL,
                           "point group: generator %d is not orthogonal "
                           "(|R R^T - 1| = %.3g)", k, oe);
        if (add_op(out, gk) < 0)
            goto too_big;
    }
    /* Close: multiply every pair until no new element appears. */
    int changed = 1;
    while (changed) {
        changed = 0;
        int n = out->order;
        for (int a = 0; a < n; a++)
            for (int b = 0; b < n; b++) {
                double p[9];
                bm_m3_mul(p, BM_M3P(out->ops[a]), BM_M3P(out->ops[b]));
                int before = out->order;
                if (add_op(out, p) < 0)
                    goto too_big;
                if (out->order != before)
                    changed = 1;
            }
    }
    out->has_inversion = bm_point_group_find(out, BM_M3CP(INV), 1e-6) >= 0;
    return BM_OK;

too_big:
    return bm_fail(err, BM_EINVAL,
                   "point group%s%s: the generators do not close within %d operations "
                   "(not a crystallographic point group)",
                   name ? " " : "", name ? name : "", BM_POINT_GROUP_MAX_ORDER);
}

const char *bm_point_group_names(void)
{
    return "C1, Ci, C2, Cs, C2h, D2, C2v, D2h, C4, S4, C4h, D4, C4v, D2d, D4h, C3, S6, "
           "C3v, D3, D3d, C6, C3h, C6h, D6, C6v, D3h, D6h, T, Th, O, Td, Oh";
}

bm_status bm_point_group_get(const char *name, bm_point_group *out, bm_errbuf *err)
{
    if (!name || !*name)
        return bm_fail(err, BM_EINVAL, "point group: no name given (supported: %s)",
                       bm_point_group_names());
    for (size_t i = 0; i < sizeof ALIASES / sizeof ALIASES[0]; i++)
        if (strcmp(name, ALIASES[i].alias) == 0)
            name = ALIASES[i].name;
    for (size_t i = 0; i < N_GROUPS; i++) {
        const group_def *d = &GROUPS[i];
        if (strcmp(name, d->schoenflies) != 0 && strcmp(name, d->hm) != 0)
            continue;
        double gens[3][3][3];
        for (int k = 0; k < d->n; k++)
            gen_matrix(d->gens[k], gens[k]);
        bm_status st = bm_point_group_generate(BM_M3CP(gens), d->n, d->schoenflies, out, err);
        if (st == BM_OK)
            snprintf(out->laue, sizeof out->laue, "%s", d->laue);
        return st;
    }
    return bm_fail(err, BM_EINVAL,
                   "point group \"%.40s\" is not supported (supported Schoenflies symbols: %s; "
                   "or their international short symbols such as m-3m, -43m, 6/mmm)",
                   name, bm_point_group_names());
}
