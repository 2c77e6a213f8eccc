/* fuzz-grid.c: the band grid document reader (JSON, inline energies or a
 * .npy file of tests/data named in it). A grid that loads and is small is
 * then searched for its extrema (mass-tensor with the grid handed over in
 * memory), so fuzzed energies reach the core too. */
#include "fuzz-common.h"
#include "band-grid.h"
#include "registry.h"

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc, (void)argv;
    fuzz_init();
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    GError *e = NULL;
    BmBandGrid *g = bm_band_grid_load_from_data((const char *)data, (gssize)size,
                                                "fuzz.json", NULL, &e);
    if (!g) {
        fuzz_check_error(e, FALSE, "grid reader");
        g_error_free(e);
        return 0;
    }
    const bm_grid *v = &g->grid;
    if (v->nbands <= 4 && v->mesh[0] * v->mesh[1] * v->mesh[2] <= 4096) {
        BmInput in = { "grid", BM_INPUT_BAND_GRID, g };
        BmCallInputs inputs = { 1, &in };
        char *r = bm_registry_call_json("mass-tensor", "{\"band\": 0, \"extremum\": \"all\"}",
                                        &inputs, FALSE, &e);
        if (r)
            fuzz_check_response(r, "mass-tensor on a fuzzed grid");
        else {
            fuzz_check_error(e, TRUE, "mass-tensor on a fuzzed grid");
            g_error_free(e);
        }
        g_free(r);
    }
    bm_band_grid_free(g);
    return 0;
}
