/* cyclotron-holes.c: operation "cyclotron-holes" -- heavy- and light-hole
 * cyclotron masses of the warped valence bands from Luttinger parameters
 * (given or a material's) by orbit integration, for one field direction, a
 * list or a sweep. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-cyclotron.h"
#include "bm-units.h"
#include "material-input.h"
#include "field-input.h"

static const BmParam params[] = {
    { "luttinger_parameters", BM_VALUE_ARRAY, FALSE, NULL,
      "[gamma1, gamma2, gamma3] of the four-fold valence-band top (cube axes x, y, z)",
      .unit = NULL },
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, FALSE, NULL,
      "instead: a built-in material name, an object or a JSON file with Luttinger "
      "parameters", .unit = NULL },
    BM_FIELD_INPUT_PARAMS,
    { "hole_energy_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "hole energy below the band top: gives each orbit's area, frequency and k_parallel "
      "(the masses do not depend on it in this parabolic model)", .unit = "eV",
      .lower = BM_GT(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "field_direction", NULL, TRUE, "the unit field direction (with \"field_direction\")" },
    { "heavy", NULL, TRUE,
      "heavy-hole band (with \"field_direction\"): closed, central_cyclotron_mass_me, "
      "orbits [{cyclotron_mass_me, area_extremum (maximum or minimum along the field), "
      "central, k_parallel_reduced, area_reduced, and with hole_energy_ev "
      "k_parallel_inv_angstrom, area_inv_angstrom2, frequency_t}], quadrature_change" },
    { "light", NULL, TRUE, "light-hole band, as \"heavy\" (with \"field_direction\")" },
    { "points", NULL, TRUE,
      "with \"field_directions\": one entry per direction, {field_direction, angle_deg "
      "(a sweep), heavy, light}" },
    { "luttinger_parameters", NULL, FALSE, "the parameters used, {value, source}" },
    { "material", NULL, TRUE, "the material's name (with \"material\")" },
    { "hole_energy_ev", "eV", TRUE, "the hole energy given" },
    { "method", NULL, FALSE, "the dispersion and the orbit integration used" },
    BM_FIELD_END
};

typedef struct {
    bm_luttinger L;
    const char *source;
    gboolean has_mat;
    BmMaterialInput mat;
    gboolean has_energy;
    double energy_ev;
} HoleRequest;

static gboolean read_request(JsonObject *request, HoleRequest *r, GError **error)
{
    gboolean given = json_object_has_member(request, "luttinger_parameters");
    gboolean mat = json_object_has_member(request, "material");
    if (given == mat) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"luttinger_parameters\" [gamma1, gamma2, "
                    "gamma3] or \"material\"");
        return FALSE;
    }
    if (given) {
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
        r->L = (bm_luttinger){ g[0], g[1], g[2] };
        r->source = "request";
    } else {
        if (!bm_material_input_read(request, "material", &r->mat, error))
            return FALSE;
        r->has_mat = TRUE;
        const bm_material *m = &r->mat.mat;
        if (!isfinite(m->luttinger[0]) || !isfinite(m->luttinger[1])
            || !isfinite(m->luttinger[2])) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "material \"%s\" (%s) has no Luttinger parameters: give "
                        "\"luttinger_parameters\"", m->name, r->mat.origin);
            return FALSE;
        }
        r->L = (bm_luttinger){ m->luttinger[0], m->luttinger[1], m->luttinger[2] };
        r->source = m->luttinger_source ? m->luttinger_source : r->mat.origin;
    }
    r->has_energy = json_object_has_member(request, "hole_energy_ev");
    return !r->has_energy || bm_json_number(request, "hole_energy_ev", NULL, &r->energy_ev, error);
}

/* One band's orbits; reduced k is in units of sqrt(2 m_e E) / hbar. */
static JsonObject *band_json(const bm_hole_band_orbits *o, const HoleRequest *r)
{
    JsonObject *b = json_object_new();
    json_object_set_boolean_member(b, "closed", o->closed);
    bm_json_set_number(b, "central_cyclotron_mass_me", o->closed ? o->central_mass : NAN);
    JsonArray *a = json_array_new();
    double kunit = r->has_energy ? sqrt(r->energy_ev / (0.5 * BM_HBAR2_OVER_ME_EV_A2)) : NAN;
    for (size_t i = 0; i < o->n_orbits; i++) {
        const bm_hole_orbit *e = &o->orbits[i];
        JsonObject *j = json_object_new();
        bm_json_set_number(j, "cyclotron_mass_me", e->mass);
        json_object_set_string_member(j, "area_extremum", e->is_maximum ? "maximum" : "minimum");
        json_object_set_boolean_member(j, "central", i == 0);
        bm_json_set_number(j, "k_parallel_reduced", e->k_parallel_reduced);
        bm_json_set_number(j, "area_reduced", e->area_reduced);
        if (r->has_energy) {
            double area = e->area_reduced * kunit * kunit;
            bm_json_set_number(j, "k_parallel_inv_angstrom", e->k_parallel_reduced * kunit);
            bm_json_set_number(j, "area_inv_angstrom2", area);
            bm_json_set_number(j, "frequency_t", BM_ONSAGER_T_A2 * area);
        }
        json_array_add_object_element(a, j);
    }
    json_object_set_array_member(b, "orbits", a);
    bm_json_set_number(b, "quadrature_change", o->closed ? o->quadrature_change : NAN);
    return b;
}

/* Heavy and light for one direction into o; warnings go to resp. */
static gboolean direction_json(const HoleRequest *r, const double b[3], JsonObject *o,
                               JsonObject *resp, GError **error)
{
    bm_errbuf err = {0};
    bm_hole_cyclotron hc;
    if (bm_hole_cyclotron_compute(&r->L, b, &hc, &err) != BM_OK) {
        bm_error_from_core(error, &err, "cyclotron-holes");
        return FALSE;
    }
    json_object_set_object_member(o, "heavy", band_json(&hc.band[BM_HOLE_HEAVY], r));
    json_object_set_object_member(o, "light", band_json(&hc.band[BM_HOLE_LIGHT], r));
    /* a sweep repeats the same finding (an open surface) at every direction: once */
    JsonArray *have = json_object_get_array_member(resp, "warnings");
    for (size_t i = 0; i < hc.warnings.count; i++) {
        gboolean seen = FALSE;
        for (guint k = 0; !seen && k < json_array_get_length(have); k++)
            seen = !g_strcmp0(json_array_get_string_element(have, k), hc.warnings.items[i].text);
        if (!seen)
            bm_json_warn(resp, hc.warnings.items[i].code, "%s", hc.warnings.items[i].text);
    }
    bm_warnings_clear(&hc.warnings);
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    HoleRequest r = {0};
    BmFieldDirections f = {0};
    JsonObject *resp = NULL;
    if (!read_request(request, &r, error) || !bm_field_directions_read(request, &f, error))
        goto done;
    resp = json_object_new();
    bm_json_warnings_ensure(resp);
    if (f.single) {
        bm_json_set_vec3(resp, "field_direction", f.dirs[0]);
        if (!direction_json(&r, f.dirs[0], resp, resp, error))
            goto fail;
    } else {
        JsonArray *pts = json_array_new();
        json_object_set_array_member(resp, "points", pts);
        for (gsize i = 0; i < f.n; i++) {
            JsonObject *p = bm_field_point_new(&f, i);
            json_array_add_object_element(pts, p);
            if (!direction_json(&r, f.dirs[i], p, resp, error))
                goto fail;
        }
    }
    JsonObject *lp = json_object_new();
    double g[3] = { r.L.g1, r.L.g2, r.L.g3 };
    bm_json_set_vec3(lp, "value", g);
    json_object_set_string_member(lp, "source", r.source);
    json_object_set_object_member(resp, "luttinger_parameters", lp);
    if (r.has_mat)
        json_object_set_string_member(resp, "material", r.mat.mat.name);
    if (r.has_energy)
        bm_json_set_number(resp, "hole_energy_ev", r.energy_ev);
    json_object_set_string_member(resp, "method",
        "E = (hbar^2 / 2 m_e) [A k^2 -/+ sqrt(B^2 k^4 + C^2 (kx^2 ky^2 + ky^2 kz^2 + kz^2 kx^2))], "
        "A = gamma1, B = 2 gamma2, C^2 = 12 (gamma3^2 - gamma2^2), hole energies downward "
        "(heavy: minus); sections normal to the field traced by rays (quartic roots), areas "
        "by the periodic trapezoid rule, extremal sections along the field by Brent's "
        "method; m_c = (hbar^2 / 2 pi) dA/dE");
    goto done;
fail:
    g_clear_pointer(&resp, json_object_unref);
done:
    bm_field_directions_clear(&f);
    if (r.has_mat)
        bm_material_input_clear(&r.mat);
    return resp;
}

const BmOperation bm_op_cyclotron_holes = {
    .name = "cyclotron-holes",
    .summary = "Heavy- and light-hole cyclotron masses of the warped valence bands from "
               "Luttinger parameters (given or a material's), central and extremal orbits",
    .params = params,
    .run = run,
    .response = response,
};
