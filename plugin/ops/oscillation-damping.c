/* oscillation-damping.c: operation "oscillation-damping" -- the cyclotron
 * mass from the temperature damping of quantum-oscillation amplitudes
 * (Lifshitz-Kosevich X / sinh X), and the Dingle temperature from their
 * field dependence. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-measure.h"
#include "bm-units.h"

static const BmParam params[] = {
    { "temperatures_k", BM_VALUE_ARRAY, FALSE, NULL,
      "temperatures of the amplitudes (at least two different; three or more for errors)",
      .unit = "K", .lower = BM_GT(0) },
    { "amplitudes", BM_VALUE_ARRAY, FALSE, NULL,
      "oscillation amplitude at each temperature, any unit (all positive, or all negative)",
      .unit = NULL },
    { "amplitude_stderrs", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "standard error of the amplitudes (one for all, or one each): a weighted fit with "
      "these errors taken as absolute", .unit = NULL, .lower = BM_GT(0) },
    { "field_t", BM_VALUE_NUMBER, FALSE, NULL,
      "the field of the amplitudes", .unit = "T", .lower = BM_GT(0) },
    { "field_range_t", BM_VALUE_ARRAY, FALSE, NULL,
      "instead: the field window [B1, B2] of a Fourier amplitude; X is taken at the "
      "effective field 2 / (1/B1 + 1/B2)", .unit = "T", .lower = BM_GT(0) },
    { "harmonic", BM_VALUE_INTEGER, FALSE, "1", "the harmonic p of the oscillation",
      .unit = NULL, .lower = BM_GE(1) },
    { "cyclotron_mass_me", BM_VALUE_NUMBER, FALSE, NULL,
      "a known mass for the Dingle fit (instead of the one fitted here)", .unit = "m_e",
      .lower = BM_GT(0) },
    { "cyclotron_mass_stderr_me", BM_VALUE_NUMBER, FALSE, NULL,
      "its standard error (propagated into the Dingle temperature)", .unit = "m_e",
      .lower = BM_GE(0) },
    { "dingle", BM_VALUE_OBJECT, FALSE, NULL,
      "amplitudes at several fields and one temperature: {fields_t, amplitudes, "
      "temperature_k, field_power, amplitude_stderrs (optional)}; field_power k of the "
      "measured quantity, A = C B^k R_T R_D", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "cyclotron_mass_me", "m_e", TRUE, "fitted mass (with temperatures_k)" },
    { "cyclotron_mass_stderr_me", "m_e", TRUE,
      "its standard error from the fit covariance (null with two points)" },
    { "amplitude_prefactor", NULL, TRUE, "A0, the T -> 0 amplitude (unit of amplitudes)" },
    { "amplitude_prefactor_stderr", NULL, TRUE, "its standard error" },
    { "mass_prefactor_correlation", NULL, TRUE, "correlation of the two fitted parameters" },
    { "residuals", NULL, TRUE, "amplitude minus fit at each temperature" },
    { "chi2", NULL, TRUE, "sum of squared (weighted) residuals" },
    { "chi2_per_dof", NULL, TRUE, "chi2 per degree of freedom" },
    { "degrees_of_freedom", NULL, TRUE, "points minus 2" },
    { "weighted", NULL, TRUE, "whether amplitude_stderrs weighted the fit (errors absolute)" },
    { "field_t", "T", TRUE, "the field used in X (given, or the effective field of the range)" },
    { "harmonic", NULL, TRUE, "the harmonic p" },
    { "x_range", NULL, TRUE,
      "X = 2 pi^2 p k_B T m_c / (hbar e B) at the lowest and highest temperature" },
    { "dingle", NULL, TRUE,
      "with \"dingle\": dingle_temperature_k, dingle_temperature_stderr_k (fit and mass "
      "errors in quadrature), dingle_temperature_stderr_from_mass_k, prefactor, "
      "field_power, mass_me and mass_source, residuals_ln (of ln |A|), chi2_per_dof, "
      "degrees_of_freedom, weighted" },
    { "method", NULL, FALSE, "the model fitted" },
    BM_FIELD_END
};

/* An array of n numbers, or one number repeated n times. */
static double *numbers_n(JsonObject *o, const char *key, const char *where, gsize n,
                         GError **error)
{
    gsize m = 0;
    double *v = bm_json_numbers(o, key, where, &m, error);
    if (!v)
        return NULL;
    if (m == 1 && n > 1) {
        v = g_renew(double, v, n);
        for (gsize i = 1; i < n; i++)
            v[i] = v[0];
    } else if (m != n) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: \"%s\" holds %zu values for %zu points: give one for all or one each",
                    where ? where : "request", key, (size_t)m, (size_t)n);
        g_free(v);
        return NULL;
    }
    return v;
}

static gboolean read_field(JsonObject *request, double *b, GError **error)
{
    gboolean one = json_object_has_member(request, "field_t");
    gboolean range = json_object_has_member(request, "field_range_t");
    if (one == range) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: the temperature fit needs exactly one of \"field_t\" or "
                    "\"field_range_t\"");
        return FALSE;
    }
    if (one)
        return bm_json_number(request, "field_t", NULL, b, error);
    gsize n = 0;
    g_autofree double *r = bm_json_numbers(request, "field_range_t", NULL, &n, error);
    if (!r)
        return FALSE;
    if (n != 2) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"field_range_t\" must hold 2 fields [B1, B2] (got %zu)",
                    (size_t)n);
        return FALSE;
    }
    /* the window is uniform in 1/B: its mean 1/B (common practice, no source) */
    *b = 2.0 / (1.0 / r[0] + 1.0 / r[1]);
    return TRUE;
}

static gboolean temperature_fit(JsonObject *request, JsonObject *resp, int p, double *mass,
                                double *smass, GError **error)
{
    if (!json_object_has_member(request, "amplitudes")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"temperatures_k\" needs \"amplitudes\"");
        return FALSE;
    }
    double b;
    gsize nt = 0, na = 0;
    g_autofree double *t = bm_json_numbers(request, "temperatures_k", NULL, &nt, error);
    if (!t)
        return FALSE;
    g_autofree double *a = bm_json_numbers(request, "amplitudes", NULL, &na, error);
    if (!a || !read_field(request, &b, error))
        return FALSE;
    if (nt != na) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"temperatures_k\" holds %zu values and \"amplitudes\" %zu: "
                    "give one amplitude per temperature", (size_t)nt, (size_t)na);
        return FALSE;
    }
    g_autofree double *sa = NULL;
    if (json_object_has_member(request, "amplitude_stderrs")
        && !(sa = numbers_n(request, "amplitude_stderrs", NULL, nt, error)))
        return FALSE;
    g_autofree double *res = g_new(double, nt);
    bm_lk_fit fit;
    bm_errbuf err = {0};
    if (bm_lk_fit_compute(t, a, sa, nt, b, p, res, &fit, &err) != BM_OK) {
        bm_error_from_core(error, &err, "oscillation-damping");
        return FALSE;
    }
    bm_json_set_number(resp, "cyclotron_mass_me", fit.mass);
    bm_json_set_number(resp, "cyclotron_mass_stderr_me", fit.mass_stderr);
    bm_json_set_number(resp, "amplitude_prefactor", fit.amplitude);
    bm_json_set_number(resp, "amplitude_prefactor_stderr", fit.amplitude_stderr);
    bm_json_set_number(resp, "mass_prefactor_correlation", fit.correlation);
    bm_json_set_numbers(resp, "residuals", res, nt);
    bm_json_set_number(resp, "chi2", fit.chi2);
    bm_json_set_number(resp, "chi2_per_dof", fit.chi2_per_dof);
    json_object_set_int_member(resp, "degrees_of_freedom", (gint64)fit.dof);
    json_object_set_boolean_member(resp, "weighted", fit.weighted);
    bm_json_set_number(resp, "field_t", b);
    json_object_set_int_member(resp, "harmonic", p);
    double xr[2] = { fit.x_min, fit.x_max };
    bm_json_set_numbers(resp, "x_range", xr, 2);
    bm_json_warn_all(resp, &fit.warnings);
    bm_warnings_clear(&fit.warnings);
    *mass = fit.mass;
    *smass = isfinite(fit.mass_stderr) ? fit.mass_stderr : 0.0;
    return TRUE;
}

static gboolean dingle_fit(JsonObject *request, JsonObject *resp, int p, double mass,
                           double smass, const char *mass_source, GError **error)
{
    static const char *const keys[] = { "fields_t", "amplitudes", "temperature_k",
                                        "field_power", "amplitude_stderrs", NULL };
    const char *where = "request: key \"dingle\"";
    JsonObject *d = json_object_get_object_member(request, "dingle");
    if (!bm_json_only_keys(d, keys, where, error))
        return FALSE;
    gsize nb = 0, na = 0;
    double t, k;
    g_autofree double *b = bm_json_numbers(d, "fields_t", where, &nb, error);
    if (!b)
        return FALSE;
    g_autofree double *a = bm_json_numbers(d, "amplitudes", where, &na, error);
    if (!a || !bm_json_positive(d, "temperature_k", where, &t, error)
        || !bm_json_number(d, "field_power", where, &k, error))
        return FALSE;
    if (nb != na) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: \"fields_t\" holds %zu values and \"amplitudes\" %zu: give one "
                    "amplitude per field", where, (size_t)nb, (size_t)na);
        return FALSE;
    }
    g_autofree double *sa = NULL;
    if (json_object_has_member(d, "amplitude_stderrs")
        && !(sa = numbers_n(d, "amplitude_stderrs", where, nb, error)))
        return FALSE;
    g_autofree double *res = g_new(double, nb);
    bm_dingle_fit fit;
    bm_errbuf err = {0};
    if (bm_dingle_fit_compute(b, a, sa, nb, t, mass, smass, p, k, res, &fit, &err) != BM_OK) {
        bm_error_from_core(error, &err, where);
        return FALSE;
    }
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "dingle_temperature_k", fit.dingle_temperature_k);
    bm_json_set_number(o, "dingle_temperature_stderr_k", fit.dingle_temperature_stderr_k);
    bm_json_set_number(o, "dingle_temperature_stderr_from_mass_k",
                       fit.dingle_temperature_stderr_mass_k);
    bm_json_set_number(o, "prefactor", fit.prefactor);
    bm_json_set_number(o, "field_power", k);
    bm_json_set_number(o, "temperature_k", t);
    bm_json_set_number(o, "mass_me", mass);
    json_object_set_string_member(o, "mass_source", mass_source);
    bm_json_set_numbers(o, "residuals_ln", res, nb);
    bm_json_set_number(o, "chi2_per_dof", fit.chi2_per_dof);
    json_object_set_int_member(o, "degrees_of_freedom", (gint64)fit.dof);
    json_object_set_boolean_member(o, "weighted", fit.weighted);
    json_object_set_object_member(resp, "dingle", o);
    bm_json_warn_all(resp, &fit.warnings);
    bm_warnings_clear(&fit.warnings);
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    gboolean has_t = json_object_has_member(request, "temperatures_k");
    gboolean has_d = json_object_has_member(request, "dingle");
    gboolean has_m = json_object_has_member(request, "cyclotron_mass_me");
    if (!has_t && !has_d) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give \"temperatures_k\" with \"amplitudes\" (the mass), or "
                    "\"dingle\" with \"cyclotron_mass_me\" (the Dingle temperature), or both");
        return NULL;
    }
    if (has_t && has_m) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"cyclotron_mass_me\" and \"temperatures_k\" both give the "
                    "mass: give one");
        return NULL;
    }
    if (has_d && !has_t && !has_m) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: the Dingle fit needs the mass: \"cyclotron_mass_me\", or "
                    "\"temperatures_k\" with \"amplitudes\" to fit it");
        return NULL;
    }
    if (!has_t && (json_object_has_member(request, "amplitudes")
                   || json_object_has_member(request, "field_t")
                   || json_object_has_member(request, "field_range_t"))) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"amplitudes\", \"field_t\" and \"field_range_t\" belong to the "
                    "temperature fit: give \"temperatures_k\" too (the Dingle data go in "
                    "\"dingle\")");
        return NULL;
    }
    if (!has_m && json_object_has_member(request, "cyclotron_mass_stderr_me")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"cyclotron_mass_stderr_me\" needs \"cyclotron_mass_me\"");
        return NULL;
    }
    int p = (int)json_object_get_int_member(request, "harmonic");
    JsonObject *resp = json_object_new();
    bm_json_warnings_ensure(resp);
    double mass = NAN, smass = 0.0;
    const char *source = "request";
    if (has_t) {
        if (!temperature_fit(request, resp, p, &mass, &smass, error))
            goto fail;
        source = "the temperature fit of this request";
    } else if (!bm_json_number(request, "cyclotron_mass_me", NULL, &mass, error)
               || !bm_json_number_opt(request, "cyclotron_mass_stderr_me", NULL, &smass, error))
        goto fail;
    if (has_d && !dingle_fit(request, resp, p, mass, smass, source, error))
        goto fail;
    json_object_set_string_member(resp, "method",
        "A(T) = A0 X / sinh X, X = 2 pi^2 p k_B T m_c / (hbar e B), fitted by GSL nonlinear "
        "least squares; Dingle: ln |A| - k ln B - ln R_T linear in 1/B with slope "
        "-2 pi^2 p k_B m_c T_D / (hbar e) (Lifshitz-Kosevich; Shoenberg, Magnetic "
        "Oscillations in Metals, 1984)");
    return resp;
fail:
    json_object_unref(resp);
    return NULL;
}

const BmOperation bm_op_oscillation_damping = {
    .name = "oscillation-damping",
    .summary = "Cyclotron mass from the temperature damping of quantum-oscillation "
               "amplitudes (Lifshitz-Kosevich), and the Dingle temperature from their field "
               "dependence, with standard errors",
    .params = params,
    .run = run,
    .response = response,
};
