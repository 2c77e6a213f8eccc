/* valley-input.c: the valley keys shared by the valley operations ("valley" with
 * "point_group" and "position", "material", or an explicit "valleys" list) read
 * into the core's valley star or list. No physics: the star is the core's. */
#include <math.h>
#include <string.h>

#include "valley-input.h"
#include "bm-json.h"
#include "bm-enums.h"

/* A single valley takes the shape keys; an entry of a list also its offset
 * and weight. Each list is written once and the entry form extends it. */
#define VALLEY_KEYS \
    "longitudinal_mass_me", "transverse_mass_me", "axis", "principal_masses_me", "axes", \
    "direction", "k_inv_angstrom", "longitudinal_mass_error_me", "transverse_mass_error_me", \
    "principal_masses_error_me"
/* An element of mass-tensor's "extrema", taken as it is. */
#define EXTREMUM_KEYS \
    "kind", "dims", "energy_ev", "k_inv_angstrom", "k_fractional", "principal_masses_me", \
    "principal_axes", "inverse_mass_tensor_per_me", "fit_rms_ev", "divergent", "method", \
    "crossing_partner_band", "principal_masses_error_me", "principal_masses_stderr_me", \
    "fit_window", "k_error_inv_angstrom", \
    "converged", "refinement_stencil", "directional_masses", "symmetry_snap", "line_fit", \
    "degenerate_kp_fit", "band_cuts", "warnings", "warning_codes"
#define LIST_ENTRY_KEYS "energy_offset_ev", "weight"
static const char *const valley_keys[] = { VALLEY_KEYS, NULL };
static const char *const list_entry_keys[] = { VALLEY_KEYS, LIST_ENTRY_KEYS, NULL };
static const char *const extremum_keys[] = { EXTREMUM_KEYS, NULL };
static const char *const extremum_entry_keys[] = { EXTREMUM_KEYS, LIST_ENTRY_KEYS, NULL };


const char *bm_valley_carrier_name(BmValleyCarrier c)
{
    return c == BM_CARRIER_HOLE ? "hole" : "electron";
}

/* One valley as parsed: its shape (positive masses), position and carriers. */
typedef struct {
    bm_valley_shape shape;
    double dir[3];
    gboolean has_dir;
    BmValleyCarrier carrier;
    gboolean has_k;             /* dir is the valley's k, 1/Angstrom (not only a direction) */
    int nerr;                   /* mass parameters with errors: 2 (m_l, m_t), 3 (principal) */
    double merr[3];             /* their errors, m_e (NAN: none given) */
    gboolean site_known;        /* an extremum's k fixes gamma / interior / face */
    double snap_tol;            /* an extremum's direction is snapped within this (0: not) */
    bm_valley_site site;
} ParsedValley;

/* Masses all of one sign: positive an electron valley, negative a hole valley
 * (made positive here); mixed signs are a saddle, not a valley. */
static gboolean signed_masses(double *m, int n, const char *where, BmValleyCarrier *carrier,
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
    *carrier = neg ? BM_CARRIER_HOLE : BM_CARRIER_ELECTRON;
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

/* Errors of the principal masses, when given: numbers >= 0, or null (not
 * assessed: then no error is propagated at all). */
static gboolean mass_errors(JsonObject *v, const char *key, int n, const char *where,
                            ParsedValley *p, GError **error)
{
    JsonNode *en = json_object_get_member(v, key);
    if (!en || JSON_NODE_HOLDS_NULL(en))
        return TRUE;
    JsonArray *ea = JSON_NODE_HOLDS_ARRAY(en) ? json_node_get_array(en) : NULL;
    if (!ea || json_array_get_length(ea) != (guint)n) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: \"%s\" must hold %d errors",
                    where, key, n);
        return FALSE;
    }
    for (int i = 0; i < n; i++) {
        JsonNode *e = json_array_get_element(ea, (guint)i);
        GType t = JSON_NODE_HOLDS_VALUE(e) ? json_node_get_value_type(e) : G_TYPE_INVALID;
        if (JSON_NODE_HOLDS_NULL(e))
            return TRUE;   /* one not assessed: no propagation */
        double x = t == G_TYPE_DOUBLE || t == G_TYPE_INT64 ? json_node_get_double(e) : NAN;
        if (!isfinite(x) || x < 0.0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: %s[%d] must be a "
                        "finite number >= 0 (or null)", where, key, i);
            return FALSE;
        }
        p->merr[i] = x;
    }
    p->nerr = n;
    return TRUE;
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
    BmValleyCarrier want = strcmp(kind, "minimum") ? BM_CARRIER_HOLE : BM_CARRIER_ELECTRON;
    if (!signed_masses(p->shape.masses, 3, where, &p->carrier, error))
        return FALSE;
    if (p->carrier != want) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: a %s must have %s masses", where, kind,
                    want == BM_CARRIER_HOLE ? "negative" : "positive");
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
    p->has_k = TRUE;
    if (!mass_errors(v, "principal_masses_error_me", 3, where, p, error))
        return FALSE;
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
        if (json_object_has_member(v, "principal_masses_error_me")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: a spheroidal valley "
                        "takes longitudinal_mass_error_me and transverse_mass_error_me", where);
            return FALSE;
        }
        double e[2] = { NAN, NAN };
        gboolean any = FALSE;
        static const char *const ek[2] = { "longitudinal_mass_error_me", "transverse_mass_error_me" };
        for (int i = 0; i < 2; i++)
            if (json_object_has_member(v, ek[i])) {
                any = TRUE;
                if (!bm_json_number(v, ek[i], where, &e[i], error))
                    return FALSE;
                if (!isfinite(e[i]) || e[i] < 0.0) {
                    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: %s = %g must be "
                                "finite and >= 0", where, ek[i], e[i]);
                    return FALSE;
                }
            }
        if (any) {
            p->nerr = 2;
            p->merr[0] = isfinite(e[0]) ? e[0] : 0.0;
            p->merr[1] = isfinite(e[1]) ? e[1] : 0.0;
        }
    } else {
        if (json_object_has_member(v, "longitudinal_mass_error_me")
            || json_object_has_member(v, "transverse_mass_error_me")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: a valley of "
                        "principal_masses_me takes principal_masses_error_me", where);
            return FALSE;
        }
        if (!mass_errors(v, "principal_masses_error_me", 3, where, p, error))
            return FALSE;
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
    if (json_object_has_member(v, "direction") && json_object_has_member(v, "k_inv_angstrom")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: give \"direction\" or "
                    "\"k_inv_angstrom\" (the valley's position), not both", where);
        return FALSE;
    }
    if (json_object_has_member(v, "direction")) {
        if (!bm_json_vec3(v, "direction", where, p->dir, error))
            return FALSE;
        p->has_dir = TRUE;
    }
    if (json_object_has_member(v, "k_inv_angstrom")) {
        if (!bm_json_vec3(v, "k_inv_angstrom", where, p->dir, error))
            return FALSE;
        p->has_k = TRUE;
        p->has_dir = p->dir[0] != 0.0 || p->dir[1] != 0.0 || p->dir[2] != 0.0;
    }
    return TRUE;
}


void bm_valley_set_clear(BmValleySet *s)
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
static gboolean adopt(BmValleySet *s, const ParsedValley *p, JsonObject *v, const char *where,
                      GError **error)
{
    if (s->carrier != BM_CARRIER_UNKNOWN && s->carrier != p->carrier) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: a %s valley among %s valleys (negative masses mean holes): "
                    "average electron and hole valleys separately", where,
                    bm_valley_carrier_name(p->carrier), bm_valley_carrier_name(s->carrier));
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
static gboolean build_star(BmValleySet *s, const bm_valley_shape *shape, bm_valley_site site,
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

/* The three masses of the valley's mass parameters: (m_l, m_t, m_t) or (m1, m2, m3). */
static void param_masses(int nerr, const double *x, double m[3])
{
    m[0] = x[0];
    m[1] = x[1];
    m[2] = nerr == 2 ? x[1] : x[2];
}

/* The relative errors of the DOS mass ((m1 m2 m3)^(1/3) times a factor the
 * star and populations give) and of the scalar conductivity mass (3 / sum of
 * 1/m_i: one star, whatever its populations), to first order from the mass
 * errors taken as independent (a spheroid's two transverse masses are one). */
static void propagate_errors(const ParsedValley *p, BmValleySet *s)
{
    if (p->nerr == 0)
        return;
    /* the parameters: a spheroid's shape holds (m_l, m_t, m_t), so its first
     * two masses are m_l and m_t; a general valley's three are its own */
    double x[3], m[3];
    memcpy(x, p->shape.masses, sizeof x);
    double vd = 0.0, vc = 0.0;
    param_masses(p->nerr, x, m);
    double d0 = cbrt(m[0] * m[1] * m[2]), c0 = 3.0 / (1.0 / m[0] + 1.0 / m[1] + 1.0 / m[2]);
    for (int i = 0; i < p->nerr; i++) {
        double h = 1e-6 * x[i], xp[3];
        memcpy(xp, x, sizeof xp);
        xp[i] += h;
        param_masses(p->nerr, xp, m);
        double dd = (cbrt(m[0] * m[1] * m[2]) - d0) / h / d0;
        double dc = (3.0 / (1.0 / m[0] + 1.0 / m[1] + 1.0 / m[2]) - c0) / h / c0;
        vd += dd * dd * p->merr[i] * p->merr[i];
        vc += dc * dc * p->merr[i] * p->merr[i];
    }
    s->has_mass_errors = TRUE;
    s->dos_rel_error = sqrt(vd);
    s->conductivity_rel_error = sqrt(vc);
}

/* The star counted by zone shares: the valley's k and the lattice vectors. */
static gboolean build_zone_star(BmValleySet *s, const ParsedValley *p, JsonObject *request,
                                GError **error)
{
    bm_errbuf err = {0};
    const char *group_name = json_object_get_string_member(request, "point_group");
    bm_point_group g;
    if (bm_point_group_get(group_name, &g, &err) != BM_OK) {
        bm_error_from_core(error, &err, "request: key \"point_group\"");
        return FALSE;
    }
    if (json_object_has_member(request, "position")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"lattice_angstrom\" "
                    "counts the star by zone shares, which replaces \"position\": leave one out");
        return FALSE;
    }
    if (!p->has_k) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "valley: \"lattice_angstrom\" "
                    "counts the star by zone shares and needs the valley's k: give "
                    "\"k_inv_angstrom\" in the valley (an extremum of mass-tensor has it)");
        return FALSE;
    }
    double a[3][3];
    if (!bm_json_mat3(request, "lattice_angstrom", "request", a, error))
        return FALSE;
    s->star = g_new0(bm_valley_star, 1);
    if (bm_valley_star_zone(&p->shape, p->dir, (const double (*)[3])a, &g, s->snap_tol,
                            &s->snapped_rad, s->star, &err) != BM_OK) {
        bm_error_from_core(error, &err, "valley");
        return FALSE;
    }
    s->valleys = s->star->valleys;
    s->n = s->star->n;
    s->count = s->star->valley_count;
    s->group_name = group_name;
    s->site_name = "zone-shares";
    s->site_from = "lattice_angstrom: the star points modulo reciprocal-lattice vectors, each "
                   "counted by its share of the zone";
    s->zone_shares = TRUE;
    memcpy(s->lattice, a, sizeof s->lattice);
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
static gboolean from_valley(JsonObject *request, BmValleySet *s, GError **error)
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
    s->snap_tol = p.snap_tol;
    propagate_errors(&p, s);
    if (json_object_has_member(request, "lattice_angstrom"))
        return build_zone_star(s, &p, request, error);
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
static gboolean from_material(JsonObject *request, BmValleySet *s, GError **error)
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
static gboolean from_list(JsonObject *request, BmValleySet *s, GError **error)
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

gboolean bm_valley_set_read(JsonObject *request, BmValleySet *s, GError **error)
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
    if (json_object_has_member(request, "lattice_angstrom")
        && !json_object_has_member(request, "valley")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"lattice_angstrom\" "
                    "goes with \"valley\" and \"point_group\" (a star counted by zone "
                    "shares), not with \"valleys\" or \"material\"");
        return FALSE;
    }
    if (json_object_has_member(request, "valley"))
        return from_valley(request, s, error);
    if (json_object_has_member(request, "material"))
        return from_material(request, s, error);
    return from_list(request, s, error);
}
