/* sheet-density.c: operation "sheet-density" -- a two-dimensional electron
 * gas: sheet density from a Fermi level, or the Fermi level of a density. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-carriers.h"

static const BmParam params[] = {
    { "subbands", BM_VALUE_ARRAY, TRUE, NULL,
      "subbands: [{energy_ev (edge), mass_me (in-plane DOS mass), valley_degeneracy "
      "(>= 1, default 1)}, ...]; spin degeneracy 2 is included", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, TRUE, NULL, "temperature", .unit = "K",
      .lower = BM_GT(0) },
    { "fermi_level_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "Fermi level, on the scale of the subband energies: gives the sheet density",
      .unit = "eV" },
    { "sheet_density_cm2", BM_VALUE_NUMBER, FALSE, NULL,
      "total sheet density: gives the Fermi level", .unit = "cm^-2", .lower = BM_GT(0) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "temperature_k", "K", FALSE, "the temperature" },
    { "fermi_level_ev", "eV", FALSE, "Fermi level (given or solved for)" },
    { "sheet_density_cm2", "cm^-2", FALSE, "total sheet density (given or computed)" },
    { "given", NULL, FALSE, "which of the two was given: fermi_level_ev or sheet_density_cm2" },
    { "subbands", NULL, FALSE,
      "per subband: energy_ev, mass_me, valley_degeneracy, dos_cm2_per_ev, sheet_density_cm2" },
    BM_FIELD_END
};

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    static const char *const keys[] = { "energy_ev", "mass_me", "valley_degeneracy", NULL };
    gboolean has_ef = json_object_has_member(request, "fermi_level_ev");
    gboolean has_ns = json_object_has_member(request, "sheet_density_cm2");
    if (has_ef == has_ns) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"fermi_level_ev\" or \"sheet_density_cm2\"");
        return NULL;
    }
    double t, ef = 0, ns = 0;
    /* temperature_k > 0 and sheet_density_cm2 > 0: checked by the registry */
    if (!bm_json_number(request, "temperature_k", NULL, &t, error))
        return NULL;
    if (has_ef && !bm_json_number(request, "fermi_level_ev", NULL, &ef, error))
        return NULL;
    if (has_ns && !bm_json_number(request, "sheet_density_cm2", NULL, &ns, error))
        return NULL;
    JsonArray *a = json_object_get_array_member(request, "subbands");
    guint n = json_array_get_length(a);
    if (n == 0 || n > BM_MAX_SUBBANDS) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"subbands\" must hold 1 to %d subbands (got %u)",
                    BM_MAX_SUBBANDS, n);
        return NULL;
    }
    bm_subband sub[BM_MAX_SUBBANDS];
    double dos[BM_MAX_SUBBANDS], per[BM_MAX_SUBBANDS];
    bm_errbuf err = {0};
    for (guint i = 0; i < n; i++) {
        g_autofree char *where = g_strdup_printf("subbands[%u]", i);
        JsonObject *o = bm_json_element_object(a, i, keys, where, error);
        if (!o)
            return NULL;
        sub[i].valley_degeneracy = 1.0;
        if (!bm_json_number(o, "energy_ev", where, &sub[i].energy_ev, error)
            || !bm_json_positive(o, "mass_me", where, &sub[i].mass, error)
            || !bm_json_number_opt(o, "valley_degeneracy", where, &sub[i].valley_degeneracy,
                                   error))
            return NULL;
        if (!(sub[i].valley_degeneracy >= 1.0)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: key \"valley_degeneracy\" must be >= 1 (got %g)", where,
                        sub[i].valley_degeneracy);
            return NULL;
        }
        if (bm_2d_dos(sub[i].mass, sub[i].valley_degeneracy, &dos[i], &err) != BM_OK) {
            bm_error_from_core(error, &err, where);
            return NULL;
        }
    }
    bm_status st = has_ef ? bm_2d_sheet_density(sub, n, t, ef, &ns, per, &err)
                          : bm_2d_fermi_level(sub, n, t, ns, &ef, per, &err);
    if (st != BM_OK) {
        bm_error_from_core(error, &err, "request");
        return NULL;
    }
    JsonObject *resp = json_object_new();
    bm_json_set_number(resp, "temperature_k", t);
    bm_json_set_number(resp, "fermi_level_ev", ef);
    bm_json_set_number(resp, "sheet_density_cm2", ns);
    json_object_set_string_member(resp, "given", has_ef ? "fermi_level_ev" : "sheet_density_cm2");
    JsonArray *out = json_array_new();
    for (guint i = 0; i < n; i++) {
        JsonObject *o = json_object_new();
        bm_json_set_number(o, "energy_ev", sub[i].energy_ev);
        bm_json_set_number(o, "mass_me", sub[i].mass);
        bm_json_set_number(o, "valley_degeneracy", sub[i].valley_degeneracy);
        bm_json_set_number(o, "dos_cm2_per_ev", dos[i]);
        bm_json_set_number(o, "sheet_density_cm2", per[i]);
        json_array_add_object_element(out, o);
        if (sub[i].mass < 0.01 || sub[i].mass > 10.0)
            bm_json_warn(resp, BM_WARN_MASS_OUT_OF_RANGE, "subband %u: mass %g m_e is outside 0.01..10 m_e", i,
                         sub[i].mass);
    }
    json_object_set_array_member(resp, "subbands", out);
    return resp;
}

const BmOperation bm_op_sheet_density = {
    .name = "sheet-density",
    .summary = "Two-dimensional electron gas: sheet density from a Fermi level, or the "
               "Fermi level of a sheet density",
    .params = params,
    .run = run,
    .response = response,
};
