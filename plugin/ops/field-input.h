/* field-input.h: the field-direction keys of the cyclotron operations
 * ("field_direction", "field_directions" as a list or a sweep in a plane),
 * read in one place. */
#ifndef BM_FIELD_INPUT_H
#define BM_FIELD_INPUT_H

#include <json-glib/json-glib.h>
#include "registry.h"

G_BEGIN_DECLS

typedef struct {
    gsize n;
    double (*dirs)[3];       /* n unit vectors */
    double *angle_deg;       /* a sweep's angles from "from"; NULL for a list */
    gboolean single;         /* "field_direction": one direction, no "points" */
} BmFieldDirections;

/* Reads exactly one of "field_direction" or "field_directions" (an array
 * of 3-vectors, or {"from", "to", "steps"}); errors name the key and the
 * element. Free with bm_field_directions_clear. */
gboolean bm_field_directions_read(JsonObject *request, BmFieldDirections *out,
                                  GError **error);
void bm_field_directions_clear(BmFieldDirections *f);

/* One point of a sweep or list: {field_direction, angle_deg (sweep only)}. */
JsonObject *bm_field_point_new(const BmFieldDirections *f, gsize i);

#define BM_FIELD_SWEEP_MAX_STEPS 10000

#define BM_FIELD_INPUT_PARAMS \
    { "field_direction", BM_VALUE_ARRAY, FALSE, NULL, \
      "one field direction, Cartesian [x, y, z] (any length; for cubic crystals the " \
      "crystal direction [h, k, l])", .unit = NULL }, \
    { "field_directions", BM_VALUE_ARRAY | BM_VALUE_OBJECT, FALSE, NULL, \
      "instead: a list of directions, or a sweep in a plane {from, to, steps} " \
      "(equal angles, both ends included, at most 10000)", .unit = NULL }

G_END_DECLS

#endif
