/* valley-average.c: operation "valley-average" -- the star of a valley under a
 * point group, or an explicit valley list, and its conductivity and DOS masses. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-valleys.h"
#include "bm-materials.h"
#include "material-input.h"
#include "valley-input.h"
#include "bm-enums.h"

/* const view of a double[3][3] for the setters (C11 qualifier rules) */
#define CM3(m) ((const double (*)[3])(m))

static const BmParam params[] = {
    BM_VALLEY_INPUT_PARAMS,
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
    { "star_symmetry", NULL, TRUE, "the symmetry of the star: the point group with time "
      "reversal, its Laue class (with \"valley\" or \"material\")" },
    { "position", NULL, TRUE, "the valley site of the star (with \"valley\" or "
      "\"material\"; zone-shares with \"lattice_angstrom\")" },
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

static JsonArray *valleys_json(const BmValleySet *s)
{
    JsonArray *va = json_array_new();
    for (size_t i = 0; i < s->n; i++) {
        const bm_valley *v = &s->valleys[i];
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "direction", v->direction);
        if (s->zone_shares)
            bm_json_set_vec3(o, "k_inv_angstrom", v->k);
        bm_json_set_number(o, "weight", v->weight);
        bm_json_set_vec3(o, "principal_masses_me", v->masses);
        bm_json_set_mat3(o, "axes", CM3(v->axes));
        bm_json_set_number(o, "energy_offset_ev", v->energy_offset_ev);
        bm_json_set_number(o, "population_fraction", v->population);
        json_array_add_object_element(va, o);
    }
    return va;
}

/* The scalar is 3 / tr(M_c^-1), and tr(M_c^-1) is the population-weighted
 * mean of the valleys' traces: where every valley has the same trace (the
 * valleys of one star, whatever their offsets) no population can move it. */
static const char *conductivity_meaning(const BmValleySet *s)
{
    double lo = INFINITY, hi = -INFINITY;
    for (size_t v = 0; v < s->n; v++) {
        const double (*m)[3] = (const double (*)[3])s->valleys[v].inv_mass;
        double tr = m[0][0] + m[1][1] + m[2][2];
        lo = fmin(lo, tr);
        hi = fmax(hi, tr);
    }
    if (hi - lo <= 1e-9 * fabs(hi))
        return "3 / trace of the inverse tensor: the harmonic mean of the principal values, "
               "a direction average. Every valley here has the same trace, so no shift of "
               "the valley populations (strain, valley offsets, temperature) can change it: "
               "read conductivity_principal_masses_me for transport along a direction";
    return "3 / trace of the inverse tensor: the harmonic mean of the principal values, a "
           "direction average; read conductivity_principal_masses_me for transport along a "
           "direction";
}

/* A valley star has the symmetry of the point group with time reversal
 * (k -> -k), which adds inversion: the group's Laue class. */
static void set_star_symmetry(JsonObject *resp, const char *group_name)
{
    bm_point_group g;
    bm_errbuf err = {0};
    if (bm_point_group_get(group_name, &g, &err) != BM_OK)
        return;
    g_autofree char *text = g_strdup_printf("%s with time reversal (k -> -k): the Laue "
                                            "class %s, so groups of one Laue class give the "
                                            "same star", g.name, g.laue);
    json_object_set_string_member(resp, "star_symmetry", text);
}

static JsonObject *respond(const BmValleySet *s, const bm_population *pop, gboolean has_t,
                           const bm_valley_average *avg)
{
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "valley_count", s->count);
    bm_json_set_number(resp, "dos_mass_me", avg->dos_mass);
    json_object_set_string_member(resp, "dos_mass_reference", "lowest valley edge");
    /* anisotropic: the directional masses first, the scalar after them with
     * what it means (and when populations cannot move it) */
    if (!avg->conductivity_isotropic) {
        bm_json_set_vec3(resp, "conductivity_principal_masses_me", avg->conductivity_masses);
        bm_json_set_mat3(resp, "conductivity_principal_axes", CM3(avg->conductivity_axes));
    }
    bm_json_set_mat3(resp, "conductivity_mass_tensor_me", CM3(avg->conductivity_mass_tensor));
    bm_json_set_number(resp, "conductivity_mass_me", avg->conductivity_mass);
    json_object_set_boolean_member(resp, "conductivity_isotropic", avg->conductivity_isotropic);
    if (!avg->conductivity_isotropic)
        json_object_set_string_member(resp, "conductivity_mass_meaning",
                                      conductivity_meaning(s));
    json_object_set_object_member(resp, "population", population_json(pop, has_t));
    if (s->has_mat) {
        json_object_set_string_member(resp, "material", s->mat.mat.name);
        json_object_set_string_member(resp, "valley_source", s->mat.mat.electron.source);
    }
    if (s->group_name) {
        json_object_set_string_member(resp, "point_group", s->group_name);
        set_star_symmetry(resp, s->group_name);
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
    json_object_set_string_member(resp, "carrier", bm_valley_carrier_name(s->carrier));
    if (s->carrier == BM_CARRIER_HOLE)
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


/* Without a temperature every valley is populated alike, which needs equal
 * energy offsets: said here in the request's terms. */
static gboolean offsets_differ(const BmValleySet *s)
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
    BmValleySet s = {0};
    bm_population pop = {0, BM_FERMI_DIRAC, 0.0, 0.0};
    gboolean has_t = FALSE;
    JsonObject *resp = NULL;
    if (!bm_valley_set_read(request, &s, error) || !read_population(request, &pop, &has_t, error))
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
    bm_valley_set_clear(&s);
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
