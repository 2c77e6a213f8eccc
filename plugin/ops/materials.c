/* materials.c: operation "materials" -- the built-in parameter sets, one in
 * full with every value's source, or all as a one-line-each list. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-materials.h"

static const BmParam params[] = {
    { "name", BM_VALUE_STRING, FALSE, NULL,
      "material name or long name (case-insensitive): that material in full; "
      "absent: the list", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, "300",
      "temperature for the band gap listed beside the parameters", .unit = "K",
      .lower = BM_GE(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "material", NULL, TRUE,
      "with \"name\": the set in full, every value as {value, source}" },
    { "temperature_k", "K", TRUE, "without \"name\": the temperature of the listed gaps" },
    { "points", NULL, TRUE,
      "without \"name\": one row per material (name, long_name, structure, gap, band_gap_ev, "
      "conduction_valley, DOS masses, dopants, sources)" },
    BM_FIELD_END
};

static JsonObject *valued(double v, const char *source)
{
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "value", v);
    json_object_set_string_member(o, "source", source);
    return o;
}

static JsonObject *full(const bm_material *m, double t, double eg)
{
    JsonObject *o = json_object_new();
    json_object_set_string_member(o, "name", m->name);
    json_object_set_string_member(o, "long_name", m->long_name);
    json_object_set_string_member(o, "structure", m->structure);
    json_object_set_string_member(o, "point_group", m->point_group);
    json_object_set_boolean_member(o, "direct_gap", m->direct_gap);

    JsonObject *g = json_object_new();
    bm_json_set_number(g, "eg0_ev", m->gap.eg0_ev);
    bm_json_set_number(g, "alpha_ev_per_k", m->gap.alpha_ev_per_k);
    bm_json_set_number(g, "beta_k", m->gap.beta_k);
    json_object_set_string_member(g, "source", m->gap_source);
    json_object_set_object_member(o, "varshni", g);
    JsonObject *gt = json_object_new();
    bm_json_set_number(gt, "temperature_k", t);
    bm_json_set_number(gt, "value", eg);
    json_object_set_string_member(gt, "source", "computed from \"varshni\"");
    json_object_set_object_member(o, "band_gap_ev", gt);

    JsonObject *v = json_object_new();
    json_object_set_string_member(v, "label", m->electron.label);
    json_object_set_string_member(v, "site", bm_valley_site_name(m->electron.site));
    bm_json_set_vec3(v, "direction", m->electron.direction);
    json_object_set_string_member(v, "direction_basis",
                                  m->electron.basis == BM_DIRECTION_HEXAGONAL
                                  ? "reciprocal (a1*, a2*, c*)" : "cartesian");
    double cart[3];
    if (bm_valley_info_direction(&m->electron, cart, NULL) == BM_OK)
        bm_json_set_vec3(v, "direction_cartesian", cart);
    json_object_set_int_member(v, "star_size", m->electron.star_size);
    bm_json_set_number(v, "valleys", m->electron.valleys);
    bm_json_set_number(v, "longitudinal_mass_me", m->electron.m_longitudinal);
    bm_json_set_number(v, "transverse_mass_me", m->electron.m_transverse);
    bm_json_set_number(v, "transverse2_mass_me", m->electron.m_transverse2);
    json_object_set_string_member(v, "source", m->electron.source);
    json_object_set_object_member(o, "conduction_valley", v);

    json_object_set_object_member(o, "electron_dos_mass_me",
                                  valued(m->m_dos_electron, m->m_dos_electron_source));
    json_object_set_object_member(o, "hole_dos_mass_me",
                                  valued(m->m_dos_hole, m->m_dos_hole_source));
    json_object_set_object_member(o, "heavy_hole_mass_me",
                                  valued(m->m_heavy_hole, m->hole_masses_source));
    json_object_set_object_member(o, "light_hole_mass_me",
                                  valued(m->m_light_hole, m->hole_masses_source));
    json_object_set_object_member(o, "split_off_mass_me",
                                  valued(m->m_split_off, m->split_off_source));
    json_object_set_object_member(o, "split_off_energy_ev",
                                  valued(m->split_off_ev, m->split_off_source));
    JsonObject *l = json_object_new();
    bm_json_set_vec3(l, "value", m->luttinger);
    json_object_set_string_member(l, "meaning", "gamma1, gamma2, gamma3");
    json_object_set_string_member(l, "source", m->luttinger_source);
    json_object_set_object_member(o, "luttinger", l);

    JsonArray *d = json_array_new();
    for (size_t i = 0; i < m->ndopants && i < BM_MATERIAL_MAX_DOPANTS; i++) {
        const bm_material_dopant *md = &m->dopants[i];
        JsonObject *e = json_object_new();
        json_object_set_string_member(e, "species", md->element);
        json_object_set_string_member(e, "kind", md->kind == BM_DOPANT_DONOR ? "donor"
                                                                             : "acceptor");
        bm_json_set_number(e, "ionization_ev", md->ionisation_ev);
        bm_json_set_number(e, "degeneracy", md->degeneracy);
        json_object_set_string_member(e, "source", md->source);
        json_array_add_object_element(d, e);
    }
    json_object_set_array_member(o, "dopants", d);
    return o;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    double t;
    if (!bm_json_number(request, "temperature_k", NULL, &t, error))
        return NULL;
    bm_errbuf err = {0};
    bm_warnings w = {0};
    JsonObject *resp = json_object_new();
    if (json_object_has_member(request, "name")) {
        const bm_material *m = bm_material_find(
            json_object_get_string_member(request, "name"), &err);
        double eg;
        if (!m || bm_material_band_gap(m, t, &eg, &w, &err) != BM_OK) {
            bm_error_from_core(error, &err, m ? "request: key \"temperature_k\""
                                              : "request: key \"name\"");
            json_object_unref(resp);
            bm_warnings_clear(&w);
            return NULL;
        }
        json_object_set_object_member(resp, "material", full(m, t, eg));
    } else {
        JsonArray *pts = json_array_new();
        for (size_t i = 0; i < bm_material_count(); i++) {
            const bm_material *m = bm_material_at(i);
            double eg;
            if (bm_material_band_gap(m, t, &eg, &w, &err) != BM_OK) {
                bm_error_from_core(error, &err, "request: key \"temperature_k\"");
                json_array_unref(pts);
                json_object_unref(resp);
                bm_warnings_clear(&w);
                return NULL;
            }
            JsonObject *o = json_object_new();
            json_object_set_string_member(o, "name", m->name);
            json_object_set_string_member(o, "long_name", m->long_name);
            json_object_set_string_member(o, "structure", m->structure);
            json_object_set_string_member(o, "gap", m->direct_gap ? "direct" : "indirect");
            bm_json_set_number(o, "band_gap_ev", eg);
            json_object_set_string_member(o, "conduction_valley", m->electron.label);
            bm_json_set_number(o, "electron_dos_mass_me", m->m_dos_electron);
            bm_json_set_number(o, "hole_dos_mass_me", m->m_dos_hole);
            json_object_set_int_member(o, "dopants", (gint64)m->ndopants);
            json_object_set_string_member(o, "band_gap_source", m->gap_source);
            json_object_set_string_member(o, "electron_dos_mass_source",
                                          m->m_dos_electron_source);
            json_object_set_string_member(o, "hole_dos_mass_source", m->m_dos_hole_source);
            json_array_add_object_element(pts, o);
        }
        bm_json_set_number(resp, "temperature_k", t);
        json_object_set_array_member(resp, "points", pts);
    }
    bm_json_warn_all(resp, &w);
    bm_warnings_clear(&w);
    return resp;
}

static double member_value(JsonObject *o, const char *key)
{
    JsonNode *n = json_object_get_member(json_object_get_object_member(o, key), "value");
    return JSON_NODE_HOLDS_NULL(n) ? NAN : json_node_get_double(n);
}

static void render(JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "points")) {
        JsonArray *a = json_object_get_array_member(response, "points");
        g_string_append_printf(out, "%-8s %-28s %-9s %9s %-6s %8s %8s\n", "name", "long name",
                               "gap", "Eg_eV", "valley", "m_dos_e", "m_dos_h");
        for (guint i = 0; i < json_array_get_length(a); i++) {
            JsonObject *o = json_array_get_object_element(a, i);
            g_string_append_printf(out, "%-8s %-28s %-9s %9.4f %-6s %8.4g %8.4g\n",
                                   json_object_get_string_member(o, "name"),
                                   json_object_get_string_member(o, "long_name"),
                                   json_object_get_string_member(o, "gap"),
                                   json_object_get_double_member(o, "band_gap_ev"),
                                   json_object_get_string_member(o, "conduction_valley"),
                                   json_object_get_double_member(o, "electron_dos_mass_me"),
                                   json_object_get_double_member(o, "hole_dos_mass_me"));
        }
        g_string_append_printf(out, "band gaps at %g K; bandmass materials --name NAME "
                               "for one material with sources\n",
                               json_object_get_double_member(response, "temperature_k"));
        return;
    }
    JsonObject *m = json_object_get_object_member(response, "material");
    JsonObject *g = json_object_get_object_member(m, "varshni");
    JsonObject *gt = json_object_get_object_member(m, "band_gap_ev");
    g_string_append_printf(out, "%s (%s), %s, point group %s, %s gap\n",
                           json_object_get_string_member(m, "name"),
                           json_object_get_string_member(m, "long_name"),
                           json_object_get_string_member(m, "structure"),
                           json_object_get_string_member(m, "point_group"),
                           json_object_get_boolean_member(m, "direct_gap") ? "direct"
                                                                           : "indirect");
    g_string_append_printf(out, "gap %.4f eV at %g K; Varshni Eg0 %.4f eV, alpha %.4g eV/K, "
                           "beta %g K\n  source: %s\n",
                           json_object_get_double_member(gt, "value"),
                           json_object_get_double_member(gt, "temperature_k"),
                           json_object_get_double_member(g, "eg0_ev"),
                           json_object_get_double_member(g, "alpha_ev_per_k"),
                           json_object_get_double_member(g, "beta_k"),
                           json_object_get_string_member(g, "source"));
    JsonObject *v = json_object_get_object_member(m, "conduction_valley");
    g_string_append_printf(out, "conduction valley %s (%s, %g valleys): m_l %.4g, m_t %.4g m_e"
                           "\n  source: %s\n",
                           json_object_get_string_member(v, "label"),
                           json_object_get_string_member(v, "site"),
                           json_object_get_double_member(v, "valleys"),
                           json_object_get_double_member(v, "longitudinal_mass_me"),
                           json_object_get_double_member(v, "transverse_mass_me"),
                           json_object_get_string_member(v, "source"));
    const char *keys[] = { "electron_dos_mass_me", "hole_dos_mass_me", "heavy_hole_mass_me",
                           "light_hole_mass_me", "split_off_mass_me", "split_off_energy_ev" };
    for (size_t i = 0; i < G_N_ELEMENTS(keys); i++)
        g_string_append_printf(out, "%-22s %-8.4g source: %s\n", keys[i],
                               member_value(m, keys[i]),
                               json_object_get_string_member(
                                   json_object_get_object_member(m, keys[i]), "source"));
    JsonArray *d = json_object_get_array_member(m, "dopants");
    for (guint i = 0; i < json_array_get_length(d); i++) {
        JsonObject *e = json_array_get_object_element(d, i);
        g_string_append_printf(out, "%-8s %-8s %.4g eV, g = %g; source: %s\n",
                               json_object_get_string_member(e, "kind"),
                               json_object_get_string_member(e, "species"),
                               json_object_get_double_member(e, "ionization_ev"),
                               json_object_get_double_member(e, "degeneracy"),
                               json_object_get_string_member(e, "source"));
    }
}

const BmOperation bm_op_materials = {
    .name = "materials",
    .summary = "Built-in semiconductor parameter sets, each value with its source",
    .params = params,
    .run = run,
    .render = render,
    .response = response,
};
