/* test-cyclotron-ops.c: the cyclotron and measurement operations through the
 * registry's JSON path (cyclotron-ellipsoid, cyclotron-holes, resonance,
 * oscillation-damping, specific-heat-mass), with bad input. */
#include "op-test.h"
#include <math.h>
#include <string.h>

#include "registry.h"
#include "bm-units.h"

#define SI_VALLEY "{\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": 0.19, " \
                  "\"axis\": [1, 0, 0]}"

static double line_mass(JsonArray *lines, guint i)
{
    return json_object_get_double_member(json_array_get_object_element(lines, i),
                                         "cyclotron_mass_me");
}

static double line_count(JsonArray *lines, guint i)
{
    return json_object_get_double_member(json_array_get_object_element(lines, i),
                                         "valley_count");
}

static gboolean has_code(JsonObject *r, const char *code)
{
    JsonArray *c = json_object_get_array_member(r, "warning_codes");
    for (guint i = 0; i < json_array_get_length(c); i++)
        if (!strcmp(json_array_get_string_element(c, i), code))
            return TRUE;
    return FALSE;
}

/* Silicon's star (Sze & Ng 2007 masses, from memory): one line of 0.2794 for
 * six valleys along [111] (tests/reference/README); a sweep from [001] to
 * [110] gives m_t (2 valleys) and sqrt(m_l m_t) (4) at 0 degrees and the
 * formula's two lines at 90 (Dresselhaus, Kip & Kittel 1955, identity). */
static void test_ellipsoid(void)
{
    g_autoptr(JsonObject) r = op_call("cyclotron-ellipsoid",
        "{\"material\": \"Si\", \"field_direction\": [1, 1, 1]}");
    JsonArray *lines = json_object_get_array_member(r, "lines");
    g_assert_cmpuint(json_array_get_length(lines), ==, 1);
    g_assert_cmpfloat_with_epsilon(line_mass(lines, 0), 0.2794, 5e-5);
    g_assert_cmpfloat(line_count(lines, 0), ==, 6.0);
    g_assert_cmpfloat_with_epsilon(
        json_object_get_double_member(json_array_get_object_element(lines, 0),
                                      "resonance_ghz_per_t"),
        BM_CYCLOTRON_GHZ_PER_T / line_mass(lines, 0), 1e-9);

    g_autoptr(JsonObject) s = op_call("cyclotron-ellipsoid",
        "{\"valley\": " SI_VALLEY ", \"point_group\": \"Oh\", \"field_directions\": "
        "{\"from\": [0, 0, 1], \"to\": [1, 1, 0], \"steps\": 7}}");
    JsonArray *pts = json_object_get_array_member(s, "points");
    g_assert_cmpuint(json_array_get_length(pts), ==, 7);
    JsonObject *p0 = json_array_get_object_element(pts, 0);
    JsonObject *p6 = json_array_get_object_element(pts, 6);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(p6, "angle_deg"), 90.0, 1e-12);
    JsonArray *l0 = json_object_get_array_member(p0, "lines");
    g_assert_cmpuint(json_array_get_length(l0), ==, 2);
    g_assert_cmpfloat_with_epsilon(line_mass(l0, 0), 0.19, 1e-12);
    g_assert_cmpfloat(line_count(l0, 0), ==, 2.0);
    g_assert_cmpfloat_with_epsilon(line_mass(l0, 1), sqrt(0.98 * 0.19), 1e-12);
    g_assert_cmpfloat(line_count(l0, 1), ==, 4.0);
    JsonArray *l6 = json_object_get_array_member(p6, "lines");
    g_assert_cmpfloat_with_epsilon(line_mass(l6, 0), sqrt(2 * 0.98 * 0.19 * 0.19 / 1.17), 1e-12);
    /* at every angle the lines count all six valleys */
    for (guint i = 0; i < 7; i++) {
        JsonArray *l = json_object_get_array_member(json_array_get_object_element(pts, i),
                                                    "lines");
        double sum = 0;
        for (guint k = 0; k < json_array_get_length(l); k++)
            sum += line_count(l, k);
        g_assert_cmpfloat(sum, ==, 6.0);
    }
}

static void test_ellipsoid_bad(void)
{
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"material\": \"Si\", \"field_direction\": [0, 0, 0]}", "zero length");
    op_expect_invalid("cyclotron-ellipsoid", "{\"material\": \"Si\"}", "field_direction");
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"material\": \"Si\", \"field_direction\": [1,0,0], "
                      "\"field_directions\": [[1,0,0]]}", "exactly one");
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"material\": \"Si\", \"field_directions\": [[1,0,0], [1,2]]}",
                      "field_directions[1]");
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"material\": \"Si\", \"field_directions\": {\"from\": [0,0,1], "
                      "\"to\": [0,0,2], \"steps\": 5}}", "no plane");
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"material\": \"Si\", \"field_directions\": {\"from\": [0,0,1], "
                      "\"to\": [1,0,0], \"steps\": 1}}", "steps");
    op_expect_invalid("cyclotron-ellipsoid",
                      "{\"valley\": " SI_VALLEY ", \"field_direction\": [1,0,0]}",
                      "point_group");
}

/* Spherical limit gamma2 = gamma3 (identity): heavy 1 / (g1 - 2 g2), light
 * 1 / (g1 + 2 g2) in every direction; with a hole energy the area is
 * pi k^2 = pi 2 m E / hbar^2 and the frequency 10475.77 T per A^-2 of area
 * (Onsager, METHODS; CODATA). */
static void test_holes(void)
{
    g_autoptr(JsonObject) r = op_call("cyclotron-holes",
        "{\"luttinger_parameters\": [6, 2, 2], \"field_directions\": [[1,0,0], [1,1,1]], "
        "\"hole_energy_ev\": 0.02}");
    JsonArray *pts = json_object_get_array_member(r, "points");
    g_assert_cmpuint(json_array_get_length(pts), ==, 2);
    for (guint i = 0; i < 2; i++) {
        JsonObject *p = json_array_get_object_element(pts, i);
        JsonObject *h = json_object_get_object_member(p, "heavy");
        JsonObject *l = json_object_get_object_member(p, "light");
        g_assert_cmpfloat_with_epsilon(json_object_get_double_member(h, "central_cyclotron_mass_me"),
                                       0.5, 1e-12);
        g_assert_cmpfloat_with_epsilon(json_object_get_double_member(l, "central_cyclotron_mass_me"),
                                       0.1, 1e-12);
        JsonObject *o = json_array_get_object_element(json_object_get_array_member(h, "orbits"), 0);
        double area = json_object_get_double_member(o, "area_inv_angstrom2");
        g_assert_cmpfloat_with_epsilon(area, G_PI * 0.5 * 0.02 / (0.5 * BM_HBAR2_OVER_ME_EV_A2),
                                       1e-12 * area);
        g_assert_cmpfloat_with_epsilon(json_object_get_double_member(o, "frequency_t"),
                                       10475.77 * area, 1e-6 * 10475.77 * area);
        g_assert_cmpstr(json_object_get_string_member(o, "area_extremum"), ==, "maximum");
    }
    /* GaAs from the built-in set: along [100] the heavy band has a central
     * minimum and a non-central maximum of the area (cross-checked against
     * SciPy in the core suite) */
    g_autoptr(JsonObject) g = op_call("cyclotron-holes",
        "{\"material\": \"GaAs\", \"field_direction\": [0, 0, 1]}");
    JsonObject *h = json_object_get_object_member(g, "heavy");
    JsonArray *orbits = json_object_get_array_member(h, "orbits");
    g_assert_cmpuint(json_array_get_length(orbits), ==, 2);
    g_assert_cmpstr(json_object_get_string_member(json_array_get_object_element(orbits, 0),
                                                  "area_extremum"), ==, "minimum");
    g_assert_true(json_object_has_member(g, "material"));
    /* an open heavy-hole surface: no heavy mass, said once */
    g_autoptr(JsonObject) o = op_call("cyclotron-holes",
        "{\"luttinger_parameters\": [4, 1, 2.5], \"field_directions\": {\"from\": [0,0,1], "
        "\"to\": [1,1,1], \"steps\": 4}}");
    g_assert_true(has_code(o, "open-surface"));
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(o, "warnings")), ==, 1);
    JsonObject *p = json_array_get_object_element(json_object_get_array_member(o, "points"), 0);
    g_assert_false(json_object_get_boolean_member(json_object_get_object_member(p, "heavy"),
                                                  "closed"));
    g_assert_true(JSON_NODE_HOLDS_NULL(json_object_get_member(
        json_object_get_object_member(p, "heavy"), "central_cyclotron_mass_me")));
}

static void test_holes_bad(void)
{
    op_expect_invalid("cyclotron-holes", "{\"luttinger_parameters\": [6, 2], "
                      "\"field_direction\": [1,0,0]}", "3 numbers");
    op_expect_invalid("cyclotron-holes", "{\"luttinger_parameters\": [6, 2, 2], "
                      "\"field_direction\": [0,0,0]}", "zero length");
    op_expect_invalid("cyclotron-holes", "{\"field_direction\": [1,0,0]}",
                      "luttinger_parameters");
    op_expect_invalid("cyclotron-holes", "{\"luttinger_parameters\": [-1, 2, 2], "
                      "\"field_direction\": [1,0,0]}", "gamma1");
    op_expect_invalid("cyclotron-holes", "{\"luttinger_parameters\": [6, 2, 2], "
                      "\"field_direction\": [1,0,0], \"hole_energy_ev\": 0}", "hole_energy_ev");
}

/* The free electron resonates at 27.9925 GHz per tesla (e / 2 pi m_e, CODATA;
 * tests/reference/README): a peak there at 1 T is m_e, and the inverses
 * return the field and frequency. */
static void test_resonance(void)
{
    g_autoptr(JsonObject) r = op_call("resonance", "{\"frequency_ghz\": 27.9925, \"field_t\": 1}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "cyclotron_mass_me"), 1.0,
                                   2e-6);
    g_assert_cmpstr(json_object_get_string_member(r, "mode"), ==, "peak");
    g_autoptr(JsonObject) e = op_call("resonance", "{\"frequency_ghz\": 35, \"field_t\": 0.0837, "
                                      "\"frequency_stderr_ghz\": 0.35}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(e, "cyclotron_mass_stderr_me"),
                                   0.01 * json_object_get_double_member(e, "cyclotron_mass_me"),
                                   1e-12);
    g_autoptr(JsonObject) i = op_call("resonance", "{\"cyclotron_mass_me\": 0.067, "
                                      "\"frequency_ghz\": 94}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(i, "field_t"),
                                   0.067 * 94 / 27.9925, 1e-5);
    g_autoptr(JsonObject) j = op_call("resonance", "{\"cyclotron_mass_me\": 1, \"field_t\": 2}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(j, "frequency_ghz"),
                                   2 * 27.9925, 1e-4);
    /* exact points on f = B e / (2 pi 0.067 m_e): the mass, zero residuals */
    g_autofree char *req = g_strdup_printf("{\"frequency_ghz\": [%.17g, %.17g, %.17g], "
                                           "\"field_t\": [0.5, 1.0, 1.5]}",
                                           0.5 * BM_CYCLOTRON_GHZ_PER_T / 0.067,
                                           1.0 * BM_CYCLOTRON_GHZ_PER_T / 0.067,
                                           1.5 * BM_CYCLOTRON_GHZ_PER_T / 0.067);
    g_autoptr(JsonObject) f = op_call("resonance", req);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(f, "cyclotron_mass_me"), 0.067,
                                   1e-12);
    g_assert_cmpstr(json_object_get_string_member(f, "mode"), ==, "line-fit");
    g_assert_true(json_object_has_member(json_object_get_object_member(f, "fit"),
                                         "residuals_ghz"));
}

static void test_resonance_bad(void)
{
    op_expect_invalid("resonance", "{\"frequency_ghz\": [10, 20], \"field_t\": [1]}",
                      "one frequency per field");
    op_expect_invalid("resonance", "{\"frequency_ghz\": [10], \"field_t\": [1]}",
                      "1 points for 1 parameters");
    op_expect_invalid("resonance", "{\"frequency_ghz\": -3, \"field_t\": 1}", "frequency_ghz");
    op_expect_invalid("resonance", "{\"frequency_ghz\": 30}", "give two of");
    op_expect_invalid("resonance", "{\"frequency_ghz\": [10, 20], \"field_t\": [1, 1]}",
                      "two different fields");
}

/* Temperature damping X / sinh X, X = 14.69 p m T / B (Shoenberg 1984, from
 * memory): exact synthetic amplitudes give the mass; the Dingle fit of exact
 * field-dependent amplitudes (B^(1/2) prefactor) gives T_D. */
static void test_damping(void)
{
    double m = 0.12, b = 6.0, td = 1.5, t0 = 2.0;
    GString *q = g_string_new("{\"field_t\": 6, \"temperatures_k\": [1, 2, 3, 4, 6, 8], "
                              "\"amplitudes\": [");
    const double ts[6] = {1, 2, 3, 4, 6, 8};
    for (int i = 0; i < 6; i++) {
        double x = BM_LK_K_PER_T * m * ts[i] / b;
        g_string_append_printf(q, "%s%.17g", i ? ", " : "", 5.0 * x / sinh(x));
    }
    g_string_append(q, "], \"dingle\": {\"temperature_k\": 2, \"field_power\": 0.5, "
                       "\"fields_t\": [3, 4, 5, 6, 8], \"amplitudes\": [");
    const double bs[5] = {3, 4, 5, 6, 8};
    for (int i = 0; i < 5; i++) {
        double x = BM_LK_K_PER_T * m * t0 / bs[i];
        g_string_append_printf(q, "%s%.17g", i ? ", " : "",
                               sqrt(bs[i]) * x / sinh(x) * exp(-BM_LK_K_PER_T * m * td / bs[i]));
    }
    g_string_append(q, "]}}");
    g_autoptr(JsonObject) r = op_call("oscillation-damping", q->str);
    g_string_free(q, TRUE);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "cyclotron_mass_me"), m, 1e-9);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "amplitude_prefactor"), 5.0,
                                   1e-8);
    JsonObject *d = json_object_get_object_member(r, "dingle");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(d, "dingle_temperature_k"), td,
                                   1e-7);
    g_assert_cmpstr(json_object_get_string_member(d, "mass_source"), ==,
                    "the temperature fit of this request");
    /* a Fourier window: X at the effective field 2 / (1/B1 + 1/B2) */
    g_autoptr(JsonObject) w = op_call("oscillation-damping",
        "{\"field_range_t\": [4, 12], \"temperatures_k\": [1, 2, 3], "
        "\"amplitudes\": [1, 0.8, 0.5]}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(w, "field_t"), 6.0, 1e-12);
}

static void test_damping_bad(void)
{
    op_expect_invalid("oscillation-damping", "{\"field_t\": 6, \"temperatures_k\": [1, 2, 3], "
                      "\"amplitudes\": [1, 0, 0.5]}", "amplitudes[1]");
    op_expect_invalid("oscillation-damping", "{\"field_t\": 6, \"temperatures_k\": [1], "
                      "\"amplitudes\": [1]}", "2 parameters");
    op_expect_invalid("oscillation-damping", "{\"field_t\": 6, \"temperatures_k\": [1, 2], "
                      "\"amplitudes\": [1, 0.5, 0.2]}", "one amplitude per temperature");
    op_expect_invalid("oscillation-damping", "{\"temperatures_k\": [1, 2], "
                      "\"amplitudes\": [1, 0.5]}", "field_t");
    op_expect_invalid("oscillation-damping", "{\"field_t\": 6, \"temperatures_k\": [1, 2, 3], "
                      "\"amplitudes\": [1, 1.2, 1.4]}", "do not fall");
    op_expect_invalid("oscillation-damping", "{\"dingle\": {\"fields_t\": [3, 4], "
                      "\"amplitudes\": [1, 2], \"temperature_k\": 2, \"field_power\": 0.5}}",
                      "needs the mass");
    op_expect_invalid("oscillation-damping", "{\"cyclotron_mass_me\": 0.1, \"dingle\": "
                      "{\"fields_t\": [3, 4], \"amplitudes\": [1, 2], \"temperature_k\": 2}}",
                      "field_power");
    op_expect_invalid("oscillation-damping", "{\"field_t\": 6, \"temperatures_k\": [1, 2, 3], "
                      "\"amplitudes\": [1, 0.8, 0.5], \"harmonic\": 0}", "harmonic");
}

/* Kittel, Introduction to Solid State Physics, 8th ed., ch. 6 (from memory):
 * Cu gamma 0.695 against the free-electron 0.505 mJ mol^-1 K^-2 (ratio 1.38)
 * with E_F = 7.00 eV; the same from n = 8.47e22 cm^-3 and the molar volume
 * 63.546 / 8.96 cm^3 (Cu molar mass and density; common practice, no source). */
static void test_specific_heat(void)
{
    g_autoptr(JsonObject) r = op_call("specific-heat-mass",
        "{\"gamma_mj_per_mol_k2\": 0.695, \"fermi_energy_ev\": 7.0, \"electrons_per_atom\": 1}");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "thermal_mass_ratio"), 1.38,
                                   0.01);
    g_assert_cmpfloat_with_epsilon(
        json_object_get_double_member(r, "free_electron_gamma_mj_per_mol_k2"), 0.505, 0.003);
    g_autofree char *req = g_strdup_printf("{\"gamma_mj_per_mol_k2\": 0.695, "
                                           "\"electron_density_cm3\": 8.47e22, "
                                           "\"molar_volume_cm3\": %.10g}", 63.546 / 8.96);
    g_autoptr(JsonObject) n = op_call("specific-heat-mass", req);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(n, "electrons_per_formula_unit"),
                                   1.0, 0.01);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(n, "fermi_energy_ev"), 7.0, 0.05);
    g_assert_true(json_object_has_member(n, "dos_at_fermi_level_per_ev_cm3"));
    /* heat-capacity data C = gamma T + beta T^3 (exact): gamma back */
    g_autoptr(JsonObject) f = op_call("specific-heat-mass",
        "{\"temperatures_k\": [1, 2, 3, 4], \"heat_capacity_mj_per_mol_k\": "
        "[0.7431, 1.7748, 3.3837, 5.8584], \"fermi_energy_ev\": 7.0, \"electrons_per_atom\": 1}");
    /* 0.695 T + 0.0481 T^3 at T = 1..4 */
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(f, "gamma_mj_per_mol_k2"), 0.695,
                                   1e-3);
    JsonObject *fit = json_object_get_object_member(f, "fit");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(fit, "beta_mj_per_mol_k4"),
                                   0.0481, 1e-4);
    /* heavy-fermion territory is said */
    g_autoptr(JsonObject) h = op_call("specific-heat-mass",
        "{\"gamma_mj_per_mol_k2\": 500, \"fermi_energy_ev\": 5, \"electrons_per_atom\": 1}");
    g_assert_true(has_code(h, "mass-out-of-range"));
}

static void test_specific_heat_bad(void)
{
    op_expect_invalid("specific-heat-mass", "{\"gamma_mj_per_mol_k2\": 1, "
                      "\"temperatures_k\": [1, 2], \"heat_capacity_mj_per_mol_k\": [1, 2], "
                      "\"fermi_energy_ev\": 7, \"electrons_per_atom\": 1}", "one of the two");
    op_expect_invalid("specific-heat-mass", "{\"gamma_mj_per_mol_k2\": 1}", "fermi_energy_ev");
    op_expect_invalid("specific-heat-mass", "{\"gamma_mj_per_mol_k2\": 1, "
                      "\"electron_density_cm3\": 1e22}", "molar_volume_cm3");
    op_expect_invalid("specific-heat-mass", "{\"temperatures_k\": [1, 2, 3], "
                      "\"heat_capacity_mj_per_mol_k\": [1, 2], \"fermi_energy_ev\": 7, "
                      "\"electrons_per_atom\": 1}", "one heat capacity per temperature");
    op_expect_invalid("specific-heat-mass", "{\"gamma_mj_per_mol_k2\": -1, "
                      "\"fermi_energy_ev\": 7, \"electrons_per_atom\": 1}", "gamma_mj_per_mol_k2");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/cyclotron-ops/ellipsoid", test_ellipsoid);
    g_test_add_func("/cyclotron-ops/ellipsoid-bad", test_ellipsoid_bad);
    g_test_add_func("/cyclotron-ops/holes", test_holes);
    g_test_add_func("/cyclotron-ops/holes-bad", test_holes_bad);
    g_test_add_func("/cyclotron-ops/resonance", test_resonance);
    g_test_add_func("/cyclotron-ops/resonance-bad", test_resonance_bad);
    g_test_add_func("/cyclotron-ops/damping", test_damping);
    g_test_add_func("/cyclotron-ops/damping-bad", test_damping_bad);
    g_test_add_func("/cyclotron-ops/specific-heat", test_specific_heat);
    g_test_add_func("/cyclotron-ops/specific-heat-bad", test_specific_heat_bad);
    return g_test_run();
}
