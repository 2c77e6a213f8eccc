/* bm-enums.h: the enumerated types of the request and response keys,
 * registered once. Each table maps the core's (or the plugin's) enum values to
 * the names used in JSON, with a short description; BmParam.choices points at
 * them so the registry checks requests, and the operations map text <-> enum
 * through the same tables. */
#ifndef BM_ENUMS_H
#define BM_ENUMS_H

#include "registry.h"

G_BEGIN_DECLS

extern const BmEnum bm_enum_statistics;      /* bm_statistics (bm-carriers.h) */
extern const BmEnum bm_enum_extremum_search; /* bm_search (bm-extrema.h) */
extern const BmEnum bm_enum_extremum_kind;   /* bm_extremum_kind (bm-extrema.h) */
extern const BmEnum bm_enum_valley_site;     /* bm_valley_site (bm-valleys.h) */
extern const BmEnum bm_enum_regime;          /* bm_regime (bm-carriers.h) */
extern const BmEnum bm_enum_gap_model;       /* bm_gap_kind (core bm-bandgap.h) */
/* bm_ionisation_kind (bm-carriers.h), plus "auto": the material's default */
#define BM_IONIZATION_AUTO (-1)
extern const BmEnum bm_enum_ionization_model;
extern const BmEnum bm_enum_band_gap_narrowing;  /* 1 "auto" (the material's), 0 "none" */

/* The default of every "statistics" request key, as JSON text. */
#define BM_STATISTICS_DEFAULT_JSON "\"fermi-dirac\""

/* The choice of that name, or NULL. */
const BmChoice *bm_enum_find(const BmEnum *e, const char *name);

/* The name of value, or "unknown" when the table has none. */
const char *bm_enum_name(const BmEnum *e, int value);

/* The enum value of request[key], a string the registry has already checked
 * against e (a programming error otherwise). */
int bm_enum_value(JsonObject *request, const char *key, const BmEnum *e);

G_END_DECLS

#endif
