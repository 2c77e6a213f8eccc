/* hole-mass.c: operation "hole-mass" -- the hole DOS mass from heavy, light
 * and split-off bands, and masses from Luttinger parameters (given or a material's). */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-holes.h"
#include "material-input.h"

static const BmParam params[] = {
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, FALSE, NULL,
      "a built-in material name, an object or a JSON file: its heavy/light/split-off "
      "masses, split-off energy, Luttinger parameters and statistics hole DOS mass; any "
      "of the keys below given explicitly overrides the material's value", .unit = NULL },
    { "heavy_hole_mass_me", BM_VALUE_NUMBER, FALSE, NULL, "parabolic heavy-hole mass",
      .unit = "m_e", .lower = BM_GT(0) },
    { "light_hole_mass_me", BM_VALUE_NUMBER, FALSE, NULL, "parabolic light-hole mass",
      .unit = "m_e", .lower = BM_GT(0) },
    { "split_off_mass_me", BM_VALUE_NUMBER, FALSE, NULL,
      "split-off band mass (optional; needs split_off_ev)",
      .unit = "m_e", .lower = BM_GT(0) },
    { "split_off_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "spin-orbit splitting Delta_so (split-off band offset)", .unit = "eV",
      .lower = BM_GE(0) },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, "300",
      "temperature for the split-off population and the statistics hole DOS mass",
      .unit = "K", .lower = BM_GT(0) },
    { "luttinger_parameters", BM_VALUE_ARRAY, FALSE, NULL,
      "[gamma1, gamma2, gamma3]: directional masses and the band-edge k.p DOS mass of "
      "the warped bands", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "parabolic_hole_dos_mass_me", "m_e", TRUE,
      "(m_hh^1.5 + m_lh^1.5 [+ m_so^1.5 exp(-Delta_so/kT)])^(2/3) of the parabolic masses" },
    { "band_fractions", NULL, TRUE,
      "share of the holes in each band: {heavy, light, split_off}" },
    { "luttinger", NULL, TRUE,
      "from Luttinger parameters: heavy_hole_mass_me and light_hole_mass_me along 100, 110, "
      "111 (m_e), heavy_hole_dos_mass_me, light_hole_dos_mass_me (null on an open surface), "
      "heavy_hole_convex" },
    { "band_edge_hole_dos_mass_me", "m_e", TRUE,
      "k.p band-edge DOS mass of the warped heavy and light bands (null on an open surface)" },
    { "band_edge_hole_dos_mass_with_split_off_me", "m_e", TRUE,
      "the same with the split-off band at its offset, at temperature_k" },
    { "statistics_hole_dos_mass_me", "m_e", TRUE,
      "the carrier-statistics hole DOS mass m_dh(T) that gives Nv (with \"material\")" },
    { "temperature_k", "K", FALSE, "the temperature used" },
    { "material", NULL, TRUE, "the material's name (with \"material\")" },
    { "inputs", NULL, TRUE,
      "each input value used, {value, source}; \"request\" for a key given" },
    { "sources", NULL, FALSE, "where each computed mass comes from" },
    BM_FIELD_END
};

static void set_dirs(JsonObject *o, const char *key, const double m[3])
{
    JsonObject *d = json_object_new();
    bm_json_set_number(d, "100", m[0]);
    bm_json_set_number(d, "110", m[1]);
    bm_json_set_number(d, "111", m[2]);
    json_object_set_object_member(o, key, d);
}

/* One input value and where it came from (NAN and NULL when absent). */
typedef bm_sourced Sourced;

typedef struct {
    Sourced hh, lh, so, delta;
    double lutt[3];
    const char *lutt_source;       /* NULL: no Luttinger parameters */
    gboolean has_mat;
    BmMaterialInput mat;
} HoleInputs;

/* request[key] if given, else the material's value when finite. */
static gboolean take(JsonObject *request, const char *key, const HoleInputs *in,
                     double mat_value, const char *mat_source, Sourced *out, GError **error)
{
    out->value = NAN;
    out->source = NULL;
    if (json_object_has_member(request, key)) {
        out->source = "request";
        return bm_json_number(request, key, NULL, &out->value, error);
    }
    if (in->has_mat && isfinite(mat_value)) {
        out->value = mat_value;
        out->source = mat_source;
    }
    return TRUE;
}

static gboolean take_luttinger(JsonObject *request, HoleInputs *in, GError **error)
{
    const bm_material *m = &in->mat.mat;
    if (!json_object_has_member(request, "luttinger_parameters")) {
        gboolean have = in->has_mat && isfinite(m->luttinger[0]) && isfinite(m->luttinger[1])
                     && isfinite(m->luttinger[2]);
        if (have) {
            memcpy(in->lutt, m->luttinger, sizeof in->lutt);
            in->lutt_source = m->luttinger_source;
        }
        return TRUE;
    }
    gsize n = 0;
    g_autofree double *g = bm_json_numbers(request, "luttinger_parameters", NULL, &n, error);
    if (!g)
        return FALSE;
    if (n != 3) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"luttinger_parameters\" must hold 3 numbers "
                    "[gamma1, gamma2, gamma3] (got %zu)", (size_t)n);
        return FALSE;
    }
    memcpy(in->lutt, g, sizeof in->lutt);
    in->lutt_source = "request";
    return TRUE;
}

static gboolean read_inputs(JsonObject *request, HoleInputs *in, GError **error)
{
    if (json_object_has_member(request, "material")) {
        if (!bm_material_input_read(request, "material", &in->mat, error))
            return FALSE;
        in->has_mat = TRUE;
    }
    const bm_material *m = &in->mat.mat;
    return take(request, "heavy_hole_mass_me", in, m->heavy_hole_mass.value,
                m->heavy_hole_mass.source, &in->hh, error)
        && take(request, "light_hole_mass_me", in, m->light_hole_mass.value,
                m->light_hole_mass.source, &in->lh, error)
        && take(request, "split_off_mass_me", in, m->split_off_mass.value,
                m->split_off_mass.source, &in->so, error)
        && take(request, "split_off_ev", in, m->split_off_ev.value, m->split_off_ev.source,
                &in->delta, error)
        && take_luttinger(request, in, error);
}

static gboolean check_bands(const HoleInputs *in, GError **error)
{
    if (!in->hh.source || !in->lh.source) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"heavy_hole_mass_me\" and \"light_hole_mass_me\" go together "
                    "(missing \"%s\"%s%s%s)",
                    in->hh.source ? "light_hole_mass_me" : "heavy_hole_mass_me",
                    in->has_mat ? " in the request and in material \"" : "",
                    in->has_mat ? in->mat.mat.name : "", in->has_mat ? "\"" : "");
        return FALSE;
    }
    if (in->so.source && !in->delta.source) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"split_off_mass_me\" needs \"split_off_ev\"");
        return FALSE;
    }
    if (!in->so.source && in->delta.source) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"split_off_ev\" needs \"split_off_mass_me\"");
        return FALSE;
    }
    return TRUE;
}

/* The parabolic combination of the heavy, light (and split-off) masses given. */
static gboolean bands_json(JsonObject *resp, JsonObject *src, const HoleInputs *in,
                           double t_k, GError **error)
{
    bm_errbuf err = {0};
    if (!check_bands(in, error))
        return FALSE;
    bm_hole_bands b = { .m_hh = in->hh.value, .m_lh = in->lh.value, .temperature_k = t_k };
    if (in->so.source) {
        b.m_so = in->so.value;
        b.delta_so_ev = in->delta.value;
    }
    bm_hole_dos d;
    if (bm_hole_dos_mass(&b, &d, &err) != BM_OK) {
        bm_error_from_core(error, &err, "hole-mass");
        return FALSE;
    }
    bm_json_set_number(resp, "parabolic_hole_dos_mass_me", d.dos_mass);
    json_object_set_string_member(src, "parabolic_hole_dos_mass_me",
                                  in->so.source
                                  ? "(m_hh^1.5 + m_lh^1.5 + m_so^1.5 exp(-split_off_ev/kT))^(2/3) "
                                    "of the parabolic masses at temperature_k"
                                  : "(m_hh^1.5 + m_lh^1.5)^(2/3) of the parabolic masses");
    JsonObject *f = json_object_new();
    bm_json_set_number(f, "heavy", d.fraction_hh);
    bm_json_set_number(f, "light", d.fraction_lh);
    bm_json_set_number(f, "split_off", d.fraction_so);
    json_object_set_object_member(resp, "band_fractions", f);
    bm_json_warn_all(resp, &d.warnings);
    bm_warnings_clear(&d.warnings);
    return TRUE;
}

/* Directional masses, warped-surface DOS masses and the band-edge k.p DOS mass. */
static gboolean luttinger_json(JsonObject *resp, JsonObject *src, const HoleInputs *in,
                               double t_k, GError **error)
{
    bm_errbuf err = {0};
    bm_luttinger L = {in->lutt[0], in->lutt[1], in->lutt[2]};
    bm_luttinger_masses m;
    if (bm_luttinger_masses_compute(&L, &m, &err) != BM_OK) {
        bm_error_from_core(error, &err, "hole-mass");
        return FALSE;
    }
    JsonObject *o = json_object_new();
    set_dirs(o, "heavy_hole_mass_me", m.heavy);
    set_dirs(o, "light_hole_mass_me", m.light);
    /* non-finite values (open heavy-hole surface) become null */
    bm_json_set_number(o, "heavy_hole_dos_mass_me", m.heavy_dos_mass);
    bm_json_set_number(o, "light_hole_dos_mass_me", m.light_dos_mass);
    json_object_set_boolean_member(o, "heavy_hole_convex", m.heavy_convex);
    json_object_set_object_member(resp, "luttinger", o);
    bm_json_warn_all(resp, &m.warnings);
    if (!m.heavy_convex) {
        bm_json_set_number(resp, "band_edge_hole_dos_mass_me", NAN);
        json_object_set_string_member(src, "band_edge_hole_dos_mass_me",
                                      "none: the heavy-hole surface is open (see warnings)");
        bm_warnings_clear(&m.warnings);
        return TRUE;
    }
    double mb;
    bm_warnings_clear(&m.warnings);
    if (bm_band_edge_hole_dos_mass(&L, 0.0, 0.0, 0.0, &mb, NULL, &err) != BM_OK) {
        bm_error_from_core(error, &err, "hole-mass");
        return FALSE;
    }
    bm_json_set_number(resp, "band_edge_hole_dos_mass_me", mb);
    g_autofree char *s = g_strdup_printf("k.p band edge: warped heavy- and light-hole surfaces "
                                         "from luttinger_parameters (%s)", in->lutt_source);
    json_object_set_string_member(src, "band_edge_hole_dos_mass_me", s);
    if (in->so.source && in->delta.source && in->so.value > 0.0) {
        if (bm_band_edge_hole_dos_mass(&L, in->so.value, in->delta.value, t_k, &mb, NULL,
                                       &err) != BM_OK) {
            bm_error_from_core(error, &err, "hole-mass");
            return FALSE;
        }
        bm_json_set_number(resp, "band_edge_hole_dos_mass_with_split_off_me", mb);
        json_object_set_string_member(src, "band_edge_hole_dos_mass_with_split_off_me",
                                      "band_edge_hole_dos_mass_me with the split-off band "
                                      "(split_off_mass_me) at its offset split_off_ev, "
                                      "weighted exp(-split_off_ev/kT) at temperature_k");
    }
    return TRUE;
}

static void add_source(JsonObject *sources, const char *key, const Sourced *s)
{
    if (!s->source)
        return;
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "value", s->value);
    json_object_set_string_member(o, "source", s->source);
    json_object_set_object_member(sources, key, o);
}

/* The input values used, each {value, source} ("request" for a key given). */
static void inputs_json(JsonObject *resp, const HoleInputs *in)
{
    JsonObject *s = json_object_new();
    add_source(s, "heavy_hole_mass_me", &in->hh);
    add_source(s, "light_hole_mass_me", &in->lh);
    add_source(s, "split_off_mass_me", &in->so);
    add_source(s, "split_off_ev", &in->delta);
    if (in->lutt_source) {
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "value", in->lutt);
        json_object_set_string_member(o, "source", in->lutt_source);
        json_object_set_object_member(s, "luttinger_parameters", o);
    }
    json_object_set_object_member(resp, "inputs", s);
}

/* The material's statistics hole DOS mass m_dh(T) at t_k, shown beside the
 * band-edge value so the two are never confused. */
static gboolean statistics_json(JsonObject *resp, JsonObject *src, const HoleInputs *in,
                                double t_k, GError **error)
{
    const bm_material *m = &in->mat.mat;
    if (!in->has_mat || m->statistics_hole_dos_mass.kind == BM_DOS_MASS_NONE)
        return TRUE;
    bm_errbuf err = {0};
    double v;
    if (bm_material_statistics_hole_dos_mass(m, t_k, &v, &err) != BM_OK) {
        bm_error_from_core(error, &err, "request: key \"temperature_k\"");
        return FALSE;
    }
    bm_json_set_number(resp, "statistics_hole_dos_mass_me", v);
    json_object_set_string_member(src, "statistics_hole_dos_mass_me",
                                  m->statistics_hole_dos_mass.source
                                  ? m->statistics_hole_dos_mass.source : in->mat.origin);
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    HoleInputs in = {0};
    JsonObject *resp = NULL;
    double t_k;
    if (!read_inputs(request, &in, error)
        || !bm_json_number(request, "temperature_k", NULL, &t_k, error))
        goto done;
    gboolean bands = in.hh.source || in.lh.source;
    if (!bands && !in.lutt_source) {
        if (in.has_mat)
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "material \"%s\" (%s) has no hole masses or Luttinger parameters: "
                        "give heavy_hole_mass_me and light_hole_mass_me, or "
                        "luttinger_parameters", in.mat.mat.name, in.mat.origin);
        else
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: give heavy_hole_mass_me and light_hole_mass_me, or "
                        "luttinger_parameters [gamma1, gamma2, gamma3], or both, or a "
                        "material");
        goto done;
    }
    resp = json_object_new();
    JsonObject *src = json_object_new();
    json_object_set_object_member(resp, "sources", src);
    if ((bands && !bands_json(resp, src, &in, t_k, error))
        || (in.lutt_source && !luttinger_json(resp, src, &in, t_k, error))
        || !statistics_json(resp, src, &in, t_k, error)) {
        g_clear_pointer(&resp, json_object_unref);
        goto done;
    }
    bm_json_set_number(resp, "temperature_k", t_k);
    if (in.has_mat)
        json_object_set_string_member(resp, "material", in.mat.mat.name);
    inputs_json(resp, &in);
done:
    if (in.has_mat)
        bm_material_input_clear(&in.mat);
    return resp;
}

const BmOperation bm_op_hole_mass = {
    .name = "hole-mass",
    .summary = "Hole DOS masses: parabolic heavy/light/split-off combination; directional "
               "masses and the band-edge k.p DOS mass from Luttinger parameters",
    .params = params,
    .run = run,
    .response = response,
};
