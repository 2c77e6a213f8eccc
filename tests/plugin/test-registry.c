/* test-registry.c: request validation, defaults and the JSON string path of
 * the operation registry, and the constants the project derives from GSL. */
#include <math.h>
#include <string.h>
#include "registry.h"
#include "bm-json.h"

/* A private operation to exercise validation without depending on physics. */
static JsonObject *echo_run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    double t;
    if (!bm_json_number(request, "temperature_k", NULL, &t, error))
        return NULL;
    JsonObject *r = json_object_new();
    bm_json_set_number(r, "twice_k", 2 * t);
    json_object_set_string_member(r, "mode", json_object_get_string_member(request, "mode"));
    return r;
}

static const BmChoice mode_choices[] = {
    { 0, "plain", "the default" }, { 1, "fancy", "another" }, { 2, "hidden", "not accepted" },
    { 0, NULL, NULL }
};
static const BmEnum mode_enum = { "mode", mode_choices };

static const BmParam echo_params[] = {
    { "temperature_k", BM_VALUE_NUMBER, TRUE, NULL, "temperature", .unit = "K",
      .lower = BM_GT(0), .upper = BM_LE(1000) },
    { "mode", BM_VALUE_STRING, FALSE, "\"plain\"", "a mode", .choices = &mode_enum,
      .choice_subset = 1u << 0 | 1u << 1 },
    { "weights", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL, "weights",
      .lower = BM_GE(0), .upper = BM_LT(1) },
    BM_PARAM_END
};

static const BmField echo_response[] = {
    { "twice_k", "K", FALSE, "twice the temperature" },
    { "mode", NULL, FALSE, "the mode" },
    BM_FIELD_END
};

static const BmOperation echo_op = { "echo", "test", echo_params, echo_run, echo_response };

/* A reader of its own, defined here and nowhere in the registry: an
 * in-memory list of numbers standing in for the "values" key. */
#define TEST_INPUT_NUMBERS "test numbers"
typedef struct { gsize n; const double *v; } TestNumbers;

static JsonObject *sum_run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)request;
    GError *local = NULL;
    const TestNumbers *given = bm_call_inputs_lookup(inputs, "values", TEST_INPUT_NUMBERS, &local);
    if (local) {
        g_propagate_error(error, local);
        return NULL;
    }
    g_autofree double *parsed = NULL;
    TestNumbers numbers = { 0, NULL };
    if (!given) {
        parsed = bm_json_numbers(request, "values", NULL, &numbers.n, error);
        if (!parsed)
            return NULL;
        numbers.v = parsed;
        given = &numbers;
    }
    double sum = 0.0;
    for (gsize i = 0; i < given->n; i++)
        sum += given->v[i];
    JsonObject *r = json_object_new();
    bm_json_set_number(r, "sum", sum);
    return r;
}

static const BmParam sum_params[] = {
    { "values", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL, "numbers to add", .unit = NULL },
    BM_PARAM_END
};

static const BmField sum_response[] = {
    { "sum", NULL, FALSE, "the sum" },
    BM_FIELD_END
};
static const BmOperation sum_op = { .name = "sum", .summary = "test", .params = sum_params,
                                    .response = sum_response, .run = sum_run };

static JsonObject *parse_object(const char *text)
{
    JsonNode *n = json_from_string(text, NULL);
    g_assert_nonnull(n);
    JsonObject *o = json_object_ref(json_node_get_object(n));
    json_node_unref(n);
    return o;
}

static void test_defaults_and_warnings(void)
{
    g_autoptr(GError) error = NULL;
    g_autoptr(JsonObject) req = parse_object("{\"temperature_k\": 150}");
    g_autoptr(JsonObject) resp = bm_registry_invoke(&echo_op, req, NULL, &error);
    g_assert_no_error(error);
    g_assert_cmpfloat(json_object_get_double_member(resp, "twice_k"), ==, 300.0);
    g_assert_cmpstr(json_object_get_string_member(resp, "mode"), ==, "plain");
    g_assert_true(json_object_has_member(resp, "warnings"));
    /* the bounds themselves are allowed where closed */
    g_autoptr(JsonObject) req2 = parse_object("{\"temperature_k\": 1000, \"weights\": [0, 0.5],"
                                              " \"mode\": \"fancy\"}");
    g_autoptr(JsonObject) resp2 = bm_registry_invoke(&echo_op, req2, NULL, &error);
    g_assert_nonnull(resp2);
    g_assert_no_error(error);
}

static void expect_invalid(const char *request, const char *fragment)
{
    g_autoptr(GError) error = NULL;
    g_autoptr(JsonObject) req = parse_object(request);
    g_autoptr(JsonObject) resp = bm_registry_invoke(&echo_op, req, NULL, &error);
    g_assert_null(resp);
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    if (!strstr(error->message, fragment))
        g_error("message \"%s\" lacks \"%s\"", error->message, fragment);
}

static void test_validation(void)
{
    expect_invalid("{\"temperature_k\": 1, \"colour\": 2}",
                   "request key \"colour\" is not a parameter of echo");
    expect_invalid("{}", "missing the required key \"temperature_k\"");
    expect_invalid("{\"temperature_k\": \"hot\"}", "\"temperature_k\" of echo must be number");
    /* ranges and choices, checked by the registry from the table */
    expect_invalid("{\"temperature_k\": -4}",
                   "request for echo: key \"temperature_k\" must be > 0 K and <= 1000 K "
                   "(got -4 K)");
    expect_invalid("{\"temperature_k\": 0}", "must be > 0 K");
    expect_invalid("{\"temperature_k\": 1000.5}", "(got 1000.5 K)");
    expect_invalid("{\"temperature_k\": 1, \"weights\": [0, 0.5, 1]}",
                   "request for echo: element 2 of \"weights\" must be >= 0 and < 1 (got 1)");
    expect_invalid("{\"temperature_k\": 1, \"weights\": -0.1}", "key \"weights\" must be >= 0");
    expect_invalid("{\"temperature_k\": 1, \"mode\": \"odd\"}",
                   "request for echo: key \"mode\" must be one of plain, fancy (got \"odd\")");
    expect_invalid("{\"temperature_k\": 1, \"mode\": \"hidden\"}", "one of plain, fancy");
}

static void test_string_path(void)
{
    g_autoptr(GError) error = NULL;
    char *out = bm_registry_call_json("nonesuch", "{}", NULL, FALSE, &error);
    g_assert_null(out);
    g_assert_error(error, BM_ERROR, BM_ERROR_UNKNOWN_OPERATION);
    g_clear_error(&error);
    out = bm_registry_call_json("constants", "{\"a\": ", NULL, FALSE, &error);
    g_assert_null(out);
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "not valid JSON"));
    g_clear_error(&error);
    out = bm_registry_call_json("constants", "[1, 2]", NULL, FALSE, &error);
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "must be a JSON object"));
}

/* A list longer than BM_MAX_LIST_LENGTH is refused by name before any work;
 * one of exactly that length is taken. */
static void test_list_length_limit(void)
{
    for (int extra = 1; extra >= 0; extra--) {
        GString *req = g_string_new("{\"order\": 0.5, \"eta\": [0");
        for (int i = 1; i < BM_MAX_LIST_LENGTH + extra; i++)
            g_string_append(req, ",0");
        g_string_append(req, "]}");
        g_autoptr(GError) error = NULL;
        g_autofree char *out = bm_registry_call_json("fermi-integral", req->str, NULL, FALSE,
                                                     &error);
        if (extra) {
            g_assert_null(out);
            g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
            g_assert_nonnull(strstr(error->message, "request key \"eta\" of fermi-integral "
                                    "holds 100001 elements; at most 100000"));
        } else {
            g_assert_no_error(error);
            g_assert_nonnull(out);
        }
        g_string_free(req, TRUE);
    }
}

static void test_describe(void)
{
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    g_assert_cmpuint(n, >, 0);
    g_autoptr(JsonNode) all = bm_registry_describe();
    g_assert_cmpuint(json_array_get_length(json_node_get_array(all)), ==, n);
    for (guint i = 0; i < n; i++) {
        g_assert_true(bm_registry_lookup(ops[i]->name) == ops[i]);
        /* every compiled-in default must parse as JSON */
        for (const BmParam *p = ops[i]->params; p && p->name; p++)
            if (p->default_json) {
                JsonNode *d = json_from_string(p->default_json, NULL);
                g_assert_nonnull(d);
                json_node_unref(d);
            }
    }
}

static double constant(JsonObject *all, const char *key)
{
    return json_object_get_double_member(json_object_get_object_member(all, key), "value");
}

static void test_constants(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *text = bm_registry_call_json("constants", "{}", NULL, FALSE, &error);
    g_assert_no_error(error);
    g_autoptr(JsonNode) root = json_from_string(text, NULL);
    JsonObject *all = json_object_get_object_member(json_node_get_object(root), "constants");
    /* GSL ships CODATA 2006; the check values are CODATA 2018: agree to 2e-5. */
    /* hbar^2/(2 m_e) = 3.80998 eV A^2 (shared REFERENCES, CODATA 2018) */
    g_assert_cmpfloat_with_epsilon(constant(all, "hbar2_over_me_ev_a2") / 2, 3.80998, 3.80998 * 2e-5);
    /* e/(2 pi m_e) = 27.9925 GHz/T (CODATA 2018) */
    g_assert_cmpfloat_with_epsilon(constant(all, "cyclotron_ghz_per_tesla"), 27.9925, 27.9925 * 2e-5);
    /* Lifshitz-Kosevich 2 pi^2 k_B m_e/(hbar e) = 14.6932 K^-1 T (Shoenberg 1984, from memory) */
    g_assert_cmpfloat_with_epsilon(constant(all, "damping_k_per_tesla"), 14.6932, 14.6932 * 2e-5);
    /* Nc(m_e, 300 K) = 2.50941e19 cm^-3 (CODATA 2018 derived) */
    g_assert_cmpfloat_with_epsilon(constant(all, "nc_at_1k_cm3") * pow(300.0, 1.5),
                                   2.50941e19, 2.50941e19 * 2e-5);
    /* m_e/(pi hbar^2) = 4.17731e14 eV^-1 cm^-2 (CODATA 2018 derived) */
    g_assert_cmpfloat_with_epsilon(constant(all, "dos2d_per_ev_cm2"), 4.17731e14, 4.17731e14 * 2e-5);
    /* Onsager F = 10475.77 T per A^-2 and m_c = 1.212755 dA/dE (shared METHODS) */
    g_assert_cmpfloat_with_epsilon(constant(all, "onsager_tesla_a2"), 10475.77, 10475.77 * 2e-5);
    g_assert_cmpfloat_with_epsilon(constant(all, "cyclotron_mass_per_dade"), 1.212755, 1.212755 * 2e-5);
}

static void test_in_memory_inputs(void)
{
    static const double v[] = { 1.5, 2.5, 4.0 };
    TestNumbers numbers = { G_N_ELEMENTS(v), v };
    BmInput in = { "values", TEST_INPUT_NUMBERS, &numbers };
    BmCallInputs inputs = { 1, &in };
    g_autoptr(GError) error = NULL;

    /* the in-memory input stands in for the key */
    g_autoptr(JsonObject) empty = parse_object("{}");
    g_autoptr(JsonObject) resp = bm_registry_invoke(&sum_op, empty, &inputs, &error);
    g_assert_no_error(error);
    g_assert_cmpfloat(json_object_get_double_member(resp, "sum"), ==, 8.0);

    /* given twice: in the request and in memory */
    g_autoptr(JsonObject) both = parse_object("{\"values\": [1]}");
    g_assert_null(bm_registry_invoke(&sum_op, both, &inputs, &error));
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "\"values\" of sum is given twice"));
    g_clear_error(&error);

    /* a key the operation does not take */
    BmInput stray = { "grid", TEST_INPUT_NUMBERS, &numbers };
    BmCallInputs stray_inputs = { 1, &stray };
    g_assert_null(bm_registry_invoke(&sum_op, empty, &stray_inputs, &error));
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "\"grid\", which is not a parameter of sum"));
    g_clear_error(&error);

    /* the wrong type tag for the key */
    BmInput wrong = { "values", "band grid", &numbers };
    BmCallInputs wrong_inputs = { 1, &wrong };
    g_assert_null(bm_registry_invoke(&sum_op, empty, &wrong_inputs, &error));
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "is a band grid, expected a test numbers"));
    g_clear_error(&error);

    /* two inputs for one key */
    BmInput twice[] = { in, in };
    BmCallInputs twice_inputs = { 2, twice };
    g_assert_null(bm_registry_invoke(&sum_op, empty, &twice_inputs, &error));
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
    g_assert_nonnull(strstr(error->message, "two in-memory inputs stand in for \"values\""));
    g_clear_error(&error);

    /* the string path carries them too */
    g_autofree char *text = bm_registry_call_json("constants", "{}", &stray_inputs, FALSE, &error);
    g_assert_null(text);
    g_assert_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    bm_registry_init();
    g_test_add_func("/registry/defaults-and-warnings", test_defaults_and_warnings);
    g_test_add_func("/registry/validation-names-the-key", test_validation);
    g_test_add_func("/registry/string-path-errors", test_string_path);
    g_test_add_func("/registry/describe", test_describe);
    g_test_add_func("/registry/list-length-limit", test_list_length_limit);
    g_test_add_func("/registry/in-memory-inputs", test_in_memory_inputs);
    g_test_add_func("/registry/constants-against-codata", test_constants);
    return g_test_run();
}
