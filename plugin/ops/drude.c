/* drude.c: operation "drude" -- mobility, scattering time, conductivity,
 * thermal velocity and mean free path from a mass, from the core. */
#include <math.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-drude.h"

static const BmParam params[] = {
    { "mass_me", BM_VALUE_NUMBER, TRUE, NULL, "conductivity effective mass",
      .unit = "m_e", .lower = BM_GT(0) },
    { "scattering_time_s", BM_VALUE_NUMBER, FALSE, NULL,
      "momentum relaxation time (give this or mobility_cm2_per_vs)",
      .unit = "s", .lower = BM_GT(0) },
    { "mobility_cm2_per_vs", BM_VALUE_NUMBER, FALSE, NULL,
      "mobility (give this or scattering_time_s)", .unit = "cm^2/(V s)", .lower = BM_GT(0) },
    { "density_cm3", BM_VALUE_NUMBER, FALSE, NULL,
      "carrier density: gives conductivity and resistivity", .unit = "cm^-3",
      .lower = BM_GE(0) },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL,
      "temperature: gives thermal velocity and mean free path", .unit = "K",
      .lower = BM_GT(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "mass_me", "m_e", FALSE, "the mass used" },
    { "scattering_time_s", "s", FALSE, "momentum relaxation time (given or from the mobility)" },
    { "mobility_cm2_per_vs", "cm^2/(V s)", FALSE, "mobility e tau / m (given or computed)" },
    { "density_cm3", "cm^-3", TRUE, "the density given" },
    { "conductivity_s_per_cm", "S/cm", TRUE, "n e mu (with density_cm3)" },
    { "resistivity_ohm_cm", "ohm cm", TRUE,
      "1 / conductivity (with density_cm3; null when the density is 0)" },
    { "temperature_k", "K", TRUE, "the temperature given" },
    { "thermal_velocity_cm_per_s", "cm/s", TRUE, "sqrt(3 kT / m) (with temperature_k)" },
    { "mean_free_path_nm", "nm", TRUE, "thermal velocity times tau (with temperature_k)" },
    BM_FIELD_END
};

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_drude_input in = { 0.0, NAN, NAN, 0.0, 0.0 };
    gboolean has_tau = json_object_has_member(request, "scattering_time_s");
    gboolean has_mu = json_object_has_member(request, "mobility_cm2_per_vs");
    gboolean has_n = json_object_has_member(request, "density_cm3");
    gboolean has_t = json_object_has_member(request, "temperature_k");
    if (has_tau == has_mu) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"scattering_time_s\" or "
                    "\"mobility_cm2_per_vs\"");
        return NULL;
    }
    /* ranges (> 0, density >= 0) are checked by the registry */
    if (!bm_json_number(request, "mass_me", NULL, &in.mass, error)
        || (has_tau && !bm_json_number(request, "scattering_time_s", NULL, &in.tau_s, error))
        || (has_mu && !bm_json_number(request, "mobility_cm2_per_vs", NULL,
                                      &in.mobility_cm2_vs, error))
        || (has_t && !bm_json_number(request, "temperature_k", NULL, &in.temperature_k,
                                     error))
        || !bm_json_number_opt(request, "density_cm3", NULL, &in.density_cm3, error))
        return NULL;
    bm_drude_result r;
    bm_errbuf err = {0};
    if (bm_drude(&in, &r, &err) != BM_OK) {
        bm_error_from_core(error, &err, "request");
        return NULL;
    }
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "mass_me", in.mass);
    bm_json_set_number(resp, "scattering_time_s", r.tau_s);
    bm_json_set_number(resp, "mobility_cm2_per_vs", r.mobility_cm2_vs);
    if (has_n) {
        bm_json_set_number(resp, "density_cm3", in.density_cm3);
        bm_json_set_number(resp, "conductivity_s_per_cm", r.conductivity_s_cm);
        bm_json_set_number(resp, "resistivity_ohm_cm", r.resistivity_ohm_cm);
    }
    if (has_t) {
        bm_json_set_number(resp, "temperature_k", in.temperature_k);
        bm_json_set_number(resp, "thermal_velocity_cm_per_s", r.thermal_velocity_cm_s);
        bm_json_set_number(resp, "mean_free_path_nm", r.mean_free_path_nm);
    }
    if (in.mass < 0.01 || in.mass > 10.0)
        bm_json_warn(resp, BM_WARN_MASS_OUT_OF_RANGE, "mass %g m_e is outside 0.01..10 m_e", in.mass);
    if (has_n && in.density_cm3 == 0)
        bm_json_warn(resp, BM_WARN_ZERO_DENSITY, "density_cm3 is 0: no conductivity, resistivity is infinite "
                     "(written as null)");
    return resp;
}

const BmOperation bm_op_drude = {
    .name = "drude",
    .summary = "Drude transport: mobility, scattering time, conductivity, thermal velocity, "
               "mean free path",
    .params = params,
    .run = run,
    .response = response,
};
