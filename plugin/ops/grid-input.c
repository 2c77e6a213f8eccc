/* grid-input.c: the band grid of a request (grid-input.h). */
#include "grid-input.h"

#include "bm-error.h"

const BmBandGrid *bm_grid_input(JsonObject *request, const BmCallInputs *inputs,
                                BmBandGrid **owned, GError **error)
{
    *owned = NULL;
    GError *lookup_error = NULL;
    const BmBandGrid *given = bm_call_inputs_lookup(inputs, "grid", BM_INPUT_BAND_GRID,
                                                    &lookup_error);
    if (lookup_error) {
        g_propagate_error(error, lookup_error);
        return NULL;
    }
    if (given)
        return given;
    if (!json_object_has_member(request, "grid")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: missing band data: give \"grid\" (a band grid document)");
        return NULL;
    }
    *owned = bm_band_grid_load(json_object_get_string_member(request, "grid"), error);
    return *owned;
}
