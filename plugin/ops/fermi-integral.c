/* fermi-integral.c: operation "fermi-integral" -- complete Fermi-Dirac
 * integrals F_j(eta) and the inverse of F_1/2, from the core. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-fermi.h"

static const BmParam params[] = {
    { "order", BM_VALUE_NUMBER, TRUE, NULL,
      "order j of F_j: -0.5, 0, 0.5, 1, 1.5 or 2", .unit = NULL },
    { "eta", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "reduced Fermi level(s) (E_F - E_c) / kT: a number or an array", .unit = NULL },
    { "values", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "F_1/2 value(s) to invert, with \"inverse\": true", .unit = NULL,
      .lower = BM_GT(0) },
    { "inverse", BM_VALUE_BOOLEAN, FALSE, "false",
      "true: return the eta with F_1/2(eta) = each of \"values\" (order 0.5 only)",
      .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "order", NULL, FALSE, "the order j" },
    { "normalisation", NULL, FALSE, "\"1/Gamma(j+1)\"" },
    { "definition", NULL, FALSE, "the integral, in words (DLMF 25.12.14)" },
    { "eta", NULL, FALSE, "reduced Fermi level(s): given, or the inverse of \"values\"" },
    { "values", NULL, FALSE, "F_j(eta): computed, or given for the inverse" },
    BM_FIELD_END
};

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    double order;
    if (!bm_json_number(request, "order", NULL, &order, error))
        return NULL;
    gboolean inverse = json_object_get_boolean_member(request, "inverse");
    const char *in_key = inverse ? "values" : "eta";
    const char *out_key = inverse ? "eta" : "values";
    if (json_object_has_member(request, out_key)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"%s\" is not used %s (give \"%s\")", out_key,
                    inverse ? "with \"inverse\": true" : "without \"inverse\": true", in_key);
        return NULL;
    }
    bm_errbuf err = {0};
    double probe;
    if (bm_fermi_dirac(order, 0.0, &probe, &err) != BM_OK) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"order\" must be -0.5, 0, 0.5, 1, 1.5 or 2 (got %g)", order);
        return NULL;
    }
    if (inverse && order != 0.5) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"inverse\" is defined for \"order\" 0.5 only (got %g)", order);
        return NULL;
    }
    if (!json_object_has_member(request, in_key)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: missing key \"%s\"",
                    in_key);
        return NULL;
    }
    gboolean scalar = JSON_NODE_HOLDS_VALUE(json_object_get_member(request, in_key));
    gsize n = 0;
    g_autofree double *x = bm_json_numbers(request, in_key, NULL, &n, error);
    if (!x)
        return NULL;
    g_autofree double *y = g_new(double, n);
    for (gsize i = 0; i < n; i++) {
        bm_status st = inverse ? bm_fermi_dirac_half_inverse(x[i], &y[i], &err)
                               : bm_fermi_dirac(order, x[i], &y[i], &err);
        if (st != BM_OK) {
            g_autofree char *ctx = scalar ? g_strdup_printf("request: key \"%s\"", in_key)
                : g_strdup_printf("request: element %zu of \"%s\"", (size_t)i, in_key);
            bm_error_from_core(error, &err, ctx);
            return NULL;
        }
    }
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "order", order);
    json_object_set_string_member(resp, "normalisation", "1/Gamma(j+1)");
    json_object_set_string_member(resp, "definition",
        "F_j(eta) = 1/Gamma(j+1) int_0^inf x^j / (1 + exp(x - eta)) dx (DLMF 25.12.14)");
    if (scalar) {
        bm_json_set_number(resp, in_key, x[0]);
        bm_json_set_number(resp, out_key, y[0]);
    } else {
        bm_json_set_numbers(resp, in_key, x, n);
        bm_json_set_numbers(resp, out_key, y, n);
    }
    return resp;
}

const BmOperation bm_op_fermi_integral = {
    .name = "fermi-integral",
    .summary = "Complete Fermi-Dirac integrals F_j(eta), j = -1/2 ... 2, and the inverse of F_1/2",
    .params = params,
    .run = run,
    .response = response,
};
