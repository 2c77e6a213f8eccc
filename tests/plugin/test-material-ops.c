/* test-material-ops.c: valley-average and hole-mass given a material (built-in
 * name, inline object, JSON file) through the registry's JSON path. */
#include "op-test.h"
#include <glib.h>
#include <glib/gstdio.h>
#include <math.h>
#include <string.h>

#include "registry.h"
#include "bm-json.h"
#include "bm-materials.h"


static double num(JsonObject *o, const char *key)
{
    return json_object_get_double_member(o, key);
}

static const bm_material *table(const char *name)
{
    const bm_material *m = bm_material_find(name, NULL);
    g_assert_nonnull(m);
    return m;
}

static JsonObject *valleys_of(const char *material)
{
    g_autofree char *req = g_strdup_printf("{\"material\": \"%s\"}", material);
    return op_call("valley-average", req);
}

/* Si: six Delta valleys.  Against the table's own masses through the textbook
 * formulas m_c = 3 / (1/m_l + 2/m_t) and m_d = N_v^(2/3) (m_l m_t^2)^(1/3), and
 * against the published values m_c 0.26 and m_d 1.08 (Sze & Ng 2007, App. G;
 * from memory; the table's 0.98 / 0.19 are from the same source). */
static void test_silicon(void)
{
    const bm_valley_info *v = &table("Si")->electron;
    g_autoptr(JsonObject) r = valleys_of("Si");
    g_assert_cmpfloat(num(r, "valley_count"), ==, 6.0);
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(r, "valleys")), ==, 6);
    double mc = 3.0 / (1.0 / v->m_longitudinal + 2.0 / v->m_transverse);
    double md = pow(6.0, 2.0 / 3.0) * cbrt(v->m_longitudinal * v->m_transverse * v->m_transverse);
    g_assert_cmpfloat_with_epsilon(num(r, "conductivity_mass_me"), mc, 1e-12);
    g_assert_cmpfloat_with_epsilon(num(r, "dos_mass_me"), md, 1e-12);
    g_assert_cmpfloat_with_epsilon(num(r, "conductivity_mass_me"), 0.2598, 1e-4);
    g_assert_cmpfloat(fabs(num(r, "conductivity_mass_me") - 0.26), <, 0.005);
    g_assert_cmpfloat(fabs(num(r, "dos_mass_me") / 1.08 - 1.0), <, 0.005);
    g_assert_true(json_object_get_boolean_member(r, "conductivity_isotropic"));
    g_assert_cmpstr(json_object_get_string_member(r, "material"), ==, "Si");
    g_assert_cmpstr(json_object_get_string_member(r, "valley_source"), ==, v->source);
    g_assert_cmpstr(json_object_get_string_member(r, "point_group"), ==, "Oh");
    g_assert_cmpstr(json_object_get_string_member(r, "position"), ==, "interior");
}

/* Ge: eight L half-valleys = 4; GaAs: one Gamma valley whose DOS and
 * conductivity masses are the valley mass (textbook; METHODS, valley stars). */
static void test_germanium_gaas(void)
{
    g_autoptr(JsonObject) ge = valleys_of("Ge");
    g_assert_cmpfloat(num(ge, "valley_count"), ==, 4.0);
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(ge, "valleys")), ==, 8);
    g_autoptr(JsonObject) gaas = valleys_of("GaAs");
    g_assert_cmpfloat(num(gaas, "valley_count"), ==, 1.0);
    g_assert_cmpstr(json_object_get_string_member(gaas, "position"), ==, "gamma");
    double m = table("GaAs")->electron.m_longitudinal;
    g_assert_cmpfloat_with_epsilon(num(gaas, "dos_mass_me"), m, 1e-12);
    g_assert_cmpfloat_with_epsilon(num(gaas, "conductivity_mass_me"), m, 1e-12);
}

/* Every built-in material: the star count is the table's, and where the
 * table's electron DOS mass is marked derived (N_v^(2/3) (m_l m_t1 m_t2)^(1/3))
 * the operation reproduces it to the table's 3-digit rounding. */
static void test_every_builtin(void)
{
    for (size_t i = 0; i < bm_material_count(); i++) {
        const bm_material *m = bm_material_at(i);
        g_autoptr(JsonObject) r = valleys_of(m->name);
        g_assert_cmpfloat(num(r, "valley_count"), ==, m->electron.valleys);
        if (strstr(m->electron_dos_mass.source, "derived"))
            g_assert_cmpfloat(fabs(num(r, "dos_mass_me") / m->electron_dos_mass.value - 1.0),
                              <, 2e-3);
    }
}

/* 4H-SiC (masses 0.58 along Gamma-M, 0.31 along M-K, 0.33 along c: Volm et
 * al. 1996, from memory): averaging the inverse mass over three M directions
 * 60 degrees apart gives <cos^2> = 1/2 in the basal plane (identity), so the
 * conductivity masses are 2 / (1/0.58 + 1/0.31) in the plane and 0.33 along c. */
static void test_hexagonal(void)
{
    const bm_valley_info *v = &table("4H-SiC")->electron;
    g_autoptr(JsonObject) r = valleys_of("4H-SiC");
    g_assert_cmpfloat(num(r, "valley_count"), ==, 3.0);
    JsonArray *m = json_object_get_array_member(r, "conductivity_principal_masses_me");
    double plane = 2.0 / (1.0 / v->m_longitudinal + 1.0 / v->m_transverse);
    g_assert_cmpfloat_with_epsilon(json_array_get_double_element(m, 0), v->m_transverse2, 1e-12);
    g_assert_cmpfloat_with_epsilon(json_array_get_double_element(m, 1), plane, 1e-12);
    g_assert_cmpfloat_with_epsilon(json_array_get_double_element(m, 2), plane, 1e-12);
    g_autoptr(JsonObject) gan = valleys_of("GaN");
    g_assert_cmpfloat(num(gan, "valley_count"), ==, 1.0);
}

/* The response without the members naming the material, as text. */
static char *numbers_only(JsonObject *r)
{
    json_object_remove_member(r, "material");
    json_object_remove_member(r, "valley_source");
    g_autoptr(JsonNode) n = json_node_init_object(json_node_alloc(), r);
    return bm_json_to_string(n, FALSE);
}

/* A user file with Si's values answers exactly as "Si" (round trip); the same
 * object inline does too. */
static void test_user_file(void)
{
    const bm_valley_info *v = &table("Si")->electron;
    g_autofree char *obj = g_strdup_printf(
        "{\"name\": \"my-si\", \"point_group\": \"Oh\", \"conduction_valley\": "
        "{\"position\": \"interior\", \"direction\": [1, 0, 0], \"longitudinal_mass_me\": %.17g,"
        " \"transverse_mass_me\": %.17g, \"source\": \"my notes\"}}",
        v->m_longitudinal, v->m_transverse);
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-valley-XXXXXX", &error);
    g_assert_no_error(error);
    g_autofree char *path = g_build_filename(dir, "my-si.json", NULL);
    g_assert_true(g_file_set_contents(path, obj, -1, NULL));
    g_autofree char *req = g_strdup_printf("{\"material\": \"%s\"}", path);
    g_autoptr(JsonObject) f = op_call("valley-average", req);
    g_assert_cmpstr(json_object_get_string_member(f, "material"), ==, "my-si");
    g_assert_cmpstr(json_object_get_string_member(f, "valley_source"), ==, "my notes");
    g_autofree char *req2 = g_strdup_printf("{\"material\": %s}", obj);
    g_autoptr(JsonObject) i = op_call("valley-average", req2);
    g_autoptr(JsonObject) s = valleys_of("Si");
    g_autofree char *ft = numbers_only(f), *it = numbers_only(i), *st = numbers_only(s);
    g_assert_cmpstr(ft, ==, st);
    g_assert_cmpstr(it, ==, st);
    g_remove(path);
    g_rmdir(dir);
}

static void test_valley_bad_input(void)
{
    const char *op = "valley-average";
    op_expect_invalid(op, "{\"material\": \"Si\", \"valley\": {\"longitudinal_mass_me\": 1,"
                   " \"transverse_mass_me\": 0.2, \"axis\": [1,0,0]}, \"point_group\": \"Oh\"}",
                   "got \"valley\" and \"material\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"valleys\": []}", "\"valleys\" and \"material\"");
    op_expect_invalid(op, "{\"material\": \"Si\", \"point_group\": \"D4h\"}", "point_group");
    op_expect_invalid(op, "{\"material\": {\"name\": \"bare\", \"point_group\": \"Oh\"}}",
                   "material \"bare\"");
    op_expect_invalid(op, "{\"material\": {\"name\": \"nogroup\", \"conduction_valley\":"
                   " {\"position\": \"gamma\", \"longitudinal_mass_me\": 0.1,"
                   " \"transverse_mass_me\": 0.1}}}", "material \"nogroup\" (given in the "
                   "request) has no point_group");
    op_expect_invalid(op, "{\"material\": {\"point_group\": \"Oh\", \"conduction_valley\":"
                   " {\"position\": \"interior\", \"longitudinal_mass_me\": 0.1,"
                   " \"transverse_mass_me\": 0.1}}}", "conduction_valley: key \"direction\"");
    op_expect_invalid(op, "{\"material\": {\"point_group\": \"Oh\", \"conduction_valley\":"
                   " {\"position\": \"edge\", \"direction\": [1,0,0], \"longitudinal_mass_me\": 1,"
                   " \"transverse_mass_me\": 0.1}}}", "key \"position\": must be gamma");
    op_expect_invalid(op, "{\"material\": {\"point_group\": \"Oh\", \"conduction_valley\":"
                   " {\"position\": \"gamma\", \"longitudinal_mass_me\": 0.1,"
                   " \"transverse_mass_me\": 0.1, \"colour\": 1}}}", "unknown key \"colour\"");
    op_expect_invalid(op, "{\"material\": {\"point_group\": \"C5v\", \"conduction_valley\":"
                   " {\"position\": \"gamma\", \"longitudinal_mass_me\": 0.1,"
                   " \"transverse_mass_me\": 0.1}}}", "point_group");
    op_expect_invalid(op, "{\"material\": {\"hue\": 1}}", "unknown key \"hue\"");
}

/* GaAs from the table: the Luttinger directional masses are 1/(g1 -+ 2 g2)
 * along [100] and 1/(g1 -+ 2 g3) along [111] (Luttinger, Phys. Rev. 102, 1030
 * (1956); identity, computed here from the table's own parameters); the band
 * DOS mass is (m_hh^1.5 + m_lh^1.5 + m_so^1.5 exp(-Delta/kT))^(2/3) (METHODS). */
static void test_holes_material(void)
{
    const bm_material *m = table("GaAs");
    const double g1 = m->luttinger[0], g2 = m->luttinger[1], g3 = m->luttinger[2];
    g_autoptr(JsonObject) r = op_call("hole-mass", "{\"material\": \"GaAs\"}");
    JsonObject *l = json_object_get_object_member(r, "luttinger");
    JsonObject *h = json_object_get_object_member(l, "heavy_hole_mass_me");
    JsonObject *lh = json_object_get_object_member(l, "light_hole_mass_me");
    g_assert_cmpfloat_with_epsilon(num(h, "100"), 1.0 / (g1 - 2 * g2), 1e-12);
    g_assert_cmpfloat_with_epsilon(num(h, "111"), 1.0 / (g1 - 2 * g3), 1e-12);
    g_assert_cmpfloat_with_epsilon(num(lh, "100"), 1.0 / (g1 + 2 * g2), 1e-12);
    g_assert_cmpfloat_with_epsilon(num(lh, "111"), 1.0 / (g1 + 2 * g3), 1e-12);
    /* k_B in eV/K (CODATA 2018; GSL's older set differs in the sixth digit) */
    double x = exp(-m->split_off_ev.value / (8.617333262e-5 * 300.0));
    double md = pow(pow(m->heavy_hole_mass.value, 1.5) + pow(m->light_hole_mass.value, 1.5)
                    + pow(m->split_off_mass.value, 1.5) * x, 2.0 / 3.0);
    g_assert_cmpfloat(fabs(num(r, "parabolic_hole_dos_mass_me") / md - 1.0), <, 1e-6);
    g_assert_cmpstr(json_object_get_string_member(r, "material"), ==, "GaAs");
    JsonObject *src = json_object_get_object_member(r, "inputs");
    g_assert_cmpstr(json_object_get_string_member(
        json_object_get_object_member(src, "luttinger_parameters"), "source"), ==,
        m->luttinger_source);

    /* an explicit key wins over the material's value, and says so */
    g_autoptr(JsonObject) o = op_call("hole-mass", "{\"material\": \"GaAs\", "
                                   "\"heavy_hole_mass_me\": 0.5, "
                                   "\"luttinger_parameters\": [7, 2, 3]}");
    double mo = pow(pow(0.5, 1.5) + pow(m->light_hole_mass.value, 1.5)
                    + pow(m->split_off_mass.value, 1.5) * x, 2.0 / 3.0);
    g_assert_cmpfloat(fabs(num(o, "parabolic_hole_dos_mass_me") / mo - 1.0), <, 1e-6);
    JsonObject *os = json_object_get_object_member(o, "inputs");
    JsonObject *hh = json_object_get_object_member(os, "heavy_hole_mass_me");
    g_assert_cmpstr(json_object_get_string_member(hh, "source"), ==, "request");
    g_assert_cmpfloat(num(hh, "value"), ==, 0.5);
    JsonObject *ol = json_object_get_object_member(o, "luttinger");
    g_assert_cmpfloat_with_epsilon(num(json_object_get_object_member(ol, "heavy_hole_mass_me"),
                                       "100"), 1.0 / (7.0 - 4.0), 1e-12);
}

/* Hole keys in a user object: a lone heavy/light pair gives
 * (m_hh^1.5 + m_lh^1.5)^(2/3) (METHODS); a material with no hole data is an
 * error naming it. */
static void test_holes_user_and_errors(void)
{
    g_autoptr(JsonObject) r = op_call("hole-mass", "{\"material\": {\"name\": \"mine\","
                                   " \"heavy_hole_mass_me\": 0.49, \"light_hole_mass_me\": 0.16}}");
    g_assert_cmpfloat_with_epsilon(num(r, "parabolic_hole_dos_mass_me"),
                                   pow(pow(0.49, 1.5) + pow(0.16, 1.5), 2.0 / 3.0), 1e-12);
    g_assert_false(json_object_has_member(r, "luttinger"));
    g_assert_false(json_object_has_member(r, "band_edge_hole_dos_mass_me"));
    JsonObject *hh = json_object_get_object_member(
        json_object_get_object_member(r, "inputs"), "heavy_hole_mass_me");
    g_assert_cmpstr(json_object_get_string_member(hh, "source"), ==, "given in the request");
    op_expect_invalid("hole-mass", "{\"material\": \"4H-SiC\"}", "material \"4H-SiC\"");
    op_expect_invalid("hole-mass", "{\"material\": {\"name\": \"half\", \"heavy_hole_mass_me\": 0.5}}",
                   "material \"half\"");
    op_expect_invalid("hole-mass", "{\"material\": {\"luttinger_parameters\": [1, 2]}}",
                   "3 numbers");
    op_expect_invalid("hole-mass", "{\"material\": {\"split_off_ev\": -0.1}}", "split_off_ev");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/plugin/material-ops/silicon", test_silicon);
    g_test_add_func("/plugin/material-ops/germanium-gaas", test_germanium_gaas);
    g_test_add_func("/plugin/material-ops/every-builtin", test_every_builtin);
    g_test_add_func("/plugin/material-ops/hexagonal", test_hexagonal);
    g_test_add_func("/plugin/material-ops/user-file", test_user_file);
    g_test_add_func("/plugin/material-ops/valley-bad-input", test_valley_bad_input);
    g_test_add_func("/plugin/material-ops/holes", test_holes_material);
    g_test_add_func("/plugin/material-ops/holes-user-and-errors", test_holes_user_and_errors);
    return g_test_run();
}
