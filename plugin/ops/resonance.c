/* resonance.c: operation "resonance" -- the cyclotron mass from a measured
 * resonance (one peak, or a line fitted to frequency against field), and
 * the inverse: the field or frequency of resonance for a mass. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-measure.h"
#include "bm-units.h"

static const BmParam params[] = {
    { "frequency_ghz", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "resonance frequency, or a list (with a list of fields of the same length) for a "
      "line fit", .unit = "GHz", .lower = BM_GT(0) },
    { "field_t", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "field of resonance, or a list", .unit = "T", .lower = BM_GT(0) },
    { "cyclotron_mass_me", BM_VALUE_NUMBER, FALSE, NULL,
      "for the inverse: with frequency_ghz gives the field of resonance, with field_t "
      "the frequency", .unit = "m_e", .lower = BM_GT(0) },
    { "frequency_stderr_ghz", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "standard error of the frequency (one for all, or one per point): a weighted fit "
      "with these errors taken as absolute", .unit = "GHz", .lower = BM_GT(0) },
    { "field_stderr_t", BM_VALUE_NUMBER, FALSE, NULL,
      "standard error of a single field of resonance", .unit = "T", .lower = BM_GE(0) },
    { "fit_intercept", BM_VALUE_BOOLEAN, FALSE, "false",
      "line fit: allow f = s B + f0 (a zero-field offset) instead of f = s B", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "cyclotron_mass_me", "m_e", TRUE,
      "m_c = e B / (2 pi f m_e) (from a peak or the fitted slope)" },
    { "cyclotron_mass_stderr_me", "m_e", TRUE,
      "its standard error (from the given errors, or the fit covariance; null when the "
      "points leave no degree of freedom)" },
    { "field_t", "T", TRUE, "the inverse: field of resonance for the mass and frequency" },
    { "frequency_ghz", "GHz", TRUE, "the inverse: frequency of resonance for the mass and field" },
    { "fit", NULL, TRUE,
      "line fit: slope_ghz_per_t, slope_stderr_ghz_per_t, intercept_ghz, "
      "intercept_stderr_ghz, chi2, chi2_per_dof, degrees_of_freedom, weighted, "
      "residuals_ghz (f - fit)" },
    { "mode", NULL, FALSE, "peak, line-fit, field-of-resonance or frequency-of-resonance" },
    { "free_electron_ghz_per_t", "GHz/T", FALSE, "e / (2 pi m_e), the constant used" },
    BM_FIELD_END
};

static gboolean is_array(JsonObject *r, const char *key)
{
    JsonNode *n = json_object_get_member(r, key);
    return n && JSON_NODE_HOLDS_ARRAY(n);
}

static JsonObject *line_fit(JsonObject *request, GError **error)
{
    gsize nf = 0, nb = 0, ns = 0;
    g_autofree double *f = bm_json_numbers(request, "frequency_ghz", NULL, &nf, error);
    if (!f)
        return NULL;
    g_autofree double *b = bm_json_numbers(request, "field_t", NULL, &nb, error);
    if (!b)
        return NULL;
    if (nf != nb) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"frequency_ghz\" holds %zu values and \"field_t\" %zu: a line "
                    "fit needs one frequency per field", (size_t)nf, (size_t)nb);
        return NULL;
    }
    if (json_object_has_member(request, "field_stderr_t")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"field_stderr_t\" is for a single peak; a line fit takes the "
                    "errors of the frequencies (\"frequency_stderr_ghz\")");
        return NULL;
    }
    g_autofree double *sf = NULL;
    if (json_object_has_member(request, "frequency_stderr_ghz")) {
        sf = bm_json_numbers(request, "frequency_stderr_ghz", NULL, &ns, error);
        if (!sf)
            return NULL;
        if (ns == 1 && nf > 1) {
            sf = g_renew(double, sf, nf);
            for (gsize i = 1; i < nf; i++)
                sf[i] = sf[0];
        } else if (ns != nf) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"frequency_stderr_ghz\" holds %zu values for %zu "
                        "frequencies: give one for all or one each", (size_t)ns, (size_t)nf);
            return NULL;
        }
    }
    gboolean intercept = json_object_get_boolean_member(request, "fit_intercept");
    g_autofree double *res = g_new(double, nf);
    bm_resonance_fit fit;
    bm_errbuf err = {0};
    if (bm_resonance_fit_compute(f, b, sf, nf, intercept, res, &fit, &err) != BM_OK) {
        bm_error_from_core(error, &err, "resonance");
        return NULL;
    }
    JsonObject *resp = json_object_new();
    json_object_set_string_member(resp, "mode", "line-fit");
    bm_json_set_number(resp, "cyclotron_mass_me", fit.mass);
    bm_json_set_number(resp, "cyclotron_mass_stderr_me", fit.mass_stderr);
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "slope_ghz_per_t", fit.slope_ghz_per_t);
    bm_json_set_number(o, "slope_stderr_ghz_per_t", fit.slope_stderr);
    bm_json_set_number(o, "intercept_ghz", fit.intercept_ghz);
    bm_json_set_number(o, "intercept_stderr_ghz", fit.intercept_stderr);
    bm_json_set_number(o, "chi2", fit.chi2);
    bm_json_set_number(o, "chi2_per_dof", fit.chi2_per_dof);
    json_object_set_int_member(o, "degrees_of_freedom", (gint64)fit.dof);
    json_object_set_boolean_member(o, "weighted", fit.weighted);
    bm_json_set_numbers(o, "residuals_ghz", res, nf);
    json_object_set_object_member(resp, "fit", o);
    bm_json_warn_all(resp, &fit.warnings);
    bm_warnings_clear(&fit.warnings);
    return resp;
}

static JsonObject *single(JsonObject *request, GError **error)
{
    gboolean has_f = json_object_has_member(request, "frequency_ghz");
    gboolean has_b = json_object_has_member(request, "field_t");
    gboolean has_m = json_object_has_member(request, "cyclotron_mass_me");
    if (has_f + has_b + has_m != 2) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give two of \"frequency_ghz\", \"field_t\" and "
                    "\"cyclotron_mass_me\" (the third follows), or lists of frequencies and "
                    "fields for a line fit");
        return NULL;
    }
    double f = NAN, b = NAN, m = NAN, sf = 0.0, sb = 0.0;
    if ((has_f && !bm_json_number(request, "frequency_ghz", NULL, &f, error))
        || (has_b && !bm_json_number(request, "field_t", NULL, &b, error))
        || (has_m && !bm_json_number(request, "cyclotron_mass_me", NULL, &m, error))
        || !bm_json_number_opt(request, "field_stderr_t", NULL, &sb, error))
        return NULL;
    if (json_object_has_member(request, "frequency_stderr_ghz")) {
        if (is_array(request, "frequency_stderr_ghz")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"frequency_stderr_ghz\" must be one number for a single "
                        "peak");
            return NULL;
        }
        if (!bm_json_number(request, "frequency_stderr_ghz", NULL, &sf, error))
            return NULL;
    }
    if (json_object_get_boolean_member(request, "fit_intercept")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"fit_intercept\" is for a line fit (lists of frequencies and "
                    "fields)");
        return NULL;
    }
    JsonObject *resp = json_object_new();
    bm_errbuf err = {0};
    if (has_m) {
        if (json_object_has_member(request, "frequency_stderr_ghz")
            || json_object_has_member(request, "field_stderr_t")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: standard errors are for a measured peak, not for the "
                        "inverse (mass given)");
            json_object_unref(resp);
            return NULL;
        }
        /* m = K B / f with K = e / (2 pi m_e) in GHz/T */
        if (has_f) {
            json_object_set_string_member(resp, "mode", "field-of-resonance");
            bm_json_set_number(resp, "field_t", m * f / BM_CYCLOTRON_GHZ_PER_T);
        } else {
            json_object_set_string_member(resp, "mode", "frequency-of-resonance");
            bm_json_set_number(resp, "frequency_ghz", BM_CYCLOTRON_GHZ_PER_T * b / m);
        }
        bm_json_set_number(resp, "cyclotron_mass_me", m);
        return resp;
    }
    double sm;
    if (bm_resonance_mass(f, b, sf, sb, &m, &sm, &err) != BM_OK) {
        bm_error_from_core(error, &err, "resonance");
        json_object_unref(resp);
        return NULL;
    }
    json_object_set_string_member(resp, "mode", "peak");
    bm_json_set_number(resp, "cyclotron_mass_me", m);
    if (sf > 0.0 || sb > 0.0)
        bm_json_set_number(resp, "cyclotron_mass_stderr_me", sm);
    if (m < 0.01 || m > 10.0)
        bm_json_warn(resp, BM_WARN_MASS_OUT_OF_RANGE, "cyclotron mass %g m_e is outside the "
                     "usual 0.01..10 m_e: check the units (GHz, T)", m);
    return resp;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    gboolean fit = is_array(request, "frequency_ghz") || is_array(request, "field_t");
    if (fit && json_object_has_member(request, "cyclotron_mass_me")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"cyclotron_mass_me\" with lists: give the mass with one "
                    "frequency or one field");
        return NULL;
    }
    if (fit && (!json_object_has_member(request, "frequency_ghz")
                || !json_object_has_member(request, "field_t"))) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: a line fit needs both \"frequency_ghz\" and \"field_t\" as "
                    "lists of the same length");
        return NULL;
    }
    JsonObject *resp = fit ? line_fit(request, error) : single(request, error);
    if (resp)
        bm_json_set_number(resp, "free_electron_ghz_per_t", BM_CYCLOTRON_GHZ_PER_T);
    return resp;
}

const BmOperation bm_op_resonance = {
    .name = "resonance",
    .summary = "Cyclotron mass from a measured resonance (a peak, or a line fitted to "
               "frequency against field, with standard errors); the field or frequency of "
               "resonance for a mass",
    .params = params,
    .run = run,
    .response = response,
};
