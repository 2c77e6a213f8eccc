/* fuzz-request.c: the request path of every operation through the registry,
 * as every host reaches it (bm_registry_call_json). The input is the
 * operation's name, a newline, and the request's JSON text; requests that
 * name files name those of tests/data. */
#include "fuzz-common.h"
#include "registry.h"

#include <string.h>

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc, (void)argv;
    fuzz_init();
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const uint8_t *nl = memchr(data, '\n', size);
    if (!nl || nl == data || nl - data > 40)
        return 0;
    g_autofree char *op = fuzz_text(data, (size_t)(nl - data));
    g_autofree char *request = fuzz_text(nl + 1, size - (size_t)(nl - data) - 1);
    GError *e = NULL;
    char *r = bm_registry_call_json(op, request, NULL, FALSE, &e);
    if (r)
        fuzz_check_response(r, op);
    else {
        fuzz_check_error(e, TRUE, op);
        g_error_free(e);
    }
    g_free(r);
    return 0;
}
