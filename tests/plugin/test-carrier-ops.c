/* test-carrier-ops.c: the carrier operations (fermi-integral, band-gap,
 * carrier-statistics, sheet-density, drude, materials) through the JSON path. */
#include "op-test.h"
#include <glib.h>
#include <glib/gstdio.h>
#include <math.h>
#include <string.h>

#include "registry.h"
#include "bm-carriers.h"

/* CODATA 2018 (exact SI values for e and k_B, m_e to the digits shown);
 * GSL's headers carry an earlier set, hence relative tolerances near 1e-6. */
#define E_CHARGE 1.602176634e-19
#define M_E_KG   9.1093837015e-31
#define K_B_J    1.380649e-23


static double num(JsonObject *o, const char *key)
{
    return json_object_get_double_member(o, key);
}

static double rel(double a, double b)
{
    return fabs(a / b - 1.0);
}

static void test_fermi_integral(void)
{
    g_autoptr(JsonObject) r = op_call("fermi-integral", "{\"order\": 0.5, \"eta\": 0}");
    /* F_1/2(0) = (1 - 2^(-1/2)) zeta(3/2) = 0.7651470246 (DLMF 25.12(iii) with the
     * 1/Gamma(j+1) normalisation, the Dirichlet eta function; from memory) */
    g_assert_cmpfloat(fabs(num(r, "values") - 0.7651470246), <, 1e-10);
    g_assert_cmpstr(json_object_get_string_member(r, "normalisation"), ==, "1/Gamma(j+1)");

    g_autoptr(JsonObject) z = op_call("fermi-integral", "{\"order\": 0, \"eta\": [-3, 0, 2.5]}");
    JsonArray *v = json_object_get_array_member(z, "values");
    const double eta[3] = { -3, 0, 2.5 };
    for (guint i = 0; i < 3; i++)   /* F_0(eta) = ln(1 + e^eta) (identity) */
        g_assert_cmpfloat(rel(json_array_get_double_element(v, i), log1p(exp(eta[i]))), <, 1e-14);
    g_autoptr(JsonObject) one = op_call("fermi-integral", "{\"order\": 1, \"eta\": 0}");
    /* F_1(0) = eta(2) = pi^2 / 12 (Dirichlet eta function at 2; identity) */
    g_assert_cmpfloat(rel(num(one, "values"), G_PI * G_PI / 12.0), <, 1e-13);

    /* inverse: round trip through F_1/2 (identity), array form */
    g_autoptr(JsonObject) inv = op_call("fermi-integral",
        "{\"order\": 0.5, \"values\": [0.7651470246254079, 1e-5], \"inverse\": true}");
    JsonArray *e = json_object_get_array_member(inv, "eta");
    g_assert_cmpfloat(fabs(json_array_get_double_element(e, 0)), <, 1e-12);
    /* far below zero F_1/2(eta) = e^eta (1 - e^eta / 2^(3/2) + ...) (series; identity) */
    double x = 1e-5;
    g_assert_cmpfloat(fabs(json_array_get_double_element(e, 1) - log(x) - x / pow(2, 1.5)),
                      <, 1e-9);

    op_expect_invalid("fermi-integral", "{\"order\": 0.75, \"eta\": 0}", "\"order\"");
    op_expect_invalid("fermi-integral", "{\"order\": 1, \"values\": 1, \"inverse\": true}",
                   "order\" 0.5 only");
    op_expect_invalid("fermi-integral", "{\"order\": 0.5, \"values\": [1, -2], \"inverse\": true}",
                   "element 1 of \"values\"");
    op_expect_invalid("fermi-integral", "{\"order\": 0.5, \"values\": 0, \"inverse\": true}",
                   "key \"values\"");
    op_expect_invalid("fermi-integral", "{\"order\": 0.5}", "missing key \"eta\"");
}

static void test_band_gap(void)
{
    /* Si Varshni at 300 K: 1.1245 eV (Thurmond 1975; from memory) */
    g_autoptr(JsonObject) r = op_call("band-gap", "{\"material\": \"Si\", \"temperature_k\": 300}");
    g_assert_cmpfloat(fabs(num(r, "band_gap_ev") - 1.1245), <, 1e-4);
    g_assert_nonnull(strstr(json_object_get_string_member(r, "source"), "Thurmond"));

    /* Bose-Einstein form, inline: Eg0 - 2 a_B / (exp(Theta/T) - 1) (the formula of
     * Vina, Logothetidis & Cardona 1984; from memory), evaluated here */
    g_autoptr(JsonObject) b = op_call("band-gap",
        "{\"material\": {\"name\": \"X\", \"bose_einstein\": {\"eg0_ev\": 1.52, \"a_b_ev\": 0.057,"
        " \"theta_k\": 240}}, \"model\": \"bose-einstein\", \"temperatures_k\": [0, 77, 300]}");
    JsonArray *pts = json_object_get_array_member(b, "points");
    g_assert_cmpuint(json_array_get_length(pts), ==, 3);
    const double t[3] = { 0, 77, 300 };
    for (guint i = 0; i < 3; i++) {
        JsonObject *p = json_array_get_object_element(pts, i);
        double want = t[i] == 0 ? 1.52 : 1.52 - 2 * 0.057 / expm1(240.0 / t[i]);
        g_assert_cmpfloat(num(p, "temperature_k"), ==, t[i]);
        g_assert_cmpfloat(fabs(num(p, "band_gap_ev") - want), <, 1e-12);
    }

    op_expect_invalid("band-gap", "{\"material\": \"Si\", \"temperature_k\": 300, "
                   "\"model\": \"bose-einstein\"}", "material \"Si\" has a varshni gap model");
    /* one gap model per material */
    op_expect_invalid("band-gap", "{\"material\": {\"band_gap_ev\": 1.1, \"varshni\": "
                   "{\"eg0_ev\": 1.17, \"alpha_ev_per_k\": 4.73e-4, \"beta_k\": 636}}, "
                   "\"temperature_k\": 300}", "give one gap model");
    op_expect_invalid("band-gap", "{\"material\": \"Si\", \"temperatures_k\": [300, -4]}",
                   "element 1 of \"temperatures_k\"");
    op_expect_invalid("band-gap", "{\"material\": \"unobtainium\", \"temperature_k\": 300}",
                   "key \"material\"");
    op_expect_invalid("band-gap", "{\"material\": \"Si\"}", "\"temperature_k\"");
}

static const char *const P_SI =
    "\"donors\": [{\"species\": \"P\", \"density_cm3\": 1e16}]";

static void test_silicon(void)
{
    g_autofree char *req = g_strdup_printf("{\"material\": \"Si\", \"temperature_k\": 300, "
                                           "\"statistics\": \"boltzmann\", %s}", P_SI);
    g_autoptr(JsonObject) r = op_call("carrier-statistics", req);
    /* Nc(Si, 300 K) = 2.8e19 cm^-3 (Sze & Ng 2007 App. G; from memory; 1 %) */
    g_assert_cmpfloat(rel(num(r, "nc_cm3"), 2.8e19), <, 0.01);
    /* Nv(Si, 300 K) = 3.10e19 cm^-3 from the temperature-dependent hole DOS mass
     * fit quoted by Green, J. Appl. Phys. 67, 2944 (1990) (from memory; 2 %) */
    g_assert_cmpfloat(rel(num(r, "nv_cm3"), 3.10e19), <, 0.02);
    /* ni(Si, 300 K) = 1.08e10 cm^-3 (Green 1990; from memory): the textbook
     * formula with these masses and Thurmond's gap lands within 3 %.  Sze & Ng
     * 2007 App. G give 9.65e9 (from memory) with their lower Nv 2.65e19; both
     * are published, so against theirs the tolerance is 12 % (ni goes as
     * sqrt(Nv): the 15 % in Nv alone makes 7.5 %). */
    g_assert_cmpfloat(rel(num(r, "ni_cm3"), 1.08e10), <, 0.03);
    g_assert_cmpfloat(rel(num(r, "ni_cm3"), 9.65e9), <, 0.12);
    g_assert_nonnull(strstr(json_object_get_string_member(
        json_object_get_object_member(r, "sources"), "statistics_hole_dos_mass_me"), "Green"));
    /* n-Si, N_D = 1e16: Ec - EF = kT ln(Nc / N_D) = 0.2052 eV (textbook worked example,
     * Sze & Ng 2007 ch. 1; from memory). The example assumes full ionisation and
     * Nc = 2.8e19; P at 45 meV is 99.6 % ionised here: 1 meV tolerance. */
    g_assert_cmpfloat(fabs(num(r, "effective_band_gap_ev") - num(r, "fermi_level_ev") - 0.2052),
                      <, 1e-3);
    g_assert_cmpstr(json_object_get_string_member(r, "regime"), ==, "extrinsic");
    g_assert_cmpstr(json_object_get_string_member(r, "statistics"), ==, "boltzmann");
    /* charge neutrality n + N_A- = p + N_D+ (identity) */
    g_assert_cmpfloat(rel(num(r, "n_cm3"), num(r, "p_cm3") + num(r, "ionized_donors_cm3")),
                      <, 1e-10);
    /* n p = nie^2 with Boltzmann statistics (mass-action law with the narrowed
     * gap; identity) */
    g_assert_cmpfloat(rel(num(r, "n_cm3") * num(r, "p_cm3"),
                          num(r, "nie_cm3") * num(r, "nie_cm3")), <, 1e-9);
    JsonArray *per = json_object_get_array_member(r, "ionized_donors_per_species_cm3");
    g_assert_cmpuint(json_array_get_length(per), ==, 1);
    JsonObject *d0 = json_array_get_object_element(json_object_get_array_member(r, "donors"), 0);
    g_assert_cmpfloat(num(d0, "ionization_ev"), ==, 0.045);
    g_assert_nonnull(strstr(json_object_get_string_member(d0, "source"), "Sze"));
    g_assert_cmpstr(json_object_get_string_member(r, "fermi_level_reference"), ==,
                    "valence-band maximum");

    /* the same donor by its numbers gives the same Fermi level (round trip) */
    g_autoptr(JsonObject) r2 = op_call("carrier-statistics",
        "{\"material\": \"silicon\", \"temperature_k\": 300, \"statistics\": \"boltzmann\","
        " \"donors\": [{\"density_cm3\": 1e16, \"ionization_ev\": 0.045, \"degeneracy\": 2}]}");
    g_assert_cmpfloat(num(r2, "fermi_level_ev"), ==, num(r, "fermi_level_ev"));
}

/* Heavily doped n-Si at 300 K: Boltzmann overestimates n; the core's > 5 %
 * warning travels to the response (Fermi level near the band edge, common
 * practice, no source). */
static void test_degenerate_warning(void)
{
    g_autoptr(JsonObject) r = op_call("carrier-statistics",
        "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": "
        "[{\"density_cm3\": 5e19, \"ionization_ev\": 0.0}]}");
    JsonArray *w = json_object_get_array_member(r, "warnings");
    gboolean found = FALSE;
    for (guint i = 0; i < json_array_get_length(w); i++)
        found |= strstr(json_array_get_string_element(w, i), "Boltzmann") != NULL;
    g_assert_true(found);
    g_assert_cmpfloat(num(r, "boltzmann_deviation"), >, 0.05);
    /* 5e19 is echoed as valid JSON text (json-glib alone writes "5e+19.0") */
    JsonObject *d0 = json_array_get_object_element(json_object_get_array_member(r, "donors"), 0);
    g_assert_cmpfloat(num(d0, "density_cm3"), ==, 5e19);
}

static gboolean has_code(JsonObject *r, const char *code)
{
    JsonArray *c = json_object_get_array_member(r, "warning_codes");
    for (guint i = 0; i < json_array_get_length(c); i++)
        if (strcmp(json_array_get_string_element(c, i), code) == 0)
            return TRUE;
    return FALSE;
}

#define SI_AS_1E20 "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": " \
                   "[{\"species\": \"As\", \"density_cm3\": 1e20}]"
#define GAAS_SI_1E17 "{\"material\": \"GaAs\", \"temperature_k\": 300, \"donors\": " \
                     "[{\"species\": \"Si\", \"density_cm3\": 1e17}]"

/* Heavy doping through the operation: the models on by default, off on request. */
static void test_heavy_doping(void)
{
    /* Si:As 1e20 at 300 K, defaults: Pearson-Bardeen lowering (alpha 3.1e-8 eV cm,
     * Pearson & Bardeen 1949; from memory) brings the 54 meV level to zero well below
     * 1e20, so the donors are all ionised (practitioners count them ionised above the
     * Mott density, about 4e18 cm^-3 in Si: REFERENCES, common practice) */
    g_autoptr(JsonObject) on = op_call("carrier-statistics", SI_AS_1E20 "}");
    g_assert_cmpstr(json_object_get_string_member(on, "donor_ionization_model"), ==,
                    "pearson-bardeen");
    g_assert_cmpfloat(num(on, "ionized_fraction"), >, 0.99);
    g_assert_cmpfloat(rel(num(on, "n_cm3"), 1e20), <, 1e-9);
    g_assert_cmpstr(json_object_get_string_member(on, "regime"), ==, "degenerate");
    g_assert_false(has_code(on, "above-mott-density"));
    JsonObject *d0 = json_array_get_object_element(json_object_get_array_member(on, "donors"), 0);
    g_assert_true(json_object_get_boolean_member(d0, "fully_ionized"));
    g_assert_cmpfloat(num(d0, "effective_ionization_ev"), ==, 0.0);
    /* band-gap narrowing: Klaassen et al. 1992 (from memory) give 92.2 meV apparent
     * at 1e20 (their formula, evaluated by hand); the Fermi-Dirac solve uses more */
    g_assert_cmpstr(json_object_get_string_member(on, "band_gap_narrowing_model"), ==,
                    "slotboom");
    JsonObject *hd = json_object_get_object_member(on, "heavy_doping");
    JsonObject *bg = json_object_get_object_member(hd, "band_gap_narrowing");
    g_assert_cmpfloat(rel(num(bg, "apparent_narrowing_ev"), 92.231809713115e-3), <, 1e-9);
    g_assert_true(json_object_get_boolean_member(bg, "fermi_dirac_corrected"));
    g_assert_cmpfloat(num(on, "band_gap_narrowing_ev"), >, num(bg, "apparent_narrowing_ev"));
    g_assert_cmpfloat(num(on, "nie_cm3"), >, num(on, "ni_cm3"));
    g_assert_cmpfloat(fabs(num(on, "effective_band_gap_ev") - num(on, "band_gap_ev")
                           + num(on, "band_gap_narrowing_ev")), <, 1e-15);
    g_assert_cmpfloat(fabs(num(on, "fermi_level_undoped_reference_ev") - num(on, "fermi_level_ev")
                           - 0.5 * num(on, "band_gap_narrowing_ev")), <, 1e-15);
    /* Si:P Mott density: measured 3.74e18 cm^-3 (Rosenbaum, Andres, Thomas & Bhatt,
     * Phys. Rev. Lett. 45, 1723 (1980); from memory); the hydrogenic estimate with
     * an isotropic valley mass and the constant 0.26 is good to a factor of 2 (the
     * scatter of N_c^(1/3) a* about 0.26 in Edwards & Sienko 1978 is about 25 %,
     * cubed: a factor of 2; from memory) */
    double nm = num(on, "donor_mott_density_cm3");
    g_assert_cmpfloat(nm, >, 3.74e18 / 2.0);
    g_assert_cmpfloat(nm, <, 3.74e18 * 2.0);

    /* models off: the single-level numbers (regression, exact solution of that
     * model: n = 1.1555e19, 12 % ionised, EF 19 meV below Ec) and a warning */
    g_autoptr(JsonObject) off = op_call("carrier-statistics", SI_AS_1E20
        ", \"ionization_model\": \"single-level\", \"band_gap_narrowing\": \"none\"}");
    g_assert_cmpfloat(rel(num(off, "n_cm3"), 1.1555186e19), <, 1e-6);
    g_assert_cmpfloat(fabs(num(off, "ionized_fraction") - 0.11555), <, 1e-4);
    g_assert_cmpfloat(fabs(num(off, "band_gap_ev") - num(off, "fermi_level_ev") - 0.0193), <,
                      1e-3);
    g_assert_cmpfloat(num(off, "band_gap_narrowing_ev"), ==, 0.0);
    g_assert_cmpstr(json_object_get_string_member(off, "band_gap_narrowing_model"), ==, "none");
    g_assert_cmpstr(json_object_get_string_member(off, "donor_ionization_model"), ==,
                    "single-level");
    g_assert_true(has_code(off, "above-mott-density"));
    /* within 3 kT of Ec: degenerate, not freeze-out */
    g_assert_cmpstr(json_object_get_string_member(off, "regime"), ==, "degenerate");

    /* GaAs:Si 1e17: no Pearson-Bardeen alpha for GaAs, so the Mott threshold:
     * hydrogenic 1.7e16 cm^-3 (m 0.067, eps_r 12.9), against about 1e16 (REFERENCES,
     * common practice, order of magnitude: factor 3) */
    g_autoptr(JsonObject) g = op_call("carrier-statistics", GAAS_SI_1E17 "}");
    g_assert_cmpstr(json_object_get_string_member(g, "donor_ionization_model"), ==, "mott");
    g_assert_cmpfloat(num(g, "ionized_fraction"), >, 0.999);
    g_assert_cmpfloat(num(g, "donor_mott_density_cm3"), >, 1e16 / 3.0);
    g_assert_cmpfloat(num(g, "donor_mott_density_cm3"), <, 1e16 * 3.0);
    g_assert_cmpstr(json_object_get_string_member(g, "band_gap_narrowing_model"), ==, "none");
    g_autoptr(JsonObject) g0 = op_call("carrier-statistics", GAAS_SI_1E17
        ", \"ionization_model\": \"single-level\"}");
    /* the single level of 5.8 meV: 70 % (regression, exact solution of that model) */
    g_assert_cmpfloat(fabs(num(g0, "ionized_fraction") - 0.7009), <, 1e-3);
    g_assert_true(has_code(g0, "above-mott-density"));
    /* below the Mott density the Mott model changes nothing */
    g_autoptr(JsonObject) lo = op_call("carrier-statistics", "{\"material\": \"GaAs\", "
        "\"temperature_k\": 300, \"donors\": [{\"species\": \"Si\", \"density_cm3\": 1e15}]}");
    g_autoptr(JsonObject) lo0 = op_call("carrier-statistics", "{\"material\": \"GaAs\", "
        "\"temperature_k\": 300, \"donors\": [{\"species\": \"Si\", \"density_cm3\": 1e15}], "
        "\"ionization_model\": \"single-level\"}");
    g_assert_cmpfloat(num(lo, "n_cm3"), ==, num(lo0, "n_cm3"));
    g_assert_false(has_code(lo0, "above-mott-density"));
    /* a model the material has no parameter for is refused, naming the key */
    op_expect_invalid("carrier-statistics", GAAS_SI_1E17
                      ", \"ionization_model\": \"pearson-bardeen\"}", "ionization_model");
    op_expect_invalid("carrier-statistics", GAAS_SI_1E17
                      ", \"ionization_model\": \"sharp\"}", "ionization_model");
    op_expect_invalid("carrier-statistics", "{\"material\": {\"band_gap_ev\": 1, "
                      "\"electron_dos_mass_me\": 0.1, \"statistics_hole_dos_mass_me\": 0.5}, "
                      "\"temperature_k\": 300, \"ionization_model\": \"mott\"}",
                      "relative_permittivity");
    /* bad narrowing sets in a material object name the key at fault */
    op_expect_invalid("carrier-statistics", "{\"material\": {\"band_gap_ev\": 1, "
                      "\"electron_dos_mass_me\": 0.1, \"statistics_hole_dos_mass_me\": 0.5, "
                      "\"band_gap_narrowing\": {\"model\": \"other\"}}, \"temperature_k\": 300}",
                      "band_gap_narrowing: key \"model\"");
    op_expect_invalid("carrier-statistics", "{\"material\": {\"band_gap_ev\": 1, "
                      "\"electron_dos_mass_me\": 0.1, \"statistics_hole_dos_mass_me\": 0.5, "
                      "\"band_gap_narrowing\": {\"model\": \"slotboom\", \"e1_ev\": 0.007, "
                      "\"n0_cm3\": 1e17, \"c\": 0.5}}, \"temperature_k\": 300}",
                      "\"apparent\"");
    op_expect_invalid("carrier-statistics", "{\"material\": {\"band_gap_ev\": 1, "
                      "\"electron_dos_mass_me\": 0.1, \"statistics_hole_dos_mass_me\": 0.5, "
                      "\"band_gap_narrowing\": {\"model\": \"slotboom\", \"e1_ev\": 0.007, "
                      "\"n0_cm3\": -1, \"c\": 0.5, \"apparent\": true}}, \"temperature_k\": 300}",
                      "N0");
    /* a material object without heavy-doping data: single level, no narrowing */
    g_autoptr(JsonObject) bare = op_call("carrier-statistics", "{\"material\": {\"band_gap_ev\": "
        "1, \"electron_dos_mass_me\": 0.1, \"statistics_hole_dos_mass_me\": 0.5}, "
        "\"temperature_k\": 300}");
    g_assert_cmpstr(json_object_get_string_member(bare, "donor_ionization_model"), ==,
                    "single-level");
    g_assert_true(JSON_NODE_HOLDS_NULL(json_object_get_member(bare, "donor_mott_density_cm3")));
}

static void test_points(void)
{
    g_autofree char *req = g_strdup_printf("{\"material\": \"Si\", \"temperatures_k\": "
                                           "[50, 300, 900], %s}", P_SI);
    g_autoptr(JsonObject) r = op_call("carrier-statistics", req);
    JsonArray *pts = json_object_get_array_member(r, "points");
    g_assert_cmpuint(json_array_get_length(pts), ==, 3);
    JsonObject *cold = json_array_get_object_element(pts, 0);
    JsonObject *room = json_array_get_object_element(pts, 1);
    JsonObject *hot = json_array_get_object_element(pts, 2);
    /* the three regimes of a doped semiconductor with temperature (freeze-out,
     * extrinsic, intrinsic: Sze & Ng 2007 ch. 1 figure of n against 1000/T; from memory;
     * at 900 K ni = 4.7e17 > 10 N_D, at 700 K ni = 3.1e16 is only "near-intrinsic") */
    g_assert_cmpstr(json_object_get_string_member(cold, "regime"), ==, "freeze-out");
    g_assert_cmpstr(json_object_get_string_member(room, "regime"), ==, "extrinsic");
    g_assert_cmpstr(json_object_get_string_member(hot, "regime"), ==, "intrinsic");
    /* Nc scales as T^(3/2) at fixed mass (identity) */
    g_assert_cmpfloat(rel(num(hot, "nc_cm3") / num(room, "nc_cm3"), pow(900.0 / 300.0, 1.5)),
                      <, 1e-12);
    /* each row carries the single-temperature keys */
    g_autofree char *one = g_strdup_printf("{\"material\": \"Si\", \"temperature_k\": 300, %s}",
                                           P_SI);
    g_autoptr(JsonObject) single = op_call("carrier-statistics", one);
    g_assert_cmpfloat(num(room, "fermi_level_ev"), ==, num(single, "fermi_level_ev"));
    g_assert_true(json_object_has_member(room, "ionized_donors_cm3"));
}

/* Tabulated DOS masses: two equal entries reproduce the built-in masses, and an
 * interpolated mass gives Nc (m/m0)^(3/2) scaling (identity). */
static void test_dos_mass_points(void)
{
    g_autoptr(JsonObject) a = op_call("carrier-statistics",
        "{\"material\": \"Si\", \"temperature_k\": 300}");
    g_autoptr(JsonObject) b = op_call("carrier-statistics",
        "{\"material\": \"Si\", \"temperature_k\": 300, \"dos_mass_points\": ["
        "{\"temperature_k\": 200, \"electron_dos_mass_me\": 1.00, \"statistics_hole_dos_mass_me\": 1.04},"
        "{\"temperature_k\": 400, \"electron_dos_mass_me\": 1.16, \"statistics_hole_dos_mass_me\": 1.04}]}");
    g_assert_cmpfloat(fabs(num(b, "electron_dos_mass_me") - 1.08), <, 1e-14);
    g_assert_cmpfloat(rel(num(b, "nc_cm3"), num(a, "nc_cm3")), <, 1e-12);
    op_expect_invalid("carrier-statistics",
        "{\"material\": \"Si\", \"temperature_k\": 500, \"dos_mass_points\": ["
        "{\"temperature_k\": 200, \"electron_dos_mass_me\": 1.0, \"statistics_hole_dos_mass_me\": 1.0},"
        "{\"temperature_k\": 400, \"electron_dos_mass_me\": 1.2, \"statistics_hole_dos_mass_me\": 1.0}]}",
        "dos_mass_points");
    op_expect_invalid("carrier-statistics",
        "{\"material\": \"Si\", \"temperature_k\": 300, \"dos_mass_points\": ["
        "{\"temperature_k\": 200, \"electron_dos_mass_me\": 0, \"statistics_hole_dos_mass_me\": 1.0}]}",
        "dos_mass_points[0]: key \"electron_dos_mass_me\"");
}

/* A material file with Si's values answers exactly as the built-in name does
 * (round trip), including a dopant named by species. */
static void test_material_file(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-mat-XXXXXX", &error);
    g_assert_no_error(error);
    g_autofree char *path = g_build_filename(dir, "si-like.json", NULL);
    const char *doc =
        "{\"name\": \"si-like\", \"electron_dos_mass_me\": 1.08, "
        "\"statistics_hole_dos_mass_me\": {\"fit_numerator\": [0.4435870, 0.3609528e-2, "
        "0.1173515e-3, 0.1263218e-5, 0.3025581e-8], \"fit_denominator\": [0.4683382e-2, "
        "0.2286895e-3, 0.7469271e-6, 0.1727481e-8]},"
        " \"varshni\": {\"eg0_ev\": 1.170, \"alpha_ev_per_k\": 4.73e-4, \"beta_k\": 636},"
        " \"relative_permittivity\": 11.7, \"donor_ionization_lowering_ev_cm\": 3.1e-8,"
        " \"acceptor_ionization_lowering_ev_cm\": 3.1e-8, \"band_gap_narrowing\": {\"model\":"
        " \"slotboom\", \"e1_ev\": 6.92e-3, \"n0_cm3\": 1.3e17, \"c\": 0.5, \"apparent\": true},"
        " \"dopants\": [{\"species\": \"P\", \"kind\": \"donor\", \"ionization_ev\": 0.045}]}";
    g_assert_true(g_file_set_contents(path, doc, -1, NULL));
    g_autofree char *req = g_strdup_printf("{\"material\": \"%s\", \"temperature_k\": 300, %s}",
                                           path, P_SI);
    g_autoptr(JsonObject) f = op_call("carrier-statistics", req);
    g_autofree char *req2 = g_strdup_printf("{\"material\": \"Si\", \"temperature_k\": 300, %s}",
                                            P_SI);
    g_autoptr(JsonObject) s = op_call("carrier-statistics", req2);
    g_assert_cmpstr(json_object_get_string_member(f, "material"), ==, "si-like");
    g_assert_cmpfloat(num(f, "fermi_level_ev"), ==, num(s, "fermi_level_ev"));
    g_assert_cmpfloat(num(f, "ni_cm3"), ==, num(s, "ni_cm3"));
    g_autofree char *req3 = g_strdup_printf("{\"material\": \"%s\", \"temperature_k\": 300}",
                                            path);
    g_autoptr(JsonObject) g = op_call("band-gap", req3);
    g_assert_cmpfloat(fabs(num(g, "band_gap_ev") - 1.1245), <, 1e-4);  /* as above */

    /* a bad key in the file is named with the file */
    g_autofree char *bad = g_build_filename(dir, "bad.json", NULL);
    g_assert_true(g_file_set_contents(bad, "{\"electron_mass\": 1}", -1, NULL));
    g_autofree char *req4 = g_strdup_printf("{\"material\": \"%s\", \"temperature_k\": 300}",
                                            bad);
    op_expect_invalid("carrier-statistics", req4, "unknown key \"electron_mass\"");
    op_expect_invalid("carrier-statistics", req4, "bad.json");
    op_expect_error("carrier-statistics",
                 "{\"material\": \"/nonexistent/m.json\", \"temperature_k\": 300}",
                 BM_ERROR_IO, "/nonexistent/m.json");
    g_remove(path);
    g_remove(bad);
    g_rmdir(dir);
}

/* Nv(300 K) through carrier-statistics, the path that uses it, within 10 % of
 * the handbook values: Si 3.10e19 (Green, J. Appl. Phys. 67, 2944 (1990)),
 * Ge 6.0e18 and GaAs 9.0e18 cm^-3 (Sze & Ng 2007 App. G); all from memory.
 * Each response names the statistics hole DOS mass it used and its source. */
static void test_valence_band_dos(void)
{
    const char *names[] = { "Si", "Ge", "GaAs" };
    const double nv[] = { 3.10e19, 6.0e18, 9.0e18 };
    for (size_t i = 0; i < G_N_ELEMENTS(names); i++) {
        g_autofree char *req = g_strdup_printf("{\"material\": \"%s\", \"temperature_k\": 300}",
                                               names[i]);
        g_autoptr(JsonObject) r = op_call("carrier-statistics", req);
        g_assert_cmpfloat(rel(num(r, "nv_cm3"), nv[i]), <, 0.10);
        g_assert_true(json_object_has_member(r, "statistics_hole_dos_mass_me"));
        g_assert_true(json_object_has_member(json_object_get_object_member(r, "sources"),
                                             "statistics_hole_dos_mass_me"));
    }
}

/* A material file's statistics hole DOS mass as a temperature table: linear
 * interpolation (identity: 1.0 at 200 K and 1.2 at 400 K give 1.1 at 300 K),
 * Nv from it, and the source named in the response; renamed keys and a
 * second gap model are refused with clear messages. */
static void test_hole_mass_table_file(void)
{
    const char *mat = "{\"name\": \"tab\", \"band_gap_ev\": 1.1, \"electron_dos_mass_me\": 1.0,"
        " \"statistics_hole_dos_mass_me\": {\"points\": [{\"temperature_k\": 200, \"mass_me\": 1.0},"
        " {\"temperature_k\": 400, \"mass_me\": 1.2}], \"source\": \"my table\"}}";
    g_autofree char *req = g_strdup_printf("{\"material\": %s, \"temperature_k\": 300}", mat);
    g_autoptr(JsonObject) r = op_call("carrier-statistics", req);
    g_assert_cmpfloat(fabs(num(r, "statistics_hole_dos_mass_me") - 1.1), <, 1e-14);
    double nv;
    bm_effective_dos(1.1, 300.0, &nv, NULL);
    g_assert_cmpfloat(rel(num(r, "nv_cm3"), nv), <, 1e-14);
    g_assert_cmpstr(json_object_get_string_member(json_object_get_object_member(r, "sources"),
                                                  "statistics_hole_dos_mass_me"), ==, "my table");
    g_autofree char *out = g_strdup_printf("{\"material\": %s, \"temperature_k\": 500}", mat);
    op_expect_invalid("carrier-statistics", out, "outside the tabulated range 200..400 K");
    op_expect_invalid("carrier-statistics", "{\"material\": {\"band_gap_ev\": 1, "
                      "\"electron_dos_mass_me\": 1, \"statistics_hole_dos_mass_me\": "
                      "{\"value\": 1, \"points\": []}}, \"temperature_k\": 300}",
                      "exactly one of \"value\", \"points\"");
    op_expect_invalid("valley-average", "{\"material\": {\"point_group\": \"Oh\", "
                      "\"conduction_valley\": {\"site\": \"gamma\"}}}",
                      "key \"site\" is now called \"position\"");
    op_expect_invalid("hole-mass", "{\"material\": {\"luttinger\": [6.98, 2.06, 2.93]}}",
                      "key \"luttinger\" is now called \"luttinger_parameters\"");
    op_expect_invalid("hole-mass", "{\"material\": {\"spin_orbit_splitting_ev\": 0.3}}",
                      "is now called \"split_off_ev\"");
}

static void test_carrier_bad_input(void)
{
    const char *op = "carrier-statistics";
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 0}", "\"temperature_k\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": -10}", "\"temperature_k\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperatures_k\": [300, 0]}",
                   "element 1 of \"temperatures_k\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": "
                   "[{\"density_cm3\": -1e16, \"ionization_ev\": 0.045}]}",
                   "donors[0]: key \"density_cm3\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 300, \"acceptors\": "
                   "[{\"species\": \"B\", \"density_cm3\": 1e15}, {\"species\": \"Q\", "
                   "\"density_cm3\": 1e15}]}", "acceptors[1]: key \"species\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": "
                   "[{\"species\": \"B\", \"density_cm3\": 1e15}]}", "'B' is an acceptor in Si");
    op_expect_invalid(op, "{\"material\": \"Unobtainium\", \"temperature_k\": 300}",
                   "unknown material 'Unobtainium'");
    op_expect_invalid(op, "{\"material\": {\"electron_dos_mass_me\": 0, "
                   "\"statistics_hole_dos_mass_me\": 1,"
                   " \"band_gap_ev\": 1}, \"temperature_k\": 300}",
                   "key \"electron_dos_mass_me\" must be greater than zero");
    op_expect_invalid(op, "{\"material\": {\"electron_dos_mass_me\": 1, \"band_gap_ev\": 1},"
                   " \"temperature_k\": 300}", "missing key \"statistics_hole_dos_mass_me\"");
    /* a renamed key says what it is called now */
    op_expect_invalid(op, "{\"material\": {\"electron_dos_mass_me\": 1, \"band_gap_ev\": 1,"
                   " \"hole_dos_mass_me\": 1}, \"temperature_k\": 300}",
                   "key \"hole_dos_mass_me\" is now called \"statistics_hole_dos_mass_me\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 300, \"statistics\": \"x\"}",
                   "key \"statistics\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": "
                   "[{\"density_cm3\": 1e15}]}", "donors[0]: give \"ionization_ev\"");
}

/* GaAs 2DEG, m = 0.067: DOS m/(pi hbar^2) = 2.80e10 cm^-2 meV^-1 (textbook value
 * for GaAs heterostructures, e.g. Davies, The Physics of Low-Dimensional
 * Semiconductors (1998); from memory).  Degenerate limit: n = DOS (EF - E0)
 * (identity when EF - E0 >> kT). */
static void test_sheet_density(void)
{
    g_autoptr(JsonObject) r = op_call("sheet-density",
        "{\"subbands\": [{\"energy_ev\": 0.0, \"mass_me\": 0.067}], \"temperature_k\": 1.5,"
        " \"sheet_density_cm2\": 3e11}");
    JsonObject *s0 = json_array_get_object_element(json_object_get_array_member(r, "subbands"), 0);
    double dos = num(s0, "dos_cm2_per_ev");
    g_assert_cmpfloat(rel(dos * 1e-3, 2.80e10), <, 0.002);
    g_assert_cmpfloat(rel(num(r, "fermi_level_ev"), 3e11 / dos), <, 1e-9);
    /* two subbands, Fermi level given: per-subband densities add up (identity), and
     * a subband below EF by x holds DOS x in the degenerate limit */
    g_autoptr(JsonObject) t = op_call("sheet-density",
        "{\"subbands\": [{\"energy_ev\": 0.0, \"mass_me\": 0.067}, {\"energy_ev\": 0.02,"
        " \"mass_me\": 0.067, \"valley_degeneracy\": 2}], \"temperature_k\": 1.5,"
        " \"fermi_level_ev\": 0.03}");
    JsonArray *sb = json_object_get_array_member(t, "subbands");
    double n0 = num(json_array_get_object_element(sb, 0), "sheet_density_cm2");
    double n1 = num(json_array_get_object_element(sb, 1), "sheet_density_cm2");
    g_assert_cmpfloat(rel(n0 + n1, num(t, "sheet_density_cm2")), <, 1e-12);
    g_assert_cmpfloat(rel(n0, dos * 0.03), <, 1e-9);
    g_assert_cmpfloat(rel(n1, 2 * dos * 0.01), <, 1e-9);

    op_expect_invalid("sheet-density", "{\"subbands\": [{\"energy_ev\": 0, \"mass_me\": 0}],"
                   " \"temperature_k\": 4, \"fermi_level_ev\": 0}", "subbands[0]: key \"mass_me\"");
    op_expect_invalid("sheet-density", "{\"subbands\": [{\"energy_ev\": 0, \"mass_me\": 0.067}],"
                   " \"temperature_k\": 4, \"sheet_density_cm2\": -1}", "\"sheet_density_cm2\"");
    op_expect_invalid("sheet-density", "{\"subbands\": [{\"energy_ev\": 0, \"mass_me\": 0.067}],"
                   " \"temperature_k\": 4}", "exactly one of");
}

static void test_drude(void)
{
    g_autoptr(JsonObject) r = op_call("drude", "{\"mass_me\": 0.26, \"mobility_cm2_per_vs\": 1400,"
                                            " \"density_cm3\": 1e16, \"temperature_k\": 300}");
    /* tau = mu m / e, sigma = n e mu, v_th = sqrt(3 kT / m), l = v_th tau (Drude model,
     * textbook definitions; CODATA constants above) */
    double tau = 1400e-4 * 0.26 * M_E_KG / E_CHARGE;
    g_assert_cmpfloat(rel(num(r, "scattering_time_s"), tau), <, 1e-6);
    g_assert_cmpfloat(rel(num(r, "conductivity_s_per_cm"), 1e16 * E_CHARGE * 1400), <, 1e-6);
    g_assert_cmpfloat(rel(num(r, "resistivity_ohm_cm"), 1 / (1e16 * E_CHARGE * 1400)), <, 1e-6);
    double vth = sqrt(3 * K_B_J * 300 / (0.26 * M_E_KG));
    g_assert_cmpfloat(rel(num(r, "thermal_velocity_cm_per_s"), vth * 100), <, 1e-6);
    g_assert_cmpfloat(rel(num(r, "mean_free_path_nm"), vth * tau * 1e9), <, 1e-6);
    /* and back: the scattering time gives the same mobility (round trip) */
    g_autofree char *req = g_strdup_printf("{\"mass_me\": 0.26, \"scattering_time_s\": %.17g}",
                                           num(r, "scattering_time_s"));
    g_autoptr(JsonObject) b = op_call("drude", req);
    g_assert_cmpfloat(rel(num(b, "mobility_cm2_per_vs"), 1400), <, 1e-12);
    g_assert_false(json_object_has_member(b, "conductivity_s_per_cm"));

    op_expect_invalid("drude", "{\"mass_me\": 0, \"scattering_time_s\": 1e-13}", "\"mass_me\"");
    op_expect_invalid("drude", "{\"mass_me\": 0.2, \"scattering_time_s\": 1e-13,"
                   " \"mobility_cm2_per_vs\": 100}", "exactly one of");
    op_expect_invalid("drude", "{\"mass_me\": 0.2, \"scattering_time_s\": 1e-13,"
                   " \"density_cm3\": -5}", "\"density_cm3\"");
}

static void test_materials(void)
{
    g_autoptr(JsonObject) all = op_call("materials", "{}");
    JsonArray *pts = json_object_get_array_member(all, "points");
    g_assert_cmpuint(json_array_get_length(pts), >=, 10);
    for (guint i = 0; i < json_array_get_length(pts); i++) {
        JsonObject *o = json_array_get_object_element(pts, i);
        g_assert_cmpuint(strlen(json_object_get_string_member(o, "band_gap_source")), >, 10);
    }
    g_autoptr(JsonObject) ga = op_call("materials", "{\"name\": \"gaas\"}");
    JsonObject *m = ga;
    g_assert_cmpstr(json_object_get_string_member(m, "name"), ==, "GaAs");
    JsonObject *me = json_object_get_object_member(m, "electron_dos_mass_me");
    /* GaAs Gamma mass 0.067 (Vurgaftman, Meyer & Ram-Mohan 2001; from memory) */
    g_assert_cmpfloat(num(me, "value"), ==, 0.067);
    g_assert_nonnull(strstr(json_object_get_string_member(me, "source"), "Vurgaftman"));
    /* every value object and dopant carries a non-empty source */
    g_autoptr(GList) keys = json_object_get_members(m);
    int with_source = 0;
    for (GList *l = keys; l; l = l->next) {
        JsonNode *n = json_object_get_member(m, l->data);
        if (JSON_NODE_HOLDS_OBJECT(n) && strcmp(l->data, "derived")) {
            g_assert_true(json_object_has_member(json_node_get_object(n), "source"));
            with_source++;
        }
    }
    g_assert_cmpint(with_source, >=, 9);
    JsonArray *d = json_object_get_array_member(m, "dopants");
    g_assert_cmpuint(json_array_get_length(d), >, 0);
    for (guint i = 0; i < json_array_get_length(d); i++)
        g_assert_true(json_object_has_member(json_array_get_object_element(d, i), "source"));
    op_expect_invalid("materials", "{\"name\": \"kryptonite\"}", "key \"name\"");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/carrier-ops/fermi-integral", test_fermi_integral);
    g_test_add_func("/carrier-ops/band-gap", test_band_gap);
    g_test_add_func("/carrier-ops/silicon", test_silicon);
    g_test_add_func("/carrier-ops/valence-band-dos", test_valence_band_dos);
    g_test_add_func("/carrier-ops/hole-mass-table-file", test_hole_mass_table_file);
    g_test_add_func("/carrier-ops/degenerate-warning", test_degenerate_warning);
    g_test_add_func("/carrier-ops/points", test_points);
    g_test_add_func("/carrier-ops/dos-mass-points", test_dos_mass_points);
    g_test_add_func("/carrier-ops/material-file", test_material_file);
    g_test_add_func("/carrier-ops/bad-input", test_carrier_bad_input);
    g_test_add_func("/carrier-ops/sheet-density", test_sheet_density);
    g_test_add_func("/carrier-ops/drude", test_drude);
    g_test_add_func("/carrier-ops/materials", test_materials);
    g_test_add_func("/carrier-ops/heavy-doping", test_heavy_doping);
    return g_test_run();
}
