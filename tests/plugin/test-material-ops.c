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
#include "material-input.h"


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

/* a and b hold the same members; numbers agree to a relative 1e-12 (the JSON
 * writer prints 17 significant digits, so they agree exactly today; the
 * tolerance allows for a writer that prints the shortest round-trip form),
 * strings are equal.  Returns the path of the first difference, or NULL. */
static char *differ(JsonNode *a, JsonNode *b, const char *path)
{
    if (JSON_NODE_TYPE(a) != JSON_NODE_TYPE(b))
        return g_strdup_printf("%s: node types differ", path);
    if (JSON_NODE_HOLDS_OBJECT(a)) {
        JsonObject *oa = json_node_get_object(a), *ob = json_node_get_object(b);
        if (json_object_get_size(oa) != json_object_get_size(ob))
            return g_strdup_printf("%s: member counts differ", path);
        g_autoptr(GList) keys = json_object_get_members(oa);
        for (GList *l = keys; l; l = l->next) {
            g_autofree char *p = g_strdup_printf("%s.%s", path, (char *)l->data);
            if (!json_object_has_member(ob, l->data))
                return g_strdup_printf("%s: missing", p);
            char *d = differ(json_object_get_member(oa, l->data),
                             json_object_get_member(ob, l->data), p);
            if (d)
                return d;
        }
        return NULL;
    }
    if (JSON_NODE_HOLDS_ARRAY(a)) {
        JsonArray *aa = json_node_get_array(a), *ab = json_node_get_array(b);
        if (json_array_get_length(aa) != json_array_get_length(ab))
            return g_strdup_printf("%s: lengths differ", path);
        for (guint i = 0; i < json_array_get_length(aa); i++) {
            g_autofree char *p = g_strdup_printf("%s[%u]", path, i);
            char *d = differ(json_array_get_element(aa, i), json_array_get_element(ab, i), p);
            if (d)
                return d;
        }
        return NULL;
    }
    if (JSON_NODE_HOLDS_NULL(a))
        return NULL;
    if (json_node_get_value_type(a) == G_TYPE_STRING)
        return strcmp(json_node_get_string(a), json_node_get_string(b))
            ? g_strdup_printf("%s: \"%s\" vs \"%s\"", path, json_node_get_string(a),
                              json_node_get_string(b)) : NULL;
    if (json_node_get_value_type(a) == G_TYPE_BOOLEAN)
        return json_node_get_boolean(a) != json_node_get_boolean(b)
            ? g_strdup_printf("%s: booleans differ", path) : NULL;
    double x = json_node_get_double(a), y = json_node_get_double(b);
    if (x == y || fabs(x - y) <= 1e-12 * fmax(fabs(x), fabs(y)))
        return NULL;
    return g_strdup_printf("%s: %.17g vs %.17g", path, x, y);
}

/* op with "material" set to the name and to the file: the same answer (or
 * both refused). */
static void same_answer(const char *op, const char *name, const char *path, const char *rest)
{
    g_autofree char *rn = g_strdup_printf("{\"material\": \"%s\"%s%s}", name,
                                          *rest ? ", " : "", rest);
    g_autofree char *rf = g_strdup_printf("{\"material\": \"%s\"%s%s}", path,
                                          *rest ? ", " : "", rest);
    g_autoptr(GError) en = NULL, ef = NULL;
    g_autofree char *an = bm_registry_call_json(op, rn, NULL, FALSE, &en);
    g_autofree char *af = bm_registry_call_json(op, rf, NULL, FALSE, &ef);
    if (!an) {
        g_assert_null(af);
        g_assert_nonnull(ef);
        return;
    }
    if (!af)
        g_error("%s for %s from its file failed: %s", op, name, ef->message);
    g_autoptr(JsonNode) nn = json_from_string(an, NULL);
    g_autoptr(JsonNode) nf = json_from_string(af, NULL);
    g_autofree char *where = g_strdup_printf("%s %s", op, name);
    g_autofree char *d = differ(nn, nf, where);
    if (d)
        g_error("file and built-in answers differ: %s", d);
}

/* Every built-in material: what "materials --name X" prints is a material file
 * that every material operation reads back to the same numbers (the same
 * answer as the name gives), and reading it writes the same material again. */
static void test_round_trip(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-roundtrip-XXXXXX", &error);
    g_assert_no_error(error);
    for (size_t i = 0; i < bm_material_count(); i++) {
        const bm_material *m = bm_material_at(i);
        g_autofree char *req = g_strdup_printf("{\"name\": \"%s\"}", m->name);
        g_autofree char *text = bm_registry_call_json("materials", req, NULL, TRUE, &error);
        g_assert_no_error(error);
        g_autofree char *file = g_strdup_printf("%s.json", m->name);
        g_autofree char *path = g_build_filename(dir, file, NULL);
        g_assert_true(g_file_set_contents(path, text, -1, NULL));

        char donor[160] = "";
        for (size_t k = 0; k < m->ndopants; k++)
            if (m->dopants[k].kind == BM_DOPANT_DONOR) {
                g_snprintf(donor, sizeof donor, ", {\"species\": \"%s\", "
                           "\"density_cm3\": 3e16}", m->dopants[k].element);
                break;
            }
        g_autofree char *carriers = g_strdup_printf(
            "\"temperatures_k\": [77, 300, 500], \"donors\": [{\"density_cm3\": 1e16, "
            "\"ionization_ev\": 0.03}%s], \"acceptors\": [{\"density_cm3\": 1e15, "
            "\"ionization_ev\": 0.05}]", donor);
        same_answer("carrier-statistics", m->name, path, carriers);
        same_answer("carrier-statistics", m->name, path,
                    "\"temperature_k\": 300, \"statistics\": \"boltzmann\"");
        same_answer("band-gap", m->name, path, "\"temperatures_k\": [0, 300, 600]");
        same_answer("valley-average", m->name, path, "");
        same_answer("hole-mass", m->name, path, "\"temperature_k\": 250");

        /* the codec: the file read back writes the same material object */
        g_autoptr(JsonNode) root = json_from_string(text, NULL);
        JsonObject *orig = json_node_get_object(root);
        json_object_remove_member(orig, "derived");
        json_object_remove_member(orig, "warnings");
        json_object_remove_member(orig, "warning_codes");
        g_autoptr(JsonObject) rq = json_object_new();
        json_object_set_string_member(rq, "material", path);
        BmMaterialInput in;
        g_assert_true(bm_material_input_read(rq, "material", &in, &error));
        g_assert_no_error(error);
        g_autoptr(JsonNode) again = json_node_init_object(json_node_alloc(),
                                                          bm_material_to_json(&in.mat));
        json_object_unref(json_node_get_object(again));
        g_autofree char *d = differ(root, again, m->name);
        if (d)
            g_error("material written, read and written again differs: %s", d);
        bm_material_input_clear(&in);
        g_remove(path);
    }
    g_rmdir(dir);
}

/* The band-edge k.p hole DOS mass of hole-mass against a direct quadrature of
 * m^(3/2) = < (g1 - R)^(-3/2) + (g1 + R)^(-3/2) >_sphere written here
 * independently (midpoint rule in theta and phi over the full sphere, 400 x
 * 800 points: error far below the 1e-4 asked), and the values expected of the
 * built-in parameters: GaAs about 0.63, Si 0.57..0.59. */
static double direct_band_edge(double g1, double g2, double g3)
{
    const int nt = 400, np = 800;
    double sum = 0.0, wsum = 0.0;
    for (int i = 0; i < nt; i++) {
        double th = (i + 0.5) * G_PI / nt, st = sin(th), ct = cos(th);
        for (int j = 0; j < np; j++) {
            double ph = (j + 0.5) * 2.0 * G_PI / np;
            double x = st * cos(ph), y = st * sin(ph), z = ct;
            double sq = x * x * y * y + y * y * z * z + z * z * x * x;
            double r = sqrt(4 * g2 * g2 + 12 * (g3 * g3 - g2 * g2) * sq);
            sum += st * (pow(g1 - r, -1.5) + pow(g1 + r, -1.5));
            wsum += st;
        }
    }
    return pow(sum / wsum, 2.0 / 3.0);
}

static void test_band_edge_mass(void)
{
    const char *names[] = { "GaAs", "Si" };
    for (size_t i = 0; i < G_N_ELEMENTS(names); i++) {
        const bm_material *m = table(names[i]);
        g_autofree char *req = g_strdup_printf("{\"material\": \"%s\"}", names[i]);
        g_autoptr(JsonObject) r = op_call("hole-mass", req);
        double v = num(r, "band_edge_hole_dos_mass_me");
        double want = direct_band_edge(m->luttinger[0], m->luttinger[1], m->luttinger[2]);
        g_test_message("%s: band-edge k.p hole DOS mass %.6f (direct quadrature %.6f)",
                       names[i], v, want);
        g_assert_cmpfloat(fabs(v / want - 1.0), <, 1e-4);
        g_assert_nonnull(strstr(json_object_get_string_member(
            json_object_get_object_member(r, "sources"), "band_edge_hole_dos_mass_me"),
            "k.p band edge"));
        /* the statistics mass is reported beside it, named apart */
        g_assert_true(json_object_has_member(r, "statistics_hole_dos_mass_me"));
        if (!strcmp(names[i], "GaAs"))
            g_assert_cmpfloat(fabs(v - 0.63), <, 0.01);   /* the value asked of GaAs */
        else
            g_assert_true(v > 0.57 && v < 0.59);           /* and of Si */
    }
    /* with a split-off band, the extra term m_so^1.5 exp(-Delta/kT) (METHODS) */
    g_autoptr(JsonObject) s = op_call("hole-mass", "{\"material\": \"Si\", "
                                      "\"temperature_k\": 300}");
    const bm_material *si = table("Si");
    double x = exp(-si->split_off_ev.value / (8.617333262e-5 * 300.0));
    double want = pow(pow(num(s, "band_edge_hole_dos_mass_me"), 1.5)
                      + pow(si->split_off_mass.value, 1.5) * x, 2.0 / 3.0);
    g_assert_cmpfloat(fabs(num(s, "band_edge_hole_dos_mass_with_split_off_me") / want - 1.0),
                      <, 1e-6);
}

/* Gap parameters beyond |Eg| <= 100 eV are refused by key when the material
 * is read (a gap of 1e308 eV once made the carrier solver fail to converge,
 * an internal error); a gap model that leaves the domain at some temperature
 * is refused naming the temperature. */
static void test_gap_domain(void)
{
    op_expect_invalid("band-gap", "{\"material\": {\"band_gap_ev\": {\"value\": 1e308}}, "
                      "\"temperature_k\": 300}", "key \"band_gap_ev\"");
    op_expect_invalid("carrier-statistics", "{\"material\": {\"varshni\": {\"eg0_ev\": 1e308, "
                      "\"alpha_ev_per_k\": 4.73e-4, \"beta_k\": 636}, \"electron_dos_mass_me\": "
                      "{\"value\": 1.09}, \"statistics_hole_dos_mass_me\": {\"value\": 1.15}}, "
                      "\"temperature_k\": 300}", "|Eg| <= 100 eV");
    op_expect_invalid("band-gap", "{\"material\": {\"varshni\": {\"eg0_ev\": 1.17, "
                      "\"alpha_ev_per_k\": 1e308, \"beta_k\": 636}}, \"temperature_k\": 300}",
                      "key \"temperature_k\"");
    /* at the edge of the domain the solver still answers */
    g_autoptr(JsonObject) r = op_call("band-gap", "{\"material\": {\"band_gap_ev\": "
                                      "{\"value\": 100}}, \"temperature_k\": 300}");
    g_assert_nonnull(r);
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
    g_test_add_func("/plugin/material-ops/round-trip", test_round_trip);
    g_test_add_func("/plugin/material-ops/band-edge-mass", test_band_edge_mass);
    g_test_add_func("/plugin/material-ops/gap-domain", test_gap_domain);
    return g_test_run();
}
