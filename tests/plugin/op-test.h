/* op-test.h: calling an operation through the registry's JSON path in tests,
 * and asserting on the error a bad request gives. */
#ifndef BM_OP_TEST_H
#define BM_OP_TEST_H

#include <string.h>
#include "registry.h"

/* The response object of a request that must succeed (caller unrefs). */
static inline JsonObject *op_call(const char *op, const char *request)
{
    g_autoptr(GError) error = NULL;
    char *out = bm_registry_call_json(op, request, NULL, FALSE, &error);
    g_assert_no_error(error);
    JsonNode *n = json_from_string(out, NULL);
    g_assert_nonnull(n);
    g_free(out);
    JsonObject *o = json_object_ref(json_node_get_object(n));
    json_node_unref(n);
    return o;
}

/* A request that must fail with BM_ERROR code and a message holding fragment. */
static inline void op_expect_error(const char *op, const char *request, int code,
                                   const char *fragment)
{
    g_autoptr(GError) error = NULL;
    char *out = bm_registry_call_json(op, request, NULL, FALSE, &error);
    g_assert_null(out);
    g_assert_error(error, BM_ERROR, code);
    if (!strstr(error->message, fragment))
        g_error("message \"%s\" lacks \"%s\"", error->message, fragment);
}

static inline void op_expect_invalid(const char *op, const char *request, const char *fragment)
{
    op_expect_error(op, request, BM_ERROR_INVALID_INPUT, fragment);
}

#endif
