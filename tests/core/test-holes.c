/* test-holes.c: hole DOS mass from heavy/light/split-off bands; Luttinger
 * directional masses and warped-surface DOS masses, checked against SciPy. */
#include <glib.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bm-holes.h"
#include "bm-units.h"

static void test_hole_dos(void)
{
    bm_hole_bands b = {0.49, 0.16, 0.0, 0.0, 300.0};
    bm_hole_dos d;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_hole_dos_mass(&b, &d, &err), ==, BM_OK);
    /* formula identity: (m_hh^(3/2) + m_lh^(3/2))^(2/3) */
    double expect = pow(pow(0.49, 1.5) + pow(0.16, 1.5), 2.0 / 3.0);
    g_assert_cmpfloat_with_epsilon(d.dos_mass, expect, 1e-14);
    /* Silicon m_hh = 0.49, m_lh = 0.16, hole DOS mass 0.55
     * (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., 2007; from memory) */
    g_assert_cmpfloat_with_epsilon(d.dos_mass, 0.55, 0.005);
    g_assert_cmpfloat_with_epsilon(d.fraction_hh + d.fraction_lh, 1.0, 1e-14);
    g_assert_cmpfloat(d.fraction_so, ==, 0.0);
    g_assert_cmpint(d.warnings.count, ==, 0);

    /* Split-off band, Boltzmann-weighted: silicon Delta_so = 0.044 eV,
     * m_so = 0.29 (Sze & Ng; from memory), formula identity */
    bm_hole_bands s = {0.49, 0.16, 0.29, 0.044, 300.0};
    g_assert_cmpint(bm_hole_dos_mass(&s, &d, &err), ==, BM_OK);
    double so = pow(0.29, 1.5) * exp(-0.044 / (BM_KB_EV * 300.0));
    expect = pow(pow(0.49, 1.5) + pow(0.16, 1.5) + so, 2.0 / 3.0);
    g_assert_cmpfloat_with_epsilon(d.dos_mass, expect, 1e-14);
    g_assert_cmpfloat(d.fraction_so, >, 0.0);
    /* a cold crystal: the split-off band empties */
    s.temperature_k = 4.0;
    g_assert_cmpint(bm_hole_dos_mass(&s, &d, &err), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(d.dos_mass, pow(pow(0.49, 1.5) + pow(0.16, 1.5), 2.0 / 3.0),
                                   1e-12);
}

static void test_hole_bad_input(void)
{
    bm_hole_dos d;
    bm_errbuf err = {0};
    bm_hole_bands b = {0.0, 0.16, 0.0, 0.0, 300.0};
    g_assert_cmpint(bm_hole_dos_mass(&b, &d, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "heavy-hole"));
    b.m_hh = 0.49; b.m_lh = -0.1;
    g_assert_cmpint(bm_hole_dos_mass(&b, &d, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "-0.1"));
    b.m_lh = 0.16; b.m_so = 0.29; b.delta_so_ev = 0.044; b.temperature_k = 0.0;
    g_assert_cmpint(bm_hole_dos_mass(&b, &d, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "0 K"));
    b.temperature_k = 300.0; b.delta_so_ev = -0.01;
    g_assert_cmpint(bm_hole_dos_mass(&b, &d, &err), ==, BM_EINVAL);
    /* swapped masses: a warning, not an error */
    bm_hole_bands w = {0.16, 0.49, 0.0, 0.0, 300.0};
    g_assert_cmpint(bm_hole_dos_mass(&w, &d, &err), ==, BM_OK);
    g_assert_cmpint(d.warnings.count, ==, 1);
    g_assert_cmpint(d.warnings.items[0].code, ==, BM_WARN_MASS_ORDER);
    bm_warnings_clear(&d.warnings);
}

/* GaAs: gamma1 = 6.98, gamma2 = 2.06, gamma3 = 2.93 (Vurgaftman, Meyer &
 * Ram-Mohan, J. Appl. Phys. 89, 5815 (2001); from memory). Directional
 * masses from the warped form (Luttinger, Phys. Rev. 102, 1030 (1956); the
 * textbook form, e.g. Yu & Cardona, Fundamentals of Semiconductors, from
 * memory): [100] heavy 1/(g1 - 2 g2) = 0.350, light 1/(g1 + 2 g2) = 0.0901,
 * [111] heavy 1/(g1 - 2 g3) = 0.893. */
static const bm_luttinger GAAS = {6.98, 2.06, 2.93};

static void test_luttinger_directional(void)
{
    bm_luttinger_masses m;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_luttinger_masses_compute(&GAAS, &m, &err), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(m.heavy[0], 0.350, 5e-4);
    g_assert_cmpfloat_with_epsilon(m.light[0], 0.0901, 5e-5);
    g_assert_cmpfloat_with_epsilon(m.heavy[2], 0.893, 5e-4);
    /* formula identities */
    double g1 = GAAS.g1, g2 = GAAS.g2, g3 = GAAS.g3;
    g_assert_cmpfloat_with_epsilon(m.heavy[0], 1 / (g1 - 2 * g2), 1e-14);
    g_assert_cmpfloat_with_epsilon(m.light[2], 1 / (g1 + 2 * g3), 1e-14);
    double r110 = sqrt(g2 * g2 + 3 * g3 * g3);
    g_assert_cmpfloat_with_epsilon(m.heavy[1], 1 / (g1 - r110), 1e-14);
    g_assert_cmpfloat_with_epsilon(m.light[1], 1 / (g1 + r110), 1e-14);
    g_assert_cmpint(m.heavy_convex, ==, 1);

    /* cubic symmetry: [010], [-100], [0 0 5] give the [100] masses */
    const double dirs[3][3] = {{0, 1, 0}, {-1, 0, 0}, {0, 0, 5}};
    for (int i = 0; i < 3; i++) {
        double h, l;
        int conc;
        g_assert_cmpint(bm_luttinger_direction(&GAAS, dirs[i], &h, &l, &conc, &err), ==, BM_OK);
        g_assert_cmpfloat_with_epsilon(h, m.heavy[0], 1e-14);
        g_assert_cmpfloat_with_epsilon(l, m.light[0], 1e-14);
        g_assert_cmpint(conc, ==, 0);
    }
}

/* Spherical limit g2 = g3 (identity): the surfaces are spheres and the DOS
 * masses equal the directional masses. */
static void test_luttinger_spherical(void)
{
    bm_luttinger L = {6.98, 2.5, 2.5};
    bm_luttinger_masses m;
    g_assert_cmpint(bm_luttinger_masses_compute(&L, &m, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(m.heavy_dos_mass, 1 / (6.98 - 5.0), 1e-11);
    g_assert_cmpfloat_with_epsilon(m.light_dos_mass, 1 / (6.98 + 5.0), 1e-11);
    g_assert_cmpfloat_with_epsilon(m.heavy[1], m.heavy[2], 1e-14);
    g_assert_cmpfloat_with_epsilon(m.combined_dos_mass,
                                   pow(pow(1 / 1.98, 1.5) + pow(1 / 11.98, 1.5), 2.0 / 3.0), 1e-11);
}

/* Independent check of the angle average: SciPy dblquad over the full
 * sphere in tests/reference/luttinger_dos.py. Skipped only when the script
 * cannot run (no /usr/bin/python3 or no SciPy). */
static void scipy_dos(const bm_luttinger *L, double *heavy, double *light, gboolean *ok)
{
    gchar *script = g_build_filename(BM_REFERENCE_DIR, "luttinger_dos.py", NULL);
    gchar a1[G_ASCII_DTOSTR_BUF_SIZE], a2[G_ASCII_DTOSTR_BUF_SIZE], a3[G_ASCII_DTOSTR_BUF_SIZE];
    gchar *argv[] = {"/usr/bin/python3", script,
                     g_ascii_dtostr(a1, sizeof a1, L->g1), g_ascii_dtostr(a2, sizeof a2, L->g2),
                     g_ascii_dtostr(a3, sizeof a3, L->g3), NULL};
    gchar *out = NULL;
    gint status = 0;
    *ok = FALSE;
    if (g_file_test(argv[0], G_FILE_TEST_IS_EXECUTABLE)
        && g_spawn_sync(NULL, argv, NULL, G_SPAWN_STDERR_TO_DEV_NULL, NULL, NULL, &out, NULL,
                        &status, NULL)
        && g_spawn_check_wait_status(status, NULL)) {
        gchar *end = NULL;
        *heavy = g_ascii_strtod(out, &end);
        *light = g_ascii_strtod(end, NULL);
        *ok = *heavy > 0 && *light > 0;
    }
    g_free(out);
    g_free(script);
}

static void test_luttinger_scipy(void)
{
    const bm_luttinger sets[] = {
        {6.98, 2.06, 2.93},   /* GaAs (Vurgaftman et al. 2001, from memory) */
        /* two strongly warped sets of the size quoted for Si and Ge in the
         * literature (from memory; only the numerical agreement is checked) */
        {4.285, 0.339, 1.446},
        {13.38, 4.24, 5.69},
    };
    for (size_t i = 0; i < G_N_ELEMENTS(sets); i++) {
        bm_luttinger_masses m;
        double h = 0, l = 0;
        gboolean ok;
        g_assert_cmpint(bm_luttinger_masses_compute(&sets[i], &m, NULL), ==, BM_OK);
        g_assert_true(isfinite(m.heavy_dos_mass) && isfinite(m.light_dos_mass));
        g_assert_cmpfloat(m.quadrature_change, <, 1e-8);
        scipy_dos(&sets[i], &h, &l, &ok);
        if (!ok) {
            g_test_skip("/usr/bin/python3 with SciPy is not available");
            return;
        }
        g_test_message("g = (%g, %g, %g): heavy %.9f (SciPy %.9f), light %.9f (SciPy %.9f)",
                       sets[i].g1, sets[i].g2, sets[i].g3, m.heavy_dos_mass, h,
                       m.light_dos_mass, l);
        g_assert_cmpfloat_with_epsilon(m.heavy_dos_mass, h, 1e-7 * h);
        g_assert_cmpfloat_with_epsilon(m.light_dos_mass, l, 1e-7 * l);
        /* the average lies between the extreme directional masses */
        g_assert_cmpfloat(m.heavy_dos_mass, >=, fmin(m.heavy[0], m.heavy[2]));
        g_assert_cmpfloat(m.heavy_dos_mass, <=, fmax(m.heavy[0], m.heavy[2]));
    }
}

/* An open heavy-hole surface (g1 < 2 max(|g2|, |g3|)): a warning and an
 * infinite DOS mass, never NaN; the light-hole values stay finite. */
static void test_luttinger_nonconvex(void)
{
    bm_luttinger L = {3.0, 1.0, 2.0};   /* [111]: g1 - 2 g3 = -1 */
    bm_luttinger_masses m;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_luttinger_masses_compute(&L, &m, &err), ==, BM_OK);
    g_assert_cmpint(m.heavy_convex, ==, 0);
    g_assert_cmpfloat_with_epsilon(m.heavy_factor_min, -1.0, 1e-14);
    g_assert_true(isinf(m.heavy_dos_mass));
    g_assert_true(isinf(m.combined_dos_mass));
    g_assert_true(isfinite(m.light_dos_mass));
    g_assert_cmpfloat_with_epsilon(m.heavy[2], -1.0, 1e-14);
    for (int d = 0; d < 3; d++)
        g_assert_false(isnan(m.heavy[d]) || isnan(m.light[d]));
    gboolean open = FALSE;
    for (size_t i = 0; i < m.warnings.count; i++)
        open |= strstr(m.warnings.items[i].text, "open") != NULL;
    g_assert_true(open);
    g_assert_true(bm_warnings_has(&m.warnings, BM_WARN_OPEN_SURFACE));
    bm_warnings_clear(&m.warnings);
    /* flat along [111] exactly: infinite directional mass, not NaN */
    bm_luttinger F = {4.0, 1.0, 2.0};
    g_assert_cmpint(bm_luttinger_masses_compute(&F, &m, &err), ==, BM_OK);
    g_assert_true(isinf(m.heavy[2]));
    g_assert_cmpint(m.heavy_convex, ==, 0);
    bm_warnings_clear(&m.warnings);

    bm_luttinger bad = {0.0, 1.0, 1.0};
    g_assert_cmpint(bm_luttinger_masses_compute(&bad, &m, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "gamma1"));
    bm_luttinger nan = {NAN, 1.0, 1.0};
    g_assert_cmpint(bm_luttinger_masses_compute(&nan, &m, &err), ==, BM_EINVAL);
    const double zero[3] = {0, 0, 0};
    g_assert_cmpint(bm_luttinger_direction(&GAAS, zero, NULL, NULL, NULL, &err), ==, BM_EINVAL);
}

/* The band-edge k.p hole DOS mass is the warped heavy + light combination
 * (identity with bm_luttinger_masses_compute), plus m_so^1.5 exp(-Delta/kT)
 * for a split-off band (METHODS); an open heavy-hole surface has none. */
static void test_band_edge_mass(void)
{
    bm_luttinger L = {6.98, 2.06, 2.93};
    bm_luttinger_masses m;
    g_assert_cmpint(bm_luttinger_masses_compute(&L, &m, NULL), ==, BM_OK);
    double v;
    g_assert_cmpint(bm_band_edge_hole_dos_mass(&L, 0.0, 0.0, 0.0, &v, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(v / m.combined_dos_mass - 1.0), <, 1e-12);
    double x = exp(-0.1 / (8.617333262e-5 * 100.0));   /* k_B CODATA 2018, eV/K */
    double want = pow(pow(v, 1.5) + pow(0.172, 1.5) * x, 2.0 / 3.0);
    double w;
    g_assert_cmpint(bm_band_edge_hole_dos_mass(&L, 0.172, 0.1, 100.0, &w, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(w / want - 1.0), <, 1e-6);
    bm_errbuf err;
    g_assert_cmpint(bm_band_edge_hole_dos_mass(&L, 0.172, 0.1, 0.0, &w, NULL, &err), ==,
                    BM_EINVAL);
    bm_luttinger open = {3, 1, 2};
    bm_warnings warn = {0};
    g_assert_cmpint(bm_band_edge_hole_dos_mass(&open, 0.0, 0.0, 0.0, &w, &warn, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "open"));
    g_assert_cmpint(warn.count, >, 0);
    bm_warnings_clear(&warn);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/core/holes/dos-combination", test_hole_dos);
    g_test_add_func("/core/holes/bad-input", test_hole_bad_input);
    g_test_add_func("/core/holes/luttinger-directional", test_luttinger_directional);
    g_test_add_func("/core/holes/luttinger-spherical", test_luttinger_spherical);
    g_test_add_func("/core/holes/luttinger-scipy", test_luttinger_scipy);
    g_test_add_func("/core/holes/luttinger-nonconvex", test_luttinger_nonconvex);
    g_test_add_func("/core/holes/band-edge-mass", test_band_edge_mass);
    return g_test_run();
}
