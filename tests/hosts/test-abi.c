/* test-abi.c: the C plugin entry point as a host sees it: the library is
 * loaded with dlopen (no link-time dependency) and called through the table. */
#include <dlfcn.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <glib.h>
#include <glib/gstdio.h>
#include <unistd.h>
#include <json-glib/json-glib.h>

#include "bandmass-plugin.h"

static const bandmass_plugin_api *(*get_api)(unsigned);

/* Output of the command line (the reference host) given request on stdin
 * (through a file), trailing newline removed. g_spawn_sync starts no thread,
 * so the helgrind run sees only the library's threads. */
static char *cli_output(const char *request, const char *const *args)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *input = NULL;
    int fd = g_file_open_tmp("bandmass-abi-XXXXXX.json", &input, &error);
    g_assert_no_error(error);
    close(fd);
    g_assert_true(g_file_set_contents(input, request, -1, &error));
    g_autoptr(GPtrArray) argv = g_ptr_array_new();
    g_ptr_array_add(argv, (gpointer)g_getenv("BANDMASS_CLI"));
    for (const char *const *a = args; *a; a++)
        g_ptr_array_add(argv, (gpointer)*a);
    if (request[0]) {
        g_ptr_array_add(argv, (gpointer)"--input");
        g_ptr_array_add(argv, input);
    }
    g_ptr_array_add(argv, NULL);
    char *out = NULL;
    int wait_status;
    g_spawn_sync(NULL, (char **)argv->pdata, NULL, G_SPAWN_DEFAULT, NULL, NULL,
                 &out, NULL, &wait_status, &error);
    g_assert_no_error(error);
    g_assert_true(g_spawn_check_wait_status(wait_status, NULL));
    g_unlink(input);
    g_strchomp(out);
    return out;
}

static void assert_same_json(const char *a, const char *b)
{
    g_autoptr(JsonNode) na = json_from_string(a, NULL);
    g_autoptr(JsonNode) nb = json_from_string(b, NULL);
    g_assert_nonnull(na);
    g_assert_nonnull(nb);
    if (!json_node_equal(na, nb))
        g_error("JSON differs:\n%s\n%s", a, b);
}

static void test_table(void)
{
    const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
    g_assert_nonnull(api);
    g_assert_true(get_api(BANDMASS_PLUGIN_ABI_MAJOR) == api);   /* one table */
    g_assert_null(get_api(BANDMASS_PLUGIN_ABI_MAJOR + 1));      /* a major not served */
    g_assert_cmpuint(api->abi_major, ==, BANDMASS_PLUGIN_ABI_MAJOR);
    g_assert_cmpuint(api->abi_minor, >=, BANDMASS_PLUGIN_ABI_MINOR);
    g_assert_cmpuint(api->size, >=, sizeof(bandmass_plugin_api));
    g_assert_nonnull(api->library_version);

    /* the table describes the same operations as `bandmass ops --json` */
    const char *args[] = { "ops", "--json", NULL };
    g_autofree char *cli = cli_output("", args);
    assert_same_json(api->operations_json, cli);
    g_autoptr(JsonNode) all = json_from_string(cli, NULL);
    JsonArray *ops = json_node_get_array(all);
    g_assert_cmpuint(api->n_operations, ==, json_array_get_length(ops));
    for (size_t i = 0; i < api->n_operations; i++) {
        JsonObject *op = json_array_get_object_element(ops, (guint)i);
        g_assert_cmpstr(api->operation_names[i], ==, json_object_get_string_member(op, "name"));
        g_assert_cmpstr(api->operation_summaries[i], ==,
                        json_object_get_string_member(op, "summary"));
        g_autoptr(JsonNode) params = json_from_string(api->operation_params_json[i], NULL);
        g_assert_true(json_node_equal(params, json_object_get_member(op, "params")));
    }
}

static void test_call_equals_cli(void)
{
    const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
    char *response = NULL, *message = NULL;
    int status = api->call("constants", "{}", &response, &message);
    g_assert_cmpint(status, ==, BANDMASS_PLUGIN_OK);
    g_assert_null(message);
    const char *args[] = { "call", "constants", "--compact", NULL };
    g_autofree char *cli = cli_output("{}", args);
    g_assert_cmpstr(response, ==, cli);
    api->free_string(response);
    /* a NULL request means {} */
    g_assert_cmpint(api->call("constants", NULL, &response, NULL), ==, BANDMASS_PLUGIN_OK);
    g_assert_cmpstr(response, ==, cli);
    api->free_string(response);
}

/* Large and awkward doubles come back as valid JSON, each the very double
 * sent: fermi-integral repeats eta, and F_0(eta) = ln(1 + e^eta) is eta
 * itself in doubles for eta >= 1e17 (mathematical identity; e^-eta
 * underflows). */
static void test_numbers_are_valid_json(void)
{
    const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
    char *response = NULL;
    const char *request = "{\"order\": 0, \"eta\": [1e17, 5e19, 1e300, -0.0, 0.1]}";
    g_assert_cmpint(api->call("fermi-integral", request, &response, NULL), ==,
                    BANDMASS_PLUGIN_OK);
    g_assert_nonnull(strstr(response, "\"eta\":[1e17,5e19,1e300,-0.0,0.1]"));
    g_assert_nonnull(strstr(response, "\"values\":[1e17,5e19,1e300,"));
    g_autoptr(GError) error = NULL;
    g_autoptr(JsonNode) root = json_from_string(response, &error);
    g_assert_no_error(error);
    JsonArray *eta = json_object_get_array_member(json_node_get_object(root), "eta");
    static const double sent[] = { 1e17, 5e19, 1e300, -0.0, 0.1 };
    for (guint i = 0; i < G_N_ELEMENTS(sent); i++) {
        double got = json_array_get_double_element(eta, i);
        g_assert_true(memcmp(&got, &sent[i], sizeof got) == 0);
    }
    api->free_string(response);
}

static void expect_failure(const char *op, const char *request, int want, const char *fragment)
{
    const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
    char *response = (char *)"untouched", *message = NULL;
    int status = api->call(op, request, &response, &message);
    g_assert_cmpint(status, ==, want);
    g_assert_null(response);
    g_assert_nonnull(message);
    if (!strstr(message, fragment))
        g_error("message \"%s\" lacks \"%s\"", message, fragment);
    api->free_string(message);
}

static void test_errors(void)
{
    expect_failure("nonesuch", "{}", BANDMASS_PLUGIN_UNKNOWN_OPERATION,
                   "no operation named \"nonesuch\"");
    expect_failure("constants", "{\"a\": ", BANDMASS_PLUGIN_INVALID_INPUT, "not valid JSON");
    expect_failure("constants", "{\"colour\": 1}", BANDMASS_PLUGIN_INVALID_INPUT,
                   "request key \"colour\"");
    expect_failure(NULL, "{}", BANDMASS_PLUGIN_BAD_ARGUMENT, "operation name is NULL");
    const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
    /* the message pointer is optional; free_string takes NULL */
    char *response = NULL;
    g_assert_cmpint(api->call("constants", "[]", &response, NULL), ==,
                    BANDMASS_PLUGIN_INVALID_INPUT);
    g_assert_null(response);
    api->free_string(NULL);
}

/* ---- many threads at once ---- */

typedef struct {
    const char *op, *request;   /* the call each thread repeats */
    const char *expected;   /* the CLI's answer */
    long calls;
    long failures;
    char first_failure[256];
} Worker;

static void note(Worker *w, const char *what)
{
    if (w->failures++ == 0)
        g_strlcpy(w->first_failure, what, sizeof w->first_failure);
}

static void *worker(void *data)
{
    Worker *w = data;
    for (long i = 0; i < w->calls; i++) {
        /* every thread fetches the table itself: the first calls race on its set-up */
        const bandmass_plugin_api *api = get_api(BANDMASS_PLUGIN_ABI_MAJOR);
        if (!api) {
            note(w, "get_api returned NULL");
            continue;
        }
        char *response = NULL, *message = NULL;
        if (i % 10 == 9) {   /* one call in ten is bad input */
            int status = api->call("constants", "{\"temperature_k\": 300}", &response, &message);
            if (status != BANDMASS_PLUGIN_INVALID_INPUT || response || !message
                || !strstr(message, "request key \"temperature_k\" is not a parameter"))
                note(w, message ? message : "bad input was not reported");
        } else {
            int status = api->call(w->op, w->request, &response, &message);
            if (status != BANDMASS_PLUGIN_OK || !response || strcmp(response, w->expected) != 0)
                note(w, message ? message : "answer differs from the command line's");
        }
        api->free_string(response);
        api->free_string(message);
    }
    return NULL;
}

static void test_threads(void)
{
    long threads = 8, calls = 10000;
    const char *env = g_getenv("BANDMASS_ABI_CALLS");   /* "THREADSxCALLS" */
    if (env && sscanf(env, "%ldx%ld", &threads, &calls) != 2)
        g_error("BANDMASS_ABI_CALLS must look like 8x200, not %s", env);
    /* the call repeated: constants, or another (the thread-sanitizer pass
     * runs grid operations, some with threads of their own) */
    const char *op = g_getenv("BANDMASS_ABI_OP"), *request = g_getenv("BANDMASS_ABI_REQUEST");
    if (!op)
        op = "constants";
    if (!request)
        request = "{}";
    const char *args[] = { "call", op, "--compact", NULL };
    g_autofree char *expected = cli_output(request, args);

    pthread_t tid[64];
    Worker work[64];
    g_assert_cmpint(threads, <=, 64);
    for (long t = 0; t < threads; t++) {
        work[t] = (Worker) { .op = op, .request = request, .expected = expected,
                             .calls = calls };
        g_assert_cmpint(pthread_create(&tid[t], NULL, worker, &work[t]), ==, 0);
    }
    long failures = 0;
    for (long t = 0; t < threads; t++) {
        g_assert_cmpint(pthread_join(tid[t], NULL), ==, 0);
        if (work[t].failures)
            g_printerr("thread %ld: %ld failures, first: %s\n", t, work[t].failures,
                       work[t].first_failure);
        failures += work[t].failures;
    }
    g_test_message("%ld threads x %ld calls, %ld failures", threads, calls, failures);
    g_assert_cmpint(failures, ==, 0);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    const char *path = g_getenv("BANDMASS_LIB");
    if (!path)
        g_error("set BANDMASS_LIB to the path of libbandmass-1.0.so");
    void *lib = dlopen(path, RTLD_NOW | RTLD_LOCAL);
    if (!lib)
        g_error("dlopen: %s", dlerror());
    *(void **)&get_api = dlsym(lib, BANDMASS_PLUGIN_ENTRY);
    if (!get_api)
        g_error("dlsym: %s", dlerror());
    g_test_add_func("/abi/table-matches-ops", test_table);
    g_test_add_func("/abi/call-equals-cli", test_call_equals_cli);
    g_test_add_func("/abi/numbers-are-valid-json", test_numbers_are_valid_json);
    g_test_add_func("/abi/errors-carry-status-and-message", test_errors);
    g_test_add_func("/abi/threads", test_threads);
    int status = g_test_run();
    dlclose(lib);
    return status;
}
