/* test-linalg.c: checks of the 3x3 helpers (inverse, determinant, symmetric
 * eigen-decomposition, basis completion) against exact identities. */
#include <glib.h>
#include <math.h>

#include "bm-linalg.h"
#include "bm-status.h"

static void test_inverse(void)
{
    /* Identities: det by the rule of Sarrus; A A^-1 = 1; a rank-2 matrix is singular. */
    double a[3][3] = { { 2, 1, 1 }, { 1, 4, 1 }, { 2, 0, 5 } };
    double sarrus = 2 * 4 * 5 + 1 * 1 * 2 + 1 * 1 * 0
                  - 1 * 4 * 2 - 2 * 1 * 0 - 1 * 1 * 5;
    g_assert_cmpfloat_with_epsilon(bm_det3(a), sarrus, 1e-12);
    double inv[3][3], prod[3][3];
    g_assert_cmpint(bm_inv3(a, inv), ==, 0);
    bm_matmul3(a, inv, prod);
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            g_assert_cmpfloat_with_epsilon(prod[i][j], i == j ? 1.0 : 0.0, 1e-13);
    double sing[3][3] = { { 1, 2, 3 }, { 2, 4, 6 }, { 0, 1, 1 } };
    g_assert_cmpint(bm_inv3(sing, inv), ==, -1);
}

static void test_reciprocal(void)
{
    /* Identity a_i . b_j = 2 pi delta_ij (definition of the reciprocal lattice),
     * on a skewed triclinic cell; and the fcc cell a/2 (0,1,1)... has
     * b1 = (2 pi / a)(-1, 1, 1) (textbook result, from memory). */
    double a[3][3] = { { 3.1, 0.2, -0.4 }, { 0.7, 4.4, 0.1 }, { -0.3, 1.2, 5.0 } }, b[3][3];
    g_assert_cmpint(bm_reciprocal3(a, b), ==, 0);
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            g_assert_cmpfloat_with_epsilon(bm_dot3(a[i], b[j]), i == j ? 2 * G_PI : 0.0, 1e-12);
    double h = 5.43 / 2;
    double fcc[3][3] = { { 0, h, h }, { h, 0, h }, { h, h, 0 } }, bf[3][3];
    g_assert_cmpint(bm_reciprocal3(fcc, bf), ==, 0);
    double want[3] = { -2 * G_PI / 5.43, 2 * G_PI / 5.43, 2 * G_PI / 5.43 };
    for (int c = 0; c < 3; c++)
        g_assert_cmpfloat_with_epsilon(bf[0][c], want[c], 1e-12);
    /* a flat cell (a3 = a1 + a2) has no reciprocal lattice */
    double flat[3][3] = { { 1, 0, 0 }, { 0, 1, 0 }, { 1, 1, 0 } };
    g_assert_cmpint(bm_reciprocal3(flat, b), ==, -1);
}

static void test_symeig(void)
{
    bm_core_init();
    /* [[2,1,0],[1,2,0],[0,0,5]] has eigenvalues 1, 3, 5 with eigenvectors
     * (1,-1,0)/sqrt2, (1,1,0)/sqrt2, (0,0,1) (exact, by inspection). */
    double a[3][3] = { { 2, 1, 0 }, { 1, 2, 0 }, { 0, 0, 5 } };
    double ev[3], vec[3][3];
    g_assert_cmpint(bm_symeig(a, 3, ev, vec), ==, 0);
    g_assert_cmpfloat_with_epsilon(ev[0], 1.0, 1e-13);
    g_assert_cmpfloat_with_epsilon(ev[1], 3.0, 1e-13);
    g_assert_cmpfloat_with_epsilon(ev[2], 5.0, 1e-13);
    g_assert_cmpfloat_with_epsilon(fabs(vec[0][0] - vec[0][1]), sqrt(2.0), 1e-12);
    g_assert_cmpfloat_with_epsilon(fabs(vec[2][2]), 1.0, 1e-13);
    /* Leading 2x2 block only: eigenvalues 1 and 3. */
    g_assert_cmpint(bm_symeig(a, 2, ev, vec), ==, 0);
    g_assert_cmpfloat_with_epsilon(ev[0], 1.0, 1e-13);
    g_assert_cmpfloat_with_epsilon(ev[1], 3.0, 1e-13);
}

static void test_basis(void)
{
    double b[3][3] = { { 0.6, 0.8, 0.0 } };
    bm_complete_basis(b, 1);
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            g_assert_cmpfloat_with_epsilon(bm_dot3(b[i], b[j]), i == j ? 1.0 : 0.0, 1e-13);
    /* right-handed: det = +1 */
    g_assert_cmpfloat_with_epsilon(bm_det3(b), 1.0, 1e-13);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/core/linalg/inverse", test_inverse);
    g_test_add_func("/core/linalg/symeig", test_symeig);
    g_test_add_func("/core/linalg/reciprocal", test_reciprocal);
    g_test_add_func("/core/linalg/basis", test_basis);
    return g_test_run();
}
