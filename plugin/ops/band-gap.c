/* band-gap.c: operation "band-gap" -- a material's gap against temperature
 * (Varshni or Bose-Einstein form) from the core. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "material-input.h"
#include "bm-enums.h"

static const BmParam params[] = {
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, TRUE, NULL,
      "built-in name (bandmass materials), path of a material JSON file, or an object with "
      "one gap model: varshni {eg0_ev, alpha_ev_per_k, beta_k}, bose_einstein {eg0_ev, "
      "a_b_ev, theta_k} or band_gap_ev (fixed)", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL, "temperature", .unit = "K",
      .lower = BM_GE(0) },
    { "temperatures_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "list of temperatures: the response holds \"points\"", .unit = "K", .lower = BM_GE(0) },
    { "model", BM_VALUE_STRING, FALSE, NULL,
      "optional check: an error unless it is the material's gap model",
      .choices = &bm_enum_gap_model },
    BM_PARAM_END
};

static const BmField response[] = {
    { "temperature_k", "K", TRUE, "the temperature (one temperature)" },
    { "band_gap_ev", "eV", TRUE, "the gap at that temperature (one temperature)" },
    { "points", NULL, TRUE, "one {temperature_k, band_gap_ev} per temperature (a list)" },
    { "material", NULL, FALSE, "the material's name" },
    { "model", NULL, FALSE, "the material's gap model: varshni, bose-einstein or fixed" },
    { "parameters", NULL, FALSE,
      "the model's parameters: {eg0_ev, alpha_ev_per_k, beta_k}, {eg0_ev, a_b_ev, theta_k} "
      "or {eg0_ev} (fixed)" },
    { "source", NULL, FALSE, "where the parameters come from" },
    BM_FIELD_END
};

/* Reads temperature_k or temperatures_k (exactly one); *list tells which. */
static double *read_temperatures(JsonObject *request, gsize *n, gboolean *list, GError **error)
{
    gboolean one = json_object_has_member(request, "temperature_k");
    *list = json_object_has_member(request, "temperatures_k");
    if (one == *list) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"temperature_k\" or \"temperatures_k\"");
        return NULL;
    }
    return bm_json_numbers(request, *list ? "temperatures_k" : "temperature_k", NULL, n, error);
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    gsize n = 0;
    gboolean list;
    g_autofree double *t = read_temperatures(request, &n, &list, error);
    if (!t)
        return NULL;
    BmMaterialInput mat;
    if (!bm_material_input_read(request, "material", &mat, error))
        return NULL;
    const bm_gap_model *g = &mat.mat.gap;
    const char *model_name = bm_gap_kind_name(g->kind);
    if (g->kind == BM_GAP_NONE) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "material \"%s\" (%s) has no band gap: give \"varshni\", "
                    "\"bose_einstein\" or \"band_gap_ev\"", mat.mat.name, mat.origin);
        bm_material_input_clear(&mat);
        return NULL;
    }
    if (json_object_has_member(request, "model")
        && strcmp(json_object_get_string_member(request, "model"), model_name)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"model\": material \"%s\" has a %s gap model, not \"%s\" "
                    "(a material carries one gap model)", mat.mat.name, model_name,
                    json_object_get_string_member(request, "model"));
        bm_material_input_clear(&mat);
        return NULL;
    }
    JsonObject *resp = json_object_new();
    JsonArray *pts = json_array_new();
    bm_warnings w = {0};
    for (gsize i = 0; i < n; i++) {
        double eg;
        bm_errbuf err = {0};
        if (bm_gap_at(g, t[i], &eg, &w, &err) != BM_OK) {
            g_autofree char *where = list
                ? g_strdup_printf("request: element %zu of \"temperatures_k\"", (size_t)i)
                : g_strdup("request: key \"temperature_k\"");
            bm_error_from_core(error, &err, where);
            json_array_unref(pts);
            json_object_unref(resp);
            bm_material_input_clear(&mat);
            bm_warnings_clear(&w);
            return NULL;
        }
        if (list) {
            JsonObject *p = json_object_new();
            bm_json_set_number(p, "temperature_k", t[i]);
            bm_json_set_number(p, "band_gap_ev", eg);
            json_array_add_object_element(pts, p);
        } else {
            bm_json_set_number(resp, "temperature_k", t[i]);
            bm_json_set_number(resp, "band_gap_ev", eg);
        }
    }
    json_object_set_string_member(resp, "material", mat.mat.name);
    json_object_set_string_member(resp, "model", model_name);
    json_object_set_object_member(resp, "parameters", bm_material_gap_parameters(g));
    json_object_set_string_member(resp, "source", g->source ? g->source : mat.origin);
    if (list)
        json_object_set_array_member(resp, "points", pts);
    else
        json_array_unref(pts);
    bm_json_warn_all(resp, &w);
    bm_warnings_clear(&w);
    bm_material_input_clear(&mat);
    return resp;
}

const BmOperation bm_op_band_gap = {
    .name = "band-gap",
    .summary = "Band gap against temperature (the material's Varshni, Bose-Einstein or "
               "fixed gap)",
    .params = params,
    .run = run,
    .response = response,
};
