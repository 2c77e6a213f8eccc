/* test-valley-ops.c: the valley-average and hole-mass operations through the
 * registry's JSON path: Si and Ge stars, strained Si, holes, bad input. */
#include "op-test.h"
#include <math.h>
#include <string.h>

#include "registry.h"
#include "render.h"


/* Si X valleys m_l = 0.98, m_t = 0.19 (Sze & Ng 2007, Appendix G; from
 * memory): 6 valleys, conductivity mass 3/(1/m_l + 2/m_t) = 0.2598, DOS mass
 * 6^(2/3) (m_l m_t^2)^(1/3) = 1.084 (textbook formulas). */
static void test_silicon(void)
{
    g_autoptr(JsonObject) r = op_call("valley-average",
        "{\"valley\": {\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": 0.19,"
        " \"axis\": [1,0,0]}, \"point_group\": \"Oh\", \"position\": \"interior\"}");
    g_assert_cmpfloat(json_object_get_double_member(r, "valley_count"), ==, 6.0);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "conductivity_mass_me"),
                                   3.0 / (1 / 0.98 + 2 / 0.19), 1e-12);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r, "dos_mass_me"), 1.084, 5e-4);
    g_assert_true(json_object_get_boolean_member(r, "conductivity_isotropic"));
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(r, "valleys")), ==, 6);
}

/* Ge L valleys m_l = 1.64, m_t = 0.082 (Sze & Ng; from memory): 8 face
 * half-valleys count 4; DOS mass 0.55-0.56. */
/* A numerical valley direction 1e-4 off [100] (an extremum of mass-tensor):
 * snapped onto the four-fold axis within its stated error, so the star is
 * silicon's six valleys (common practice, no source), not the 24 of a general
 * direction; the response says by how much it turned. */
static void test_snapped_extremum(void)
{
    const char *valley = "{\"kind\": \"minimum\", \"dims\": 3, \"principal_masses_me\": "
        "[0.19, 0.19, 0.98], \"principal_axes\": [[0,1,0],[0,0,1],[1,0,0]], "
        "\"k_inv_angstrom\": [0.977, 0.0001, 0], \"k_error_inv_angstrom\": %s}";
    g_autofree char *v1 = g_strdup_printf(valley, "0.001");
    g_autofree char *r1 = g_strdup_printf("{\"valley\": %s, \"point_group\": \"Oh\"}", v1);
    g_autoptr(JsonObject) a = op_call("valley-average", r1);
    g_assert_cmpfloat(json_object_get_double_member(a, "valley_count"), ==, 6.0);
    JsonObject *sn = json_object_get_object_member(a, "direction_snapped");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(sn, "angle_rad"), 1e-4 / 0.977,
                                   1e-7);
    /* a direction off by more than its error is a general one: 24 positions */
    g_autofree char *v2 = g_strdup_printf(valley, "0.000001");
    g_autofree char *r2 = g_strdup_printf("{\"valley\": %s, \"point_group\": \"Oh\"}", v2);
    g_autoptr(JsonObject) b = op_call("valley-average", r2);
    g_assert_cmpfloat(json_object_get_double_member(b, "valley_count"), ==, 24.0);
}

static void test_germanium(void)
{
    g_autoptr(JsonObject) r = op_call("valley-average",
        "{\"valley\": {\"longitudinal_mass_me\": 1.64, \"transverse_mass_me\": 0.082,"
        " \"axis\": [1,1,1]}, \"point_group\": \"m-3m\", \"position\": \"face\"}");
    g_assert_cmpfloat(json_object_get_double_member(r, "valley_count"), ==, 4.0);
    double md = json_object_get_double_member(r, "dos_mass_me");
    g_assert_cmpfloat(md, >=, 0.55);
    g_assert_cmpfloat(md, <=, 0.565);
}

/* Strained Si, [001] pair lowered by 0.1 eV at 300 K: the pair holds
 * 2 e^x / (2 e^x + 4) of the electrons, x = 0.1 eV / kT (Boltzmann), and the
 * in-plane conductivity mass lies between m_t and the unstrained value. */
static JsonObject *strained(const char *population)
{
    GString *req = g_string_new("{\"temperature_k\": 300, ");
    g_string_append_printf(req, "%s, \"valleys\": [", population);
    const char *ax[6] = {"[1,0,0]", "[-1,0,0]", "[0,1,0]", "[0,-1,0]", "[0,0,1]", "[0,0,-1]"};
    for (int i = 0; i < 6; i++)
        g_string_append_printf(req, "%s{\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": "
                               "0.19, \"axis\": %s, \"energy_offset_ev\": %s}", i ? "," : "",
                               ax[i], i >= 4 ? "-0.1" : "0");
    g_string_append(req, "]}");
    JsonObject *r = op_call("valley-average", req->str);
    g_string_free(req, TRUE);
    return r;
}

/* The population of the lowered [001] pair. */
static double pair_population(JsonObject *r)
{
    JsonArray *v = json_object_get_array_member(r, "valleys");
    return json_object_get_double_member(json_array_get_object_element(v, 4),
                                         "population_fraction")
         + json_object_get_double_member(json_array_get_object_element(v, 5),
                                         "population_fraction");
}

static double strained_pair(const char *population)
{
    g_autoptr(JsonObject) r = strained(population);
    return pair_population(r);
}

/* Fermi-Dirac populations (the default statistics) with the Fermi level 0.5 eV
 * below the lowest edge (eta about -19) equal the Boltzmann ones: F_1/2(eta)
 * = exp(eta) (1 - exp(eta) / 2^(3/2) + ...) far below zero (series of the
 * complete Fermi-Dirac integral, DLMF 25.12.14 normalisation; identity). */
static void test_strained_fermi_dirac_limit(void)
{
    double b = strained_pair("\"statistics\": \"boltzmann\"");
    double f = strained_pair("\"fermi_level_ev\": -0.6");
    g_assert_cmpfloat_with_epsilon(f, b, 1e-7);
}

static void test_strained(void)
{
    g_autoptr(JsonObject) r = strained("\"statistics\": \"boltzmann\"");
    double pair = pair_population(r);
    /* k_B in eV/K, CODATA 2018; GSL's headers carry an earlier CODATA set that
     * differs in the sixth digit, hence the tolerance */
    double x = 0.1 / (8.617333262e-5 * 300.0);
    g_assert_cmpfloat_with_epsilon(pair, 2 * exp(x) / (2 * exp(x) + 4), 1e-6);
    g_assert_false(json_object_get_boolean_member(r, "conductivity_isotropic"));
    JsonArray *m = json_object_get_array_member(r, "conductivity_principal_masses_me");
    double mxx = json_array_get_double_element(m, 0);
    g_assert_cmpfloat(mxx, >, 0.19);
    g_assert_cmpfloat(mxx, <, 3.0 / (1 / 0.98 + 2 / 0.19));
}

/* GaAs gamma = (6.98, 2.06, 2.93) (Vurgaftman, Meyer & Ram-Mohan, J. Appl.
 * Phys. 89, 5815 (2001); from memory): [100] heavy 0.350, light 0.0901,
 * [111] heavy 0.893. Si m_hh = 0.49, m_lh = 0.16: (0.49^1.5 + 0.16^1.5)^(2/3). */
static void test_holes(void)
{
    g_autoptr(JsonObject) r = op_call("hole-mass",
        "{\"luttinger_parameters\": [6.98, 2.06, 2.93], \"heavy_hole_mass_me\": 0.49,"
        " \"light_hole_mass_me\": 0.16}");
    JsonObject *l = json_object_get_object_member(r, "luttinger");
    JsonObject *h = json_object_get_object_member(l, "heavy_hole_mass_me");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(h, "100"), 0.350, 5e-4);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(h, "111"), 0.893, 5e-4);
    JsonObject *lh = json_object_get_object_member(l, "light_hole_mass_me");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(lh, "100"), 0.0901, 5e-5);
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(r,
                                       "parabolic_hole_dos_mass_me"),
                                   pow(pow(0.49, 1.5) + pow(0.16, 1.5), 2.0 / 3.0), 1e-12);

    /* open heavy-hole surface: null DOS mass and a warning, never NaN */
    g_autoptr(JsonObject) o = op_call("hole-mass", "{\"luttinger_parameters\": [3, 1, 2]}");
    JsonObject *ol = json_object_get_object_member(o, "luttinger");
    g_assert_true(json_object_get_null_member(ol, "heavy_hole_dos_mass_me"));
    g_assert_true(json_object_get_null_member(o, "band_edge_hole_dos_mass_me"));
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(o, "warnings")), >=, 1);
}

static void test_bad_input(void)
{
    const char *si = "{\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": 0.19,"
                     " \"axis\": [1,0,0]}";
    g_autofree char *r1 = g_strdup_printf("{\"valley\": %s, \"point_group\": \"C5v\"}", si);
    op_expect_invalid("valley-average", r1, "point_group");
    g_autofree char *r2 = g_strdup_printf("{\"valley\": %s}", si);
    op_expect_invalid("valley-average", r2, "point_group");
    g_autofree char *r3 = g_strdup_printf("{\"valley\": %s, \"point_group\": \"Oh\", "
                                          "\"position\": \"edge\"}", si);
    op_expect_invalid("valley-average", r3, "position");
    op_expect_invalid("valley-average",
                   "{\"valley\": {\"longitudinal_mass_me\": 0, \"transverse_mass_me\": 0.19,"
                   " \"axis\": [1,0,0]}, \"point_group\": \"Oh\"}", "longitudinal mass");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0.2,0],[0,1,0],[0,0,1]]}]}", "valleys[0]");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]], \"energy_offset_ev\": 0.1},"
                   " {\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}]}", "temperature_k");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]], \"energy_offset_ev\": 0.1},"
                   " {\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}], \"temperature_k\": 0,"
                   " \"statistics\": \"boltzmann\"}", "0 K");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4], \"colour\": 1,"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}]}", "colour");
    /* the default statistics (fermi-dirac) need a Fermi level for thermal populations */
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}], \"temperature_k\": 300}",
                   "\"fermi_level_ev\"");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}], \"statistics\": \"maxwell\"}",
                   "key \"statistics\" must be one of fermi-dirac, boltzmann");
    op_expect_invalid("valley-average",
                   "{\"valleys\": [{\"principal_masses_me\": [0.2, 0.3, 0.4],"
                   " \"axes\": [[1,0,0],[0,1,0],[0,0,1]]}], \"fermi_level_ev\": 0.1}",
                   "\"fermi_level_ev\" needs \"temperature_k\"");
    op_expect_invalid("hole-mass", "{}", "luttinger_parameters");
    op_expect_invalid("hole-mass", "{\"luttinger_parameters\": [1, 2]}", "3 numbers");
    op_expect_invalid("hole-mass", "{\"heavy_hole_mass_me\": -0.5, \"light_hole_mass_me\": 0.16}",
                   "key \"heavy_hole_mass_me\" must be > 0 m_e");
}

/* The readable view shows the response's numbers, and "-" (never "nan") for
 * the DOS mass of an open heavy-hole surface. GaAs [100] heavy hole
 * 1/(g1 - 2 g2) = 0.3497 (Vurgaftman et al. 2001 parameters, from memory). */
static void test_hole_render(void)
{
    const BmOperation *op = bm_registry_lookup("hole-mass");
    g_autoptr(JsonObject) r = op_call("hole-mass", "{\"luttinger_parameters\": [6.98, 2.06, 2.93]}");
    g_autoptr(GString) out = g_string_new(NULL);
    bm_cli_render(op, r, out);
    g_assert_nonnull(strstr(out->str, "0.3497"));
    g_autoptr(JsonObject) open = op_call("hole-mass", "{\"luttinger_parameters\": [4, 2.5, 2.5]}");
    g_autoptr(GString) out2 = g_string_new(NULL);
    bm_cli_render(op, open, out2);
    g_assert_null(strstr(out2->str, "nan"));
    g_assert_nonnull(strstr(out2->str, "         -"));
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/plugin/valley-average/silicon", test_silicon);
    g_test_add_func("/plugin/valley-average/germanium", test_germanium);
    g_test_add_func("/plugin/valley-average/snapped-extremum", test_snapped_extremum);
    g_test_add_func("/plugin/valley-average/strained-fermi-dirac-limit",
                    test_strained_fermi_dirac_limit);
    g_test_add_func("/plugin/valley-average/strained", test_strained);
    g_test_add_func("/plugin/hole-mass/values", test_holes);
    g_test_add_func("/plugin/hole-mass/render", test_hole_render);
    g_test_add_func("/plugin/valley-ops/bad-input", test_bad_input);
    return g_test_run();
}
