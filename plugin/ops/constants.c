/* constants.c: operation "constants" -- the physical constants the project
 * uses, in its interface units, derived from GSL's CODATA values. */
#include "ops.h"
#include "bm-json.h"
#include "bm-units.h"

static const BmParam params[] = {
    BM_PARAM_END
};

static const BmField response[] = {
    { "constants", NULL, FALSE,
      "one object per constant: {value, meaning}, the unit in the key name" },
    { "source", NULL, FALSE, "where the values come from" },
    BM_FIELD_END
};

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)request; (void)inputs; (void)error;
    /* The constants, as data: key (unit in the name), value, meaning (a local
     * table: some values are computed, not constant expressions). */
    const struct {
        const char *key;
        double value;
        const char *meaning;
    } constants[] = {
        { "hbar2_over_me_ev_a2", BM_HBAR2_OVER_ME_EV_A2,
          "hbar^2/m_e: inverse mass tensor (1/m_e) = Hessian (eV A^2) / this" },
        { "boltzmann_ev_per_k", BM_KB_EV, "k_B" },
        { "nc_at_1k_cm3", BM_NC_PREFACTOR_CM3,
          "2 (2 pi m_e k_B T / h^2)^(3/2) at 1 K; scale by (m/m_e)^(3/2) T^(3/2)" },
        { "dos2d_per_ev_cm2", BM_DOS2D_PER_EV_CM2,
          "m_e / (pi hbar^2): 2D density of states per spin-degenerate valley" },
        { "cyclotron_ghz_per_tesla", BM_CYCLOTRON_GHZ_PER_T,
          "e / (2 pi m_e): free-electron cyclotron frequency" },
        { "damping_k_per_tesla", BM_LK_K_PER_T,
          "2 pi^2 k_B m_e / (hbar e): X = this p (m/m_e) T / B" },
        { "onsager_tesla_a2", BM_ONSAGER_T_A2,
          "hbar / (2 pi e): oscillation frequency (T) per orbit area (A^-2)" },
        { "cyclotron_mass_per_dade", BM_CYCLOTRON_MASS_PER_DADE,
          "hbar^2 / (2 pi m_e): m_c/m_e per dA/dE (A^-2 per eV)" },
    };
    JsonObject *all = json_object_new();
    for (gsize i = 0; i < G_N_ELEMENTS(constants); i++) {
        JsonObject *c = json_object_new();
        bm_json_set_number(c, "value", constants[i].value);
        json_object_set_string_member(c, "meaning", constants[i].meaning);
        json_object_set_object_member(all, constants[i].key, c);
    }
    JsonObject *response = json_object_new();
    json_object_set_object_member(response, "constants", all);
    json_object_set_string_member(response, "source",
        "CODATA values as shipped in GSL's gsl_const_mksa.h");
    return response;
}

const BmOperation bm_op_constants = {
    .name = "constants",
    .summary = "Physical constants the project uses, in its interface units",
    .params = params,
    .run = run,
    .response = response,
};
