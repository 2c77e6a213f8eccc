/* test-json-writer.c: the one JSON writer (bm_json_to_string): numbers come
 * out as valid JSON in the fewest digits that read back to the same double,
 * integers stay integers, and json-glib's parser reads every text back to
 * the same node. */
#include <float.h>
#include <math.h>
#include <string.h>
#include "bm-json.h"

static char *double_text(double v)
{
    GString *s = g_string_new(NULL);
    bm_json_write_double(s, v);
    return g_string_free(s, FALSE);
}

/* Writes v, parses the text with json-glib and checks the bits came back. */
static void round_trip_double(double v, const char *want)
{
    g_autofree char *text = double_text(v);
    if (want)
        g_assert_cmpstr(text, ==, want);
    g_autoptr(GError) error = NULL;
    g_autoptr(JsonNode) back = json_from_string(text, &error);
    g_assert_no_error(error);
    g_assert_cmpint(json_node_get_value_type(back), ==, G_TYPE_DOUBLE);
    double r = json_node_get_double(back);
    /* identical bits, so -0.0 is told from 0.0 */
    g_assert_true(memcmp(&r, &v, sizeof v) == 0);
}

static void test_tricky_doubles(void)
{
    /* shortest forms, IEEE 754 binary64 (mathematical facts of the format) */
    round_trip_double(0.1, "0.1");
    round_trip_double(1e17, "1e17");            /* json-glib itself writes 1e+17.0 */
    round_trip_double(2e17, "2e17");
    round_trip_double(5e19, "5e19");
    round_trip_double(1e20, "1e20");
    round_trip_double(1e300, "1e300");
    round_trip_double(5e-324, "5e-324");        /* the smallest subnormal */
    round_trip_double(DBL_MIN, "2.2250738585072014e-308");
    round_trip_double(DBL_MAX, "1.7976931348623157e308");
    round_trip_double(-0.0, "-0.0");
    round_trip_double(0.0, "0.0");
    round_trip_double(300.0, "300.0");          /* stays a real number */
    round_trip_double(1e-5, "1e-5");
    round_trip_double(0.30000000000000004, "0.30000000000000004");   /* 0.1 + 0.2 */
    round_trip_double(1.0 / 3.0, "0.3333333333333333");
    round_trip_double(9007199254740993.0, NULL);   /* 2^53 + 1 is not a double: 2^53 */
    round_trip_double(123456789012345678.0, "1.2345678901234568e17");
    round_trip_double(-2.5e-7, "-2.5e-7");
    /* a sweep of awkward values: every one reads back to its own bits */
    for (int e = -320; e <= 308; e += 7)
        for (int m = 1; m < 10; m += 2)
            round_trip_double(m * pow(10.0, e) * (1.0 + 1e-15 * m), NULL);
}

static void test_non_finite_is_null(void)
{
    g_autofree char *a = double_text(NAN);
    g_autofree char *b = double_text(INFINITY);
    g_autofree char *c = double_text(-INFINITY);
    g_assert_cmpstr(a, ==, "null");
    g_assert_cmpstr(b, ==, "null");
    g_assert_cmpstr(c, ==, "null");
}

static void test_integers_stay_integers(void)
{
    static const gint64 ints[] = {
        0, -1, 123456789012345678, 9007199254740993 /* 2^53 + 1 */,
        G_MAXINT64, G_MININT64,
    };
    for (guint i = 0; i < G_N_ELEMENTS(ints); i++) {
        g_autoptr(JsonNode) n = json_node_new(JSON_NODE_VALUE);
        json_node_set_int(n, ints[i]);
        g_autofree char *text = bm_json_to_string(n, FALSE);
        g_autofree char *want = g_strdup_printf("%" G_GINT64_FORMAT, ints[i]);
        g_assert_cmpstr(text, ==, want);
        g_autoptr(JsonNode) back = json_from_string(text, NULL);
        g_assert_cmpint(json_node_get_value_type(back), ==, G_TYPE_INT64);
        g_assert_cmpint(json_node_get_int(back), ==, ints[i]);
    }
}

static const char document[] =
    "{\"a\":1,\"e\":[],\"o\":{},\"n\":null,\"s\":\"q\\\"b\\\\s/\\n\\t\\u0001\xc3\xa9\","
    "\"arr\":[1.5,true,false,{\"q\":[1e17,-0.0]}],\"big\":123456789012345678,"
    "\"tiny\":5e-324,\"x\":1e300}";

static void test_document_round_trip(void)
{
    g_autoptr(JsonNode) n = json_from_string(document, NULL);
    g_assert_nonnull(n);
    for (int pretty = 0; pretty <= 1; pretty++) {
        g_autofree char *text = bm_json_to_string(n, pretty);
        g_autoptr(GError) error = NULL;
        g_autoptr(JsonNode) back = json_from_string(text, &error);
        g_assert_no_error(error);
        g_assert_true(json_node_equal(n, back));
        g_autofree char *again = bm_json_to_string(back, pretty);
        g_assert_cmpstr(text, ==, again);
        if (!pretty)
            g_assert_cmpstr(text, ==,
                "{\"a\":1,\"e\":[],\"o\":{},\"n\":null,\"s\":\"q\\\"b\\\\s/\\n\\t\\u0001\xc3\xa9\","
                "\"arr\":[1.5,true,false,{\"q\":[1e17,-0.0]}],\"big\":123456789012345678,"
                "\"tiny\":5e-324,\"x\":1e300}");
    }
    g_autofree char *pretty = bm_json_to_string(n, TRUE);
    g_assert_true(g_str_has_prefix(pretty, "{\n  \"a\" : 1,\n  \"e\" : [],\n  \"o\" : {},\n"));
    g_assert_nonnull(strstr(pretty, "\"arr\" : [\n    1.5,\n    true,\n"));
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/json-writer/tricky-doubles", test_tricky_doubles);
    g_test_add_func("/json-writer/non-finite", test_non_finite_is_null);
    g_test_add_func("/json-writer/integers", test_integers_stay_integers);
    g_test_add_func("/json-writer/document", test_document_round_trip);
    return g_test_run();
}
