/* test-interp-dft.c: the band interpolant of zone integrals between mesh
 * points, against DFT energies of the same calculation along Gamma-X-W-L-
 * Gamma-K (tests/data/first-principles/si-lines.csv; GPAW LDA, written by
 * make_si_lines.py).  Locks the figures the README's choice rests on: the
 * pair blend helps the valence bands and the conduction band near X, and the
 * error falls as the mesh is refined. */
#include <glib.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "band-grid.h"
#include "bm-bandinterp.h"
#include "bm-linalg.h"

#define FP BM_TEST_DATA_DIR "/first-principles/"

typedef struct {
    double max[8], rms[8], near_x;   /* eV; near_x: c1 within 0.3 of Gamma-X before X */
} line_errors;

static void errors_on_lines(int n, double pair_gap, line_errors *out)
{
    g_autofree char *path = g_strdup_printf(FP "si-%d.json", n);
    GError *error = NULL;
    BmBandGrid *g = bm_band_grid_load(path, &error);
    g_assert_no_error(error);
    bm_bandinterp *bi = bm_bandinterp_new(&g->grid, pair_gap);
    double rc[3][3], binv[3][3];
    memcpy(rc, g->grid.recip, sizeof rc);
    g_assert_cmpint(bm_inv3(rc, binv), ==, 0);
    FILE *f = fopen(FP "si-lines.csv", "r");
    g_assert_nonnull(f);
    char line[1024];
    g_assert_nonnull(fgets(line, sizeof line, f));   /* comment */
    g_assert_nonnull(fgets(line, sizeof line, f));   /* header */
    memset(out, 0, sizeof *out);
    int count = 0;
    while (fgets(line, sizeof line, f)) {
        double v[11];
        char *p = line;
        for (int i = 0; i < 11; i++) {
            v[i] = g_ascii_strtod(p, &p);
            if (*p == ',')
                p++;
        }
        double fr[3];
        for (int a = 0; a < 3; a++)
            fr[a] = v[0] * binv[0][a] + v[1] * binv[1][a] + v[2] * binv[2][a];
        for (int b = 0; b < 8; b++) {
            double e;
            bm_bandinterp_eval(bi, (size_t)b, fr, &e, NULL, NULL);
            double d = fabs(e - v[3 + b]);
            out->max[b] = fmax(out->max[b], d);
            out->rms[b] += d * d;
            if (b == 4 && count >= 17 && count <= 24)   /* 0.71 to 1.0 of Gamma-X */
                out->near_x = fmax(out->near_x, d);
        }
        count++;
    }
    fclose(f);
    g_assert_cmpint(count, ==, 121);
    for (int b = 0; b < 8; b++)
        out->rms[b] = sqrt(out->rms[b] / count);
    bm_bandinterp_free(bi);
    bm_band_grid_free(g);
}

static void test_pair_blend_measured(void)
{
    line_errors plain, pair;
    errors_on_lines(24, 0.0, &plain);
    errors_on_lines(24, BM_BANDINTERP_PAIR_GAP_EV, &pair);
    g_test_message("24^3 rms v1 %.1f -> %.1f meV, v4 %.1f -> %.1f, c1 near X %.1f -> %.1f",
                   1e3 * plain.rms[0], 1e3 * pair.rms[0], 1e3 * plain.rms[3], 1e3 * pair.rms[3],
                   1e3 * plain.near_x, 1e3 * pair.near_x);
    for (int b = 0; b < 4; b++)
        g_assert_cmpfloat(pair.rms[b], <, 0.6 * plain.rms[b]);
    g_assert_cmpfloat(pair.near_x, <, 0.4 * plain.near_x);
    g_assert_cmpfloat(pair.near_x, <, 0.008);
}

static void test_refinement_helps(void)
{
    line_errors e24, e32;
    errors_on_lines(24, BM_BANDINTERP_PAIR_GAP_EV, &e24);
    errors_on_lines(32, BM_BANDINTERP_PAIR_GAP_EV, &e32);
    for (int b = 0; b < 8; b++)
        g_assert_cmpfloat(e32.rms[b], <, e24.rms[b]);
    g_assert_cmpfloat(e32.near_x, <, e24.near_x);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/interp-dft/pair-blend", test_pair_blend_measured);
    g_test_add_func("/interp-dft/refinement", test_refinement_helps);
    return g_test_run();
}
