/* bm-enums.c: the tables of bm-enums.h and the text <-> enum look-ups. */
#include <string.h>

#include "bm-enums.h"
#include "bm-carriers.h"
#include "bm-extrema.h"
#include "bm-valleys.h"
#include "bm-bandgap.h"

static const BmChoice statistics[] = {
    { BM_FERMI_DIRAC, "fermi-dirac", "Fermi-Dirac occupation, n = Nc F_1/2(eta)" },
    { BM_BOLTZMANN, "boltzmann", "the non-degenerate limit, n = Nc exp(eta)" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_statistics = { "statistics", statistics };

static const BmChoice search[] = {
    { BM_SEARCH_MINIMUM, "minimum", "the lowest minimum" },
    { BM_SEARCH_MAXIMUM, "maximum", "the highest maximum" },
    { BM_SEARCH_ALL, "all", "every local extremum of a grid (the lowest minimum and highest "
                            "maximum of a table)" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_extremum_search = { "extremum search", search };

static const BmChoice extremum_kind[] = {
    { BM_EXTREMUM_MINIMUM, "minimum", "all curvatures positive" },
    { BM_EXTREMUM_MAXIMUM, "maximum", "all curvatures negative" },
    { BM_EXTREMUM_SADDLE, "saddle", "curvatures of both signs" },
    { BM_EXTREMUM_NOT_STATIONARY, "not-stationary",
      "a given point where the gradient does not vanish: the local curvature only" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_extremum_kind = { "extremum kind", extremum_kind };

static const BmChoice valley_site[] = {
    { BM_SITE_GAMMA, "gamma", "the zone centre: one valley" },
    { BM_SITE_INTERIOR, "interior", "inside the zone: k and -k distinct" },
    { BM_SITE_FACE, "face", "on the zone boundary: each position counts one half" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_valley_site = { "valley site", valley_site };

static const BmChoice regime[] = {
    { BM_REGIME_FREEZE_OUT, "freeze-out", "carriers frozen on the dopants" },
    { BM_REGIME_EXTRINSIC, "extrinsic", "saturation: majority density set by the net "
                                        "doping" },
    { BM_REGIME_INTRINSIC, "intrinsic", "thermally generated carriers dominate" },
    { BM_REGIME_DEGENERATE, "degenerate", "Fermi level within 3 kT of a band edge or inside "
                                          "a band" },
    { BM_REGIME_COMPENSATED, "compensated", "donors and acceptors largely cancel" },
    { BM_REGIME_PARTIAL, "partial-ionization", "between half and 90 % of the net doping "
                                               "ionised" },
    { BM_REGIME_NEAR_INTRINSIC, "near-intrinsic", "net doping ionised, but the intrinsic "
                                                  "density is not below it" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_regime = { "regime", regime };

static const BmChoice ionization_model[] = {
    { BM_IONIZATION_AUTO, "auto", "the material's: pearson-bardeen where it has an alpha, "
                                  "else mott where its Mott density is known, else "
                                  "single-level" },
    { BM_IONISATION_SINGLE_LEVEL, "single-level", "one level of fixed ionisation energy at "
                                                  "every density" },
    { BM_IONISATION_PEARSON_BARDEEN, "pearson-bardeen",
      "E0 - alpha N^(1/3), clamped at zero: full ionisation there" },
    { BM_IONISATION_MOTT, "mott", "full ionisation at and above the hydrogenic Mott density" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_ionization_model = { "ionization model", ionization_model };

static const BmChoice narrowing[] = {
    { 1, "auto", "the material's band-gap narrowing model, where it has one" },
    { 0, "none", "no band-gap narrowing" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_band_gap_narrowing = { "band-gap narrowing", narrowing };

static const BmChoice gap_model[] = {
    { BM_GAP_VARSHNI, "varshni", "Eg0 - alpha T^2 / (T + beta)" },
    { BM_GAP_BOSE_EINSTEIN, "bose-einstein",
      "Eg0 - 2 a_B / (exp(theta / T) - 1)" },
    { BM_GAP_FIXED, "fixed", "a gap that does not depend on temperature (band_gap_ev)" },
    { 0, NULL, NULL }
};
const BmEnum bm_enum_gap_model = { "band-gap model", gap_model };

const BmChoice *bm_enum_find(const BmEnum *e, const char *name)
{
    for (const BmChoice *c = e->choices; name && c->name; c++)
        if (strcmp(c->name, name) == 0)
            return c;
    return NULL;
}

const char *bm_enum_name(const BmEnum *e, int value)
{
    for (const BmChoice *c = e->choices; c->name; c++)
        if (c->value == value)
            return c->name;
    return "unknown";
}

int bm_enum_value(JsonObject *request, const char *key, const BmEnum *e)
{
    const BmChoice *c = bm_enum_find(e, json_object_get_string_member(request, key));
    g_assert(c != NULL);   /* the registry checked the key against e */
    return c->value;
}
