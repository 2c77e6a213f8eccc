/* test-status.c: the warning list: unbounded, codes kept beside their
 * messages, every code with its own stable name. No physics. */
#include <string.h>
#include <glib.h>

#include "bm-status.h"

static void test_unbounded(void)
{
    bm_warnings w = {0};
    for (int i = 0; i < 1000; i++)
        bm_warn(&w, (bm_warn_code)(i % BM_WARN_COUNT), "warning %d", i);
    g_assert_cmpuint(w.count, ==, 1000);
    g_assert_cmpuint(w.lost, ==, 0);
    for (int i = 0; i < 1000; i++) {
        g_autofree char *expect = g_strdup_printf("warning %d", i);
        g_assert_cmpstr(w.items[i].text, ==, expect);
        g_assert_cmpint(w.items[i].code, ==, i % BM_WARN_COUNT);
    }
    g_assert_true(bm_warnings_has(&w, BM_WARN_SADDLE_POINT));
    bm_warnings_clear(&w);
    g_assert_cmpuint(w.count, ==, 0);
    g_assert_null(w.items);
    g_assert_false(bm_warnings_has(&w, BM_WARN_SADDLE_POINT));
    /* a long message is kept whole */
    char long_text[2001];
    memset(long_text, 'x', 2000);
    long_text[2000] = '\0';
    bm_warn(&w, BM_WARN_NON_PARABOLIC, "%s", long_text);
    g_assert_cmpuint(strlen(w.items[0].text), ==, 2000);
    bm_warnings_clear(&w);
    bm_warnings_clear(NULL);
    bm_warn(NULL, BM_WARN_SADDLE_POINT, "ignored");
}

static void test_code_names(void)
{
    for (int i = 0; i < BM_WARN_COUNT; i++) {
        const char *a = bm_warn_code_name((bm_warn_code)i);
        g_assert_cmpstr(a, !=, "unknown");
        g_assert_cmpuint(strlen(a), >, 0);
        /* kebab-case: lower-case letters and digits joined by single hyphens */
        g_assert_true(g_ascii_islower(a[0]));
        g_assert_true(a[strlen(a) - 1] != '-');
        g_assert_null(strstr(a, "--"));
        for (const char *p = a; *p; p++)
            g_assert_true(g_ascii_islower(*p) || g_ascii_isdigit(*p) || *p == '-');
        for (int j = 0; j < i; j++)
            g_assert_cmpstr(a, !=, bm_warn_code_name((bm_warn_code)j));
    }
    g_assert_cmpstr(bm_warn_code_name(BM_WARN_COUNT), ==, "unknown");
    g_assert_cmpstr(bm_warn_code_name((bm_warn_code)-1), ==, "unknown");
    /* names are part of the JSON interface: a few pinned */
    g_assert_cmpstr(bm_warn_code_name(BM_WARN_SADDLE_POINT), ==, "saddle-point");
    g_assert_cmpstr(bm_warn_code_name(BM_WARN_DEGENERATE_BAND), ==, "degenerate-band");
    g_assert_cmpstr(bm_warn_code_name(BM_WARN_MASS_OUT_OF_RANGE), ==, "mass-out-of-range");
    g_assert_cmpstr(bm_warn_code_name(BM_WARN_BOLTZMANN_DEVIATION), ==, "boltzmann-deviation");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/core/status/warnings-unbounded", test_unbounded);
    g_test_add_func("/core/status/code-names", test_code_names);
    return g_test_run();
}
