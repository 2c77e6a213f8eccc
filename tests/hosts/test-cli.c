/* test-cli.c: the command line as a host of the registry: exit codes,
 * error messages, and that a friendly subcommand answers as `call` does. */
#include <glib.h>
#include <glib/gstdio.h>
#include <string.h>
#include <gio/gio.h>
#include <json-glib/json-glib.h>

typedef struct {
    int status;
    char *out;
    char *err;
} Run;

static void run_clear(Run *r)
{
    g_free(r->out);
    g_free(r->err);
}
G_DEFINE_AUTO_CLEANUP_CLEAR_FUNC(Run, run_clear)

/* Runs the CLI with argv (NULL-terminated after the program) and optional stdin text. */
static void run_cli(Run *r, const char *stdin_text, ...)
{
    GPtrArray *args = g_ptr_array_new();
    g_ptr_array_add(args, (gpointer)g_getenv("BANDMASS_CLI"));
    va_list ap;
    va_start(ap, stdin_text);
    for (const char *a; (a = va_arg(ap, const char *));)
        g_ptr_array_add(args, (gpointer)a);
    va_end(ap);
    g_ptr_array_add(args, NULL);

    g_autoptr(GError) error = NULL;
    g_autoptr(GSubprocessLauncher) l = g_subprocess_launcher_new(
        G_SUBPROCESS_FLAGS_STDIN_PIPE | G_SUBPROCESS_FLAGS_STDOUT_PIPE | G_SUBPROCESS_FLAGS_STDERR_PIPE);
    g_autoptr(GSubprocess) p = g_subprocess_launcher_spawnv(l, (const char *const *)args->pdata, &error);
    g_assert_no_error(error);
    g_subprocess_communicate_utf8(p, stdin_text ? stdin_text : "", NULL, &r->out, &r->err, &error);
    g_assert_no_error(error);
    g_assert_true(g_subprocess_get_if_exited(p));   /* never a signal */
    r->status = g_subprocess_get_exit_status(p);
    g_ptr_array_free(args, TRUE);
}

static void assert_bad_input(const Run *r, const char *fragment)
{
    g_assert_cmpint(r->status, ==, 2);
    g_assert_true(g_str_has_prefix(r->err, "bandmass: error: "));
    if (!strstr(r->err, fragment))
        g_error("stderr \"%s\" lacks \"%s\"", r->err, fragment);
}

static void test_version_and_ops(void)
{
    g_auto(Run) v = { 0 };
    run_cli(&v, NULL, "--version", NULL);
    g_assert_cmpint(v.status, ==, 0);
    g_assert_true(g_str_has_prefix(v.out, "bandmass "));
    g_auto(Run) ops = { 0 };
    run_cli(&ops, NULL, "ops", "--json", NULL);
    g_assert_cmpint(ops.status, ==, 0);
    g_autoptr(JsonNode) all = json_from_string(ops.out, NULL);
    g_assert_true(JSON_NODE_HOLDS_ARRAY(all));
    g_assert_cmpuint(json_array_get_length(json_node_get_array(all)), >, 0);
}

static void test_bad_usage(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, NULL, "nonesuch", NULL);
    assert_bad_input(&a, "unknown command or operation \"nonesuch\"");
    g_auto(Run) b = { 0 };
    run_cli(&b, "{\"a\":", "call", "constants", NULL);
    assert_bad_input(&b, "not valid JSON");
    g_auto(Run) c = { 0 };
    run_cli(&c, NULL, "constants", "--colour", "red", NULL);
    assert_bad_input(&c, "unknown option --colour");
    g_auto(Run) d = { 0 };
    run_cli(&d, NULL, "call", "constants", "--input", "/nonexistent/request.json", NULL);
    assert_bad_input(&d, "cannot read request /nonexistent/request.json");
}

static void test_friendly_equals_call(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, "{}", "call", "constants", NULL);
    g_auto(Run) b = { 0 };
    run_cli(&b, NULL, "constants", "--json", NULL);
    g_assert_cmpint(a.status, ==, 0);
    g_assert_cmpint(b.status, ==, 0);
    g_assert_cmpstr(a.out, ==, b.out);
}

static void test_output_is_atomic(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-cli-XXXXXX", &error);
    g_assert_no_error(error);
    g_autofree char *path = g_build_filename(dir, "out.json", NULL);
    g_auto(Run) a = { 0 };
    run_cli(&a, "{}", "call", "constants", "--output", path, NULL);
    g_assert_cmpint(a.status, ==, 0);
    g_assert_true(g_file_test(path, G_FILE_TEST_EXISTS));
    /* a failing request leaves nothing behind */
    g_autofree char *bad = g_build_filename(dir, "bad.json", NULL);
    g_auto(Run) b = { 0 };
    run_cli(&b, "{\"x\": 1}", "call", "constants", "--output", bad, NULL);
    g_assert_cmpint(b.status, ==, 2);
    g_assert_false(g_file_test(bad, G_FILE_TEST_EXISTS));
    g_remove(path);
    g_rmdir(dir);
}

/* A list of temperatures becomes CSV: a header of the point keys (per-species
 * arrays numbered) and one row per temperature. */
static void test_carrier_csv(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, NULL, "carrier-statistics", "--material", "Si", "--temperatures-k", "200,300,400",
            "--donors", "[{\"species\": \"P\", \"density_cm3\": 1e16}]", "--csv", NULL);
    g_assert_cmpint(a.status, ==, 0);
    g_auto(GStrv) lines = g_strsplit(a.out, "\n", -1);
    g_assert_cmpuint(g_strv_length(lines), ==, 5);   /* header, 3 rows, empty tail */
    g_assert_true(g_str_has_prefix(lines[0], "temperature_k,band_gap_ev,"));
    g_assert_nonnull(strstr(lines[0], ",fermi_level_ev,"));
    g_assert_nonnull(strstr(lines[0], ",ionized_donors_per_species_cm3_1,"));
    g_assert_true(g_str_has_prefix(lines[1], "200,"));
    g_assert_true(g_str_has_prefix(lines[3], "400,"));
    g_auto(GStrv) head = g_strsplit(lines[0], ",", -1);
    guint cols = g_strv_length(head);
    for (int i = 1; i <= 3; i++) {
        g_auto(GStrv) f = g_strsplit(lines[i], ",", -1);
        g_assert_cmpuint(g_strv_length(f), ==, cols);
    }
    g_assert_cmpstr(lines[4], ==, "");
}

static void test_carrier_bad_input(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, NULL, "carrier-statistics", "--material", "Si", "--temperature-k", "-5", NULL);
    assert_bad_input(&a, "\"temperature_k\"");
    g_auto(Run) b = { 0 };
    run_cli(&b, "{\"material\": \"Si\", \"temperature_k\": 300, \"donors\": "
            "[{\"species\": \"Zz\", \"density_cm3\": 1e16}]}", "call", "carrier-statistics",
            NULL);
    assert_bad_input(&b, "donors[0]: key \"species\"");
    g_auto(Run) c = { 0 };
    run_cli(&c, NULL, "materials", "--name", "unobtainium", NULL);
    assert_bad_input(&c, "unknown material");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/cli/version-and-ops", test_version_and_ops);
    g_test_add_func("/cli/bad-usage-exits-2", test_bad_usage);
    g_test_add_func("/cli/friendly-equals-call", test_friendly_equals_call);
    g_test_add_func("/cli/output-is-atomic", test_output_is_atomic);
    g_test_add_func("/cli/carrier-csv", test_carrier_csv);
    g_test_add_func("/cli/carrier-bad-input", test_carrier_bad_input);
    return g_test_run();
}
