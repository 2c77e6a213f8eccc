/* fuzz-npy.c: the .npy reader, on a memory file holding the input (the
 * reader maps regular files, so the fuzzed bytes go through the same path
 * as a file on disk), then its detach (the copy a long-lived object makes). */
#include "fuzz-common.h"
#include "npy.h"

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc, (void)argv;
    fuzz_init();
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    GError *e = NULL;
    BmNpyArray *a = bm_npy_read_f64(fuzz_file(data, size), &e);
    if (!a) {
        fuzz_check_error(e, FALSE, ".npy reader");
        g_error_free(e);
        return 0;
    }
    /* every value is readable, and the count matches the shape */
    size_t count = 1;
    for (size_t i = 0; i < a->ndim; i++)
        count *= a->shape[i];
    if (count != a->count)
        g_error(".npy reader: count %zu, shape gives %zu", a->count, count);
    volatile double sum = 0.0;
    for (size_t i = 0; i < a->count; i++)
        sum += a->data[i];
    if (!bm_npy_array_unchanged(a, &e) || !bm_npy_array_detach(a, &e))
        g_error(".npy reader: the unchanged file reads as changed: %s", e->message);
    for (size_t i = 0; i < a->count; i++)
        sum += a->data[i];
    (void)sum;   /* read for the sanitizers, not for its value */
    bm_npy_array_free(a);
    return 0;
}
