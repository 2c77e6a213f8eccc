/* materials.c: operation "materials" -- the built-in parameter sets, one in
 * full with every value's source (written by the material codec, so the
 * response is itself a material file), or all as a one-line-each list. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-carriers.h"
#include "bm-holes.h"
#include "bm-materials.h"
#include "material-input.h"

static const BmParam params[] = {
    { "name", BM_VALUE_STRING, FALSE, NULL,
      "material name or long name (case-insensitive): that material in full; "
      "absent: the list", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, "300",
      "temperature for the band gap and statistics hole DOS mass listed beside the "
      "parameters", .unit = "K", .lower = BM_GE(0) },
    BM_PARAM_END
};

/* With "name" the response is the material itself, written by the material
 * codec (ops/material-input.c), so it is a valid material file; plus
 * "derived". The built-in sets all carry a Varshni gap, so the codec's other
 * gap keys (bose_einstein, band_gap_ev) do not appear here. */
#define WITH_NAME(key, unit, meaning) { key, unit, TRUE, "with \"name\": " meaning }
static const BmField response[] = {
    WITH_NAME("name", NULL, "short name, e.g. GaAs"),
    WITH_NAME("long_name", NULL, "full name"),
    WITH_NAME("structure", NULL, "crystal structure"),
    WITH_NAME("point_group", NULL, "Schoenflies symbol of the crystal class"),
    WITH_NAME("direct_gap", NULL, "whether the fundamental gap is direct"),
    WITH_NAME("varshni", NULL, "gap model {eg0_ev, alpha_ev_per_k, beta_k, source}"),
    WITH_NAME("conduction_valley", NULL,
              "{position, direction, longitudinal_mass_me, transverse_mass_me, "
              "transverse2_mass_me, source}"),
    WITH_NAME("electron_dos_mass_me", "m_e", "conduction-band DOS mass {value, source}"),
    WITH_NAME("statistics_hole_dos_mass_me", "m_e",
              "carrier-statistics hole DOS mass m_dh(T) that gives Nv: {value, source}, a "
              "table or a published fit"),
    WITH_NAME("heavy_hole_mass_me", "m_e", "parabolic heavy-hole mass {value, source}"),
    WITH_NAME("light_hole_mass_me", "m_e", "parabolic light-hole mass {value, source}"),
    WITH_NAME("split_off_mass_me", "m_e", "split-off band mass {value, source}"),
    WITH_NAME("split_off_ev", "eV", "spin-orbit splitting {value, source}"),
    WITH_NAME("luttinger_parameters", NULL, "{value: [gamma1, gamma2, gamma3], source}"),
    WITH_NAME("dopants", NULL, "[{species, kind, ionization_ev, degeneracy, source}]"),
    { "derived", NULL, TRUE,
      "with \"name\": values computed from the material at temperature_k, skipped when the "
      "response is read back as a material" },
    { "temperature_k", "K", TRUE, "without \"name\": the temperature of the listed values" },
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

/* The band-edge k.p hole DOS mass from the Luttinger parameters (NAN and a
 * reason as the source where there is none); *source is newly allocated. */
static double band_edge(const bm_material *m, char **source, bm_warnings *w)
{
    if (!(isfinite(m->luttinger[0]) && isfinite(m->luttinger[1])
          && isfinite(m->luttinger[2]))) {
        *source = g_strdup("none: no Luttinger parameters");
        return NAN;
    }
    bm_luttinger L = { m->luttinger[0], m->luttinger[1], m->luttinger[2] };
    bm_errbuf err = {0};
    double v;
    if (bm_band_edge_hole_dos_mass(&L, 0.0, 0.0, 0.0, &v, w, &err) != BM_OK) {
        *source = g_strdup_printf("none: %s", err.message);
        return NAN;
    }
    *source = g_strdup_printf("k.p band edge: warped heavy- and light-hole surfaces from "
                              "luttinger_parameters (%s)", m->luttinger_source);
    return v;
}

/* Values computed from the material at t (never read back from a file). */
static JsonObject *derived(const bm_material *m, double t, double eg, double mdh,
                           bm_warnings *w)
{
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "temperature_k", t);
    g_autofree char *gs = g_strdup_printf("Eg(temperature_k) of the \"%s\" model",
                                          m->gap.kind == BM_GAP_VARSHNI ? "varshni"
                                          : m->gap.kind == BM_GAP_BOSE_EINSTEIN
                                          ? "bose_einstein" : "band_gap_ev");
    json_object_set_object_member(o, "band_gap_ev", valued(eg, gs));
    g_autofree char *hs = g_strdup_printf("m_dh(temperature_k) of statistics_hole_dos_mass_me "
                                          "(%s)",
                                          bm_dos_mass_kind_name(m->statistics_hole_dos_mass.kind));
    json_object_set_object_member(o, "statistics_hole_dos_mass_me", valued(mdh, hs));
    double nv = NAN;
    if (bm_effective_dos(mdh, t, &nv, NULL) == BM_OK)
        json_object_set_object_member(o, "nv_cm3",
            valued(nv, "2 (2 pi m_dh k T / h^2)^(3/2) from statistics_hole_dos_mass_me"));
    g_autofree char *bs = NULL;
    double mb = band_edge(m, &bs, w);
    json_object_set_object_member(o, "band_edge_hole_dos_mass_me", valued(mb, bs));
    JsonObject *v = json_object_new();
    bm_json_set_vec3(v, "tabulated_direction", m->electron.direction);
    json_object_set_string_member(v, "direction_basis",
                                  m->electron.basis == BM_DIRECTION_HEXAGONAL
                                  ? "reciprocal (a1*, a2*, c*)" : "cartesian");
    json_object_set_int_member(v, "star_size", m->electron.star_size);
    bm_json_set_number(v, "valleys", m->electron.valleys);
    json_object_set_object_member(o, "conduction_valley", v);
    return o;
}

static gboolean at_t(const bm_material *m, double t, double *eg, double *mdh, bm_warnings *w,
                     GError **error)
{
    bm_errbuf err = {0};
    if (bm_material_band_gap(m, t, eg, w, &err) != BM_OK
        || bm_material_statistics_hole_dos_mass(m, t, mdh, &err) != BM_OK) {
        g_autofree char *ctx = g_strdup_printf("materials: %s: request: key \"temperature_k\"",
                                               m->name);
        bm_error_from_core(error, &err, ctx);
        return FALSE;
    }
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    double t;
    if (!bm_json_number(request, "temperature_k", NULL, &t, error))
        return NULL;
    bm_errbuf err = {0};
    bm_warnings w = {0};
    double eg, mdh;
    if (json_object_has_member(request, "name")) {
        const bm_material *m = bm_material_find(
            json_object_get_string_member(request, "name"), &err);
        if (!m) {
            bm_error_from_core(error, &err, "request: key \"name\"");
            return NULL;
        }
        if (!at_t(m, t, &eg, &mdh, &w, error))
            return NULL;
        /* the material itself is a valid material file; "derived" and
         * "warnings" are skipped when it is read back */
        JsonObject *resp = bm_material_to_json(m);
        json_object_set_object_member(resp, "derived", derived(m, t, eg, mdh, &w));
        bm_json_warn_all(resp, &w);
        return resp;
    }
    JsonArray *pts = json_array_new();
    for (size_t i = 0; i < bm_material_count(); i++) {
        const bm_material *m = bm_material_at(i);
        if (!at_t(m, t, &eg, &mdh, &w, error)) {
            json_array_unref(pts);
            return NULL;
        }
        g_autofree char *bs = NULL;
        bm_warnings mw = {0};
        double mb = band_edge(m, &bs, &mw);
        for (size_t k = 0; k < mw.count; k++)
            bm_warn(&w, mw.items[k].code, "%s: %s", m->name, mw.items[k].text);
        bm_warnings_clear(&mw);
        JsonObject *o = json_object_new();
        json_object_set_string_member(o, "name", m->name);
        json_object_set_string_member(o, "long_name", m->long_name);
        json_object_set_string_member(o, "structure", m->structure);
        json_object_set_string_member(o, "gap", m->direct_gap ? "direct" : "indirect");
        bm_json_set_number(o, "band_gap_ev", eg);
        json_object_set_string_member(o, "conduction_valley", m->electron.label);
        double me = NAN;
        bm_dos_mass_at(&m->electron_dos_mass, t, "electron DOS mass", &me, NULL);
        bm_json_set_number(o, "electron_dos_mass_me", me);
        bm_json_set_number(o, "statistics_hole_dos_mass_me", mdh);
        bm_json_set_number(o, "band_edge_hole_dos_mass_me", mb);
        json_object_set_int_member(o, "dopants", (gint64)m->ndopants);
        json_object_set_string_member(o, "band_gap_source", m->gap.source);
        json_object_set_string_member(o, "electron_dos_mass_source",
                                      m->electron_dos_mass.source);
        json_object_set_string_member(o, "statistics_hole_dos_mass_source",
                                      m->statistics_hole_dos_mass.source);
        json_object_set_string_member(o, "band_edge_hole_dos_mass_source", bs);
        json_array_add_object_element(pts, o);
    }
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "temperature_k", t);
    json_object_set_array_member(resp, "points", pts);
    bm_json_warn_all(resp, &w);
    bm_warnings_clear(&w);
    return resp;
}

static double member_value(JsonObject *o, const char *key)
{
    JsonObject *v = o && json_object_has_member(o, key)
        ? json_object_get_object_member(o, key) : NULL;
    JsonNode *n = v ? json_object_get_member(v, "value") : NULL;
    return n && JSON_NODE_HOLDS_VALUE(n) ? json_node_get_double(n) : NAN;
}

static const char *member_source(JsonObject *o, const char *key)
{
    JsonObject *v = o && json_object_has_member(o, key)
        ? json_object_get_object_member(o, key) : NULL;
    return v && json_object_has_member(v, "source")
        ? json_object_get_string_member(v, "source") : "-";
}

static void render(JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "points")) {
        JsonArray *a = json_object_get_array_member(response, "points");
        g_string_append_printf(out, "%-8s %-28s %-9s %9s %-6s %8s %8s %8s\n", "name",
                               "long name", "gap", "Eg_eV", "valley", "m_dos_e", "m_dh(T)",
                               "m_kp_h");
        for (guint i = 0; i < json_array_get_length(a); i++) {
            JsonObject *o = json_array_get_object_element(a, i);
            JsonNode *kp = json_object_get_member(o, "band_edge_hole_dos_mass_me");
            g_autofree char *kps = JSON_NODE_HOLDS_NULL(kp) ? g_strdup("-")
                : g_strdup_printf("%.4g", json_node_get_double(kp));
            g_string_append_printf(out, "%-8s %-28s %-9s %9.4f %-6s %8.4g %8.4g %8s\n",
                                   json_object_get_string_member(o, "name"),
                                   json_object_get_string_member(o, "long_name"),
                                   json_object_get_string_member(o, "gap"),
                                   json_object_get_double_member(o, "band_gap_ev"),
                                   json_object_get_string_member(o, "conduction_valley"),
                                   json_object_get_double_member(o, "electron_dos_mass_me"),
                                   json_object_get_double_member(o,
                                       "statistics_hole_dos_mass_me"),
                                   kps);
        }
        g_string_append_printf(out, "at %g K; m_dh(T): statistics hole DOS mass (gives Nv); "
                               "m_kp_h: band-edge k.p hole DOS mass (warped bands); "
                               "bandmass materials --name NAME for one material with "
                               "sources\n",
                               json_object_get_double_member(response, "temperature_k"));
        return;
    }
    JsonObject *m = response;
    JsonObject *d = json_object_get_object_member(m, "derived");
    g_string_append_printf(out, "%s (%s), %s, point group %s, %s gap\n",
                           json_object_get_string_member(m, "name"),
                           json_object_get_string_member(m, "long_name"),
                           json_object_get_string_member(m, "structure"),
                           json_object_get_string_member(m, "point_group"),
                           json_object_get_boolean_member(m, "direct_gap") ? "direct"
                                                                           : "indirect");
    double t = json_object_get_double_member(d, "temperature_k");
    g_string_append_printf(out, "at %g K: gap %.4f eV (%s)\n  source: %s\n", t,
                           member_value(d, "band_gap_ev"), member_source(d, "band_gap_ev"),
                           member_source(m, json_object_has_member(m, "varshni") ? "varshni"
                                         : json_object_has_member(m, "bose_einstein")
                                         ? "bose_einstein" : "band_gap_ev"));
    JsonObject *v = json_object_get_object_member(m, "conduction_valley");
    JsonObject *dv = json_object_get_object_member(d, "conduction_valley");
    g_string_append_printf(out, "conduction valley %s (%s, %g valleys): m_l %.4g, m_t %.4g m_e"
                           "\n  source: %s\n",
                           json_object_get_string_member(v, "label"),
                           json_object_get_string_member(v, "position"),
                           json_object_get_double_member(dv, "valleys"),
                           json_object_get_double_member(v, "longitudinal_mass_me"),
                           json_object_get_double_member(v, "transverse_mass_me"),
                           json_object_get_string_member(v, "source"));
    g_string_append_printf(out, "%-30s %-8.4g source: %s\n", "electron_dos_mass_me",
                           member_value(m, "electron_dos_mass_me"),
                           member_source(m, "electron_dos_mass_me"));
    g_string_append_printf(out, "%-30s %-8.4g at %g K (Nv %.3e cm^-3); source: %s\n",
                           "statistics_hole_dos_mass_me",
                           member_value(d, "statistics_hole_dos_mass_me"), t,
                           member_value(d, "nv_cm3"),
                           member_source(m, "statistics_hole_dos_mass_me"));
    g_string_append_printf(out, "%-30s %-8.4g source: %s\n", "band_edge_hole_dos_mass_me",
                           member_value(d, "band_edge_hole_dos_mass_me"),
                           member_source(d, "band_edge_hole_dos_mass_me"));
    const char *keys[] = { "heavy_hole_mass_me", "light_hole_mass_me", "split_off_mass_me",
                           "split_off_ev" };
    for (size_t i = 0; i < G_N_ELEMENTS(keys); i++)
        g_string_append_printf(out, "%-30s %-8.4g source: %s\n", keys[i],
                               member_value(m, keys[i]), member_source(m, keys[i]));
    JsonArray *dop = json_object_get_array_member(m, "dopants");
    for (guint i = 0; i < json_array_get_length(dop); i++) {
        JsonObject *e = json_array_get_object_element(dop, i);
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
