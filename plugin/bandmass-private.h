/* bandmass-private.h: declarations shared by the bandmass-*.c sources of the
 * GObject API and not part of the introspected interface. */
#ifndef BANDMASS_PRIVATE_H
#define BANDMASS_PRIVATE_H

#include <json-glib/json-glib.h>
#include "bandmass.h"

G_BEGIN_DECLS

/* An extremum from one parsed element of a mass-tensor "extrema" array;
 * shared_warnings (the response's own, may be NULL) are listed first. */
BmExtremum *bm_extremum_new_from_object(JsonObject *o, JsonArray *shared_warnings,
                                        GError **error);

G_END_DECLS

#endif
