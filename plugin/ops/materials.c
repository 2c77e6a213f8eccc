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
    WITH_NAME("relative_permittivity", NULL, "static relative permittivity {value, source}"),
    WITH_NAME("donor_ionization_lowering_ev_cm", "eV cm",
              "Pearson-Bardeen alpha of the donors, E(N) = E0 - alpha N^(1/3) {value, source}"),
    WITH_NAME("acceptor_ionization_lowering_ev_cm", "eV cm",
              "Pearson-Bardeen alpha of the acceptors {value, source}"),
    WITH_NAME("band_gap_narrowing", NULL,
              "{model: slotboom, e1_ev, n0_cm3, c, apparent, source}"),
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
    static const struct { const char *key; bm_dopant_kind kind; } kinds[] = {
        { "hydrogenic_donor", BM_DOPANT_DONOR }, { "hydrogenic_acceptor", BM_DOPANT_ACCEPTOR }
    };
    for (size_t i = 0; i < G_N_ELEMENTS(kinds); i++) {
        bm_hydrogenic_info h;
        bm_material_hydrogenic(m, kinds[i].kind, &h, NULL);
        JsonObject *e = json_object_new();
        bm_json_set_number(e, "mass_me", h.mass);
        bm_json_set_number(e, "binding_ev", h.binding_ev);
        bm_json_set_number(e, "bohr_radius_angstrom", h.bohr_radius_angstrom);
        bm_json_set_number(e, "mott_density_cm3", h.mott_density_cm3);
        g_autofree char *src = g_strdup_printf(
            "E_H = 13.606 eV m / eps_r^2, a* = 0.529 A eps_r / m, Mott density (0.26 / a*)^3 "
            "(Edwards & Sienko, Phys. Rev. B 17, 2575 (1978); from memory); mass: %s",
            h.mass_source);
        json_object_set_string_member(e, "source", src);
        json_object_set_object_member(o, kinds[i].key, e);
    }
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
        if (!at_t(m, t, &eg, &mdh, &w, error)) {
            bm_warnings_clear(&w);
            return NULL;
        }
        /* the material itself is a valid material file; "derived" and
         * "warnings" are skipped when it is read back */
        JsonObject *resp = bm_material_to_json(m);
        json_object_set_object_member(resp, "derived", derived(m, t, eg, mdh, &w));
        bm_json_warn_all(resp, &w);
        bm_warnings_clear(&w);
        return resp;
    }
    JsonArray *pts = json_array_new();
    for (size_t i = 0; i < bm_material_count(); i++) {
        const bm_material *m = bm_material_at(i);
        if (!at_t(m, t, &eg, &mdh, &w, error)) {
            json_array_unref(pts);
            bm_warnings_clear(&w);
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

const BmOperation bm_op_materials = {
    .name = "materials",
    .summary = "Built-in semiconductor parameter sets, each value with its source",
    .params = params,
    .run = run,
    .response = response,
};
