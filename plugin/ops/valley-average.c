/* valley-average.c: operation "valley-average" -- the star of a valley under a
 * point group, or an explicit valley list, and its conductivity and DOS masses. */
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-valleys.h"

/* const view of a double[3][3] for the setters (C11 qualifier rules) */
#define CM3(m) ((const double (*)[3])(m))

static const BmParam params[] = {
    { "valley", BM_VALUE_OBJECT, FALSE, NULL,
      "one valley, expanded by symmetry: {longitudinal_mass_me, transverse_mass_me, axis} "
      "or {principal_masses_me, axes}; optional direction (position, default the axis)" },
    { "point_group", BM_VALUE_STRING, FALSE, NULL,
      "crystal point group for \"valley\" (Schoenflies, e.g. Oh, Td, D6h, C6v, D4h, "
      "or international, e.g. m-3m)" },
    { "position", BM_VALUE_STRING, FALSE, "\"interior\"",
      "where \"valley\" sits: gamma, interior (k and -k distinct) or face (zone boundary, "
      "each position counts one half)" },
    { "valleys", BM_VALUE_ARRAY, FALSE, NULL,
      "explicit valley list, each a valley object plus energy_offset_ev (default 0, "
      "positive away from the band edge) and weight (default 1)" },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL,
      "temperature for valley populations, K (needed when offsets differ)" },
    { "statistics", BM_VALUE_STRING, FALSE, "\"boltzmann\"",
      "valley populations: boltzmann or fermi-dirac" },
    { "fermi_level_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "Fermi level for fermi-dirac, eV, measured like the offsets (positive into the band)" },
    { NULL, 0, FALSE, NULL, NULL }
};

static const char *const valley_keys[] = {
    "longitudinal_mass_me", "transverse_mass_me", "axis", "principal_masses_me", "axes",
    "direction", "energy_offset_ev", "weight", NULL
};

static gboolean check_keys(JsonObject *v, const char *where, gboolean list_entry,
                           GError **error)
{
    g_autoptr(GList) keys = json_object_get_members(v);
    for (GList *l = keys; l; l = l->next) {
        const char *k = l->data;
        gboolean ok = FALSE;
        for (int i = 0; valley_keys[i]; i++)
            ok |= strcmp(k, valley_keys[i]) == 0;
        if (ok && !list_entry && (!strcmp(k, "energy_offset_ev") || !strcmp(k, "weight")))
            ok = FALSE;
        if (!ok) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"%s\" is not a valley key (expected longitudinal_mass_me, "
                        "transverse_mass_me, axis, or principal_masses_me, axes; direction%s)",
                        where, k, list_entry ? "; energy_offset_ev, weight" : "");
            return FALSE;
        }
    }
    return TRUE;
}

/* Reads a valley shape; *has_dir tells whether a position direction is known. */
static gboolean parse_valley(JsonObject *v, const char *where, gboolean list_entry,
                             bm_valley_shape *shape, double dir[3], gboolean *has_dir,
                             bm_warnings *warn, GError **error)
{
    bm_errbuf err = {0};
    if (!check_keys(v, where, list_entry, error))
        return FALSE;
    gboolean spheroid = json_object_has_member(v, "longitudinal_mass_me")
                     || json_object_has_member(v, "transverse_mass_me");
    gboolean general = json_object_has_member(v, "principal_masses_me")
                    || json_object_has_member(v, "axes");
    if (spheroid == general) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: give either longitudinal_mass_me, transverse_mass_me and axis, "
                    "or principal_masses_me and axes", where);
        return FALSE;
    }
    *has_dir = FALSE;
    if (spheroid) {
        double ml, mt, ax[3];
        if (!bm_json_number(v, "longitudinal_mass_me", where, &ml, error)
            || !bm_json_number(v, "transverse_mass_me", where, &mt, error)
            || !bm_json_vec3(v, "axis", where, ax, error))
            return FALSE;
        if (bm_valley_shape_spheroid(ml, mt, ax, shape, &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            return FALSE;
        }
        memcpy(dir, ax, sizeof ax);
        *has_dir = TRUE;
    } else {
        gsize n = 0;
        g_autofree double *m = bm_json_numbers(v, "principal_masses_me", where, &n, error);
        if (!m)
            return FALSE;
        if (n != 3) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"principal_masses_me\" must hold 3 masses (got %zu)",
                        where, (size_t)n);
            return FALSE;
        }
        if (!bm_json_mat3(v, "axes", where, shape->axes, error))
            return FALSE;
        memcpy(shape->masses, m, sizeof shape->masses);
        if (bm_valley_shape_normalise(shape, warn, &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            return FALSE;
        }
    }
    if (json_object_has_member(v, "direction")) {
        if (!bm_json_vec3(v, "direction", where, dir, error))
            return FALSE;
        *has_dir = TRUE;
    }
    return TRUE;
}

static void copy_warnings(JsonObject *resp, const bm_warnings *w)
{
    for (int i = 0; i < w->count; i++)
        bm_json_warn(resp, "%s", w->text[i]);
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_errbuf err = {0};
    bm_warnings pw = {0};
    gboolean has_valley = json_object_has_member(request, "valley");
    gboolean has_list = json_object_has_member(request, "valleys");
    if (has_valley == has_list) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"valley\" (with \"point_group\") or "
                    "\"valleys\" (an explicit list)");
        return NULL;
    }

    bm_valley *valleys = NULL;
    size_t n = 0;
    double count = 0.0;
    bm_valley_star *star = NULL;
    JsonObject *resp = NULL;
    const char *site_name = json_object_get_string_member(request, "position");
    const char *group_name = NULL;

    if (has_valley) {
        if (!json_object_has_member(request, "point_group")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"valley\" needs \"point_group\" (e.g. \"Oh\")");
            return NULL;
        }
        group_name = json_object_get_string_member(request, "point_group");
        bm_valley_site site;
        if (!strcmp(site_name, "gamma"))
            site = BM_SITE_GAMMA;
        else if (!strcmp(site_name, "interior"))
            site = BM_SITE_INTERIOR;
        else if (!strcmp(site_name, "face"))
            site = BM_SITE_FACE;
        else {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"position\" must be gamma, interior or face (got \"%s\")",
                        site_name);
            return NULL;
        }
        bm_point_group g;
        if (bm_point_group_get(group_name, &g, &err) != BM_OK) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: key \"point_group\": %s",
                        err.message);
            return NULL;
        }
        bm_valley_shape shape;
        double dir[3];
        gboolean has_dir;
        if (!parse_valley(json_object_get_object_member(request, "valley"), "valley", FALSE,
                          &shape, dir, &has_dir, &pw, error))
            return NULL;
        if (site != BM_SITE_GAMMA && !has_dir) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "valley: a general valley at position \"%s\" needs \"direction\"",
                        site_name);
            return NULL;
        }
        star = g_new0(bm_valley_star, 1);
        if (bm_valley_star_build(&shape, site, dir, &g, star, &err) != BM_OK) {
            bm_error_from_core(error, &err, "valley");
            g_free(star);
            return NULL;
        }
        valleys = star->valleys;
        n = star->n;
        count = star->valley_count;
    } else {
        JsonArray *a = json_object_get_array_member(request, "valleys");
        n = json_array_get_length(a);
        if (n == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"valleys\" is empty");
            return NULL;
        }
        valleys = g_new0(bm_valley, n);
        for (size_t i = 0; i < n; i++) {
            g_autofree char *where = g_strdup_printf("valleys[%zu]", i);
            JsonNode *node = json_array_get_element(a, (guint)i);
            if (!JSON_NODE_HOLDS_OBJECT(node)) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: must be an object",
                            where);
                goto fail;
            }
            JsonObject *v = json_node_get_object(node);
            bm_valley_shape shape;
            double dir[3] = {0, 0, 0}, off = 0.0, w = 1.0;
            gboolean has_dir;
            if (!parse_valley(v, where, TRUE, &shape, dir, &has_dir, &pw, error)
                || !bm_json_number_opt(v, "energy_offset_ev", where, &off, error)
                || !bm_json_number_opt(v, "weight", where, &w, error))
                goto fail;
            if (bm_valley_from_shape(&shape, has_dir ? dir : NULL, w, off, &valleys[i], &err)
                != BM_OK) {
                bm_error_from_core(error, &err, where);
                goto fail;
            }
            count += w;
        }
    }

    bm_population pop = {BM_POPULATION_EQUAL, 0.0, 0.0};
    const char *stats = json_object_get_string_member(request, "statistics");
    gboolean has_t = json_object_has_member(request, "temperature_k");
    if (strcmp(stats, "boltzmann") != 0 && strcmp(stats, "fermi-dirac") != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"statistics\" must be boltzmann or fermi-dirac (got \"%s\")",
                    stats);
        goto fail;
    }
    if (has_t) {
        if (!bm_json_number(request, "temperature_k", NULL, &pop.temperature_k, error))
            goto fail;
        pop.kind = strcmp(stats, "fermi-dirac") ? BM_POPULATION_BOLTZMANN : BM_POPULATION_FERMI;
        if (pop.kind == BM_POPULATION_FERMI
            && !bm_json_number(request, "fermi_level_ev", NULL, &pop.fermi_level_ev, error))
            goto fail;
    } else if (!strcmp(stats, "fermi-dirac")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: fermi-dirac statistics need \"temperature_k\" and \"fermi_level_ev\"");
        goto fail;
    }

    bm_valley_average avg;
    if (bm_valley_average_compute(valleys, n, &pop, &avg, &err) != BM_OK) {
        if (err.status == BM_EINVAL && !has_t && strstr(err.message, "offsets"))
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: the valleys' energy_offset_ev differ: give \"temperature_k\"");
        else
            bm_error_from_core(error, &err, "valley-average");
        goto fail;
    }

    resp = json_object_new();
    bm_json_set_number(resp, "valley_count", count);
    bm_json_set_number(resp, "dos_mass_me", avg.dos_mass);
    json_object_set_string_member(resp, "dos_mass_reference", "lowest valley edge");
    bm_json_set_mat3(resp, "conductivity_mass_tensor_me", CM3(avg.conductivity_mass_tensor));
    bm_json_set_number(resp, "conductivity_mass_me", avg.conductivity_mass);
    json_object_set_boolean_member(resp, "conductivity_isotropic", avg.conductivity_isotropic);
    if (!avg.conductivity_isotropic) {
        json_object_set_string_member(resp, "conductivity_mass_meaning",
                                      "3 / trace of the inverse tensor (harmonic mean)");
        bm_json_set_vec3(resp, "conductivity_principal_masses_me", avg.conductivity_masses);
        bm_json_set_mat3(resp, "conductivity_principal_axes", CM3(avg.conductivity_axes));
    }
    JsonObject *p = json_object_new();
    json_object_set_string_member(p, "statistics",
                                  pop.kind == BM_POPULATION_EQUAL ? "equal"
                                  : pop.kind == BM_POPULATION_BOLTZMANN ? "boltzmann"
                                  : "fermi-dirac");
    if (has_t)
        bm_json_set_number(p, "temperature_k", pop.temperature_k);
    if (pop.kind == BM_POPULATION_FERMI)
        bm_json_set_number(p, "fermi_level_ev", pop.fermi_level_ev);
    json_object_set_object_member(resp, "population", p);
    if (group_name) {
        json_object_set_string_member(resp, "point_group", group_name);
        json_object_set_string_member(resp, "position", site_name);
    }
    JsonArray *va = json_array_new();
    for (size_t i = 0; i < n; i++) {
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "direction", valleys[i].direction);
        bm_json_set_number(o, "weight", valleys[i].weight);
        bm_json_set_vec3(o, "principal_masses_me", valleys[i].masses);
        bm_json_set_mat3(o, "axes", CM3(valleys[i].axes));
        bm_json_set_number(o, "energy_offset_ev", valleys[i].energy_offset_ev);
        bm_json_set_number(o, "population_fraction", valleys[i].population);
        json_array_add_object_element(va, o);
    }
    json_object_set_array_member(resp, "valleys", va);
    copy_warnings(resp, &pw);
    if (star)
        copy_warnings(resp, &star->warnings);
    copy_warnings(resp, &avg.warnings);

fail:
    if (star)
        g_free(star);
    else
        g_free(valleys);
    return resp;
}

static void render(JsonObject *response, GString *out)
{
    g_string_append_printf(out, "valleys                 %g\n",
                           json_object_get_double_member(response, "valley_count"));
    g_string_append_printf(out, "DOS mass                %.6g m_e\n",
                           json_object_get_double_member(response, "dos_mass_me"));
    g_string_append_printf(out, "conductivity mass       %.6g m_e%s\n",
                           json_object_get_double_member(response, "conductivity_mass_me"),
                           json_object_get_boolean_member(response, "conductivity_isotropic")
                           ? "" : " (harmonic mean)");
    if (json_object_has_member(response, "conductivity_principal_masses_me")) {
        JsonArray *m = json_object_get_array_member(response,
                                                    "conductivity_principal_masses_me");
        JsonArray *ax = json_object_get_array_member(response, "conductivity_principal_axes");
        for (guint i = 0; i < json_array_get_length(m); i++) {
            JsonArray *r = json_array_get_array_element(ax, i);
            g_string_append_printf(out, "  principal %u           %.6g m_e along [%.4f %.4f %.4f]\n",
                                   i + 1, json_array_get_double_element(m, i),
                                   json_array_get_double_element(r, 0),
                                   json_array_get_double_element(r, 1),
                                   json_array_get_double_element(r, 2));
        }
    }
    JsonArray *va = json_object_get_array_member(response, "valleys");
    g_string_append(out, "direction                      weight  offset_ev  population\n");
    for (guint i = 0; i < json_array_get_length(va); i++) {
        JsonObject *o = json_array_get_object_element(va, i);
        JsonArray *d = json_object_get_array_member(o, "direction");
        g_string_append_printf(out, "[%7.4f %7.4f %7.4f]   %6.3g  %9.4g  %10.4g\n",
                               json_array_get_double_element(d, 0),
                               json_array_get_double_element(d, 1),
                               json_array_get_double_element(d, 2),
                               json_object_get_double_member(o, "weight"),
                               json_object_get_double_member(o, "energy_offset_ev"),
                               json_object_get_double_member(o, "population_fraction"));
    }
    JsonArray *w = json_object_get_array_member(response, "warnings");
    for (guint i = 0; w && i < json_array_get_length(w); i++)
        g_string_append_printf(out, "warning: %s\n", json_array_get_string_element(w, i));
}

const BmOperation bm_op_valley_average = {
    .name = "valley-average",
    .summary = "Valley star from a point group (or an explicit list) and its conductivity "
               "and density-of-states masses",
    .params = params,
    .run = run,
    .render = render,
};
