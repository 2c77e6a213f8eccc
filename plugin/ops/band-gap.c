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
      "varshni {eg0_ev, alpha_ev_per_k, beta_k} and/or bose_einstein {eg0_ev, a_b_ev, theta_k}",
      .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL, "temperature", .unit = "K",
      .lower = BM_GE(0) },
    { "temperatures_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "list of temperatures: the response holds \"points\"", .unit = "K", .lower = BM_GE(0) },
    { "model", BM_VALUE_STRING, FALSE, "\"varshni\"", "temperature dependence of the gap",
      .choices = &bm_enum_gap_model,
      .choice_subset = 1u << BM_GAP_VARSHNI | 1u << BM_GAP_BOSE_EINSTEIN },
    BM_PARAM_END
};

static const BmField response[] = {
    { "temperature_k", "K", TRUE, "the temperature (one temperature)" },
    { "band_gap_ev", "eV", TRUE, "the gap at that temperature (one temperature)" },
    { "points", NULL, TRUE, "one {temperature_k, band_gap_ev} per temperature (a list)" },
    { "material", NULL, FALSE, "the material's name" },
    { "model", NULL, FALSE, "the model used: varshni or bose-einstein" },
    { "parameters", NULL, FALSE,
      "the model's parameters: {eg0_ev, alpha_ev_per_k, beta_k} or {eg0_ev, a_b_ev, theta_k}" },
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
    /* the registry checked "model" (varshni or bose-einstein) and the temperatures */
    const char *model_name = json_object_get_string_member(request, "model");
    BmGapModel model = (BmGapModel)bm_enum_value(request, "model", &bm_enum_gap_model);
    gsize n = 0;
    gboolean list;
    g_autofree double *t = read_temperatures(request, &n, &list, error);
    if (!t)
        return NULL;
    BmMaterialInput mat;
    if (!bm_material_input_read(request, "material", &mat, error)) {
        bm_material_input_clear(&mat);
        return NULL;
    }
    JsonObject *resp = json_object_new();
    JsonArray *pts = json_array_new();
    bm_warnings w = {0};
    for (gsize i = 0; i < n; i++) {
        g_autofree char *where = list
            ? g_strdup_printf("request: element %zu of \"temperatures_k\"", (size_t)i)
            : g_strdup("request: key \"temperature_k\"");
        double eg;
        if (!bm_material_input_gap(&mat, model, t[i], where, &eg, &w, error)) {
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
    JsonObject *par = json_object_new();
    if (model == BM_GAP_VARSHNI) {
        bm_json_set_number(par, "eg0_ev", mat.mat.gap.eg0_ev);
        bm_json_set_number(par, "alpha_ev_per_k", mat.mat.gap.alpha_ev_per_k);
        bm_json_set_number(par, "beta_k", mat.mat.gap.beta_k);
    } else {
        bm_json_set_number(par, "eg0_ev", mat.bose_einstein.eg0_ev);
        bm_json_set_number(par, "a_b_ev", mat.bose_einstein.a_b_ev);
        bm_json_set_number(par, "theta_k", mat.bose_einstein.theta_k);
    }
    json_object_set_object_member(resp, "parameters", par);
    json_object_set_string_member(resp, "source", bm_material_input_gap_source(&mat, model));
    if (list)
        json_object_set_array_member(resp, "points", pts);
    else
        json_array_unref(pts);
    bm_json_warn_all(resp, &w);
    bm_warnings_clear(&w);
    bm_material_input_clear(&mat);
    return resp;
}

static void render(JsonObject *response, GString *out)
{
    g_string_append_printf(out, "material   %s (%s form)\nsource     %s\n",
                           json_object_get_string_member(response, "material"),
                           json_object_get_string_member(response, "model"),
                           json_object_get_string_member(response, "source"));
    g_string_append_printf(out, "%14s  %12s\n", "temperature_k", "band_gap_ev");
    if (json_object_has_member(response, "points")) {
        JsonArray *pts = json_object_get_array_member(response, "points");
        for (guint i = 0; i < json_array_get_length(pts); i++) {
            JsonObject *p = json_array_get_object_element(pts, i);
            g_string_append_printf(out, "%14g  %12.6f\n",
                                   json_object_get_double_member(p, "temperature_k"),
                                   json_object_get_double_member(p, "band_gap_ev"));
        }
    } else {
        g_string_append_printf(out, "%14g  %12.6f\n",
                               json_object_get_double_member(response, "temperature_k"),
                               json_object_get_double_member(response, "band_gap_ev"));
    }
}

const BmOperation bm_op_band_gap = {
    .name = "band-gap",
    .summary = "Band gap against temperature (Varshni or Bose-Einstein form)",
    .params = params,
    .run = run,
    .render = render,
    .response = response,
};
