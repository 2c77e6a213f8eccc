/* valley-average.c: operation "valley-average" -- the star of a valley under a
 * point group, or an explicit valley list, and its conductivity and DOS masses. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-valleys.h"
#include "bm-materials.h"
#include "material-input.h"
#include "bm-enums.h"

/* const view of a double[3][3] for the setters (C11 qualifier rules) */
#define CM3(m) ((const double (*)[3])(m))

static const BmParam params[] = {
    { "valley", BM_VALUE_OBJECT, FALSE, NULL,
      "one valley, expanded by symmetry: {longitudinal_mass_me, transverse_mass_me, axis}, "
      "{principal_masses_me, axes} (optional direction: position, default the axis), or an "
      "extremum of mass-tensor as it is (or its whole response when it holds one extremum)",
      .unit = NULL },
    { "point_group", BM_VALUE_STRING, FALSE, NULL,
      "crystal point group for \"valley\" (Schoenflies, e.g. Oh, Td, D6h, C6v, D4h, "
      "or international, e.g. m-3m)", .unit = NULL },
    { "position", BM_VALUE_STRING, FALSE, NULL,
      "where \"valley\" sits (default interior; for an extremum of mass-tensor, from "
      "its k)", .choices = &bm_enum_valley_site },
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, FALSE, NULL,
      "instead of \"valley\": a built-in material name, an object or a JSON file; its "
      "conduction valley and point group give the star", .unit = NULL },
    { "valleys", BM_VALUE_ARRAY, FALSE, NULL,
      "explicit valley list, each a valley object plus energy_offset_ev (default 0, "
      "positive away from the band edge) and weight (default 1)", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL,
      "temperature for thermal valley populations (needed when offsets differ)",
      .unit = "K", .lower = BM_GE(0) },
    { "statistics", BM_VALUE_STRING, FALSE, BM_STATISTICS_DEFAULT_JSON,
      "statistics of the thermal populations (fermi-dirac needs fermi_level_ev)",
      .choices = &bm_enum_statistics },
    { "fermi_level_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "Fermi level for fermi-dirac, measured like the offsets (positive into the band)",
      .unit = "eV" },
    BM_PARAM_END
};

static const BmField response[] = {
    { "valley_count", NULL, FALSE, "number of valleys (sum of the weights)" },
    { "dos_mass_me", "m_e", FALSE, "density-of-states mass of all valleys together" },
    { "dos_mass_reference", NULL, FALSE, "the edge the DOS mass refers to" },
    { "conductivity_mass_tensor_me", "m_e", FALSE,
      "conductivity mass tensor: inverse of the population-weighted mean inverse tensor" },
    { "conductivity_mass_me", "m_e", FALSE, "3 / trace of the inverse tensor" },
    { "conductivity_isotropic", NULL, FALSE, "whether the tensor is a scalar" },
    { "conductivity_mass_meaning", NULL, TRUE,
      "what conductivity_mass_me is when the tensor is not isotropic" },
    { "conductivity_principal_masses_me", "m_e", TRUE,
      "principal values of the tensor (not isotropic)" },
    { "conductivity_principal_axes", NULL, TRUE,
      "their axes, rows of Cartesian unit vectors (not isotropic)" },
    { "population", NULL, FALSE,
      "how the valleys are populated: {statistics (equal, boltzmann, fermi-dirac), "
      "temperature_k, fermi_level_ev}" },
    { "material", NULL, TRUE, "the material's name (with \"material\")" },
    { "valley_source", NULL, TRUE, "source of the material's valley (with \"material\")" },
    { "point_group", NULL, TRUE, "the point group of the star (with \"valley\" or \"material\")" },
    { "position", NULL, TRUE, "the valley site of the star (with \"valley\" or \"material\")" },
    { "position_from", NULL, TRUE,
      "how the site was chosen: request, default, or the extremum's k (with \"valley\")" },
    { "direction_snapped", NULL, TRUE,
      "an extremum's direction turned onto its symmetry element: {angle_rad, tolerance_rad "
      "(twice k_error / |k|, 1e-4 to 0.05)}" },
    { "carrier", NULL, FALSE,
      "electron, or hole when the valleys have negative masses (a band maximum)" },
    { "carrier_note", NULL, TRUE, "for holes: how the negative masses were taken" },
    { "valleys", NULL, FALSE,
      "each valley: direction, weight, principal_masses_me, axes, energy_offset_ev, "
      "population_fraction" },
    BM_FIELD_END
};

/* A single valley takes the shape keys; an entry of a list also its offset
 * and weight. Each list is written once and the entry form extends it. */
#define VALLEY_KEYS \
    "longitudinal_mass_me", "transverse_mass_me", "axis", "principal_masses_me", "axes", \
    "direction"
/* An element of mass-tensor's "extrema", taken as it is. */
#define EXTREMUM_KEYS \
    "kind", "dims", "energy_ev", "k_inv_angstrom", "k_fractional", "principal_masses_me", \
    "principal_axes", "inverse_mass_tensor_per_me", "fit_rms_ev", "divergent", "method", \
    "crossing_partner_band", "principal_masses_error_me", "k_error_inv_angstrom", \
    "converged", "refinement_stencil", "directional_masses", "symmetry_snap", \
    "degenerate_kp_fit", "warnings", "warning_codes"
#define LIST_ENTRY_KEYS "energy_offset_ev", "weight"
static const char *const valley_keys[] = { VALLEY_KEYS, NULL };
static const char *const list_entry_keys[] = { VALLEY_KEYS, LIST_ENTRY_KEYS, NULL };
static const char *const extremum_keys[] = { EXTREMUM_KEYS, NULL };
static const char *const extremum_entry_keys[] = { EXTREMUM_KEYS, LIST_ENTRY_KEYS, NULL };

/* Which carriers a valley holds: negative inertial masses (a band maximum)
 * make a hole valley, averaged with the hole masses |m|. */
typedef enum { CARRIER_UNKNOWN, CARRIER_ELECTRON, CARRIER_HOLE } Carrier;

static const char *carrier_name(Carrier c)
{
    return c == CARRIER_HOLE ? "hole" : "electron";
}

/* One valley as parsed: its shape (positive masses), position and carriers. */
typedef struct {
    bm_valley_shape shape;
    double dir[3];
    gboolean has_dir;
    Carrier carrier;
    gboolean site_known;        /* an extremum's k fixes gamma / interior / face */
    double snap_tol;            /* an extremum's direction is snapped within this (0: not) */
    bm_valley_site site;
} ParsedValley;

/* Masses all of one sign: positive an electron valley, negative a hole valley
 * (made positive here); mixed signs are a saddle, not a valley. */
static gboolean signed_masses(double *m, int n, const char *where, Carrier *carrier,
                              GError **error)
{
    int neg = 0, pos = 0;
    for (int i = 0; i < n; i++) {
        neg += m[i] < 0.0;
        pos += m[i] > 0.0;
    }
    if (neg && pos) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: masses of both signs describe a saddle point, not a valley", where);
        return FALSE;
    }
    *carrier = neg ? CARRIER_HOLE : CARRIER_ELECTRON;
    for (int i = 0; neg && i < n; i++)
        m[i] = -m[i];
    return TRUE;
}

static gboolean is_extremum(JsonObject *v)
{
    return json_object_has_member(v, "kind") || json_object_has_member(v, "principal_axes");
}

/* gamma when k vanishes, face when k and -k differ by a reciprocal-lattice
 * vector (2 k_fractional integral), interior otherwise; without k_fractional
 * (a k-table) only gamma is recognised. */
static void extremum_site(JsonObject *v, const double k[3], ParsedValley *p)
{
    double kf[3];
    JsonNode *kfn = json_object_get_member(v, "k_fractional");
    gboolean has_frac = kfn && JSON_NODE_HOLDS_ARRAY(kfn)
                     && bm_json_vec3(v, "k_fractional", NULL, kf, NULL);
    double kn = sqrt(k[0] * k[0] + k[1] * k[1] + k[2] * k[2]);
    p->site_known = TRUE;
    if (kn < 1e-6) {
        p->site = BM_SITE_GAMMA;
        return;
    }
    p->site = BM_SITE_INTERIOR;
    if (!has_frac) {
        p->site_known = FALSE;
        return;
    }
    gboolean half = TRUE;
    for (int i = 0; i < 3; i++)
        half = half && fabs(2.0 * kf[i] - nearbyint(2.0 * kf[i])) < 1e-6;
    if (half)
        p->site = BM_SITE_FACE;
}

/* An extremum of mass-tensor: a minimum is an electron valley, a maximum a hole
 * valley; saddles, line cuts, sheets and divergent masses are refused. */
static gboolean parse_extremum(JsonObject *v, const char *where, gboolean list_entry,
                               ParsedValley *p, bm_warnings *warn, GError **error)
{
    bm_errbuf err = {0};
    if (!bm_json_only_keys(v, list_entry ? extremum_entry_keys : extremum_keys, where, error))
        return FALSE;
    JsonNode *kn = json_object_get_member(v, "kind");
    const char *kind = kn && JSON_NODE_HOLDS_VALUE(kn)
                    && json_node_get_value_type(kn) == G_TYPE_STRING
                     ? json_node_get_string(kn) : NULL;
    if (!kind || (strcmp(kind, "minimum") && strcmp(kind, "maximum"))) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: an extremum of mass-tensor must have \"kind\" minimum or maximum "
                    "(got %s%s%s)%s", where, kind ? "\"" : "", kind ? kind : "none",
                    kind ? "\"" : "",
                    kind && !strcmp(kind, "saddle")
                    ? ": a saddle point (masses of both signs) is not a valley" : "");
        return FALSE;
    }
    JsonNode *dn = json_object_get_member(v, "dims");
    if (dn && JSON_NODE_HOLDS_VALUE(dn) && json_node_get_value_type(dn) == G_TYPE_INT64
        && json_node_get_int(dn) != 3) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: the extremum was found in %d dimension(s) (a line cut or a sheet); "
                    "a valley average needs all three principal masses", where,
                    (int)json_node_get_int(dn));
        return FALSE;
    }
    JsonNode *mn = json_object_get_member(v, "principal_masses_me");
    JsonArray *ma = mn && JSON_NODE_HOLDS_ARRAY(mn) ? json_node_get_array(mn) : NULL;
    if (!ma || json_array_get_length(ma) != 3) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"principal_masses_me\" must hold 3 masses", where);
        return FALSE;
    }
    for (guint i = 0; i < 3; i++) {
        JsonNode *e = json_array_get_element(ma, i);
        GType t = JSON_NODE_HOLDS_VALUE(e) ? json_node_get_value_type(e) : G_TYPE_INVALID;
        if (t == G_TYPE_DOUBLE || t == G_TYPE_INT64) {
            p->shape.masses[i] = json_node_get_double(e);
            continue;
        }
        const char *word = t == G_TYPE_STRING ? json_node_get_string(e) : NULL;
        gboolean degenerate = word && !strcmp(word, "degenerate");
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: principal_masses_me[%u] is %s: %s", where, i,
                    degenerate ? "\"degenerate\"" : word ? "\"divergent\"" : "null",
                    degenerate
                    ? "bands touch at this extremum, so it has no single-band valley mass"
                    : word
                    ? "a direction without a finite inertial mass (a conical or flat band) "
                      "has no valley average"
                    : "a direction the band data do not sample has no valley average");
        return FALSE;
    }
    Carrier want = strcmp(kind, "minimum") ? CARRIER_HOLE : CARRIER_ELECTRON;
    if (!signed_masses(p->shape.masses, 3, where, &p->carrier, error))
        return FALSE;
    if (p->carrier != want) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: a %s must have %s masses", where, kind,
                    want == CARRIER_HOLE ? "negative" : "positive");
        return FALSE;
    }
    if (!bm_json_mat3(v, "principal_axes", where, p->shape.axes, error)
        || !bm_json_vec3(v, "k_inv_angstrom", where, p->dir, error))
        return FALSE;
    if (bm_valley_shape_normalise(&p->shape, warn, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    extremum_site(v, p->dir, p);
    p->has_dir = p->site != BM_SITE_GAMMA;
    /* a numerical position is snapped onto its symmetry element, within its
     * own error (k_error / |k|, at least 1e-4, at most 0.05 rad) */
    double klen = sqrt(p->dir[0] * p->dir[0] + p->dir[1] * p->dir[1] + p->dir[2] * p->dir[2]);
    JsonNode *ke = json_object_get_member(v, "k_error_inv_angstrom");
    double kerr = ke && JSON_NODE_HOLDS_VALUE(ke) ? json_node_get_double(ke) : NAN;
    p->snap_tol = isfinite(kerr) && klen > 0.0 ? fmin(fmax(2.0 * kerr / klen, 1e-4), 0.05) : 1e-3;
    return TRUE;
}

/* Reads a valley: the spheroid or general form, or an extremum of mass-tensor. */
static gboolean parse_valley(JsonObject *v, const char *where, gboolean list_entry,
                             ParsedValley *p, bm_warnings *warn, GError **error)
{
    bm_errbuf err = {0};
    memset(p, 0, sizeof *p);
    if (is_extremum(v))
        return parse_extremum(v, where, list_entry, p, warn, error);
    if (!bm_json_only_keys(v, list_entry ? list_entry_keys : valley_keys, where, error))
        return FALSE;
    gboolean spheroid = json_object_has_member(v, "longitudinal_mass_me")
                     || json_object_has_member(v, "transverse_mass_me");
    gboolean general = json_object_has_member(v, "principal_masses_me")
                    || json_object_has_member(v, "axes");
    if (spheroid == general) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: give either longitudinal_mass_me, transverse_mass_me and axis, "
                    "or principal_masses_me and axes (or an extremum of mass-tensor)", where);
        return FALSE;
    }
    if (spheroid) {
        double m[2], ax[3];
        if (!bm_json_number(v, "longitudinal_mass_me", where, &m[0], error)
            || !bm_json_number(v, "transverse_mass_me", where, &m[1], error)
            || !bm_json_vec3(v, "axis", where, ax, error)
            || !signed_masses(m, 2, where, &p->carrier, error))
            return FALSE;
        if (bm_valley_shape_spheroid(m[0], m[1], ax, &p->shape, &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            return FALSE;
        }
        memcpy(p->dir, ax, sizeof ax);
        p->has_dir = TRUE;
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
        if (!signed_masses(m, 3, where, &p->carrier, error)
            || !bm_json_mat3(v, "axes", where, p->shape.axes, error))
            return FALSE;
        memcpy(p->shape.masses, m, sizeof p->shape.masses);
        if (bm_valley_shape_normalise(&p->shape, warn, &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            return FALSE;
        }
    }
    if (json_object_has_member(v, "direction")) {
        if (!bm_json_vec3(v, "direction", where, p->dir, error))
            return FALSE;
        p->has_dir = TRUE;
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
    const char *site_from;       /* how the position was chosen (star only) */
    double snapped_rad;          /* the direction was turned by this onto its symmetry element */
    double snap_tol;             /* within this tolerance (0: no snapping) */
    BmMaterialInput mat;         /* material path only */
    gboolean has_mat;
    Carrier carrier;             /* one kind for all valleys */
    bm_warnings pw;              /* parsing warnings */
    bm_warnings carried;         /* warnings of extrema given as valleys */
} ValleySet;

static void valley_set_clear(ValleySet *s)
{
    bm_warnings_clear(&s->pw);
    if (s->star) {
        bm_warnings_clear(&s->star->warnings);
        g_free(s->star);
    }
    else
        g_free(s->valleys);
    if (s->has_mat)
        bm_material_input_clear(&s->mat);
    bm_warnings_clear(&s->carried);
}

/* The code of element i of an extremum's "warning_codes", when it names one. */
static bm_warn_code carried_code(JsonArray *codes, guint i)
{
    JsonNode *n = codes && i < json_array_get_length(codes)
                ? json_array_get_element(codes, i) : NULL;
    if (n && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING)
        for (int c = 0; c < BM_WARN_COUNT; c++)
            if (!strcmp(json_node_get_string(n), bm_warn_code_name((bm_warn_code)c)))
                return (bm_warn_code)c;
    return BM_WARN_EXTREMUM_WARNINGS;
}

/* Records p's carriers (all valleys must agree) and, for an extremum, the
 * warnings it came with, so they stay beside the numbers made from it. */
static gboolean adopt(ValleySet *s, const ParsedValley *p, JsonObject *v, const char *where,
                      GError **error)
{
    if (s->carrier != CARRIER_UNKNOWN && s->carrier != p->carrier) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: a %s valley among %s valleys (negative masses mean holes): "
                    "average electron and hole valleys separately", where,
                    carrier_name(p->carrier), carrier_name(s->carrier));
        return FALSE;
    }
    s->carrier = p->carrier;
    JsonNode *wn = json_object_get_member(v, "warnings");
    if (!is_extremum(v) || !wn || !JSON_NODE_HOLDS_ARRAY(wn))
        return TRUE;
    JsonArray *wa = json_node_get_array(wn);
    JsonNode *cn = json_object_get_member(v, "warning_codes");
    JsonArray *ca = cn && JSON_NODE_HOLDS_ARRAY(cn) ? json_node_get_array(cn) : NULL;
    for (guint i = 0; i < json_array_get_length(wa); i++) {
        JsonNode *e = json_array_get_element(wa, i);
        if (!JSON_NODE_HOLDS_VALUE(e) || json_node_get_value_type(e) != G_TYPE_STRING)
            continue;
        bm_warn(&s->carried, carried_code(ca, i), "%s (from mass-tensor): %s", where,
                json_node_get_string(e));
    }
    return TRUE;
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
    double d[3] = { dir[0], dir[1], dir[2] };
    if (s->snap_tol > 0.0 && site != BM_SITE_GAMMA
        && bm_valley_snap_direction(d, &g, s->snap_tol, &s->snapped_rad, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    s->star = g_new0(bm_valley_star, 1);
    if (bm_valley_star_build(shape, site, d, &g, s->star, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    s->valleys = s->star->valleys;
    s->n = s->star->n;
    s->count = s->star->valley_count;
    s->group_name = group_name;
    s->site_name = bm_enum_name(&bm_enum_valley_site, (int)site);
    return TRUE;
}

/* "valley" may be a whole mass-tensor response holding a single extremum. */
static JsonObject *single_valley(JsonObject *request, GError **error)
{
    JsonObject *v = json_object_get_object_member(request, "valley");
    JsonNode *en = json_object_get_member(v, "extrema");
    if (!en)
        return v;
    JsonArray *ea = JSON_NODE_HOLDS_ARRAY(en) ? json_node_get_array(en) : NULL;
    guint n = ea ? json_array_get_length(ea) : 0;
    JsonNode *first = n ? json_array_get_element(ea, 0) : NULL;
    if (n != 1 || !JSON_NODE_HOLDS_OBJECT(first)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "valley: a mass-tensor response given as the valley must hold exactly one "
                    "extremum (it holds %u): pass one element of its \"extrema\", or run "
                    "mass-tensor with \"extremum\": \"minimum\" or \"maximum\"", n);
        return NULL;
    }
    return json_node_get_object(first);
}

/* "valley" + "point_group" + "position". */
static gboolean from_valley(JsonObject *request, ValleySet *s, GError **error)
{
    if (!json_object_has_member(request, "point_group")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"valley\" needs \"point_group\" (e.g. \"Oh\")");
        return FALSE;
    }
    JsonObject *v = single_valley(request, error);
    ParsedValley p;
    if (!v || !parse_valley(v, "valley", FALSE, &p, &s->pw, error) || !adopt(s, &p, v, "valley", error))
        return FALSE;
    /* the registry checked "position" against the valley sites */
    bm_valley_site site = BM_SITE_INTERIOR;
    s->site_from = "default";
    if (json_object_has_member(request, "position")) {
        site = (bm_valley_site)bm_enum_value(request, "position", &bm_enum_valley_site);
        s->site_from = "request";
    } else if (p.site_known) {
        site = p.site;
        s->site_from = "the extremum's k (gamma at k = 0, face where 2 k_fractional is a "
                       "reciprocal-lattice vector)";
    }
    s->snap_tol = p.snap_tol;
    if (site != BM_SITE_GAMMA && !p.has_dir) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "valley: a valley at position \"%s\" needs a direction (\"direction\", "
                    "or k away from Gamma)", bm_enum_name(&bm_enum_valley_site, (int)site));
        return FALSE;
    }
    return build_star(s, &p.shape, site, p.dir,
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
        ParsedValley p;
        double off = 0.0, w = 1.0;
        if (!parse_valley(v, where, TRUE, &p, &s->pw, error) || !adopt(s, &p, v, where, error)
            || !bm_json_number_opt(v, "energy_offset_ev", where, &off, error)
            || !bm_json_number_opt(v, "weight", where, &w, error))
            return FALSE;
        if (bm_valley_from_shape(&p.shape, p.has_dir ? p.dir : NULL, w, off, &s->valleys[i], &err)
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
    /* the registry checked "statistics" against the one statistics table */
    pop->statistics = (bm_statistics)bm_enum_value(request, "statistics", &bm_enum_statistics);
    *has_t = json_object_has_member(request, "temperature_k");
    if (!*has_t) {
        if (json_object_has_member(request, "fermi_level_ev")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"fermi_level_ev\" needs \"temperature_k\" (without a "
                        "temperature every valley is populated alike)");
            return FALSE;
        }
        return TRUE;   /* equal populations: the statistics do not enter */
    }
    pop->thermal = 1;
    if (!bm_json_number(request, "temperature_k", NULL, &pop->temperature_k, error))
        return FALSE;
    if (pop->statistics != BM_FERMI_DIRAC)
        return TRUE;
    if (!json_object_has_member(request, "fermi_level_ev")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: fermi-dirac populations (the default \"statistics\") need "
                    "\"fermi_level_ev\"; give it, or \"statistics\": \"boltzmann\" for "
                    "non-degenerate carriers");
        return FALSE;
    }
    return bm_json_number(request, "fermi_level_ev", NULL, &pop->fermi_level_ev, error);
}

static JsonObject *population_json(const bm_population *pop, gboolean has_t)
{
    JsonObject *p = json_object_new();
    json_object_set_string_member(p, "statistics", !pop->thermal ? "equal"
                                  : bm_enum_name(&bm_enum_statistics, (int)pop->statistics));
    if (has_t)
        bm_json_set_number(p, "temperature_k", pop->temperature_k);
    if (pop->thermal && pop->statistics == BM_FERMI_DIRAC)
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
        if (s->site_from)
            json_object_set_string_member(resp, "position_from", s->site_from);
        if (s->snap_tol > 0.0) {
            JsonObject *sn = json_object_new();
            bm_json_set_number(sn, "angle_rad", s->snapped_rad);
            bm_json_set_number(sn, "tolerance_rad", s->snap_tol);
            json_object_set_object_member(resp, "direction_snapped", sn);
        }
    }
    json_object_set_string_member(resp, "carrier", carrier_name(s->carrier));
    if (s->carrier == CARRIER_HOLE)
        json_object_set_string_member(resp, "carrier_note",
                                      "negative inertial masses (a band maximum): a hole "
                                      "valley, averaged with the hole masses |m|");
    json_object_set_array_member(resp, "valleys", valleys_json(s));
    bm_json_warn_all(resp, &s->pw);
    bm_json_warn_all(resp, &s->carried);
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

/* Without a temperature every valley is populated alike, which needs equal
 * energy offsets: said here in the request's terms. */
static gboolean offsets_differ(const ValleySet *s)
{
    for (size_t i = 1; i < s->n; i++)
        if (s->valleys[i].energy_offset_ev != s->valleys[0].energy_offset_ev)
            return TRUE;
    return FALSE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_errbuf err = {0};
    ValleySet s = {0};
    bm_population pop = {0, BM_FERMI_DIRAC, 0.0, 0.0};
    gboolean has_t = FALSE;
    JsonObject *resp = NULL;
    if (!read_valleys(request, &s, error) || !read_population(request, &pop, &has_t, error))
        goto done;
    if (!has_t && offsets_differ(&s)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: the valleys' energy_offset_ev differ: give \"temperature_k\"");
        goto done;
    }
    bm_valley_average avg;
    if (bm_valley_average_compute(s.valleys, s.n, &pop, &avg, &err) != BM_OK) {
        bm_error_from_core(error, &err, "valley-average");
        goto done;
    }
    resp = respond(&s, &pop, has_t, &avg);
    bm_warnings_clear(&avg.warnings);
done:
    valley_set_clear(&s);
    return resp;
}

const BmOperation bm_op_valley_average = {
    .name = "valley-average",
    .summary = "Valley star from a point group or a material (or an explicit list) and its "
               "conductivity and density-of-states masses",
    .params = params,
    .run = run,
    .response = response,
};
