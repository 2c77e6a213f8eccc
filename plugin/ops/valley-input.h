/* valley-input.h: the valley keys that valley-average and cyclotron-ellipsoid
 * share, read in one place into the core's star (bm-valleys.h) or a list. */
#ifndef BM_VALLEY_INPUT_H
#define BM_VALLEY_INPUT_H

#include <json-glib/json-glib.h>
#include "registry.h"
#include "bm-error-private.h"
#include "bm-valleys.h"
#include "material-input.h"
#include "bm-enums.h"

G_BEGIN_DECLS

/* Which carriers a valley holds: negative inertial masses (a band maximum)
 * make a hole valley, taken with the hole masses |m|. */
typedef enum { BM_CARRIER_UNKNOWN, BM_CARRIER_ELECTRON, BM_CARRIER_HOLE } BmValleyCarrier;

/* "hole" or "electron". */
const char *bm_valley_carrier_name(BmValleyCarrier c);

/* The valleys of a request, from a star (valley or material) or a list. */
typedef struct {
    bm_valley *valleys;          /* star->valleys, or an owned list */
    size_t n;
    double count;
    bm_valley_star *star;        /* owned when a star was built */
    const char *group_name;      /* star only */
    const char *site_name;
    const char *site_from;       /* how the position was chosen (star only) */
    double snapped_rad;          /* the direction was turned by this onto its symmetry element */
    double snap_tol;             /* within this tolerance (0: no snapping) */
    BmMaterialInput mat;         /* material path only */
    gboolean has_mat;
    BmValleyCarrier carrier;     /* one kind for all valleys */
    gboolean zone_shares;        /* the star was counted by zone shares (valleys carry k) */
    double lattice[3][3];        /* lattice_angstrom, rows (zone_shares only) */
    gboolean has_mass_errors;    /* the valley's masses came with errors */
    double dos_rel_error;        /* relative error of the DOS mass they give */
    double conductivity_rel_error; /* of the scalar conductivity mass */
    bm_warnings pw;              /* parsing warnings */
    bm_warnings carried;         /* warnings of extrema given as valleys */
} BmValleySet;

/* Reads exactly one of "valley" (with "point_group", optional "position"),
 * "material" or "valleys" from a validated request; errors name the key.
 * Clear *s with bm_valley_set_clear whatever the result (start it zeroed). */
gboolean bm_valley_set_read(JsonObject *request, BmValleySet *s, GError **error);
void bm_valley_set_clear(BmValleySet *s);

/* The parameter-table rows of those keys, for an operation's BmParam table. */
#define BM_VALLEY_INPUT_PARAMS \
    { "valley", BM_VALUE_OBJECT, FALSE, NULL, \
      "one valley, expanded by symmetry: {longitudinal_mass_me, transverse_mass_me, axis}, " \
      "{principal_masses_me, axes} (optional direction: position, default the axis), or an " \
      "extremum of mass-tensor as it is (or its whole response when it holds one extremum)", \
      .unit = NULL }, \
    { "point_group", BM_VALUE_STRING, FALSE, NULL, \
      "crystal point group for \"valley\" (Schoenflies, e.g. Oh, Td, D6h, C6v, D4h, " \
      "or international, e.g. m-3m)", .unit = NULL }, \
    { "position", BM_VALUE_STRING, FALSE, NULL, \
      "where \"valley\" sits (default interior; for an extremum of mass-tensor, from " \
      "its k)", .choices = &bm_enum_valley_site }, \
    { "lattice_angstrom", BM_VALUE_ARRAY, FALSE, NULL, \
      "with \"valley\": the lattice vectors [a1, a2, a3] (rows, Angstrom, in the point " \
      "group's frame): the star is then counted from the valley's k modulo reciprocal-" \
      "lattice vectors, each point by its share of the zone (a hexagonal zone corner " \
      "1/3), instead of by \"position\"", .unit = "Angstrom" }, \
    { "material", BM_VALUE_STRING | BM_VALUE_OBJECT, FALSE, NULL, \
      "instead of \"valley\": a built-in material name, an object or a JSON file; its " \
      "conduction valley and point group give the star", .unit = NULL }, \
    { "valleys", BM_VALUE_ARRAY, FALSE, NULL, \
      "explicit valley list, each a valley object plus energy_offset_ev (default 0, " \
      "positive away from the band edge) and weight (default 1)", .unit = NULL }

G_END_DECLS

#endif
