/* grid-input.h: the band grid of a request, read in one place for the
 * operations that take a grid only ("grid": a document path, or a grid a
 * host hands over in memory). */
#ifndef BM_GRID_INPUT_H
#define BM_GRID_INPUT_H

#include "registry.h"
#include "band-grid.h"

G_BEGIN_DECLS

/* The grid handed over for "grid", or the document the key names, loaded
 * into *owned (NULL when handed over; free it with bm_band_grid_free after
 * use). NULL with error set when there is none or it does not load. */
const BmBandGrid *bm_grid_input(JsonObject *request, const BmCallInputs *inputs,
                                BmBandGrid **owned, GError **error);

G_END_DECLS

#endif
