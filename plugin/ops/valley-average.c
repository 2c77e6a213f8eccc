/* valley-average.c: operation "valley-average" -- the star of a valley under a
 * point group, or an explicit valley list, and its conductivity and DOS masses. */
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-valleys.h"
#include "bm-materials.h"
#include "material-input.h"

/* const view of a double[3][3] for the setters (C11 qualifier rules) */
#define CM3(m) ((const double (*)[3])(m))

static const BmParam params[] = {
    { "valley", BM_VALUE_OBJECT, FALSE, NULL,
      "one valley, expanded by symmetry: {longitudinal_mass_me, transverse_mass_me, axis} "
      "or {principal_masses_me, axes}; optional direction (position, default the axis)" },
    { "point_group", BM_VALUE_STRING, FALSE, NULL,
      "crystal point group for \"valley\" (Schoenflies, e.g. Oh, Td, D6h, C6v, D4h, "
      "or international, e.g. m-3m)" },
    { "position", BM_VALUE_STRING, FALSE, NULL,
      "where \"valley\" sits: gamma, interior (k and -k distinct; the default) or face "
      "(zone boundary, each position counts one half)" },
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, FALSE, NULL,
      "instead of \"valley\": a built-in material name, an object or a JSON file; its "
      "conduction valley and point group give the star" },
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

/* A single valley takes the shape keys; an entry of a list also its offset and weight. */
static const char *const valley_keys[] = {
    "longitudinal_mass_me", "transverse_mass_me", "axis", "principal_masses_me", "axes",
    "direction", NULL
};
static const char *const list_entry_keys[] = {
    "longitudinal_mass_me", "transverse_mass_me", "axis", "principal_masses_me", "axes",
    "direction", "energy_offset_ev", "weight", NULL
};

/* Reads a valley shape; *has_dir tells whether a position direction is known. */
static gboolean parse_valley(JsonObject *v, const char *where, gboolean list_entry,
                             bm_valley_shape *shape, double dir[3], gboolean *has_dir,
                             bm_warnings *warn, GError **error)
{
    bm_errbuf err = {0};
    if (!bm_json_only_keys(v, list_entry ? list_entry_keys : valley_keys, where, error))
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

/* The valleys to average, from a star (valley or material) or a list. */
typedef struct {
    bm_valley *valleys;          /* star->valleys, or an owned list */
    size_t n;
    double count;
    bm_valley_star *star;        /* owned when a star was built */
    const char *group_name;      /* star only */
    const char *site_name;
    BmMaterialInput mat;         /* material path only */
    gboolean has_mat;
    bm_warnings pw;              /* parsing warnings */
} ValleySet;

static void valley_set_clear(ValleySet *s)
{
    if (s->star)
        g_free(s->star);
    else
        g_free(s->valleys);
    if (s->has_mat)
        bm_material_input_clear(&s->mat);
}

/* The star of one valley under the named point group; group_where and where
 * name the point group's and the valley's origin in messages. */
static gboolean build_star(ValleySet *s, const bm_valley_shape *shape, bm_valley_site site,
                           const double dir[3], const char *group_name,
                           const char *group_where, const char *where, GError **error)
{
    bm_errbuf err = {0};
    bm_point_group g;
    if (bm_point_group_get(group_name, &g, &err) != BM_OK) {
        bm_error_from_core(error, &err, group_where);
        return FALSE;
    }
    s->star = g_new0(bm_valley_star, 1);
    if (bm_valley_star_build(shape, site, dir, &g, s->star, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    s->valleys = s->star->valleys;
    s->n = s->star->n;
    s->count = s->star->valley_count;
    s->group_name = group_name;
    s->site_name = bm_valley_site_name(site);
    return TRUE;
}

/* "valley" + "point_group" + "position". */
static gboolean from_valley(JsonObject *request, ValleySet *s, GError **error)
{
    bm_errbuf err = {0};
    if (!json_object_has_member(request, "point_group")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"valley\" needs \"point_group\" (e.g. \"Oh\")");
        return FALSE;
    }
    const char *site_name = json_object_has_member(request, "position")
        ? json_object_get_string_member(request, "position") : "interior";
    bm_valley_site site;
    if (bm_valley_site_parse(site_name, &site, &err) != BM_OK) {
        bm_error_from_core(error, &err, "request: key \"position\"");
        return FALSE;
    }
    bm_valley_shape shape;
    double dir[3];
    gboolean has_dir;
    if (!parse_valley(json_object_get_object_member(request, "valley"), "valley", FALSE,
                      &shape, dir, &has_dir, &s->pw, error))
        return FALSE;
    if (site != BM_SITE_GAMMA && !has_dir) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "valley: a general valley at position \"%s\" needs \"direction\"",
                    site_name);
        return FALSE;
    }
    return build_star(s, &shape, site, dir,
                      json_object_get_string_member(request, "point_group"),
                      "request: key \"point_group\"", "valley", error);
}

/* "material": its conduction valley and point group. */
static gboolean from_material(JsonObject *request, ValleySet *s, GError **error)
{
    bm_errbuf err = {0};
    if (json_object_has_member(request, "point_group")
        || json_object_has_member(request, "position")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"material\" gives the point group and position; leave out "
                    "\"point_group\" and \"position\"");
        return FALSE;
    }
    if (!bm_material_input_read(request, "material", &s->mat, error))
        return FALSE;
    s->has_mat = TRUE;
    const bm_material *m = &s->mat.mat;
    if (!m->electron.label || !m->point_group) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "material \"%s\" (%s) has no %s: give \"conduction_valley\" and "
                    "\"point_group\"", m->name, s->mat.origin,
                    m->electron.label ? "point_group" : "conduction-valley description");
        return FALSE;
    }
    g_autofree char *where = g_strdup_printf("material \"%s\": conduction valley", m->name);
    g_autofree char *gwhere = g_strdup_printf("material \"%s\": point_group", m->name);
    bm_valley_shape shape;
    double dir[3];
    if (bm_valley_info_shape(&m->electron, &shape, dir, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    return build_star(s, &shape, m->electron.site, dir, m->point_group, gwhere, where, error);
}

/* "valleys": an explicit list. */
static gboolean from_list(JsonObject *request, ValleySet *s, GError **error)
{
    bm_errbuf err = {0};
    JsonArray *a = json_object_get_array_member(request, "valleys");
    s->n = json_array_get_length(a);
    if (s->n == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: key \"valleys\" is empty");
        return FALSE;
    }
    s->valleys = g_new0(bm_valley, s->n);
    for (size_t i = 0; i < s->n; i++) {
        g_autofree char *where = g_strdup_printf("valleys[%zu]", i);
        JsonNode *node = json_array_get_element(a, (guint)i);
        if (!JSON_NODE_HOLDS_OBJECT(node)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: must be an object", where);
            return FALSE;
        }
        JsonObject *v = json_node_get_object(node);
        bm_valley_shape shape;
        double dir[3] = {0, 0, 0}, off = 0.0, w = 1.0;
        gboolean has_dir;
        if (!parse_valley(v, where, TRUE, &shape, dir, &has_dir, &s->pw, error)
            || !bm_json_number_opt(v, "energy_offset_ev", where, &off, error)
            || !bm_json_number_opt(v, "weight", where, &w, error))
            return FALSE;
        if (bm_valley_from_shape(&shape, has_dir ? dir : NULL, w, off, &s->valleys[i], &err)
            != BM_OK) {
            bm_error_from_core(error, &err, where);
            return FALSE;
        }
        s->count += w;
    }
    return TRUE;
}

static gboolean read_population(JsonObject *request, bm_population *pop, gboolean *has_t,
                                GError **error)
{
    const char *stats = json_object_get_string_member(request, "statistics");
    *has_t = json_object_has_member(request, "temperature_k");
    if (strcmp(stats, "boltzmann") != 0 && strcmp(stats, "fermi-dirac") != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"statistics\" must be boltzmann or fermi-dirac (got \"%s\")",
                    stats);
        return FALSE;
    }
    if (*has_t) {
        if (!bm_json_number(request, "temperature_k", NULL, &pop->temperature_k, error))
            return FALSE;
        pop->kind = strcmp(stats, "fermi-dirac") ? BM_POPULATION_BOLTZMANN : BM_POPULATION_FERMI;
        return pop->kind != BM_POPULATION_FERMI
            || bm_json_number(request, "fermi_level_ev", NULL, &pop->fermi_level_ev, error);
    }
    if (!strcmp(stats, "fermi-dirac")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: fermi-dirac statistics need \"temperature_k\" and \"fermi_level_ev\"");
        return FALSE;
    }
    return TRUE;
}

static JsonObject *population_json(const bm_population *pop, gboolean has_t)
{
    JsonObject *p = json_object_new();
    json_object_set_string_member(p, "statistics",
                                  pop->kind == BM_POPULATION_EQUAL ? "equal"
                                  : pop->kind == BM_POPULATION_BOLTZMANN ? "boltzmann"
                                  : "fermi-dirac");
    if (has_t)
        bm_json_set_number(p, "temperature_k", pop->temperature_k);
    if (pop->kind == BM_POPULATION_FERMI)
        bm_json_set_number(p, "fermi_level_ev", pop->fermi_level_ev);
    return p;
}

static JsonArray *valleys_json(const ValleySet *s)
{
    JsonArray *va = json_array_new();
    for (size_t i = 0; i < s->n; i++) {
        const bm_valley *v = &s->valleys[i];
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "direction", v->direction);
        bm_json_set_number(o, "weight", v->weight);
        bm_json_set_vec3(o, "principal_masses_me", v->masses);
        bm_json_set_mat3(o, "axes", CM3(v->axes));
        bm_json_set_number(o, "energy_offset_ev", v->energy_offset_ev);
        bm_json_set_number(o, "population_fraction", v->population);
        json_array_add_object_element(va, o);
    }
    return va;
}

static JsonObject *respond(const ValleySet *s, const bm_population *pop, gboolean has_t,
                           const bm_valley_average *avg)
{
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "valley_count", s->count);
    bm_json_set_number(resp, "dos_mass_me", avg->dos_mass);
    json_object_set_string_member(resp, "dos_mass_reference", "lowest valley edge");
    bm_json_set_mat3(resp, "conductivity_mass_tensor_me", CM3(avg->conductivity_mass_tensor));
    bm_json_set_number(resp, "conductivity_mass_me", avg->conductivity_mass);
    json_object_set_boolean_member(resp, "conductivity_isotropic", avg->conductivity_isotropic);
    if (!avg->conductivity_isotropic) {
        json_object_set_string_member(resp, "conductivity_mass_meaning",
                                      "3 / trace of the inverse tensor (harmonic mean)");
        bm_json_set_vec3(resp, "conductivity_principal_masses_me", avg->conductivity_masses);
        bm_json_set_mat3(resp, "conductivity_principal_axes", CM3(avg->conductivity_axes));
    }
    json_object_set_object_member(resp, "population", population_json(pop, has_t));
    if (s->has_mat) {
        json_object_set_string_member(resp, "material", s->mat.mat.name);
        json_object_set_string_member(resp, "valley_source", s->mat.mat.electron.source);
    }
    if (s->group_name) {
        json_object_set_string_member(resp, "point_group", s->group_name);
        json_object_set_string_member(resp, "position", s->site_name);
    }
    json_object_set_array_member(resp, "valleys", valleys_json(s));
    bm_json_warn_all(resp, &s->pw);
    if (s->star)
        bm_json_warn_all(resp, &s->star->warnings);
    bm_json_warn_all(resp, &avg->warnings);
    return resp;
}

static gboolean read_valleys(JsonObject *request, ValleySet *s, GError **error)
{
    static const char *const keys[] = { "valley", "valleys", "material" };
    GString *given = g_string_new(NULL);
    int count = 0;
    for (size_t i = 0; i < G_N_ELEMENTS(keys); i++)
        if (json_object_has_member(request, keys[i]))
            g_string_append_printf(given, "%s\"%s\"", count++ ? " and " : "", keys[i]);
    if (count != 1) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"valley\" (with \"point_group\"), "
                    "\"valleys\" (an explicit list) or \"material\"%s%s",
                    given->len ? "; got " : "", given->str);
        g_string_free(given, TRUE);
        return FALSE;
    }
    g_string_free(given, TRUE);
    if (json_object_has_member(request, "valley"))
        return from_valley(request, s, error);
    if (json_object_has_member(request, "material"))
        return from_material(request, s, error);
    return from_list(request, s, error);
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_errbuf err = {0};
    ValleySet s = {0};
    bm_population pop = {BM_POPULATION_EQUAL, 0.0, 0.0};
    gboolean has_t = FALSE;
    JsonObject *resp = NULL;
    if (!read_valleys(request, &s, error) || !read_population(request, &pop, &has_t, error))
        goto done;
    bm_valley_average avg;
    if (bm_valley_average_compute(s.valleys, s.n, &pop, &avg, &err) != BM_OK) {
        if (err.status == BM_EINVAL && !has_t && strstr(err.message, "offsets"))
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: the valleys' energy_offset_ev differ: give \"temperature_k\"");
        else
            bm_error_from_core(error, &err, "valley-average");
        goto done;
    }
    resp = respond(&s, &pop, has_t, &avg);
done:
    valley_set_clear(&s);
    return resp;
}

static void render(JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "material"))
        g_string_append_printf(out, "material                %s (%s %s)\n",
                               json_object_get_string_member(response, "material"),
                               json_object_get_string_member(response, "point_group"),
                               json_object_get_string_member(response, "position"));
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
    .summary = "Valley star from a point group or a material (or an explicit list) and its "
               "conductivity and density-of-states masses",
    .params = params,
    .run = run,
    .render = render,
};
