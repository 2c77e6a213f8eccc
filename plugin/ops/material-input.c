/* material-input.c: reads a material given by built-in name, inline object or
 * JSON file into the core's bm_material (no physics: values are copied). */
#include <math.h>
#include <string.h>

#include "material-input.h"
#include "bm-json.h"
#include "bm-bandgap.h"

static const char *const material_keys[] = {
    "name", "electron_dos_mass_me", "hole_dos_mass_me", "band_gap_ev", "varshni",
    "bose_einstein", "dopants", "comment", "point_group", "conduction_valley",
    "heavy_hole_mass_me", "light_hole_mass_me", "split_off_mass_me", "split_off_ev",
    "luttinger_parameters", NULL
};

static const char *keep(BmMaterialInput *in, const char *s)
{
    char *c = g_strdup(s);
    g_ptr_array_add(in->strings, c);
    return c;
}

static JsonObject *sub_object(JsonObject *o, const char *key, const char *where,
                              GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!JSON_NODE_HOLDS_OBJECT(n)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"%s\" must be an object", where, key);
        return NULL;
    }
    return json_node_get_object(n);
}

static gboolean read_dopants(BmMaterialInput *in, JsonObject *o, const char *where,
                             GError **error)
{
    static const char *const keys[] = { "species", "kind", "ionization_ev", "degeneracy",
                                        "source", NULL };
    JsonNode *n = json_object_get_member(o, "dopants");
    if (!JSON_NODE_HOLDS_ARRAY(n)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"dopants\" must be an array of objects", where);
        return FALSE;
    }
    JsonArray *a = json_node_get_array(n);
    guint len = json_array_get_length(a);
    if (len > BM_MATERIAL_MAX_DOPANTS) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"dopants\" holds %u entries (at most %d)", where, len,
                    BM_MATERIAL_MAX_DOPANTS);
        return FALSE;
    }
    for (guint i = 0; i < len; i++) {
        g_autofree char *w = g_strdup_printf("%s: dopants[%u]", where, i);
        JsonNode *e = json_array_get_element(a, i);
        if (!JSON_NODE_HOLDS_OBJECT(e)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: must be an object", w);
            return FALSE;
        }
        JsonObject *d = json_node_get_object(e);
        if (!bm_json_only_keys(d, keys, w, error))
            return FALSE;
        bm_material_dopant *md = &in->mat.dopants[i];
        const char *species = json_object_has_member(d, "species")
            && JSON_NODE_HOLDS_VALUE(json_object_get_member(d, "species"))
            ? json_object_get_string_member(d, "species") : NULL;
        const char *kind = json_object_has_member(d, "kind")
            && JSON_NODE_HOLDS_VALUE(json_object_get_member(d, "kind"))
            ? json_object_get_string_member(d, "kind") : NULL;
        if (!species || !*species) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"species\" must be a non-empty string", w);
            return FALSE;
        }
        if (!kind || (strcmp(kind, "donor") && strcmp(kind, "acceptor"))) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"kind\" must be \"donor\" or \"acceptor\"", w);
            return FALSE;
        }
        md->element = keep(in, species);
        md->kind = strcmp(kind, "donor") ? BM_DOPANT_ACCEPTOR : BM_DOPANT_DONOR;
        md->degeneracy = 0.0;
        if (!bm_json_number(d, "ionization_ev", w, &md->ionisation_ev, error)
            || !bm_json_number_opt(d, "degeneracy", w, &md->degeneracy, error))
            return FALSE;
        md->source = json_object_has_member(d, "source")
            ? keep(in, json_object_get_string_member(d, "source")) : in->origin;
    }
    in->mat.ndopants = len;
    return TRUE;
}

static gboolean string_member(JsonObject *o, const char *key, const char *where,
                              const char **out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!n || !JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_STRING) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"%s\" must be a string", where, key);
        return FALSE;
    }
    *out = json_node_get_string(n);
    return TRUE;
}

/* "conduction_valley": position, Cartesian direction, masses (bm_valley_info). */
static gboolean read_valley(BmMaterialInput *in, JsonObject *o, const char *where,
                           GError **error)
{
    static const char *const keys[] = { "position", "direction", "longitudinal_mass_me",
                                        "transverse_mass_me", "transverse2_mass_me",
                                        "source", NULL };
    g_autofree char *w = g_strdup_printf("%s: conduction_valley", where);
    JsonObject *v = sub_object(o, "conduction_valley", where, error);
    bm_valley_info *e = &in->mat.electron;
    const char *pos = NULL;
    bm_errbuf err = {0};
    if (!v || !bm_json_only_keys(v, keys, w, error) || !string_member(v, "position", w, &pos, error))
        return FALSE;
    if (bm_valley_site_parse(pos, &e->site, &err) != BM_OK) {
        g_autofree char *ctx = g_strdup_printf("%s: key \"position\"", w);
        bm_error_from_core(error, &err, ctx);
        return FALSE;
    }
    e->label = bm_valley_site_name(e->site);
    e->basis = BM_DIRECTION_CARTESIAN;
    e->star_size = 0;
    e->valleys = NAN;
    memset(e->direction, 0, sizeof e->direction);
    if ((e->site != BM_SITE_GAMMA || json_object_has_member(v, "direction"))
        && !bm_json_vec3(v, "direction", w, e->direction, error))
        return FALSE;
    if (!bm_json_positive(v, "longitudinal_mass_me", w, &e->m_longitudinal, error)
        || !bm_json_positive(v, "transverse_mass_me", w, &e->m_transverse, error))
        return FALSE;
    e->m_transverse2 = e->m_transverse;
    if (json_object_has_member(v, "transverse2_mass_me")
        && !bm_json_positive(v, "transverse2_mass_me", w, &e->m_transverse2, error))
        return FALSE;
    e->source = in->origin;
    if (json_object_has_member(v, "source")) {
        const char *src;
        if (!string_member(v, "source", w, &src, error))
            return FALSE;
        e->source = keep(in, src);
    }
    in->has_valley = TRUE;
    return TRUE;
}

static gboolean read_positive_opt(JsonObject *o, const char *key, const char *where,
                                  double *out, GError **error)
{
    return !json_object_has_member(o, key) || bm_json_positive(o, key, where, out, error);
}

/* Hole masses, split-off energy and Luttinger parameters (NAN when absent). */
static gboolean read_holes(BmMaterialInput *in, JsonObject *o, const char *where,
                          GError **error)
{
    bm_material *m = &in->mat;
    m->m_heavy_hole = m->m_light_hole = m->m_split_off = m->split_off_ev = NAN;
    m->luttinger[0] = m->luttinger[1] = m->luttinger[2] = NAN;
    m->hole_masses_source = m->split_off_source = m->luttinger_source = in->origin;
    if (!read_positive_opt(o, "heavy_hole_mass_me", where, &m->m_heavy_hole, error)
        || !read_positive_opt(o, "light_hole_mass_me", where, &m->m_light_hole, error)
        || !read_positive_opt(o, "split_off_mass_me", where, &m->m_split_off, error)
        || !read_positive_opt(o, "split_off_ev", where, &m->split_off_ev, error))
        return FALSE;
    if (!json_object_has_member(o, "luttinger_parameters"))
        return TRUE;
    gsize n = 0;
    g_autofree double *g = bm_json_numbers(o, "luttinger_parameters", where, &n, error);
    if (!g)
        return FALSE;
    if (n != 3) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"luttinger_parameters\" must hold 3 numbers [gamma1, gamma2, "
                    "gamma3] (got %zu)", where, (size_t)n);
        return FALSE;
    }
    memcpy(m->luttinger, g, sizeof m->luttinger);
    return TRUE;
}

static gboolean read_object(BmMaterialInput *in, JsonObject *o, const char *where,
                            GError **error)
{
    static const char *const vkeys[] = { "eg0_ev", "alpha_ev_per_k", "beta_k", NULL };
    static const char *const bkeys[] = { "eg0_ev", "a_b_ev", "theta_k", NULL };
    if (!bm_json_only_keys(o, material_keys, where, error))
        return FALSE;
    bm_material *m = &in->mat;
    m->name = "custom";
    if (json_object_has_member(o, "name")) {
        JsonNode *n = json_object_get_member(o, "name");
        if (!JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_STRING) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"name\" must be a string", where);
            return FALSE;
        }
        m->name = keep(in, json_node_get_string(n));
    }
    m->long_name = m->name;
    m->m_dos_electron = m->m_dos_hole = NAN;
    m->m_dos_electron_source = m->m_dos_hole_source = m->gap_source = in->origin;
    if (json_object_has_member(o, "electron_dos_mass_me")) {
        if (!bm_json_positive(o, "electron_dos_mass_me", where, &m->m_dos_electron, error))
            return FALSE;
        in->has_electron_mass = TRUE;
    }
    if (json_object_has_member(o, "hole_dos_mass_me")) {
        if (!bm_json_positive(o, "hole_dos_mass_me", where, &m->m_dos_hole, error))
            return FALSE;
        in->has_hole_mass = TRUE;
    }
    if (json_object_has_member(o, "band_gap_ev")) {
        if (!bm_json_number(o, "band_gap_ev", where, &in->fixed_gap_ev, error))
            return FALSE;
        in->has_fixed_gap = TRUE;
    }
    if (json_object_has_member(o, "varshni")) {
        g_autofree char *w = g_strdup_printf("%s: varshni", where);
        JsonObject *v = sub_object(o, "varshni", where, error);
        if (!v || !bm_json_only_keys(v, vkeys, w, error)
            || !bm_json_number(v, "eg0_ev", w, &m->gap.eg0_ev, error)
            || !bm_json_number(v, "alpha_ev_per_k", w, &m->gap.alpha_ev_per_k, error)
            || !bm_json_number(v, "beta_k", w, &m->gap.beta_k, error))
            return FALSE;
        in->has_varshni = TRUE;
    }
    if (json_object_has_member(o, "bose_einstein")) {
        g_autofree char *w = g_strdup_printf("%s: bose_einstein", where);
        JsonObject *v = sub_object(o, "bose_einstein", where, error);
        if (!v || !bm_json_only_keys(v, bkeys, w, error)
            || !bm_json_number(v, "eg0_ev", w, &in->bose_einstein.eg0_ev, error)
            || !bm_json_number(v, "a_b_ev", w, &in->bose_einstein.a_b_ev, error)
            || !bm_json_number(v, "theta_k", w, &in->bose_einstein.theta_k, error))
            return FALSE;
        in->has_bose_einstein = TRUE;
    }
    if (in->has_fixed_gap && (in->has_varshni || in->has_bose_einstein)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: give either \"band_gap_ev\" (a fixed gap) or \"varshni\" / "
                    "\"bose_einstein\" parameters, not both", where);
        return FALSE;
    }
    if (json_object_has_member(o, "dopants") && !read_dopants(in, o, where, error))
        return FALSE;
    if (json_object_has_member(o, "point_group")
        && !string_member(o, "point_group", where, &m->point_group, error))
        return FALSE;
    if (m->point_group)
        m->point_group = keep(in, m->point_group);
    if (json_object_has_member(o, "conduction_valley") && !read_valley(in, o, where, error))
        return FALSE;
    return read_holes(in, o, where, error);
}

static gboolean looks_like_path(const char *s)
{
    return strchr(s, '/') || g_str_has_suffix(s, ".json") || g_file_test(s, G_FILE_TEST_EXISTS);
}

static gboolean read_input(JsonObject *request, const char *key, BmMaterialInput *out,
                           GError **error)
{
    memset(out, 0, sizeof *out);
    out->strings = g_ptr_array_new_with_free_func(g_free);
    JsonNode *n = json_object_get_member(request, key);
    if (n && JSON_NODE_HOLDS_OBJECT(n)) {
        out->origin = g_strdup("given in the request");
        g_autofree char *where = g_strdup_printf("request: key \"%s\"", key);
        return read_object(out, json_node_get_object(n), where, error);
    }
    if (!n || !JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_STRING) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"%s\" must be a material name, a file name or an object",
                    key);
        return FALSE;
    }
    const char *name = json_node_get_string(n);
    bm_errbuf err = {0};
    const bm_material *m = bm_material_find(name, &err);
    if (m) {
        out->mat = *m;
        out->builtin = TRUE;
        out->has_varshni = out->has_electron_mass = out->has_hole_mass = TRUE;
        out->has_valley = m->electron.label != NULL;
        out->origin = g_strdup("built-in table");
        return TRUE;
    }
    if (!looks_like_path(name)) {
        g_autofree char *ctx = g_strdup_printf("request: key \"%s\"", key);
        bm_error_from_core(error, &err, ctx);
        return FALSE;
    }
    g_autoptr(JsonParser) parser = json_parser_new();
    g_autoptr(GError) io = NULL;
    if (!json_parser_load_from_file(parser, name, &io)) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "request: key \"%s\": material file %s: %s",
                    key, name, io->message);
        return FALSE;
    }
    JsonNode *root = json_parser_get_root(parser);
    if (!root || !JSON_NODE_HOLDS_OBJECT(root)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "material file %s: the top level must be an object", name);
        return FALSE;
    }
    out->origin = g_strdup_printf("material file %s", name);
    g_autofree char *where = g_strdup_printf("material file %s", name);
    return read_object(out, json_node_get_object(root), where, error);
}

gboolean bm_material_input_read(JsonObject *request, const char *key,
                                BmMaterialInput *out, GError **error)
{
    if (read_input(request, key, out, error))
        return TRUE;
    bm_material_input_clear(out);   /* a failed read owns nothing */
    return FALSE;
}

void bm_material_input_clear(BmMaterialInput *in)
{
    g_clear_pointer(&in->strings, g_ptr_array_unref);
    g_clear_pointer(&in->origin, g_free);
}

BmGapModel bm_material_input_default_gap(const BmMaterialInput *in)
{
    if (in->has_varshni)
        return BM_GAP_VARSHNI;
    if (in->has_bose_einstein)
        return BM_GAP_BOSE_EINSTEIN;
    return BM_GAP_FIXED;
}

const char *bm_gap_model_name(BmGapModel model)
{
    return model == BM_GAP_VARSHNI ? "varshni"
         : model == BM_GAP_BOSE_EINSTEIN ? "bose-einstein" : "fixed";
}

const char *bm_material_input_gap_source(const BmMaterialInput *in, BmGapModel model)
{
    if (in->builtin && model == BM_GAP_VARSHNI)
        return in->mat.gap_source;
    return in->origin;
}

gboolean bm_material_input_gap(const BmMaterialInput *in, BmGapModel model, double t_k,
                               const char *where, double *eg_ev, bm_warnings *w,
                               GError **error)
{
    bm_errbuf err = {0};
    bm_status st = BM_OK;
    gboolean have = model == BM_GAP_VARSHNI ? in->has_varshni
                  : model == BM_GAP_BOSE_EINSTEIN ? in->has_bose_einstein
                  : in->has_fixed_gap;
    if (!have) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "material \"%s\" has no %s band-gap parameters%s", in->mat.name,
                    bm_gap_model_name(model),
                    in->builtin ? " in the built-in table (give the material as an object)"
                    : model == BM_GAP_FIXED ? " (needs \"band_gap_ev\", \"varshni\" or "
                      "\"bose_einstein\")" : "");
        return FALSE;
    }
    if (model == BM_GAP_VARSHNI)
        st = bm_bandgap_varshni(&in->mat.gap, t_k, eg_ev, w, &err);
    else if (model == BM_GAP_BOSE_EINSTEIN)
        st = bm_bandgap_bose_einstein(&in->bose_einstein, t_k, eg_ev, w, &err);
    else
        *eg_ev = in->fixed_gap_ev;
    if (st != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    return TRUE;
}
