/* test-valleys.c: valley stars (Si, Ge, time reversal, Gamma, hexagonal) and
 * conductivity / DOS mass averages, with and without valley energy offsets. */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-units.h"
#include "bm-valleys.h"

/* Silicon X valleys: m_l = 0.98, m_t = 0.19; germanium L valleys:
 * m_l = 1.64, m_t = 0.082 (Sze & Ng, Physics of Semiconductor Devices,
 * 3rd ed., 2007, Appendix G; from memory). */
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

/* star_of, a check of the number of valleys, and their average (equal populations). */
static void average_of(const char *group, double ml, double mt, const double axis[3],
                       bm_valley_site site, size_t n, bm_valley_star *star,
                       bm_valley_average *avg)
{
    star_of(group, ml, mt, axis, site, star);
    g_assert_cmpuint(star->n, ==, n);
    g_assert_cmpint(bm_valley_average_compute(star->valleys, star->n, NULL, avg, NULL), ==,
                    BM_OK);
}

static void test_silicon(void)
{
    const double ax[3] = {1, 0, 0};
    bm_valley_star star;
    bm_valley_average avg;
    bm_errbuf err = {0};
    star_of("Oh", SI_ML, SI_MT, ax, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 6);
    g_assert_cmpfloat_with_epsilon(star.valley_count, 6.0, 1e-12);
    g_assert_cmpint(star.warnings.count, ==, 0);
    /* every valley's longitudinal axis lies along its position (+-x, +-y, +-z) */
    for (size_t v = 0; v < star.n; v++) {
        const bm_valley *x = &star.valleys[v];
        g_assert_cmpfloat_with_epsilon(x->masses[2], SI_ML, 1e-12);
        g_assert_cmpfloat_with_epsilon(x->masses[0], SI_MT, 1e-12);
        g_assert_cmpfloat_with_epsilon(fabs(x->axes[2][0] * x->direction[0]
                                            + x->axes[2][1] * x->direction[1]
                                            + x->axes[2][2] * x->direction[2]), 1.0, 1e-12);
    }
    g_assert_cmpint(bm_valley_average_compute(star.valleys, star.n, NULL, &avg, &err), ==, BM_OK);
    /* textbook formulas 3/(1/m_l + 2/m_t) and N_v^(2/3) (m_l m_t^2)^(1/3) */
    double mc = 3.0 / (1.0 / SI_ML + 2.0 / SI_MT);
    double md = pow(6.0, 2.0 / 3.0) * cbrt(SI_ML * SI_MT * SI_MT);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, mc, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, md, 1e-12);
    /* published figures (REFERENCES: 0.2598 and 1.084; Sze & Ng 0.26 and 1.08) */
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, 0.2598, 5e-5);
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, 1.084, 5e-4);
    g_assert_cmpint(avg.conductivity_isotropic, ==, 1);
    for (int i = 0; i < 3; i++) {
        g_assert_cmpfloat_with_epsilon(avg.conductivity_masses[i], mc, 1e-12);
        g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[i][i], mc, 1e-12);
    }
    for (size_t v = 0; v < star.n; v++)
        g_assert_cmpfloat_with_epsilon(star.valleys[v].population, 1.0 / 6.0, 1e-12);
}

static void test_germanium(void)
{
    const double ax[3] = {1, 1, 1};
    bm_valley_star star;
    bm_valley_average avg;
    star_of("Oh", GE_ML, GE_MT, ax, BM_SITE_FACE, &star);
    /* 8 L half-valleys on the zone faces count 4 (Sze & Ng; METHODS) */
    g_assert_cmpuint(star.n, ==, 8);
    g_assert_cmpfloat_with_epsilon(star.valley_count, 4.0, 1e-12);
    for (size_t v = 0; v < star.n; v++)
        g_assert_cmpfloat(star.valleys[v].weight, ==, 0.5);
    g_assert_cmpint(bm_valley_average_compute(star.valleys, star.n, NULL, &avg, NULL), ==, BM_OK);
    double md = pow(4.0, 2.0 / 3.0) * cbrt(GE_ML * GE_MT * GE_MT);   /* textbook formula */
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, md, 1e-12);
    g_assert_cmpfloat(avg.dos_mass, >=, 0.55);     /* Sze & Ng: 0.55-0.56, from memory */
    g_assert_cmpfloat(avg.dos_mass, <=, 0.565);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, 3.0 / (1.0 / GE_ML + 2.0 / GE_MT), 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, 0.12, 5e-4);   /* Sze & Ng 0.12 */
    g_assert_cmpint(avg.conductivity_isotropic, ==, 1);
}

/* Time reversal: Td lacks inversion, but k -> -k still pairs valleys.
 * Td alone maps [111] onto the 4 directions of a tetrahedron (group theory);
 * with time reversal the interior star has all 8. [100] gives 6 either way.
 * C6v keeps z fixed, so a valley on the z axis has a partner only through
 * time reversal: 2 valleys. */
static void test_time_reversal(void)
{
    bm_valley_star star;
    const double x100[3] = {1, 0, 0}, x111[3] = {1, 1, 1}, z[3] = {0, 0, 1};
    star_of("Td", SI_ML, SI_MT, x100, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 6);

    bm_point_group td;
    g_assert_cmpint(bm_point_group_get("Td", &td, NULL), ==, BM_OK);
    int images = 0;
    double seen[48][3];
    for (int o = 0; o < td.order; o++) {
        double p[3];
        for (int i = 0; i < 3; i++)
            p[i] = td.ops[o][i][0] + td.ops[o][i][1] + td.ops[o][i][2];
        int dup = 0;
        for (int s = 0; s < images; s++)
            dup |= fabs(seen[s][0] - p[0]) + fabs(seen[s][1] - p[1]) + fabs(seen[s][2] - p[2]) < 1e-9;
        if (!dup)
            memcpy(seen[images++], p, sizeof p);
    }
    g_assert_cmpint(images, ==, 4);
    star_of("Td", 1.0, 0.2, x111, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 8);
    g_assert_cmpfloat(star.valley_count, ==, 8.0);

    star_of("C6v", 0.5, 0.3, z, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 2);
    g_assert_cmpfloat_with_epsilon(star.valleys[0].direction[2] * star.valleys[1].direction[2],
                                   -1.0, 1e-12);
}

/* An isotropic valley at Gamma is its own star and averages to itself
 * (identity). An anisotropic one in a cubic crystal breaks the symmetry of
 * its site: a warning, and the cubic average 3/tr(M^-1) (identity). */
static void test_gamma(void)
{
    const double ax[3] = {0, 0, 1};
    bm_valley_star star;
    bm_valley_average avg;
    star_of("Td", 0.067, 0.067, ax, BM_SITE_GAMMA, &star);
    g_assert_cmpuint(star.n, ==, 1);
    g_assert_cmpfloat(star.valley_count, ==, 1.0);
    g_assert_cmpint(star.warnings.count, ==, 0);
    g_assert_cmpint(bm_valley_average_compute(star.valleys, 1, NULL, &avg, NULL), ==, BM_OK);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, 0.067, 1e-14);
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, 0.067, 1e-14);

    star_of("Oh", 0.4, 0.1, ax, BM_SITE_GAMMA, &star);
    g_assert_cmpuint(star.n, ==, 1);
    g_assert_cmpint(star.warnings.count, ==, 1);
    g_assert_nonnull(strstr(star.warnings.items[0].text, "symmetrised"));
    g_assert_true(bm_warnings_has(&star.warnings, BM_WARN_VALLEY_SYMMETRISED));
    bm_warnings_clear(&star.warnings);
    double m = 3.0 / (1.0 / 0.4 + 2.0 / 0.1);
    for (int i = 0; i < 3; i++)
        g_assert_cmpfloat_with_epsilon(star.valleys[0].masses[i], m, 1e-12);
}

/* Identity: for any tensor A, sum over a cubic group of R A R^T is
 * (tr A / 3) times the identity times the order, so a general valley at a
 * general position in Oh gives a scalar 3 / tr(M^-1). */
static void test_cubic_isotropy(void)
{
    bm_point_group g;
    bm_valley_shape s;
    bm_valley_star star;
    bm_valley_average avg;
    bm_errbuf err = {0};
    g_assert_cmpint(bm_point_group_get("Oh", &g, NULL), ==, BM_OK);
    /* axes: a rotation by 0.3 rad about (1,2,3)/|..| (Rodrigues formula) */
    double u[3] = {1, 2, 3}, l = sqrt(14.0), t = 0.3;
    for (int i = 0; i < 3; i++)
        u[i] /= l;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double eps = 0.0;
            int k = 3 - i - j;
            if (i != j)
                eps = (((j - i + 3) % 3) == 1 ? 1.0 : -1.0) * u[k];
            s.axes[i][j] = (i == j ? cos(t) : 0.0) + (1 - cos(t)) * u[i] * u[j] - sin(t) * eps;
        }
    s.masses[0] = 0.2; s.masses[1] = 0.5; s.masses[2] = 1.3;
    g_assert_cmpint(bm_valley_shape_normalise(&s, NULL, &err), ==, BM_OK);
    const double pos[3] = {0.1, 0.25, 0.4};
    g_assert_cmpint(bm_valley_star_build(&s, BM_SITE_INTERIOR, pos, &g, &star, &err), ==, BM_OK);
    g_assert_cmpuint(star.n, ==, 48);   /* a general position: the order of Oh */
    g_assert_cmpint(bm_valley_average_compute(star.valleys, star.n, NULL, &avg, &err), ==, BM_OK);
    g_assert_cmpint(avg.conductivity_isotropic, ==, 1);
    double m = 3.0 / (1 / 0.2 + 1 / 0.5 + 1 / 1.3);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass, m, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[0][1], 0.0, 1e-12);
    /* equivalent valleys: g_v^(2/3) (m1 m2 m3)^(1/3) (textbook) */
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, pow(48.0, 2.0 / 3.0) * cbrt(0.2 * 0.5 * 1.3),
                                   1e-12);
}

/* Hexagonal: six in-plane spheroids related by 60-degree rotations. The
 * in-plane average of a 2D tensor over a six-fold star is half its trace
 * (identity), so 1/m_xx = 1/m_yy = (1/m_l + 1/m_t)/2 and 1/m_zz = 1/m_t:
 * a uniaxial tensor, reported by principal values. */
static void test_hexagonal(void)
{
    const double ax[3] = {1, 0, 0};
    bm_valley_star star;
    bm_valley_average avg;
    average_of("D6h", 0.9, 0.3, ax, BM_SITE_INTERIOR, 6, &star, &avg);
    g_assert_cmpint(avg.conductivity_isotropic, ==, 0);
    double mxy = 2.0 / (1 / 0.9 + 1 / 0.3);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[0][0], mxy, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[1][1], mxy, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[2][2], 0.3, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_masses[0], 0.3, 1e-12);
    g_assert_cmpfloat_with_epsilon(fabs(avg.conductivity_axes[0][2]), 1.0, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_masses[1], mxy, 1e-12);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_masses[2], mxy, 1e-12);
    /* C6v gives the same star for an in-plane valley */
    star_of("C6v", 0.9, 0.3, ax, BM_SITE_INTERIOR, &star);
    g_assert_cmpuint(star.n, ==, 6);
}

/* Strained silicon: the two [001] valleys lowered by dE. Limits: as dE
 * grows the in-plane conductivity mass tends to m_t and the DOS mass to
 * 2^(2/3) (m_l m_t^2)^(1/3) (two valleys; textbook formula). Populations
 * follow Boltzmann: lowered pair share 2 e^x / (2 e^x + 4), x = dE / kT. */
static void strained(double de, double t, bm_statistics stats, double ef,
                     bm_valley_average *avg, double frac[6])
{
    bm_valley v[6];
    bm_errbuf err = {0};
    const double axes[6][3] = {{1, 0, 0}, {-1, 0, 0}, {0, 1, 0}, {0, -1, 0}, {0, 0, 1}, {0, 0, -1}};
    for (int i = 0; i < 6; i++) {
        bm_valley_shape s;
        g_assert_cmpint(bm_valley_shape_spheroid(SI_ML, SI_MT, axes[i], &s, &err), ==, BM_OK);
        g_assert_cmpint(bm_valley_from_shape(&s, axes[i], 1.0, i >= 4 ? -de : 0.0, &v[i], &err),
                        ==, BM_OK);
    }
    bm_population pop = {1, stats, t, ef};
    g_assert_cmpint(bm_valley_average_compute(v, 6, &pop, avg, &err), ==, BM_OK);
    for (int i = 0; i < 6; i++)
        frac[i] = v[i].population;
}

static void test_strained_silicon(void)
{
    bm_valley_average avg;
    double frac[6];
    double prev_xx = 1.0, prev_dos = 10.0;
    const double des[] = {0.0, 0.05, 0.1, 0.2, 0.6};
    double md2 = pow(2.0, 2.0 / 3.0) * cbrt(SI_ML * SI_MT * SI_MT);
    for (size_t k = 0; k < G_N_ELEMENTS(des); k++) {
        strained(des[k], 300.0, BM_BOLTZMANN, 0.0, &avg, frac);
        double x = des[k] / (BM_KB_EV * 300.0);
        double share = 2.0 * exp(x) / (2.0 * exp(x) + 4.0);
        g_assert_cmpfloat_with_epsilon(frac[4] + frac[5], share, 1e-12);
        g_assert_cmpfloat(avg.conductivity_mass_tensor[0][0], <=, prev_xx + 1e-15);
        g_assert_cmpfloat(avg.dos_mass, <=, prev_dos + 1e-15);
        g_assert_cmpfloat(avg.conductivity_mass_tensor[0][0], >=, SI_MT - 1e-12);
        g_assert_cmpfloat(avg.dos_mass, >=, md2 - 1e-12);
        g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[0][0],
                                       avg.conductivity_mass_tensor[1][1], 1e-12);
        prev_xx = avg.conductivity_mass_tensor[0][0];
        prev_dos = avg.dos_mass;
        if (k == 2)   /* 0.1 eV at 300 K: mostly but not fully repopulated */
            g_assert_cmpfloat(share, >, 0.9);
    }
    /* 0.6 eV: the upper valleys hold e^(-23) of the carriers */
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[0][0], SI_MT, 1e-8);
    g_assert_cmpfloat_with_epsilon(avg.conductivity_mass_tensor[2][2], SI_ML, 1e-7);
    g_assert_cmpfloat_with_epsilon(avg.dos_mass, md2, 1e-8);
    g_assert_cmpint(avg.conductivity_isotropic, ==, 0);

    /* Fermi-Dirac far below the edges reduces to Boltzmann (F_1/2(eta) -> e^eta) */
    bm_valley_average fd;
    double ffd[6];
    strained(0.1, 300.0, BM_BOLTZMANN, 0.0, &avg, frac);
    strained(0.1, 300.0, BM_FERMI_DIRAC, -0.1 - 0.6, &fd, ffd);
    g_assert_cmpfloat_with_epsilon(fd.dos_mass, avg.dos_mass, 1e-8);
    g_assert_cmpfloat_with_epsilon(ffd[4], frac[4], 1e-9);
    g_assert_cmpfloat_with_epsilon(fd.conductivity_mass_tensor[0][0],
                                   avg.conductivity_mass_tensor[0][0], 1e-9);
    /* Degenerate: the lowered pair fills up while F_1/2 grows only as
     * eta^(3/2), so the upper valleys gain share relative to Boltzmann
     * (F_1/2 is sub-exponential above eta ~ 0), with a warning. */
    strained(0.1, 300.0, BM_FERMI_DIRAC, -0.1 + 0.1, &fd, ffd);
    g_assert_cmpfloat(ffd[0], >, frac[0]);
    g_assert_cmpint(fd.warnings.count, >=, 1);
    g_assert_true(bm_warnings_has(&fd.warnings, BM_WARN_DEGENERATE_STATISTICS));
    bm_warnings_clear(&fd.warnings);
}

static void test_bad_input(void)
{
    bm_valley_shape s;
    bm_errbuf err = {0};
    bm_warnings w = {0};
    const double ax[3] = {1, 0, 0}, zero[3] = {0, 0, 0};
    g_assert_cmpint(bm_valley_shape_spheroid(0.0, 0.19, ax, &s, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "longitudinal"));
    g_assert_cmpint(bm_valley_shape_spheroid(0.98, -0.19, ax, &s, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "-0.19"));
    g_assert_cmpint(bm_valley_shape_spheroid(0.98, NAN, ax, &s, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_valley_shape_spheroid(0.98, 0.19, zero, &s, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "axis"));

    /* small axis error: corrected with a warning */
    bm_valley_shape g = {{0.2, 0.3, 0.4}, {{1, 1e-5, 0}, {0, 1, 0}, {0, 0, 1}}};
    g_assert_cmpint(bm_valley_shape_normalise(&g, &w, &err), ==, BM_OK);
    g_assert_cmpint(w.count, ==, 1);
    g_assert_cmpint(w.items[0].code, ==, BM_WARN_AXES_REORTHONORMALISED);
    bm_warnings_clear(&w);
    g_assert_cmpfloat_with_epsilon(g.axes[1][0] * g.axes[0][0] + g.axes[1][1] * g.axes[0][1],
                                   0.0, 1e-15);
    /* large error: rejected */
    bm_valley_shape b = {{0.2, 0.3, 0.4}, {{1, 0.2, 0}, {0, 1, 0}, {0, 0, 1}}};
    g_assert_cmpint(bm_valley_shape_normalise(&b, &w, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "orthonormal"));
    bm_valley_shape m = {{0.2, 0.0, 0.4}, {{1, 0, 0}, {0, 1, 0}, {0, 0, 1}}};
    g_assert_cmpint(bm_valley_shape_normalise(&m, &w, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "principal mass 1"));

    /* star: missing direction, zero direction */
    bm_point_group oh;
    bm_valley_star star;
    g_assert_cmpint(bm_point_group_get("Oh", &oh, NULL), ==, BM_OK);
    g_assert_cmpint(bm_valley_shape_spheroid(0.98, 0.19, ax, &s, &err), ==, BM_OK);
    g_assert_cmpint(bm_valley_star_build(&s, BM_SITE_FACE, NULL, &oh, &star, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_valley_star_build(&s, BM_SITE_INTERIOR, zero, &oh, &star, &err), ==,
                    BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "direction"));

    /* zero temperature with offsets; equal populations with offsets */
    bm_valley v[2];
    g_assert_cmpint(bm_valley_from_shape(&s, ax, 1.0, 0.0, &v[0], &err), ==, BM_OK);
    g_assert_cmpint(bm_valley_from_shape(&s, ax, 1.0, 0.05, &v[1], &err), ==, BM_OK);
    bm_valley_average avg;
    bm_population p0 = {1, BM_BOLTZMANN, 0.0, 0.0};
    g_assert_cmpint(bm_valley_average_compute(v, 2, &p0, &avg, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "0 K"));
    bm_population pn = {1, BM_FERMI_DIRAC, -5.0, 0.0};
    g_assert_cmpint(bm_valley_average_compute(v, 2, &pn, &avg, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "-5 K"));
    g_assert_cmpint(bm_valley_average_compute(v, 2, NULL, &avg, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "offsets"));
    g_assert_cmpint(bm_valley_average_compute(v, 0, NULL, &avg, &err), ==, BM_EINVAL);
    g_assert_cmpint(bm_valley_from_shape(&s, ax, 0.0, 0.0, &v[0], &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "weight"));
    /* zero temperature with all offsets equal is fine */
    g_assert_cmpint(bm_valley_from_shape(&s, ax, 1.0, 0.05, &v[0], &err), ==, BM_OK);
    g_assert_cmpint(bm_valley_average_compute(v, 2, &p0, &avg, &err), ==, BM_OK);
}

/* Masses outside the usual range are reported (common practice, no source:
 * 0.01..10 m_e). */
static void test_warnings(void)
{
    const double ax[3] = {0, 0, 1};
    bm_valley_star star;
    bm_valley_average avg;
    average_of("D4h", 25.0, 0.5, ax, BM_SITE_INTERIOR, 2, &star, &avg);
    g_assert_cmpint(avg.warnings.count, ==, 1);
    g_assert_nonnull(strstr(avg.warnings.items[0].text, "25"));
    g_assert_cmpint(avg.warnings.items[0].code, ==, BM_WARN_MASS_OUT_OF_RANGE);
    bm_warnings_clear(&avg.warnings);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_core_init();
    g_test_add_func("/core/valleys/silicon", test_silicon);
    g_test_add_func("/core/valleys/germanium", test_germanium);
    g_test_add_func("/core/valleys/time-reversal", test_time_reversal);
    g_test_add_func("/core/valleys/gamma", test_gamma);
    g_test_add_func("/core/valleys/cubic-isotropy", test_cubic_isotropy);
    g_test_add_func("/core/valleys/hexagonal", test_hexagonal);
    g_test_add_func("/core/valleys/strained-silicon", test_strained_silicon);
    g_test_add_func("/core/valleys/bad-input", test_bad_input);
    g_test_add_func("/core/valleys/warnings", test_warnings);
    return g_test_run();
}
