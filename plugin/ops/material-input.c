/* material-input.c: the material codec (JSON <-> bm_material): one field
 * table drives both the reader and the writer.  No physics: values are copied. */
#include <math.h>
#include <stddef.h>
#include <string.h>

#include "material-input.h"
#include "bm-json.h"

typedef enum {
    F_STRING,      /* const char * */
    F_BOOL,        /* int: 1, 0, -1 not given */
    F_GAP,         /* bm_gap_model of the field's gap kind */
    F_VALLEY,      /* bm_valley_info */
    F_DOS,         /* bm_dos_mass_model */
    F_SOURCED,     /* bm_sourced */
    F_LUTTINGER,   /* double[3] + source */
    F_DOPANTS,     /* ndopants + dopants[] */
    F_BGN          /* bm_bgn_model */
} FieldType;

typedef struct {
    const char *key;
    FieldType type;
    size_t offset;
    bm_gap_kind gap_kind;       /* F_GAP */
} Field;

#define AT(member) offsetof(bm_material, member)

/* The material file format, in the order written. */
static const Field fields[] = {
    { "name", F_STRING, AT(name), 0 },
    { "long_name", F_STRING, AT(long_name), 0 },
    { "structure", F_STRING, AT(structure), 0 },
    { "point_group", F_STRING, AT(point_group), 0 },
    { "direct_gap", F_BOOL, AT(direct_gap), 0 },
    { "varshni", F_GAP, AT(gap), BM_GAP_VARSHNI },
    { "bose_einstein", F_GAP, AT(gap), BM_GAP_BOSE_EINSTEIN },
    { "band_gap_ev", F_GAP, AT(gap), BM_GAP_FIXED },
    { "conduction_valley", F_VALLEY, AT(electron), 0 },
    { "electron_dos_mass_me", F_DOS, AT(electron_dos_mass), 0 },
    { "statistics_hole_dos_mass_me", F_DOS, AT(statistics_hole_dos_mass), 0 },
    { "heavy_hole_mass_me", F_SOURCED, AT(heavy_hole_mass), 0 },
    { "light_hole_mass_me", F_SOURCED, AT(light_hole_mass), 0 },
    { "split_off_mass_me", F_SOURCED, AT(split_off_mass), 0 },
    { "split_off_ev", F_SOURCED, AT(split_off_ev), 0 },
    { "luttinger_parameters", F_LUTTINGER, AT(luttinger), 0 },
    { "dopants", F_DOPANTS, AT(ndopants), 0 },
    { "relative_permittivity", F_SOURCED, AT(relative_permittivity), 0 },
    { "donor_ionization_lowering_ev_cm", F_SOURCED, AT(donor_ionisation_alpha), 0 },
    { "acceptor_ionization_lowering_ev_cm", F_SOURCED, AT(acceptor_ionisation_alpha), 0 },
    { "band_gap_narrowing", F_BGN, AT(band_gap_narrowing), 0 },
};

#define N_IGNORED_KEYS 4
const char *const bm_material_ignored_keys[N_IGNORED_KEYS + 1] = { "comment", "derived",
                                                                   "warnings", "warning_codes",
                                                                   NULL };

/* Keys of earlier versions: a clear error naming the new key. */
static const char *const renamed[][2] = {
    { "hole_dos_mass_me", "statistics_hole_dos_mass_me" },
    { "luttinger", "luttinger_parameters" },
    { "split_off_energy_ev", "split_off_ev" },
    { "spin_orbit_splitting_ev", "split_off_ev" },
    { "site", "position" },
};

#define FIELD(m, f, type) ((type *)(void *)((char *)(m) + (f)->offset))
#define CFIELD(m, f, type) ((const type *)(const void *)((const char *)(m) + (f)->offset))

static gboolean invalid(GError **error, const char *fmt, ...) G_GNUC_PRINTF(2, 3);
static gboolean invalid(GError **error, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT, msg);
    return FALSE;
}

static const char *keep(BmMaterialInput *in, const char *s)
{
    char *c = g_strdup(s);
    g_ptr_array_add(in->strings, c);
    return c;
}

static gboolean check_renamed(JsonObject *o, const char *where, GError **error)
{
    for (size_t i = 0; i < G_N_ELEMENTS(renamed); i++)
        if (json_object_has_member(o, renamed[i][0]))
            return invalid(error, "%s: key \"%s\" is now called \"%s\" (README, Changes)",
                           where, renamed[i][0], renamed[i][1]);
    return TRUE;
}

static gboolean is_string(JsonNode *n)
{
    return n && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING;
}

static gboolean string_member(JsonObject *o, const char *key, const char *where,
                              const char **out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!is_string(n))
        return invalid(error, "%s: key \"%s\" must be a string", where, key);
    *out = json_node_get_string(n);
    return TRUE;
}

/* An optional "source" string of o (else dflt). */
static gboolean source_of(BmMaterialInput *in, JsonObject *o, const char *where,
                          const char *dflt, const char **out, GError **error)
{
    *out = dflt;
    if (!json_object_has_member(o, "source"))
        return TRUE;
    const char *s = NULL;
    if (!string_member(o, "source", where, &s, error))
        return FALSE;
    *out = keep(in, s);
    return TRUE;
}

/* A number, null (not given) or {value: number or null, source}. */
static gboolean read_sourced(BmMaterialInput *in, JsonObject *o, const char *key,
                             const char *where, gboolean positive, bm_sourced *out,
                             GError **error)
{
    static const char *const keys[] = { "value", "source", NULL };
    JsonNode *n = json_object_get_member(o, key);
    out->value = NAN;
    out->source = in->origin;
    JsonObject *holder = o;
    const char *vkey = key;
    g_autofree char *w = NULL;
    if (JSON_NODE_HOLDS_OBJECT(n)) {
        w = g_strdup_printf("%s: %s", where, key);
        holder = json_node_get_object(n);
        if (!bm_json_only_keys(holder, keys, w, error)
            || !source_of(in, holder, w, in->origin, &out->source, error))
            return FALSE;
        vkey = "value";
        n = json_object_get_member(holder, "value");
        if (!n)
            return invalid(error, "%s: missing key \"value\"", w);
    }
    if (JSON_NODE_HOLDS_NULL(n))
        return TRUE;
    return positive ? bm_json_positive(holder, vkey, w ? w : where, &out->value, error)
                    : bm_json_number(holder, vkey, w ? w : where, &out->value, error);
}

static gboolean sub_object(JsonObject *o, const char *key, const char *where,
                           JsonObject **out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!JSON_NODE_HOLDS_OBJECT(n))
        return invalid(error, "%s: key \"%s\" must be an object", where, key);
    *out = json_node_get_object(n);
    return TRUE;
}

/* The core's check of a gap model, named by its key: refused on reading, not
 * when a later calculation trips over it. */
static gboolean gap_in_domain(const bm_gap_model *g, const char *where, const char *key,
                              GError **error)
{
    bm_errbuf err = {0};
    if (bm_gap_model_check(g, &err) == BM_OK)
        return TRUE;
    g_autofree char *ctx = g_strdup_printf("%s: key \"%s\"", where, key);
    bm_error_from_core(error, &err, ctx);
    return FALSE;
}

static gboolean read_gap(BmMaterialInput *in, JsonObject *o, const Field *f, const char *where,
                         GError **error)
{
    bm_gap_model *g = FIELD(&in->mat, f, bm_gap_model);
    if (g->kind != BM_GAP_NONE)
        return invalid(error, "%s: give one gap model, \"varshni\", \"bose_einstein\" or "
                       "\"band_gap_ev\" (a fixed gap), not several", where);
    memset(g, 0, sizeof *g);
    g->kind = f->gap_kind;
    g->source = in->origin;
    if (f->gap_kind == BM_GAP_FIXED) {
        bm_sourced v;
        if (!read_sourced(in, o, f->key, where, FALSE, &v, error))
            return FALSE;
        if (!isfinite(v.value))
            return invalid(error, "%s: key \"band_gap_ev\" must be a number", where);
        g->eg0_ev = v.value;
        g->source = v.source;
        return gap_in_domain(g, where, f->key, error);
    }
    static const char *const vkeys[] = { "eg0_ev", "alpha_ev_per_k", "beta_k", "source", NULL };
    static const char *const bkeys[] = { "eg0_ev", "a_b_ev", "theta_k", "source", NULL };
    gboolean v = f->gap_kind == BM_GAP_VARSHNI;
    g_autofree char *w = g_strdup_printf("%s: %s", where, f->key);
    JsonObject *p = NULL;
    return sub_object(o, f->key, where, &p, error)
        && bm_json_only_keys(p, v ? vkeys : bkeys, w, error)
        && bm_json_number(p, "eg0_ev", w, &g->eg0_ev, error)
        && (v ? bm_json_number(p, "alpha_ev_per_k", w, &g->alpha_ev_per_k, error)
                && bm_json_number(p, "beta_k", w, &g->beta_k, error)
              : bm_json_number(p, "a_b_ev", w, &g->a_b_ev, error)
                && bm_json_number(p, "theta_k", w, &g->theta_k, error))
        && source_of(in, p, w, in->origin, &g->source, error)
        && gap_in_domain(g, where, f->key, error);
}

/* "conduction_valley": position, Cartesian direction, masses (bm_valley_info). */
static gboolean read_valley(BmMaterialInput *in, JsonObject *o, const Field *f,
                            const char *where, GError **error)
{
    static const char *const keys[] = { "label", "position", "direction",
                                        "longitudinal_mass_me", "transverse_mass_me",
                                        "transverse2_mass_me", "source", NULL };
    g_autofree char *w = g_strdup_printf("%s: %s", where, f->key);
    bm_valley_info *e = FIELD(&in->mat, f, bm_valley_info);
    JsonObject *v = NULL;
    const char *pos = NULL;
    bm_errbuf err = {0};
    if (!sub_object(o, f->key, where, &v, error) || !check_renamed(v, w, error)
        || !bm_json_only_keys(v, keys, w, error) || !string_member(v, "position", w, &pos, error))
        return FALSE;
    if (bm_valley_site_parse(pos, &e->site, &err) != BM_OK) {
        g_autofree char *ctx = g_strdup_printf("%s: key \"position\"", w);
        bm_error_from_core(error, &err, ctx);
        return FALSE;
    }
    e->label = bm_valley_site_name(e->site);
    if (json_object_has_member(v, "label")) {
        const char *l = NULL;
        if (!string_member(v, "label", w, &l, error))
            return FALSE;
        e->label = keep(in, l);
    }
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
    return source_of(in, v, w, in->origin, &e->source, error);
}

/* A number array of exactly n entries at o[key]. */
static gboolean fixed_numbers(JsonObject *o, const char *key, const char *where, double *out,
                              gsize n, GError **error)
{
    gsize got = 0;
    g_autofree double *v = bm_json_numbers(o, key, where, &got, error);
    if (!v)
        return FALSE;
    if (got != n)
        return invalid(error, "%s: key \"%s\" must hold %zu numbers (got %zu)", where, key,
                       (size_t)n, (size_t)got);
    memcpy(out, v, n * sizeof *out);
    return TRUE;
}

/* A DOS mass: a number, {value, source}, {points: [{temperature_k, mass_me}],
 * source} or {fit_numerator: [5], fit_denominator: [4], source}. */
static gboolean read_dos(BmMaterialInput *in, JsonObject *o, const Field *f, const char *where,
                         GError **error)
{
    static const char *const keys[] = { "value", "error_me", "points", "fit_numerator",
                                        "fit_denominator", "source", NULL };
    static const char *const pkeys[] = { "temperature_k", "mass_me", NULL };
    bm_dos_mass_model *m = FIELD(&in->mat, f, bm_dos_mass_model);
    memset(m, 0, sizeof *m);
    m->source = in->origin;
    JsonNode *n = json_object_get_member(o, f->key);
    if (!JSON_NODE_HOLDS_OBJECT(n)) {
        m->kind = BM_DOS_MASS_FIXED;
        return bm_json_positive(o, f->key, where, &m->value, error);
    }
    g_autofree char *w = g_strdup_printf("%s: %s", where, f->key);
    JsonObject *d = json_node_get_object(n);
    if (!bm_json_only_keys(d, keys, w, error)
        || !source_of(in, d, w, in->origin, &m->source, error))
        return FALSE;
    gboolean has_v = json_object_has_member(d, "value");
    gboolean has_p = json_object_has_member(d, "points");
    gboolean has_f = json_object_has_member(d, "fit_numerator")
                  || json_object_has_member(d, "fit_denominator");
    if (has_v + has_p + has_f != 1)
        return invalid(error, "%s: give exactly one of \"value\", \"points\" or "
                       "\"fit_numerator\" with \"fit_denominator\"", w);
    bm_errbuf err = {0};
    if (json_object_has_member(d, "error_me")) {
        if (!has_v)
            return invalid(error, "%s: \"error_me\" goes with a fixed \"value\"", w);
        if (!bm_json_number(d, "error_me", w, &m->error, error))
            return FALSE;
        if (!isfinite(m->error) || m->error < 0.0)
            return invalid(error, "%s: \"error_me\" = %g must be finite and >= 0", w,
                           m->error);
    }
    if (has_v) {
        m->kind = BM_DOS_MASS_FIXED;
        if (!bm_json_positive(d, "value", w, &m->value, error))
            return FALSE;
        if (m->error >= m->value)
            return invalid(error, "%s: \"error_me\" %g is not below the mass %g", w,
                           m->error, m->value);
        return TRUE;
    }
    if (has_f) {
        m->kind = BM_DOS_MASS_FIT;
        if (!fixed_numbers(d, "fit_numerator", w, m->fit_numerator, BM_DOS_FIT_NUMERATOR,
                           error)
            || !fixed_numbers(d, "fit_denominator", w, m->fit_denominator,
                              BM_DOS_FIT_DENOMINATOR, error))
            return FALSE;
    } else {
        JsonNode *pn = json_object_get_member(d, "points");
        if (!JSON_NODE_HOLDS_ARRAY(pn) || json_array_get_length(json_node_get_array(pn)) == 0)
            return invalid(error, "%s: key \"points\" must be a non-empty array of "
                           "{temperature_k, mass_me}", w);
        JsonArray *a = json_node_get_array(pn);
        m->kind = BM_DOS_MASS_TABLE;
        m->n = json_array_get_length(a);
        double *t = g_new(double, m->n), *mass = g_new(double, m->n);
        g_ptr_array_add(in->strings, t);
        g_ptr_array_add(in->strings, mass);
        m->t_k = t;
        m->mass = mass;
        for (guint i = 0; i < m->n; i++) {
            g_autofree char *pw = g_strdup_printf("%s: points[%u]", w, i);
            JsonObject *p = bm_json_element_object(a, i, pkeys, pw, error);
            if (!p || !bm_json_number(p, "temperature_k", pw, &t[i], error)
                || !bm_json_number(p, "mass_me", pw, &mass[i], error))
                return FALSE;
        }
    }
    if (bm_dos_mass_check(m, f->key, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    return TRUE;
}

static gboolean read_luttinger(BmMaterialInput *in, JsonObject *o, const Field *f,
                               const char *where, GError **error)
{
    static const char *const keys[] = { "value", "source", NULL };
    double *g = FIELD(&in->mat, f, double);
    JsonNode *n = json_object_get_member(o, f->key);
    JsonObject *holder = o;
    const char *vkey = f->key;
    g_autofree char *w = NULL;
    in->mat.luttinger_source = in->origin;
    if (JSON_NODE_HOLDS_OBJECT(n)) {
        w = g_strdup_printf("%s: %s", where, f->key);
        holder = json_node_get_object(n);
        if (!bm_json_only_keys(holder, keys, w, error)
            || !source_of(in, holder, w, in->origin, &in->mat.luttinger_source, error))
            return FALSE;
        vkey = "value";
        n = json_object_get_member(holder, "value");
        if (!n)
            return invalid(error, "%s: missing key \"value\"", w);
    }
    if (JSON_NODE_HOLDS_NULL(n))
        return TRUE;
    return fixed_numbers(holder, vkey, w ? w : where, g, 3, error);
}

static gboolean read_dopants(BmMaterialInput *in, JsonObject *o, const Field *f,
                             const char *where, GError **error)
{
    static const char *const keys[] = { "species", "kind", "ionization_ev", "degeneracy",
                                        "source", NULL };
    JsonNode *n = json_object_get_member(o, f->key);
    if (!JSON_NODE_HOLDS_ARRAY(n))
        return invalid(error, "%s: key \"dopants\" must be an array of objects", where);
    JsonArray *a = json_node_get_array(n);
    guint len = json_array_get_length(a);
    if (len > BM_MATERIAL_MAX_DOPANTS)
        return invalid(error, "%s: key \"dopants\" holds %u entries (at most %d)", where, len,
                       BM_MATERIAL_MAX_DOPANTS);
    for (guint i = 0; i < len; i++) {
        g_autofree char *w = g_strdup_printf("%s: dopants[%u]", where, i);
        JsonObject *d = bm_json_element_object(a, i, keys, w, error);
        if (!d)
            return FALSE;
        bm_material_dopant *md = &in->mat.dopants[i];
        JsonNode *sp = json_object_get_member(d, "species");
        JsonNode *kn = json_object_get_member(d, "kind");
        const char *species = is_string(sp) ? json_node_get_string(sp) : NULL;
        const char *kind = is_string(kn) ? json_node_get_string(kn) : NULL;
        if (!species || !*species)
            return invalid(error, "%s: key \"species\" must be a non-empty string", w);
        if (!kind || (strcmp(kind, "donor") && strcmp(kind, "acceptor")))
            return invalid(error, "%s: key \"kind\" must be \"donor\" or \"acceptor\"", w);
        md->element = keep(in, species);
        md->kind = strcmp(kind, "donor") ? BM_DOPANT_ACCEPTOR : BM_DOPANT_DONOR;
        md->degeneracy = 0.0;
        if (!bm_json_number(d, "ionization_ev", w, &md->ionisation_ev, error)
            || !bm_json_number_opt(d, "degeneracy", w, &md->degeneracy, error)
            || !source_of(in, d, w, in->origin, &md->source, error))
            return FALSE;
    }
    in->mat.ndopants = len;
    return TRUE;
}

/* "band_gap_narrowing": {model: "slotboom", e1_ev, n0_cm3, c, apparent, source}. */
static gboolean read_bgn(BmMaterialInput *in, JsonObject *o, const Field *f, const char *where,
                         GError **error)
{
    static const char *const keys[] = { "model", "e1_ev", "n0_cm3", "c", "apparent", "source",
                                        NULL };
    bm_bgn_model *m = FIELD(&in->mat, f, bm_bgn_model);
    memset(m, 0, sizeof *m);
    g_autofree char *w = g_strdup_printf("%s: %s", where, f->key);
    JsonObject *b = NULL;
    const char *model = NULL;
    if (!sub_object(o, f->key, where, &b, error) || !bm_json_only_keys(b, keys, w, error)
        || !string_member(b, "model", w, &model, error))
        return FALSE;
    if (strcmp(model, bm_bgn_kind_name(BM_BGN_SLOTBOOM)))
        return invalid(error, "%s: key \"model\" must be \"slotboom\" (got \"%.40s\")", w,
                       model);
    m->kind = BM_BGN_SLOTBOOM;
    JsonNode *ap = json_object_get_member(b, "apparent");
    if (!ap || !JSON_NODE_HOLDS_VALUE(ap) || json_node_get_value_type(ap) != G_TYPE_BOOLEAN)
        return invalid(error, "%s: key \"apparent\" must be true (fitted with Boltzmann "
                       "statistics) or false", w);
    m->apparent = json_node_get_boolean(ap) ? 1 : 0;
    bm_errbuf err = {0};
    double probe;
    if (!bm_json_number(b, "e1_ev", w, &m->e1_ev, error)
        || !bm_json_number(b, "n0_cm3", w, &m->n0_cm3, error)
        || !bm_json_number(b, "c", w, &m->c, error)
        || !source_of(in, b, w, in->origin, &m->source, error))
        return FALSE;
    if (bm_bgn_value(m, 0.0, &probe, &err) != BM_OK) {
        bm_error_from_core(error, &err, w);
        return FALSE;
    }
    return TRUE;
}

static gboolean read_field(BmMaterialInput *in, JsonObject *o, const Field *f,
                           const char *where, GError **error)
{
    switch (f->type) {
    case F_STRING: {
        const char *s = NULL;
        if (!string_member(o, f->key, where, &s, error))
            return FALSE;
        *FIELD(&in->mat, f, const char *) = keep(in, s);
        return TRUE;
    }
    case F_BOOL: {
        JsonNode *n = json_object_get_member(o, f->key);
        if (!n || !JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_BOOLEAN)
            return invalid(error, "%s: key \"%s\" must be true or false", where, f->key);
        *FIELD(&in->mat, f, int) = json_node_get_boolean(n) ? 1 : 0;
        return TRUE;
    }
    case F_GAP:       return read_gap(in, o, f, where, error);
    case F_VALLEY:    return read_valley(in, o, f, where, error);
    case F_DOS:       return read_dos(in, o, f, where, error);
    case F_SOURCED:
        return read_sourced(in, o, f->key, where, TRUE, FIELD(&in->mat, f, bm_sourced), error);
    case F_LUTTINGER: return read_luttinger(in, o, f, where, error);
    case F_DOPANTS:   return read_dopants(in, o, f, where, error);
    case F_BGN:       return read_bgn(in, o, f, where, error);
    }
    return FALSE;
}

static gboolean read_object(BmMaterialInput *in, JsonObject *o, const char *where,
                            GError **error)
{
    /* every field, every ignored key and the closing NULL */
    const char *allowed[G_N_ELEMENTS(fields) + N_IGNORED_KEYS + 1];
    size_t k = 0;
    for (size_t i = 0; i < G_N_ELEMENTS(fields); i++)
        allowed[k++] = fields[i].key;
    for (size_t i = 0; bm_material_ignored_keys[i]; i++)
        allowed[k++] = bm_material_ignored_keys[i];
    allowed[k] = NULL;
    if (!check_renamed(o, where, error) || !bm_json_only_keys(o, allowed, where, error))
        return FALSE;
    bm_material *m = &in->mat;
    memset(m, 0, sizeof *m);
    m->name = "custom";
    m->direct_gap = -1;
    bm_sourced *none[] = { &m->heavy_hole_mass, &m->light_hole_mass, &m->split_off_mass,
                           &m->split_off_ev, &m->relative_permittivity,
                           &m->donor_ionisation_alpha, &m->acceptor_ionisation_alpha };
    for (size_t i = 0; i < G_N_ELEMENTS(none); i++)
        *none[i] = (bm_sourced){ NAN, NULL };
    m->luttinger[0] = m->luttinger[1] = m->luttinger[2] = NAN;
    for (size_t i = 0; i < G_N_ELEMENTS(fields); i++)
        if (json_object_has_member(o, fields[i].key)
            && !read_field(in, o, &fields[i], where, error))
            return FALSE;
    return TRUE;
}

/* ---- writer ---- */

/* A "source" member of o, written when the source is known. */
static void set_source(JsonObject *o, const char *source)
{
    if (source)
        json_object_set_string_member(o, "source", source);
}

static void set_sourced(JsonObject *o, const char *key, double v, const char *source)
{
    if (!isfinite(v) && !source)
        return;
    JsonObject *s = json_object_new();
    bm_json_set_number(s, "value", v);
    set_source(s, source);
    json_object_set_object_member(o, key, s);
}

JsonObject *bm_material_gap_parameters(const bm_gap_model *g)
{
    JsonObject *p = json_object_new();
    bm_json_set_number(p, "eg0_ev", g->eg0_ev);
    if (g->kind == BM_GAP_VARSHNI) {
        bm_json_set_number(p, "alpha_ev_per_k", g->alpha_ev_per_k);
        bm_json_set_number(p, "beta_k", g->beta_k);
    } else if (g->kind == BM_GAP_BOSE_EINSTEIN) {
        bm_json_set_number(p, "a_b_ev", g->a_b_ev);
        bm_json_set_number(p, "theta_k", g->theta_k);
    }
    return p;
}

static JsonObject *gap_json(const bm_gap_model *g)
{
    JsonObject *p = bm_material_gap_parameters(g);
    set_source(p, g->source);
    return p;
}

static JsonObject *valley_json(const bm_valley_info *e)
{
    JsonObject *v = json_object_new();
    json_object_set_string_member(v, "label", e->label);
    json_object_set_string_member(v, "position", bm_valley_site_name(e->site));
    /* written Cartesian (the reader's convention); the tabulated direction
     * and its basis are among the "derived" values of the materials operation */
    double cart[3];
    if (bm_valley_info_direction(e, cart, NULL) == BM_OK
        && (e->site != BM_SITE_GAMMA || cart[0] != 0.0 || cart[1] != 0.0 || cart[2] != 0.0))
        bm_json_set_vec3(v, "direction", cart);
    bm_json_set_number(v, "longitudinal_mass_me", e->m_longitudinal);
    bm_json_set_number(v, "transverse_mass_me", e->m_transverse);
    bm_json_set_number(v, "transverse2_mass_me", e->m_transverse2);
    set_source(v, e->source);
    return v;
}

static JsonObject *dos_json(const bm_dos_mass_model *m)
{
    JsonObject *d = json_object_new();
    if (m->kind == BM_DOS_MASS_FIXED) {
        bm_json_set_number(d, "value", m->value);
        if (m->error > 0.0)
            bm_json_set_number(d, "error_me", m->error);
    } else if (m->kind == BM_DOS_MASS_FIT) {
        bm_json_set_numbers(d, "fit_numerator", m->fit_numerator, BM_DOS_FIT_NUMERATOR);
        bm_json_set_numbers(d, "fit_denominator", m->fit_denominator, BM_DOS_FIT_DENOMINATOR);
    } else {
        JsonArray *a = json_array_new();
        for (size_t i = 0; i < m->n; i++) {
            JsonObject *p = json_object_new();
            bm_json_set_number(p, "temperature_k", m->t_k[i]);
            bm_json_set_number(p, "mass_me", m->mass[i]);
            json_array_add_object_element(a, p);
        }
        json_object_set_array_member(d, "points", a);
    }
    set_source(d, m->source);
    return d;
}

static void write_field(JsonObject *o, const bm_material *m, const Field *f)
{
    switch (f->type) {
    case F_STRING: {
        const char *s = *CFIELD(m, f, char *);
        if (s)
            json_object_set_string_member(o, f->key, s);
        return;
    }
    case F_BOOL: {
        int b = *CFIELD(m, f, int);
        if (b >= 0)
            json_object_set_boolean_member(o, f->key, b);
        return;
    }
    case F_GAP: {
        const bm_gap_model *g = CFIELD(m, f, bm_gap_model);
        if (g->kind != f->gap_kind)
            return;
        if (g->kind == BM_GAP_FIXED)
            set_sourced(o, f->key, g->eg0_ev, g->source);
        else
            json_object_set_object_member(o, f->key, gap_json(g));
        return;
    }
    case F_VALLEY: {
        const bm_valley_info *e = CFIELD(m, f, bm_valley_info);
        if (e->label)
            json_object_set_object_member(o, f->key, valley_json(e));
        return;
    }
    case F_DOS: {
        const bm_dos_mass_model *d = CFIELD(m, f, bm_dos_mass_model);
        if (d->kind != BM_DOS_MASS_NONE)
            json_object_set_object_member(o, f->key, dos_json(d));
        return;
    }
    case F_SOURCED: {
        const bm_sourced *s = CFIELD(m, f, bm_sourced);
        set_sourced(o, f->key, s->value, s->source);
        return;
    }
    case F_LUTTINGER: {
        const double *g = CFIELD(m, f, double);
        if (!isfinite(g[0]) && !m->luttinger_source)
            return;
        JsonObject *l = json_object_new();
        if (isfinite(g[0]) && isfinite(g[1]) && isfinite(g[2]))
            bm_json_set_vec3(l, "value", g);
        else
            json_object_set_null_member(l, "value");
        set_source(l, m->luttinger_source);
        json_object_set_object_member(o, f->key, l);
        return;
    }
    case F_DOPANTS: {
        JsonArray *d = json_array_new();
        for (size_t i = 0; i < m->ndopants && i < BM_MATERIAL_MAX_DOPANTS; i++) {
            const bm_material_dopant *md = &m->dopants[i];
            JsonObject *e = json_object_new();
            json_object_set_string_member(e, "species", md->element);
            json_object_set_string_member(e, "kind", md->kind == BM_DOPANT_DONOR ? "donor"
                                                                                 : "acceptor");
            bm_json_set_number(e, "ionization_ev", md->ionisation_ev);
            if (md->degeneracy > 0.0)
                bm_json_set_number(e, "degeneracy", md->degeneracy);
            set_source(e, md->source);
            json_array_add_object_element(d, e);
        }
        json_object_set_array_member(o, f->key, d);
        return;
    }
    case F_BGN: {
        const bm_bgn_model *b = CFIELD(m, f, bm_bgn_model);
        if (b->kind == BM_BGN_NONE)
            return;
        JsonObject *e = json_object_new();
        json_object_set_string_member(e, "model", bm_bgn_kind_name(b->kind));
        bm_json_set_number(e, "e1_ev", b->e1_ev);
        bm_json_set_number(e, "n0_cm3", b->n0_cm3);
        bm_json_set_number(e, "c", b->c);
        json_object_set_boolean_member(e, "apparent", b->apparent != 0);
        set_source(e, b->source);
        json_object_set_object_member(o, f->key, e);
        return;
    }
    }
}

JsonObject *bm_material_to_json(const bm_material *m)
{
    JsonObject *o = json_object_new();
    for (size_t i = 0; i < G_N_ELEMENTS(fields); i++)
        write_field(o, m, &fields[i]);
    return o;
}

/* ---- request value ---- */

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
    if (!is_string(n))
        return invalid(error, "request: key \"%s\" must be a material name, a file name or "
                       "an object", key);
    const char *name = json_node_get_string(n);
    bm_errbuf err = {0};
    const bm_material *m = bm_material_find(name, &err);
    if (m) {
        out->mat = *m;
        out->builtin = TRUE;
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
    g_autofree char *text = NULL;
    gsize len = 0;
    g_autofree char *what = g_strdup_printf("material file %s", name);
    if (!bm_error_read_file(name, "material file", &text, &len, error)
        || !bm_json_check_depth(text, (gssize)len, what, error)
        || !json_parser_load_from_data(parser, text, (gssize)len, &io)) {
        if (io)
            g_set_error(error, BM_ERROR, BM_ERROR_IO, "request: key \"%s\": material file %s: %s",
                        key, name, io->message);
        return FALSE;
    }
    JsonNode *root = json_parser_get_root(parser);
    if (!root || !JSON_NODE_HOLDS_OBJECT(root))
        return invalid(error, "material file %s: the top level must be an object", name);
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
