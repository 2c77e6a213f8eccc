/* abi.c: the generic C entry point (bandmass-plugin.h): a table built once
 * from the registry, and a call that goes through its JSON string path. */
#include "bandmass-plugin.h"
#include "registry.h"
#include "bm-json.h"

#include <pthread.h>

static int status_of(const GError *error)
{
    if (error->domain == BM_ERROR) {
        switch ((BmError)error->code) {
        case BM_ERROR_INVALID_INPUT:     return BANDMASS_PLUGIN_INVALID_INPUT;
        case BM_ERROR_IO:                return BANDMASS_PLUGIN_IO;
        case BM_ERROR_UNKNOWN_OPERATION: return BANDMASS_PLUGIN_UNKNOWN_OPERATION;
        case BM_ERROR_NO_CONVERGENCE:    return BANDMASS_PLUGIN_NO_CONVERGENCE;
        case BM_ERROR_INTERNAL:          return BANDMASS_PLUGIN_INTERNAL;
        }
    }
    return BANDMASS_PLUGIN_INTERNAL;
}

static int plugin_call(const char *op, const char *request_json,
                       char **response_json, char **error_message)
{
    if (error_message)
        *error_message = NULL;
    if (response_json)
        *response_json = NULL;
    if (!op || !response_json) {
        if (error_message)
            *error_message = g_strdup(!op ? "call: the operation name is NULL"
                                          : "call: response_json is NULL");
        return BANDMASS_PLUGIN_BAD_ARGUMENT;
    }
    GError *error = NULL;
    *response_json = bm_registry_call_json(op, request_json ? request_json : "{}",
                                           NULL, FALSE, &error);
    if (*response_json)
        return BANDMASS_PLUGIN_OK;
    int status = status_of(error);
    if (error_message)
        *error_message = g_strdup(error->message);
    g_error_free(error);
    return status;
}

static void plugin_free_string(char *s)
{
    g_free(s);
}

static bandmass_plugin_api api_v1;

/* Fills the table once; its strings live as long as the library. */
static void build_table(void)
{
    bm_registry_init();
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    const char **names = g_new0(const char *, n + 1);
    const char **summaries = g_new0(const char *, n + 1);
    const char **params = g_new0(const char *, n + 1);
    for (guint i = 0; i < n; i++) {
        names[i] = ops[i]->name;
        summaries[i] = ops[i]->summary;
        g_autoptr(JsonNode) d = bm_operation_describe(ops[i]);
        JsonNode *p = json_object_get_member(json_node_get_object(d), "params");
        params[i] = bm_json_to_string(p, FALSE);
    }
    g_autoptr(JsonNode) all = bm_registry_describe();
    api_v1 = (bandmass_plugin_api) {
        .size = sizeof(bandmass_plugin_api),
        .abi_major = BANDMASS_PLUGIN_ABI_MAJOR,
        .abi_minor = BANDMASS_PLUGIN_ABI_MINOR,
        .library_version = PACKAGE_VERSION,
        .n_operations = n,
        .operation_names = names,
        .operation_summaries = summaries,
        .operation_params_json = params,
        .operations_json = bm_json_to_string(all, FALSE),
        .call = plugin_call,
        .free_string = plugin_free_string,
    };
}

/* A plain pthread mutex (not g_once, not pthread_once, both built on bare
 * futexes) so that thread checkers such as helgrind see the ordering between
 * building the table and reading it. Hosts call this once, so the lock costs
 * nothing that matters. */
const bandmass_plugin_api *bandmass_plugin_get_api(unsigned abi_major)
{
    static pthread_mutex_t lock = PTHREAD_MUTEX_INITIALIZER;
    static int built = 0;
    if (abi_major != BANDMASS_PLUGIN_ABI_MAJOR)
        return NULL;
    pthread_mutex_lock(&lock);
    if (!built) {
        build_table();
        built = 1;
    }
    pthread_mutex_unlock(&lock);
    return &api_v1;
}
