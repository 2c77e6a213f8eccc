/* test-symmetry.c: point groups: orders, closure, inverses, orthogonality,
 * inversion, name lookup and rejection of unsupported or bad generators. */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-symmetry.h"

/* Orders of the crystallographic point groups: a fact of group theory
 * (any table of the 32 point groups). */
static const struct { const char *name; const char *hm; int order; int inversion; } ORDERS[] = {
    {"C1", "1", 1, 0},     {"Ci", "-1", 2, 1},     {"C2", "2", 2, 0},
    {"C2h", "2/m", 4, 1},  {"D2", "222", 4, 0},    {"D2h", "mmm", 8, 1},
    {"C4", "4", 4, 0},     {"C4h", "4/m", 8, 1},   {"D4", "422", 8, 0},
    {"C4v", "4mm", 8, 0},  {"D2d", "-42m", 8, 0},  {"D4h", "4/mmm", 16, 1},
    {"C3", "3", 3, 0},     {"C3v", "3m", 6, 0},    {"D3", "32", 6, 0},
    {"D3d", "-3m", 12, 1}, {"D3h", "-6m2", 12, 0}, {"C6", "6", 6, 0},
    {"C6h", "6/m", 12, 1}, {"C6v", "6mm", 12, 0},  {"D6", "622", 12, 0},
    {"D6h", "6/mmm", 24, 1}, {"T", "23", 12, 0},   {"Th", "m-3", 24, 1},
    {"Td", "-43m", 24, 0}, {"O", "432", 24, 0},    {"Oh", "m-3m", 48, 1},
};

static void mul(double c[3][3], double a[3][3], double b[3][3])
{
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            c[i][j] = 0.0;
            for (int k = 0; k < 3; k++)
                c[i][j] += a[i][k] * b[k][j];
        }
}

static double det(double a[3][3])
{
    return a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1])
         - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0])
         + a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
}

static void test_orders(void)
{
    for (size_t i = 0; i < G_N_ELEMENTS(ORDERS); i++) {
        bm_point_group g, h;
        bm_errbuf err = {0};
        g_assert_cmpint(bm_point_group_get(ORDERS[i].name, &g, &err), ==, BM_OK);
        g_assert_cmpint(g.order, ==, ORDERS[i].order);   /* group theory */
        g_assert_cmpint(g.has_inversion, ==, ORDERS[i].inversion);
        g_assert_cmpstr(g.name, ==, ORDERS[i].name);
        /* the international symbol names the same group */
        g_assert_cmpint(bm_point_group_get(ORDERS[i].hm, &h, &err), ==, BM_OK);
        g_assert_cmpint(h.order, ==, g.order);
        g_assert_cmpstr(h.name, ==, ORDERS[i].name);
    }
}

/* Group axioms (identity): closure under products, an inverse (the
 * transpose, for orthogonal matrices) for every element, all distinct. */
static void test_closure(void)
{
    for (size_t i = 0; i < G_N_ELEMENTS(ORDERS); i++) {
        bm_point_group g;
        g_assert_cmpint(bm_point_group_get(ORDERS[i].name, &g, NULL), ==, BM_OK);
        for (int a = 0; a < g.order; a++) {
            double t[3][3], p[3][3];
            for (int r = 0; r < 3; r++)
                for (int c = 0; c < 3; c++)
                    t[r][c] = g.ops[a][c][r];
            mul(p, g.ops[a], t);
            for (int r = 0; r < 3; r++)
                for (int c = 0; c < 3; c++)
                    g_assert_cmpfloat_with_epsilon(p[r][c], r == c ? 1.0 : 0.0, 1e-12);
            g_assert_cmpint(bm_point_group_find(&g, (const double *)t, 1e-9), >=, 0);
            g_assert_cmpfloat_with_epsilon(fabs(det(g.ops[a])), 1.0, 1e-12);
            g_assert_cmpint(bm_point_group_find(&g, (const double *)g.ops[a], 1e-9), ==, a);
            for (int b = 0; b < g.order; b++) {
                mul(p, g.ops[a], g.ops[b]);
                g_assert_cmpint(bm_point_group_find(&g, (const double *)p, 1e-9), >=, 0);
            }
        }
    }
}

/* Class contents (group theory): Td = {E, 8 C3, 3 C2, 6 S4, 6 sigma_d} has 12
 * improper operations and no inversion; Oh has 24 improper ones; C6v keeps
 * the z axis fixed under every operation. */
static void test_improper_counts(void)
{
    bm_point_group g;
    int improper = 0;
    g_assert_cmpint(bm_point_group_get("Td", &g, NULL), ==, BM_OK);
    for (int a = 0; a < g.order; a++)
        improper += det(g.ops[a]) < 0;
    g_assert_cmpint(improper, ==, 12);

    improper = 0;
    g_assert_cmpint(bm_point_group_get("Oh", &g, NULL), ==, BM_OK);
    for (int a = 0; a < g.order; a++)
        improper += det(g.ops[a]) < 0;
    g_assert_cmpint(improper, ==, 24);

    g_assert_cmpint(bm_point_group_get("C6v", &g, NULL), ==, BM_OK);
    for (int a = 0; a < g.order; a++) {
        g_assert_cmpfloat_with_epsilon(g.ops[a][2][2], 1.0, 1e-12);
        g_assert_cmpfloat_with_epsilon(g.ops[a][0][2], 0.0, 1e-12);
        g_assert_cmpfloat_with_epsilon(g.ops[a][1][2], 0.0, 1e-12);
    }
}

static void test_unsupported(void)
{
    bm_point_group g;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_point_group_get("C5v", &g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "C5v"));
    g_assert_nonnull(strstr(err.message, "Oh"));   /* lists what is supported */
    g_assert_cmpint(bm_point_group_get("", &g, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_point_group_get(NULL, &g, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_point_group_get("oh", &g, &err), ==, BM_EINVAL);
}

static void test_generate(void)
{
    bm_errbuf err = {0};
    bm_point_group g;
    /* A rotation by one radian never closes: not a crystallographic group. */
    double c = cos(1.0), s = sin(1.0);
    double rot[9] = {c, -s, 0, s, c, 0, 0, 0, 1};
    g_assert_cmpint(bm_point_group_generate(rot, 1, "R1", &g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "close"));
    /* A shear is not orthogonal. */
    double shear[9] = {1, 0.1, 0, 0, 1, 0, 0, 0, 1};
    g_assert_cmpint(bm_point_group_generate(shear, 1, NULL, &g, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "orthogonal"));
    double bad[9] = {NAN, 0, 0, 0, 1, 0, 0, 0, 1};
    g_assert_cmpint(bm_point_group_generate(bad, 1, NULL, &g, &err), ==, BM_EINVAL);
    /* Mirror x = 0 and mirror y = 0 generate C2v, order 4 (group theory). */
    double gens[18] = {-1, 0, 0, 0, 1, 0, 0, 0, 1,   1, 0, 0, 0, -1, 0, 0, 0, 1};
    g_assert_cmpint(bm_point_group_generate(gens, 2, "C2v", &g, &err), ==, BM_OK);
    g_assert_cmpint(g.order, ==, 4);
    g_assert_cmpint(g.has_inversion, ==, 0);
    /* No generators: the trivial group. */
    g_assert_cmpint(bm_point_group_generate(NULL, 0, NULL, &g, &err), ==, BM_OK);
    g_assert_cmpint(g.order, ==, 1);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/core/symmetry/orders", test_orders);
    g_test_add_func("/core/symmetry/closure", test_closure);
    g_test_add_func("/core/symmetry/improper-counts", test_improper_counts);
    g_test_add_func("/core/symmetry/unsupported", test_unsupported);
    g_test_add_func("/core/symmetry/generate", test_generate);
    return g_test_run();
}
