/* cyclotron-ellipsoid.c: operation "cyclotron-ellipsoid" -- the distinct
 * cyclotron-resonance lines of a valley star (or list) for one field
 * direction, a list, or a sweep in a plane (the rotation diagram). */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-cyclotron.h"
#include "bm-units.h"
#include "valley-input.h"
#include "field-input.h"

static const BmParam params[] = {
    BM_VALLEY_INPUT_PARAMS,
    BM_FIELD_INPUT_PARAMS,
    BM_PARAM_END
};

static const BmField response[] = {
    { "field_direction", NULL, TRUE, "the unit field direction (with \"field_direction\")" },
    { "lines", NULL, TRUE,
      "the distinct resonance lines by increasing mass (with \"field_direction\"): "
      "cyclotron_mass_me, valley_count (a face valley counts one half), "
      "resonance_ghz_per_t (e / 2 pi m_c), valleys (indices into \"valleys\")" },
    { "points", NULL, TRUE,
      "with \"field_directions\": one entry per direction, {field_direction, angle_deg "
      "(a sweep: from \"from\"), lines}" },
    { "valley_count", NULL, FALSE, "number of valleys (sum of the weights)" },
    { "valleys", NULL, FALSE,
      "the valleys: direction, weight, principal_masses_me, axes" },
    { "carrier", NULL, FALSE,
      "electron, or hole when the valleys have negative masses (then |m| is used)" },
    { "material", NULL, TRUE, "the material's name (with \"material\")" },
    { "valley_source", NULL, TRUE, "source of the material's valley (with \"material\")" },
    { "point_group", NULL, TRUE, "the point group of the star (with \"valley\" or \"material\")" },
    { "position", NULL, TRUE, "the valley site of the star (with \"valley\" or \"material\")" },
    { "method", NULL, FALSE, "the formula used" },
    BM_FIELD_END
};

static JsonArray *lines_json(const BmValleySet *s, const double b[3], GError **error)
{
    bm_errbuf err = {0};
    bm_cyclotron_line *lines = g_new(bm_cyclotron_line, s->n);
    size_t nl = 0;
    if (bm_cyclotron_lines(s->valleys, s->n, b, lines, &nl, &err) != BM_OK) {
        bm_error_from_core(error, &err, "cyclotron-ellipsoid");
        g_free(lines);
        return NULL;
    }
    JsonArray *a = json_array_new();
    for (size_t l = 0; l < nl; l++) {
        JsonObject *o = json_object_new();
        bm_json_set_number(o, "cyclotron_mass_me", lines[l].mass);
        bm_json_set_number(o, "valley_count", lines[l].valley_count);
        bm_json_set_number(o, "resonance_ghz_per_t", BM_CYCLOTRON_GHZ_PER_T / lines[l].mass);
        JsonArray *idx = json_array_new();
        size_t shown = MIN(lines[l].members, (size_t)BM_STAR_MAX);
        for (size_t i = 0; i < shown; i++)
            json_array_add_int_element(idx, (gint64)lines[l].index[i]);
        json_object_set_array_member(o, "valleys", idx);
        json_array_add_object_element(a, o);
    }
    g_free(lines);
    return a;
}

static JsonArray *valleys_json(const BmValleySet *s)
{
    JsonArray *va = json_array_new();
    for (size_t i = 0; i < s->n; i++) {
        const bm_valley *v = &s->valleys[i];
        JsonObject *o = json_object_new();
        bm_json_set_vec3(o, "direction", v->direction);
        bm_json_set_number(o, "weight", v->weight);
        bm_json_set_vec3(o, "principal_masses_me", v->masses);
        bm_json_set_mat3(o, "axes", (const double (*)[3])v->axes);
        json_array_add_object_element(va, o);
    }
    return va;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    BmValleySet s = {0};
    BmFieldDirections f = {0};
    JsonObject *resp = NULL;
    if (!bm_valley_set_read(request, &s, error) || !bm_field_directions_read(request, &f, error))
        goto done;
    resp = json_object_new();
    if (f.single) {
        JsonArray *l = lines_json(&s, f.dirs[0], error);
        if (!l)
            goto fail;
        bm_json_set_vec3(resp, "field_direction", f.dirs[0]);
        json_object_set_array_member(resp, "lines", l);
    } else {
        JsonArray *pts = json_array_new();
        json_object_set_array_member(resp, "points", pts);
        for (gsize i = 0; i < f.n; i++) {
            JsonArray *l = lines_json(&s, f.dirs[i], error);
            if (!l)
                goto fail;
            JsonObject *p = bm_field_point_new(&f, i);
            json_object_set_array_member(p, "lines", l);
            json_array_add_object_element(pts, p);
        }
    }
    bm_json_set_number(resp, "valley_count", s.count);
    json_object_set_array_member(resp, "valleys", valleys_json(&s));
    json_object_set_string_member(resp, "carrier", bm_valley_carrier_name(s.carrier));
    if (s.has_mat) {
        json_object_set_string_member(resp, "material", s.mat.mat.name);
        json_object_set_string_member(resp, "valley_source", s.mat.mat.electron.source);
    }
    if (s.group_name) {
        json_object_set_string_member(resp, "point_group", s.group_name);
        json_object_set_string_member(resp, "position", s.site_name);
    }
    json_object_set_string_member(resp, "method",
                                  "m_c = sqrt(m1 m2 m3 / sum_i m_i (a_i . b)^2) for each valley "
                                  "(Dresselhaus, Kip & Kittel, Phys. Rev. 98, 368 (1955)); "
                                  "valleys within 1e-7 relative share a line");
    bm_json_warn_all(resp, &s.pw);
    bm_json_warn_all(resp, &s.carried);
    if (s.star)
        bm_json_warn_all(resp, &s.star->warnings);
    /* the usual range of masses (common practice, no source), said once */
    for (size_t i = 0; i < s.n; i++) {
        const double *m = s.valleys[i].masses;   /* ascending */
        if (m[0] < 0.01 || m[2] > 10.0) {
            bm_json_warn(resp, BM_WARN_MASS_OUT_OF_RANGE, "valley %zu: principal masses %g, "
                         "%g, %g m_e reach outside the usual 0.01..10 m_e", i, m[0], m[1], m[2]);
            break;
        }
    }
    goto done;
fail:
    g_clear_pointer(&resp, json_object_unref);
done:
    bm_field_directions_clear(&f);
    bm_valley_set_clear(&s);
    return resp;
}

const BmOperation bm_op_cyclotron_ellipsoid = {
    .name = "cyclotron-ellipsoid",
    .summary = "Cyclotron-resonance lines of ellipsoidal valleys (a star from a point group, "
               "a material or a list) for a field direction, a list or a sweep in a plane",
    .params = params,
    .run = run,
    .response = response,
};
