/* fuzz-ktable.c: the k-table reader (CSV or TSV). A table that loads is then
 * fitted (mass-tensor on the table given as a file), so fuzzed points reach
 * the table fit too. */
#include "fuzz-common.h"
#include "ktable.h"
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
    BmKTable *t = bm_ktable_load_from_data((const char *)data, size, "fuzz.csv", &e);
    if (!t) {
        fuzz_check_error(e, FALSE, "k-table reader");
        g_error_free(e);
        return 0;
    }
    gboolean small = t->table.npoints <= 2000 && t->table.nbands <= 8;
    bm_ktable_free(t);
    if (!small)
        return 0;
    g_autofree char *request = g_strdup_printf("{\"table\": \"%s\", \"band\": 0}",
                                               fuzz_file(data, size));
    char *r = bm_registry_call_json("mass-tensor", request, NULL, FALSE, &e);
    if (r)
        fuzz_check_response(r, "mass-tensor on a fuzzed k-table");
    else {
        fuzz_check_error(e, TRUE, "mass-tensor on a fuzzed k-table");
        g_error_free(e);
    }
    g_free(r);
    return 0;
}
