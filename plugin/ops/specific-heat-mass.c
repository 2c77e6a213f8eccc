/* specific-heat-mass.c: operation "specific-heat-mass" -- the thermal mass
 * ratio from the electronic specific-heat coefficient gamma (given, or fitted
 * from C/T against T^2) against the free-electron value. */
#include <math.h>
#include <string.h>

#include <gsl/gsl_const_num.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-measure.h"

static const BmParam params[] = {
    { "gamma_mj_per_mol_k2", BM_VALUE_NUMBER, FALSE, NULL,
      "electronic specific-heat coefficient, per mole of formula units",
      .unit = "mJ/(mol K^2)", .lower = BM_GT(0) },
    { "gamma_stderr_mj_per_mol_k2", BM_VALUE_NUMBER, FALSE, NULL, "its standard error",
      .unit = "mJ/(mol K^2)", .lower = BM_GE(0) },
    { "temperatures_k", BM_VALUE_ARRAY, FALSE, NULL,
      "instead of gamma: temperatures of heat-capacity data, fitted as C/T = gamma + "
      "beta T^2", .unit = "K", .lower = BM_GT(0) },
    { "heat_capacity_mj_per_mol_k", BM_VALUE_ARRAY, FALSE, NULL,
      "the heat capacity at each temperature", .unit = "mJ/(mol K)" },
    { "heat_capacity_stderr_mj_per_mol_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "its standard error (one for all, or one each): a weighted fit, errors absolute",
      .unit = "mJ/(mol K)", .lower = BM_GT(0) },
    { "atoms_per_formula_unit", BM_VALUE_NUMBER, FALSE, "1",
      "atoms per formula unit, for the Debye temperature of the fit", .unit = NULL,
      .lower = BM_GT(0) },
    { "fermi_energy_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "free-electron Fermi energy (with electrons_per_atom)", .unit = "eV", .lower = BM_GT(0) },
    { "electrons_per_atom", BM_VALUE_NUMBER, FALSE, NULL,
      "conduction electrons per atom (per formula unit of the molar quantity)",
      .unit = NULL, .lower = BM_GT(0) },
    { "electron_density_cm3", BM_VALUE_NUMBER, FALSE, NULL,
      "instead of the Fermi energy: the conduction-electron density (with "
      "molar_volume_cm3)", .unit = "cm^-3", .lower = BM_GT(0) },
    { "molar_volume_cm3", BM_VALUE_NUMBER, FALSE, NULL,
      "volume of a mole of formula units", .unit = "cm^3/mol", .lower = BM_GT(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "thermal_mass_ratio", NULL, TRUE,
      "gamma / free-electron gamma: the thermal (DOS) mass in m_e (null when a fitted "
      "gamma is not positive)" },
    { "thermal_mass_ratio_stderr", NULL, TRUE, "its standard error (from gamma's)" },
    { "gamma_mj_per_mol_k2", "mJ/(mol K^2)", FALSE, "gamma used (given or fitted)" },
    { "gamma_stderr_mj_per_mol_k2", "mJ/(mol K^2)", TRUE, "its standard error" },
    { "free_electron_gamma_mj_per_mol_k2", "mJ/(mol K^2)", FALSE,
      "(pi^2 / 2) z R k_B / E_F" },
    { "fermi_energy_ev", "eV", FALSE, "free-electron Fermi energy (given or from the density)" },
    { "electrons_per_formula_unit", NULL, FALSE,
      "z (given, or electron_density_cm3 times molar_volume_cm3 / N_A)" },
    { "dos_at_fermi_level_per_ev", "1/(eV formula unit)", TRUE,
      "g(E_F) = 3 gamma / (pi^2 k_B^2 N_A), both spins, per formula unit" },
    { "free_electron_dos_per_ev", "1/(eV formula unit)", FALSE, "3 z / (2 E_F)" },
    { "dos_at_fermi_level_per_ev_cm3", "1/(eV cm^3)", TRUE,
      "the same per volume (with molar_volume_cm3)" },
    { "fit", NULL, TRUE,
      "with heat-capacity data: beta_mj_per_mol_k4, beta_stderr_mj_per_mol_k4, "
      "debye_temperature_k, debye_temperature_stderr_k, chi2, chi2_per_dof, "
      "degrees_of_freedom, weighted, residuals_mj_per_mol_k2 (C/T - fit)" },
    { "method", NULL, FALSE, "the relations used" },
    BM_FIELD_END
};

static double *numbers_n(JsonObject *o, const char *key, gsize n, GError **error)
{
    gsize m = 0;
    double *v = bm_json_numbers(o, key, NULL, &m, error);
    if (!v)
        return NULL;
    if (m == 1 && n > 1) {
        v = g_renew(double, v, n);
        for (gsize i = 1; i < n; i++)
            v[i] = v[0];
    } else if (m != n) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"%s\" holds %zu values for %zu temperatures", key, (size_t)m,
                    (size_t)n);
        g_free(v);
        return NULL;
    }
    return v;
}

/* gamma from the request or fitted; the fit object goes into resp. */
static gboolean read_gamma(JsonObject *request, JsonObject *resp, double *g, double *sg,
                           GError **error)
{
    gboolean given = json_object_has_member(request, "gamma_mj_per_mol_k2");
    gboolean data = json_object_has_member(request, "temperatures_k")
                 || json_object_has_member(request, "heat_capacity_mj_per_mol_k");
    if (given == data) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give \"gamma_mj_per_mol_k2\", or \"temperatures_k\" with "
                    "\"heat_capacity_mj_per_mol_k\" to fit it (one of the two)");
        return FALSE;
    }
    if (given) {
        if (json_object_has_member(request, "heat_capacity_stderr_mj_per_mol_k")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"heat_capacity_stderr_mj_per_mol_k\" needs heat-capacity "
                        "data");
            return FALSE;
        }
        *sg = NAN;
        return bm_json_number(request, "gamma_mj_per_mol_k2", NULL, g, error)
            && bm_json_number_opt(request, "gamma_stderr_mj_per_mol_k2", NULL, sg, error);
    }
    if (json_object_has_member(request, "gamma_stderr_mj_per_mol_k2")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"gamma_stderr_mj_per_mol_k2\" goes with a given gamma; a fit "
                    "gives its own");
        return FALSE;
    }
    if (!json_object_has_member(request, "temperatures_k")
        || !json_object_has_member(request, "heat_capacity_mj_per_mol_k")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: the fit needs both \"temperatures_k\" and "
                    "\"heat_capacity_mj_per_mol_k\"");
        return FALSE;
    }
    gsize nt = 0, nc = 0;
    double r;
    g_autofree double *t = bm_json_numbers(request, "temperatures_k", NULL, &nt, error);
    if (!t)
        return FALSE;
    g_autofree double *c = bm_json_numbers(request, "heat_capacity_mj_per_mol_k", NULL, &nc,
                                           error);
    if (!c || !bm_json_number(request, "atoms_per_formula_unit", NULL, &r, error))
        return FALSE;
    if (nt != nc) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"temperatures_k\" holds %zu values and "
                    "\"heat_capacity_mj_per_mol_k\" %zu: one heat capacity per temperature",
                    (size_t)nt, (size_t)nc);
        return FALSE;
    }
    g_autofree double *sc = NULL;
    if (json_object_has_member(request, "heat_capacity_stderr_mj_per_mol_k")
        && !(sc = numbers_n(request, "heat_capacity_stderr_mj_per_mol_k", nt, error)))
        return FALSE;
    g_autofree double *res = g_new(double, nt);
    bm_heat_fit fit;
    bm_errbuf err = {0};
    if (bm_heat_fit_compute(t, c, sc, nt, r, res, &fit, &err) != BM_OK) {
        bm_error_from_core(error, &err, "specific-heat-mass");
        return FALSE;
    }
    JsonObject *o = json_object_new();
    bm_json_set_number(o, "beta_mj_per_mol_k4", fit.beta);
    bm_json_set_number(o, "beta_stderr_mj_per_mol_k4", fit.beta_stderr);
    bm_json_set_number(o, "debye_temperature_k", fit.debye_temperature_k);
    bm_json_set_number(o, "debye_temperature_stderr_k", fit.debye_temperature_stderr_k);
    bm_json_set_number(o, "chi2", fit.chi2);
    bm_json_set_number(o, "chi2_per_dof", fit.chi2_per_dof);
    json_object_set_int_member(o, "degrees_of_freedom", (gint64)fit.dof);
    json_object_set_boolean_member(o, "weighted", fit.weighted);
    bm_json_set_numbers(o, "residuals_mj_per_mol_k2", res, nt);
    json_object_set_object_member(resp, "fit", o);
    bm_json_warn_all(resp, &fit.warnings);
    bm_warnings_clear(&fit.warnings);
    *g = fit.gamma;
    *sg = fit.gamma_stderr;
    return TRUE;
}

/* E_F and z from (fermi_energy_ev, electrons_per_atom) or (electron_density_cm3,
 * molar_volume_cm3). */
static gboolean read_electrons(JsonObject *request, double *ef, double *z, double *vm,
                               GError **error)
{
    gboolean a = json_object_has_member(request, "fermi_energy_ev")
              || json_object_has_member(request, "electrons_per_atom");
    gboolean b = json_object_has_member(request, "electron_density_cm3");
    *vm = NAN;
    if (a == b) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give \"fermi_energy_ev\" with \"electrons_per_atom\", or "
                    "\"electron_density_cm3\" with \"molar_volume_cm3\" (one of the two)");
        return FALSE;
    }
    if (a) {
        if (!bm_json_number(request, "fermi_energy_ev", NULL, ef, error)
            || !bm_json_number(request, "electrons_per_atom", NULL, z, error)
            || !bm_json_number_opt(request, "molar_volume_cm3", NULL, vm, error))
            return FALSE;
        return TRUE;
    }
    double n;
    if (!bm_json_number(request, "electron_density_cm3", NULL, &n, error))
        return FALSE;
    if (!json_object_has_member(request, "molar_volume_cm3")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: \"electron_density_cm3\" needs \"molar_volume_cm3\" (for the "
                    "electrons per formula unit)");
        return FALSE;
    }
    if (!bm_json_number(request, "molar_volume_cm3", NULL, vm, error))
        return FALSE;
    bm_errbuf err = {0};
    if (bm_free_electron_fermi_energy(n, ef, &err) != BM_OK) {
        bm_error_from_core(error, &err, "request: key \"electron_density_cm3\"");
        return FALSE;
    }
    *z = n * *vm / GSL_CONST_NUM_AVOGADRO;
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    double g, sg, ef, z, vm;
    JsonObject *resp = json_object_new();
    bm_json_warnings_ensure(resp);
    if (!read_electrons(request, &ef, &z, &vm, error)
        || !read_gamma(request, resp, &g, &sg, error)) {
        json_object_unref(resp);
        return NULL;
    }
    bm_json_set_number(resp, "gamma_mj_per_mol_k2", g);
    if (isfinite(sg))
        bm_json_set_number(resp, "gamma_stderr_mj_per_mol_k2", sg);
    bm_json_set_number(resp, "fermi_energy_ev", ef);
    bm_json_set_number(resp, "electrons_per_formula_unit", z);
    /* the free-electron values do not need gamma; a non-positive fitted gamma
     * (warned by the fit) gives no ratio */
    bm_thermal_mass tm;
    bm_errbuf err = {0};
    if (bm_thermal_mass_compute(g > 0.0 ? g : 1.0, sg, ef, z, &tm, &err) != BM_OK) {
        bm_error_from_core(error, &err, "specific-heat-mass");
        json_object_unref(resp);
        return NULL;
    }
    bm_json_set_number(resp, "free_electron_gamma_mj_per_mol_k2", tm.free_gamma);
    bm_json_set_number(resp, "free_electron_dos_per_ev", tm.free_dos_per_ev_formula_unit);
    if (g > 0.0) {
        bm_json_set_number(resp, "thermal_mass_ratio", tm.ratio);
        if (isfinite(sg))
            bm_json_set_number(resp, "thermal_mass_ratio_stderr", tm.ratio_stderr);
        bm_json_set_number(resp, "dos_at_fermi_level_per_ev", tm.dos_per_ev_formula_unit);
        if (isfinite(vm))
            bm_json_set_number(resp, "dos_at_fermi_level_per_ev_cm3",
                               tm.dos_per_ev_formula_unit * GSL_CONST_NUM_AVOGADRO / vm);
        bm_json_warn_all(resp, &tm.warnings);
    } else
        bm_json_set_number(resp, "thermal_mass_ratio", NAN);
    bm_warnings_clear(&tm.warnings);
    json_object_set_string_member(resp, "method",
        "gamma_free = (pi^2 / 2) z R / T_F with T_F = E_F / k_B; thermal mass ratio = "
        "gamma / gamma_free; g(E_F) = 3 gamma / (pi^2 k_B^2 N_A); E_F = hbar^2 (3 pi^2 n)^(2/3) "
        "/ 2 m_e from a density (Kittel, Introduction to Solid State Physics, ch. 6); fit: "
        "C/T = gamma + beta T^2, Debye temperature (12 pi^4 r R / 5 beta)^(1/3)");
    return resp;
}

const BmOperation bm_op_specific_heat_mass = {
    .name = "specific-heat-mass",
    .summary = "Thermal mass ratio from the electronic specific-heat coefficient (given or "
               "fitted from C/T against T^2) against the free-electron value; the density of "
               "states at the Fermi level",
    .params = params,
    .run = run,
    .response = response,
};
