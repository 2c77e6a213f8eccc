/* test-cyclotron.c: cyclotron masses of ellipsoidal valleys (resonance lines
 * of the Si and Ge stars), field sweeps, and warped hole orbits (spherical
 * limit, SciPy orbit integration, open surfaces, bad input). */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-cyclotron.h"
#include "bm-mat3.h"

/* Silicon X valleys m_l = 0.98, m_t = 0.19; germanium L valleys m_l = 1.64,
 * m_t = 0.082 (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., 2007,
 * Appendix G; from memory). */
#define SI_ML 0.98
#define SI_MT 0.19
#define GE_ML 1.64
#define GE_MT 0.082

static void star_of(const char *group, double ml, double mt, const double axis[3],
                    bm_valley_site site, bm_valley_star *star)
{
    bm_point_group g;
    bm_valley_shape s;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_point_group_get(group, &g, &err), ==, BM_OK);
    g_assert_cmpint(bm_valley_shape_spheroid(ml, mt, axis, &s, &err), ==, BM_OK);
    g_assert_cmpint(bm_valley_star_build(&s, site, axis, &g, star, &err), ==, BM_OK);
}

static size_t lines_of(const bm_valley_star *star, const double b[3], bm_cyclotron_line *lines)
{
    size_t n = 0;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_cyclotron_lines(star->valleys, star->n, b, lines, &n, &err), ==, BM_OK);
    return n;
}

/* Silicon: B along [100] gives two lines, m_t (2 valleys) and sqrt(m_l m_t)
 * (4 valleys); along [111] one line 0.2794 (6 valleys) (Dresselhaus, Kip &
 * Kittel, Phys. Rev. 98, 368 (1955), formula; values in tests/reference/README
 * from Sze & Ng's masses). [110]: the formula sqrt(m1 m2 m3 / sum m_i b_i^2)
 * (identity) gives sqrt(m_l m_t) for the z valleys (2) and
 * sqrt(2 m_l m_t^2 / (m_l + m_t)) for the x and y valleys (4). */
static void test_silicon_lines(void)
{
    static const double x[3] = {1, 0, 0};
    bm_valley_star star;
    bm_cyclotron_line lines[BM_STAR_MAX];
    star_of("Oh", SI_ML, SI_MT, x, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 6);

    size_t n = lines_of(&star, (const double[3]){1, 0, 0}, lines);
    g_assert_cmpuint(n, ==, 2);
    g_assert_cmpfloat_with_epsilon(lines[0].mass, SI_MT, 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[0].valley_count, 2.0, 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[1].mass, 0.4315, 5e-5);
    g_assert_cmpfloat_with_epsilon(lines[1].mass, sqrt(SI_ML * SI_MT), 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[1].valley_count, 4.0, 1e-12);

    n = lines_of(&star, (const double[3]){1, 1, 1}, lines);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpfloat_with_epsilon(lines[0].mass, 0.2794, 5e-5);
    g_assert_cmpfloat_with_epsilon(lines[0].valley_count, 6.0, 1e-12);

    n = lines_of(&star, (const double[3]){1, 1, 0}, lines);
    g_assert_cmpuint(n, ==, 2);
    g_assert_cmpfloat_with_epsilon(lines[0].mass, sqrt(2 * SI_ML * SI_MT * SI_MT / (SI_ML + SI_MT)),
                                   1e-12);
    g_assert_cmpfloat_with_epsilon(lines[0].valley_count, 4.0, 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[1].mass, sqrt(SI_ML * SI_MT), 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[1].valley_count, 2.0, 1e-12);
    bm_warnings_clear(&star.warnings);
}

/* Germanium: 8 L half-valleys on the zone faces are 4 valleys. B along
 * [100] makes the same angle (cos^2 = 1/3) with every <111> axis: one line
 * sqrt(m_l m_t^2 / (m_l/3 + 2 m_t/3)) (identity from the formula) for 4
 * valleys. Along [111]: m_t for the [111] valley (1) and the other three. */
static void test_germanium_lines(void)
{
    static const double l[3] = {1, 1, 1};
    bm_valley_star star;
    bm_cyclotron_line lines[BM_STAR_MAX];
    star_of("Oh", GE_ML, GE_MT, l, BM_SITE_FACE, &star);
    size_t n = lines_of(&star, (const double[3]){0, 0, 2}, lines);
    g_assert_cmpuint(n, ==, 1);
    g_assert_cmpfloat_with_epsilon(lines[0].valley_count, 4.0, 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[0].mass,
                                   sqrt(GE_ML * GE_MT * GE_MT / (GE_ML / 3 + 2 * GE_MT / 3)), 1e-12);
    n = lines_of(&star, l, lines);
    g_assert_cmpuint(n, ==, 2);
    g_assert_cmpfloat_with_epsilon(lines[0].mass, GE_MT, 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[0].valley_count, 1.0, 1e-12);
    /* cos^2 = 1/9 between [111] and [1-1-1] */
    g_assert_cmpfloat_with_epsilon(lines[1].mass,
                                   sqrt(GE_ML * GE_MT * GE_MT / (GE_ML / 9 + 8 * GE_MT / 9)), 1e-12);
    g_assert_cmpfloat_with_epsilon(lines[1].valley_count, 3.0, 1e-12);
    bm_warnings_clear(&star.warnings);
}

/* A general tilted valley: the principal form equals sqrt(det M / (b^T M b))
 * with M the Cartesian mass tensor (identity; Dresselhaus, Kip & Kittel 1955). */
static void test_general_tensor(void)
{
    double ax[3][3] = {{0.36, 0.48, 0.8}, {0.8, -0.6, 0.0}, {0.48, 0.64, -0.6}};
    bm_valley_shape s = { {0.3, 0.7, 2.1}, {{0}} };
    memcpy(s.axes, ax, sizeof ax);
    bm_valley v;
    g_assert_cmpint(bm_valley_from_shape(&s, NULL, 1.0, 0.0, &v, NULL), ==, BM_OK);
    double inv[9], M[9] = {0};
    memcpy(inv, v.inv_mass, sizeof inv);
    g_assert_cmpint(bm_m3_inverse(M, inv, 1e-300), ==, 1);
    double dirs[][3] = {{1, 0, 0}, {0.2, -0.5, 0.9}, {1, 1, 1}, {-3, 2, 0.5}};
    for (size_t i = 0; i < G_N_ELEMENTS(dirs); i++) {
        double b[3], Mb[3], l = bm_v3_norm(dirs[i]);
        for (int k = 0; k < 3; k++)
            b[k] = dirs[i][k] / l;
        bm_m3_apply(Mb, M, b);
        double want = sqrt(bm_m3_det(M) / bm_v3_dot(b, Mb)), m;
        g_assert_cmpint(bm_cyclotron_ellipsoid_mass(&v, dirs[i], &m, NULL), ==, BM_OK);
        g_assert_cmpfloat_with_epsilon(m, want, 1e-12 * want);
    }
    bm_errbuf err = {0};
    double m;
    g_assert_cmpint(bm_cyclotron_ellipsoid_mass(&v, (const double[3]){0, 0, 0}, &m, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "zero length"));
}

/* Sweep from [001] to [110]: equal steps of 90/(N-1) degrees, unit vectors
 * in the plane (identity); parallel ends span no plane. */
static void test_sweep(void)
{
    double d[10][3], ang[10];
    g_assert_cmpint(bm_direction_sweep((const double[3]){0, 0, 1}, (const double[3]){1, 1, 0},
                                       10, d, ang, NULL), ==, BM_OK);
    for (int i = 0; i < 10; i++) {
        g_assert_cmpfloat_with_epsilon(ang[i], 10.0 * i, 1e-12);
        g_assert_cmpfloat_with_epsilon(bm_v3_norm(d[i]), 1.0, 1e-14);
        g_assert_cmpfloat_with_epsilon(d[i][0], d[i][1], 1e-14);
        g_assert_cmpfloat_with_epsilon(d[i][2], cos(ang[i] * G_PI / 180), 1e-14);
    }
    g_assert_cmpfloat_with_epsilon(d[9][0], sqrt(0.5), 1e-14);
    bm_errbuf err = {0};
    g_assert_cmpint(bm_direction_sweep((const double[3]){0, 0, 1}, (const double[3]){0, 0, -2},
                                       3, d, ang, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "no plane"));
}

/* Spherical limit gamma2 = gamma3 (identity): for every field direction one
 * orbit per band, m_c = 1 / (gamma1 -/+ 2 gamma2). */
static void test_holes_spherical(void)
{
    bm_luttinger L = {6.98, 2.4, 2.4};
    double dirs[][3] = {{1, 0, 0}, {1, 1, 1}, {1, 1, 0}, {0.3, -0.7, 2.0}};
    for (size_t i = 0; i < G_N_ELEMENTS(dirs); i++) {
        bm_hole_cyclotron o;
        g_assert_cmpint(bm_hole_cyclotron_compute(&L, dirs[i], &o, NULL), ==, BM_OK);
        g_assert_cmpuint(o.band[BM_HOLE_HEAVY].n_orbits, ==, 1);
        g_assert_cmpuint(o.band[BM_HOLE_LIGHT].n_orbits, ==, 1);
        g_assert_cmpfloat_with_epsilon(o.band[BM_HOLE_HEAVY].central_mass, 1 / (6.98 - 4.8),
                                       1e-12);
        g_assert_cmpfloat_with_epsilon(o.band[BM_HOLE_LIGHT].central_mass, 1 / (6.98 + 4.8),
                                       1e-12);
        g_assert_true(o.band[BM_HOLE_HEAVY].orbits[0].is_maximum);
        g_assert_cmpuint(o.warnings.count, ==, 0);
        bm_warnings_clear(&o.warnings);
    }
}

/* The SciPy route of tests/reference/hole_orbits.py (brentq on rays, quad
 * over the angle, minimize_scalar along the field): one line per band,
 * "name central kappa:area:mass ...". Skipped when it cannot run. */
static gboolean scipy_orbits(const bm_luttinger *L, const double b[3], gchar ***lines)
{
    gchar *script = g_build_filename(BM_REFERENCE_DIR, "hole_orbits.py", NULL);
    gchar a[6][G_ASCII_DTOSTR_BUF_SIZE];
    double v[6] = {L->g1, L->g2, L->g3, b[0], b[1], b[2]};
    for (int i = 0; i < 6; i++)
        g_ascii_dtostr(a[i], sizeof a[i], v[i]);
    gchar *argv[] = {"/usr/bin/python3", script, a[0], a[1], a[2], a[3], a[4], a[5], NULL};
    gchar *out = NULL;
    gint status = 0;
    gboolean ok = g_file_test(argv[0], G_FILE_TEST_IS_EXECUTABLE)
               && g_spawn_sync(NULL, argv, NULL, G_SPAWN_STDERR_TO_DEV_NULL, NULL, NULL, &out,
                               NULL, &status, NULL)
               && g_spawn_check_wait_status(status, NULL);
    if (ok)
        *lines = g_strsplit(g_strstrip(out), "\n", -1);
    g_free(out);
    g_free(script);
    return ok;
}

static void test_holes_scipy(void)
{
    /* GaAs (Vurgaftman, Meyer & Ram-Mohan 2001, from memory): along [100] the
     * heavy band's central orbit is a minimum of the area and a non-central
     * maximum lies beside it; a low-symmetry direction as well. */
    bm_luttinger L = {6.98, 2.06, 2.93};
    double dirs[][3] = {{1, 0, 0}, {1, 2, 3}};
    for (size_t d = 0; d < G_N_ELEMENTS(dirs); d++) {
        bm_hole_cyclotron o;
        g_assert_cmpint(bm_hole_cyclotron_compute(&L, dirs[d], &o, NULL), ==, BM_OK);
        gchar **lines = NULL;
        if (!scipy_orbits(&L, dirs[d], &lines)) {
            g_test_skip("/usr/bin/python3 with SciPy is not available");
            bm_warnings_clear(&o.warnings);
            return;
        }
        g_assert_cmpuint(g_strv_length(lines), ==, 2);
        for (int band = 0; band < 2; band++) {
            gchar **f = g_strsplit(lines[band], " ", -1);
            const bm_hole_band_orbits *r = &o.band[band];
            double central = g_ascii_strtod(f[1], NULL);
            g_test_message("b = [%g %g %g] band %d: central %.10f (SciPy %.10f), %zu orbits",
                           dirs[d][0], dirs[d][1], dirs[d][2], band, r->central_mass, central,
                           r->n_orbits);
            g_assert_cmpfloat_with_epsilon(r->central_mass, central, 1e-9 * central);
            /* the non-central extremal orbits, in order of k_parallel */
            guint nf = g_strv_length(f);
            guint extra = 0;
            for (guint i = 2; i < nf; i++)
                extra += f[i][0] != '\0';
            g_assert_cmpuint(r->n_orbits, ==, 1 + extra);
            for (guint i = 0; i < extra; i++) {
                gchar **kam = g_strsplit(f[2 + i], ":", 3);
                const bm_hole_orbit *e = &r->orbits[1 + i];
                double k = g_ascii_strtod(kam[0], NULL), area = g_ascii_strtod(kam[1], NULL);
                g_test_message("  orbit at k %.6f (SciPy %.6f): mass %.10f (SciPy %.10f)",
                               e->k_parallel_reduced, k, e->mass, area / G_PI);
                g_assert_cmpfloat_with_epsilon(e->k_parallel_reduced, k, 1e-4);
                g_assert_cmpfloat_with_epsilon(e->area_reduced, area, 1e-8 * area);
                g_assert_false(e->irregular);
                g_strfreev(kam);
            }
            g_strfreev(f);
        }
        g_strfreev(lines);
        bm_warnings_clear(&o.warnings);
    }
}

/* An open heavy-hole surface (gamma1 < 2 gamma3): no heavy orbits, an
 * open-surface warning; the light band keeps its orbit. */
static void test_holes_open(void)
{
    bm_luttinger L = {4.0, 1.0, 2.5};
    bm_hole_cyclotron o;
    g_assert_cmpint(bm_hole_cyclotron_compute(&L, (const double[3]){0, 0, 1}, &o, NULL), ==,
                    BM_OK);
    g_assert_false(o.band[BM_HOLE_HEAVY].closed);
    g_assert_true(isnan(o.band[BM_HOLE_HEAVY].central_mass));
    g_assert_true(o.band[BM_HOLE_LIGHT].closed);
    g_assert_true(isfinite(o.band[BM_HOLE_LIGHT].central_mass));
    g_assert_true(bm_warnings_has(&o.warnings, BM_WARN_OPEN_SURFACE));
    bm_warnings_clear(&o.warnings);
    bm_errbuf err = {0};
    g_assert_cmpint(bm_hole_cyclotron_compute(&L, (const double[3]){0, 0, 0}, &o, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "zero length"));
    bm_luttinger bad = {-1.0, 1.0, 1.0};
    g_assert_cmpint(bm_hole_cyclotron_compute(&bad, (const double[3]){0, 0, 1}, &o, &err), ==,
                    BM_EINVAL);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/cyclotron/ellipsoid/silicon-lines", test_silicon_lines);
    g_test_add_func("/cyclotron/ellipsoid/germanium-lines", test_germanium_lines);
    g_test_add_func("/cyclotron/ellipsoid/general-tensor", test_general_tensor);
    g_test_add_func("/cyclotron/sweep", test_sweep);
    g_test_add_func("/cyclotron/holes/spherical-limit", test_holes_spherical);
    g_test_add_func("/cyclotron/holes/scipy-orbits", test_holes_scipy);
    g_test_add_func("/cyclotron/holes/open-surface", test_holes_open);
    return g_test_run();
}
