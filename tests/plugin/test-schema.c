/* test-schema.c: the operations' self-description holds: every request key's
 * table entry is consistent (defaults pass their own checks), and every
 * response of a set of representative requests has exactly the top-level
 * keys its operation declares (no undeclared key; every key not marked
 * optional present; every declared key seen in at least one response). */
#include <string.h>
#include <glib/gstdio.h>

#include "registry.h"
#include "bm-enums.h"
#include "bm-carriers.h"
#include "bm-materials.h"
#include "material-input.h"

typedef struct {
    const char *op;
    const char *dir;       /* NULL, BM_TEST_DATA_DIR or BM_EXAMPLES_DIR */
    const char *request;   /* JSON text, or the name of a request file in dir */
} Case;

#define DATA BM_TEST_DATA_DIR
#define EXAMPLES BM_EXAMPLES_DIR
#define SI_VALLEY "{\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": 0.19, " \
                  "\"axis\": [1, 0, 0]}"

static const Case cases[] = {
    { "constants", NULL, "{}" },
    { "mass-tensor", DATA, "{\"grid\": \"grid-small.json\", \"band\": 0}" },
    { "mass-tensor", EXAMPLES, "orte-arpes-mass.json" },
    { "mass-tensor", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"all\", "
                           "\"extremum\": \"minimum\"}" },
    /* a stencil that does not bracket the minimum: its estimate is beyond the data */
    { "mass-tensor", DATA, "{\"table\": \"first-principles/si-stencil-beyond.csv\", \"band\": \"c1\", \"extremum\": \"minimum\", \"stencil\": true}" },
    { "valley-average", NULL, "{\"valley\": " SI_VALLEY ", \"point_group\": \"Oh\", "
                              "\"position\": \"interior\"}" },
    { "valley-average", NULL, "{\"material\": \"Si\"}" },
    /* an extremum of mass-tensor, its direction 1e-4 off [100] (snapped) */
    { "valley-average", NULL, "{\"valley\": {\"kind\": \"minimum\", \"dims\": 3, "
                              "\"principal_masses_me\": [0.19, 0.19, 0.98], \"principal_axes\": "
                              "[[0,1,0],[0,0,1],[1,0,0]], \"k_inv_angstrom\": [0.977, 0.0001, 0], "
                              "\"k_error_inv_angstrom\": 0.001}, \"point_group\": \"Oh\"}" },
    /* a hole valley (negative masses) at Gamma */
    { "valley-average", NULL, "{\"valley\": {\"principal_masses_me\": [-0.5, -0.5, -0.5], "
                              "\"axes\": [[1,0,0],[0,1,0],[0,0,1]]}, \"point_group\": \"Oh\", "
                              "\"position\": \"gamma\"}" },
    { "valley-average", EXAMPLES, "strained-si-valleys.json" },
    /* strain with the built-in deformation potential, a (001) well */
    { "valley-average", NULL, "{\"material\": \"Si\", \"strain\": [[0.01,0,0],[0,0.01,0],"
                              "[0,0,-0.0077]], \"temperature_k\": 300, \"statistics\": "
                              "\"boltzmann\", \"confinement_miller\": [0,0,1], "
                              "\"well_width_nm\": 5}" },
    /* a material whose DOS mass carries an error */
    { "carrier-statistics", NULL, "{\"material\": {\"name\": \"Orvane-T\", \"band_gap_ev\": "
                                  "0.61, \"electron_dos_mass_me\": {\"value\": 0.42, "
                                  "\"error_me\": 0.02}, \"statistics_hole_dos_mass_me\": 0.55}, "
                                  "\"temperature_k\": 300}" },
    /* a star counted by zone shares, masses with errors */
    { "valley-average", NULL, "{\"valley\": {\"longitudinal_mass_me\": 0.98, "
                              "\"transverse_mass_me\": 0.19, \"axis\": [1,0,0], "
                              "\"k_inv_angstrom\": [0.98,0,0], \"longitudinal_mass_error_me\": "
                              "0.03, \"transverse_mass_error_me\": 0.01}, \"point_group\": "
                              "\"Oh\", \"lattice_angstrom\": [[0,2.7155,2.7155],"
                              "[2.7155,0,2.7155],[2.7155,2.7155,0]]}" },
    { "valley-average", NULL, "{\"valleys\": [" SI_VALLEY "], \"temperature_k\": 300, "
                              "\"fermi_level_ev\": -0.1}" },
    { "hole-mass", EXAMPLES, "gaas-holes.json" },
    { "hole-mass", NULL, "{\"heavy_hole_mass_me\": 0.49, \"light_hole_mass_me\": 0.16}" },
    { "hole-mass", NULL, "{\"luttinger_parameters\": [6.98, 2.06, 2.93]}" },
    { "fermi-integral", NULL, "{\"order\": 0.5, \"eta\": [-1, 0, 2]}" },
    { "fermi-integral", NULL, "{\"order\": 0.5, \"inverse\": true, \"values\": 1}" },
    { "band-gap", NULL, "{\"material\": \"GaAs\", \"temperature_k\": 300}" },
    { "cyclotron-orbit", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"c1\", "
      "\"energy_ev\": 0.55, \"field_direction\": [1, 0, 0], \"contour\": true}" },
    { "cyclotron-orbit", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"c1\", "
      "\"energy_ev\": 0.55, \"field_directions\": [[1, 0, 0], [0, 0, 1]]}" },
    { "kane-fit", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"c1\", "
      "\"temperatures_k\": [300]}" },
    /* band cuts for plotting (mass-tensor: inside each extremum) */
    { "kane-fit", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"c1\", "
      "\"temperatures_k\": [300], \"cuts\": true}" },
    { "mass-tensor", DATA, "{\"grid\": \"first-principles/si-12.json\", \"band\": \"c1\", "
      "\"extremum\": \"minimum\", \"cuts\": true}" },
    { "thermal-mass", DATA, "{\"grid\": \"first-principles/si-12.json\", \"bands\": \"valence\", "
      "\"temperatures_k\": [300], \"density_cm3\": 1e17}" },
    { "band-gap", NULL, "{\"material\": \"Si\", \"temperatures_k\": [0, 300]}" },
    { "carrier-statistics", EXAMPLES, "si-carriers.json" },
    { "carrier-statistics", EXAMPLES, "orte-carriers.json" },
    { "carrier-statistics", NULL, "{\"material\": \"Si\", \"temperature_k\": 300, "
      "\"donors\": [{\"species\": \"P\", \"density_cm3\": 1e16}], "
      "\"acceptors\": [{\"species\": \"B\", \"density_cm3\": 1e15}]}" },
    { "carrier-statistics", NULL, "{\"material\": \"GaAs\", \"temperature_k\": 300, "
      "\"statistics\": \"boltzmann\"}" },
    { "sheet-density", NULL, "{\"subbands\": [{\"energy_ev\": 0, \"mass_me\": 0.067}], "
                             "\"temperature_k\": 4, \"fermi_level_ev\": 0.01}" },
    { "sheet-density", NULL, "{\"subbands\": [{\"energy_ev\": 0, \"mass_me\": 0.19, "
      "\"valley_degeneracy\": 2}], \"temperature_k\": 300, \"sheet_density_cm2\": 1e12}" },
    { "drude", NULL, "{\"mass_me\": 0.26, \"mobility_cm2_per_vs\": 1400, "
                     "\"density_cm3\": 1e16, \"temperature_k\": 300}" },
    { "drude", NULL, "{\"mass_me\": 0.26, \"scattering_time_s\": 1e-13}" },
    { "materials", NULL, "{}" },
    { "materials", NULL, "{\"name\": \"GaAs\"}" },
    { "materials", NULL, "{\"name\": \"Si\"}" },
    { "carrier-statistics", NULL, "{\"material\": \"Si\", \"temperatures_k\": [300, 600], "
      "\"donors\": [{\"species\": \"As\", \"density_cm3\": 1e20}], "
      "\"ionization_model\": \"single-level\", \"band_gap_narrowing\": \"none\"}" },
    { "carrier-statistics", NULL, "{\"material\": \"Si\", \"temperature_k\": 300, "
      "\"donors\": [{\"species\": \"P\"}], \"donor_densities_cm3\": [1e15, 1e17], "
      "\"acceptors\": [{\"species\": \"B\"}], \"acceptor_densities_cm3\": 1e14}" },
    { "cyclotron-ellipsoid", NULL, "{\"material\": \"Si\", \"field_direction\": [1, 0, 0]}" },
    { "cyclotron-ellipsoid", NULL, "{\"valley\": " SI_VALLEY ", \"point_group\": \"Oh\", "
      "\"position\": \"interior\", \"field_directions\": {\"from\": [0,0,1], \"to\": [1,1,0], "
      "\"steps\": 3}}" },
    { "cyclotron-holes", NULL, "{\"material\": \"GaAs\", \"field_direction\": [0, 0, 1], "
      "\"hole_energy_ev\": 0.01}" },
    { "cyclotron-holes", NULL, "{\"luttinger_parameters\": [6.98, 2.06, 2.93], "
      "\"field_directions\": [[1, 0, 0], [1, 1, 1]]}" },
    { "resonance", NULL, "{\"frequency_ghz\": 35, \"field_t\": 0.0837, "
      "\"frequency_stderr_ghz\": 0.1}" },
    { "resonance", NULL, "{\"frequency_ghz\": [14, 28, 43], \"field_t\": [0.5, 1, 1.5]}" },
    { "resonance", NULL, "{\"cyclotron_mass_me\": 0.067, \"frequency_ghz\": 94}" },
    { "resonance", NULL, "{\"cyclotron_mass_me\": 0.067, \"field_t\": 1}" },
    { "oscillation-damping", NULL, "{\"field_t\": 6, \"temperatures_k\": [1, 2, 3, 4], "
      "\"amplitudes\": [1, 0.8, 0.55, 0.35], \"dingle\": {\"fields_t\": [3, 4, 6], "
      "\"amplitudes\": [0.2, 0.5, 1], \"temperature_k\": 1, \"field_power\": 0.5}}" },
    { "specific-heat-mass", NULL, "{\"temperatures_k\": [1, 2, 3, 4], "
      "\"heat_capacity_mj_per_mol_k\": [0.7431, 1.7748, 3.3837, 5.8584], "
      "\"electron_density_cm3\": 8.47e22, \"molar_volume_cm3\": 7.09, "
      "\"atoms_per_formula_unit\": 1}" },
    { "specific-heat-mass", NULL, "{\"gamma_mj_per_mol_k2\": 0.695, "
      "\"gamma_stderr_mj_per_mol_k2\": 0.01, \"fermi_energy_ev\": 7, "
      "\"electrons_per_atom\": 1}" },
};

static gboolean declared(const BmOperation *op, const char *key)
{
    for (const BmField *f = bm_common_fields; f->name; f++)
        if (strcmp(key, f->name) == 0)
            return TRUE;
    for (const BmField *f = op->response; f && f->name; f++)
        if (strcmp(f->name, key) == 0)
            return TRUE;
    return FALSE;
}

/* Runs one case; adds the response's keys to seen. */
static void run_case(const Case *c, GHashTable *seen)
{
    const BmOperation *op = bm_registry_lookup(c->op);
    g_assert_nonnull(op);
    g_autofree char *cwd = g_get_current_dir();
    if (c->dir)
        g_assert_cmpint(g_chdir(c->dir), ==, 0);
    g_autofree char *text = NULL;
    if (c->request[0] == '{')
        text = g_strdup(c->request);
    else
        g_assert_true(g_file_get_contents(c->request, &text, NULL, NULL));
    g_autoptr(GError) error = NULL;
    g_autofree char *out = bm_registry_call_json(c->op, text, NULL, FALSE, &error);
    g_assert_cmpint(g_chdir(cwd), ==, 0);
    if (!out)
        g_error("%s %s: %s", c->op, c->request, error->message);
    g_autoptr(JsonNode) root = json_from_string(out, NULL);
    JsonObject *r = json_node_get_object(root);
    g_autoptr(GList) keys = json_object_get_members(r);
    for (GList *l = keys; l; l = l->next) {
        if (!declared(op, l->data))
            g_error("%s %s: response key \"%s\" is not in the operation's response table",
                    c->op, c->request, (const char *)l->data);
        g_hash_table_add(seen, g_strdup_printf("%s/%s", c->op, (const char *)l->data));
    }
    for (const BmField *f = op->response; f && f->name; f++)
        if (!f->optional && !json_object_has_member(r, f->name))
            g_error("%s %s: response lacks \"%s\", declared as always present", c->op,
                    c->request, f->name);
    g_assert_true(json_object_has_member(r, "warnings"));
}

static void test_responses_match_tables(void)
{
    g_autoptr(GHashTable) seen = g_hash_table_new_full(g_str_hash, g_str_equal, g_free, NULL);
    for (gsize i = 0; i < G_N_ELEMENTS(cases); i++)
        run_case(&cases[i], seen);
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    for (guint i = 0; i < n; i++) {
        gboolean has_case = FALSE;
        for (gsize k = 0; k < G_N_ELEMENTS(cases); k++)
            has_case |= strcmp(cases[k].op, ops[i]->name) == 0;
        if (!has_case)
            g_error("operation %s has no representative request here", ops[i]->name);
        /* a declared key no response shows is a stale table entry */
        for (const BmField *f = ops[i]->response; f && f->name; f++) {
            g_autofree char *key = g_strdup_printf("%s/%s", ops[i]->name, f->name);
            if (!g_hash_table_contains(seen, key))
                g_error("%s: declared response key \"%s\" appears in none of the requests",
                        ops[i]->name, f->name);
        }
    }
}

/* The tables themselves: a response table for every operation, unique names,
 * "warnings" left to the registry, units not empty, bounds ordered, choices
 * non-empty, and every default accepted by its own key's checks. */
static void test_tables_consistent(void)
{
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    for (guint i = 0; i < n; i++) {
        const BmOperation *op = ops[i];
        g_assert_nonnull(op->response);
        g_autoptr(GHashTable) names = g_hash_table_new(g_str_hash, g_str_equal);
        for (const BmField *f = op->response; f->name; f++) {
            g_assert_cmpstr(f->name, !=, "warnings");
            g_assert_true(g_hash_table_add(names, (gpointer)f->name));
            g_assert_true(f->unit == NULL || f->unit[0] != '\0');
            g_assert_nonnull(f->meaning);
        }
        for (const BmParam *p = op->params; p && p->name; p++) {
            g_assert_true(p->unit == NULL || p->unit[0] != '\0');
            if (p->lower.kind != BM_BOUND_NONE && p->upper.kind != BM_BOUND_NONE)
                g_assert_cmpfloat(p->lower.value, <, p->upper.value);
            if (p->choices) {
                g_assert_true(p->kinds & BM_VALUE_STRING);
                g_autofree const BmChoice **c = bm_param_choices(p);
                g_assert_nonnull(c[0]);
            }
            if (p->default_json) {
                g_autoptr(JsonNode) d = json_from_string(p->default_json, NULL);
                g_autoptr(GError) error = NULL;
                if (!bm_param_check(p, op->name, d, &error))
                    g_error("%s: the default of \"%s\" fails its own check: %s", op->name,
                            p->name, error->message);
            }
        }
    }
}

/* One statistics table and one default for every operation that takes it. */
static void test_statistics_shared(void)
{
    guint n, users = 0;
    const BmOperation *const *ops = bm_registry_operations(&n);
    const BmEnum *table = NULL;
    for (guint i = 0; i < n; i++)
        for (const BmParam *p = ops[i]->params; p && p->name; p++)
            if (strcmp(p->name, "statistics") == 0) {
                users++;
                g_assert_nonnull(p->choices);
                if (!table)
                    table = p->choices;
                g_assert_true(p->choices == table);
                g_assert_cmpstr(p->default_json, ==, "\"fermi-dirac\"");
            }
    g_assert_cmpuint(users, >=, 2);
}

/* The core (and material-input.c) still name some of these values for their
 * own messages; the registered tables must say the same. */
static void test_tables_agree_with_core_names(void)
{
    for (const BmChoice *c = bm_enum_regime.choices; c->name; c++)
        g_assert_cmpstr(c->name, ==, bm_regime_name((bm_regime)c->value));
    for (const BmChoice *c = bm_enum_valley_site.choices; c->name; c++) {
        g_assert_cmpstr(c->name, ==, bm_valley_site_name((bm_valley_site)c->value));
        bm_valley_site site;
        bm_errbuf err = {0};
        g_assert_cmpint(bm_valley_site_parse(c->name, &site, &err), ==, BM_OK);
        g_assert_cmpint(site, ==, c->value);
    }
    for (const BmChoice *c = bm_enum_gap_model.choices; c->name; c++)
        g_assert_cmpstr(c->name, ==, bm_gap_kind_name((bm_gap_kind)c->value));
    g_assert_cmpstr(bm_enum_name(&bm_enum_statistics, BM_FERMI_DIRAC), ==, "fermi-dirac");
    g_assert_cmpstr(bm_enum_name(&bm_enum_statistics, BM_BOLTZMANN), ==, "boltzmann");
    g_assert_cmpstr(bm_enum_name(&bm_enum_statistics, 99), ==, "unknown");
    g_assert_null(bm_enum_find(&bm_enum_statistics, "Boltzmann"));
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/schema/tables-consistent", test_tables_consistent);
    g_test_add_func("/schema/statistics-shared", test_statistics_shared);
    g_test_add_func("/schema/responses-match-tables", test_responses_match_tables);
    g_test_add_func("/schema/tables-agree-with-core-names", test_tables_agree_with_core_names);
    return g_test_run();
}
