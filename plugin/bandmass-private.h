/* bandmass-private.h: declarations shared by the bandmass-*.c sources of the
 * GObject API and not part of the introspected interface. */
#ifndef BANDMASS_PRIVATE_H
#define BANDMASS_PRIVATE_H

#include <json-glib/json-glib.h>
#include "bandmass.h"
#include "bm-extrema.h"

G_BEGIN_DECLS

/* An extremum straight from a core result (fractional: k_fractional is
 * meaningful, a grid); shared_warnings (may be NULL) come first. */
BmExtremum *bm_extremum_new_from_core(const bm_mass_tensor *t, gboolean fractional,
                                      const bm_warnings *shared_warnings);

G_END_DECLS

#endif
