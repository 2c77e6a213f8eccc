/* bench-mass-tensor.c: times loading a band grid document and the
 * mass-tensor operation (extremum "all") on each band of it, in process,
 * through the registry with the loaded grid handed over in memory.
 * Usage: bench-mass-tensor GRID.json; prints one JSON object on stdout. */
#include <stdio.h>
#include <time.h>
#include <glib.h>

#include "registry.h"
#include "band-grid.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

int main(int argc, char **argv)
{
    if (argc != 2) {
        fprintf(stderr, "usage: bench-mass-tensor GRID.json\n");
        return 2;
    }
    bm_registry_init();
    GError *error = NULL;
    double t0 = now();
    g_autoptr(BmBandGrid) grid = bm_band_grid_load(argv[1], &error);
    double t_load = now() - t0;
    if (!grid) {
        fprintf(stderr, "bench-mass-tensor: %s\n", error->message);
        g_error_free(error);
        return 2;
    }
    /* one call without band data first, so that one-time type and JSON
     * set-up is not counted against the first band */
    g_autofree char *warm = bm_registry_call_json("constants", "{}", NULL, FALSE, NULL);
    if (!warm)
        return 1;
    BmInput given = { "grid", BM_INPUT_BAND_GRID, grid };
    BmCallInputs inputs = { 1, &given };
    GString *out = g_string_new(NULL);
    g_string_append_printf(out, "{\"load_s\": %.6f, \"bands\": [", t_load);
    double total = 0.0;
    for (size_t b = 0; b < grid->grid.nbands; b++) {
        g_autofree char *req = g_strdup_printf("{\"band\": %zu, \"extremum\": \"all\"}", b);
        t0 = now();
        g_autofree char *resp = bm_registry_call_json("mass-tensor", req, &inputs, FALSE, &error);
        double t = now() - t0;
        if (!resp) {
            fprintf(stderr, "bench-mass-tensor: band %zu: %s\n", b, error->message);
            g_error_free(error);
            return 1;
        }
        total += t;
        g_string_append_printf(out, "%s{\"band\": %zu, \"seconds\": %.6f, \"response\": %s}",
                               b ? ", " : "", b, t, resp);
    }
    g_string_append_printf(out, "], \"compute_s\": %.6f}\n", total);
    fputs(out->str, stdout);
    g_string_free(out, TRUE);
    return 0;
}
