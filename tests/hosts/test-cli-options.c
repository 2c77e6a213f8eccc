/* test-cli-options.c: the command line's option values (numbers exact or
 * refused, ranges, booleans), doping sweeps and the CSV view of every
 * tabular response. */
#include <glib.h>
#include <string.h>
#include <math.h>
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

/* Runs the CLI with the NULL-terminated arguments. */
static void run_cli(Run *r, ...)
{
    GPtrArray *args = g_ptr_array_new();
    g_ptr_array_add(args, (gpointer)g_getenv("BANDMASS_CLI"));
    va_list ap;
    va_start(ap, r);
    for (const char *a; (a = va_arg(ap, const char *));)
        g_ptr_array_add(args, (gpointer)a);
    va_end(ap);
    g_ptr_array_add(args, NULL);
    g_autoptr(GError) error = NULL;
    g_autoptr(GSubprocess) p = g_subprocess_newv((const char *const *)args->pdata,
        G_SUBPROCESS_FLAGS_STDOUT_PIPE | G_SUBPROCESS_FLAGS_STDERR_PIPE, &error);
    g_assert_no_error(error);
    g_subprocess_communicate_utf8(p, NULL, NULL, &r->out, &r->err, &error);
    g_assert_no_error(error);
    g_assert_true(g_subprocess_get_if_exited(p));   /* never a signal */
    r->status = g_subprocess_get_exit_status(p);
    g_ptr_array_free(args, TRUE);
}

static void assert_refused(const Run *r, const char *fragment)
{
    if (r->status != 2 || !g_str_has_prefix(r->err, "bandmass: error: ")
        || !strstr(r->err, fragment))
        g_error("exit %d, stderr \"%s\": wanted exit 2 and \"%s\"", r->status, r->err,
                fragment);
    g_assert_cmpstr(r->out, ==, "");   /* nothing half-written */
}

static JsonObject *response(const Run *r)
{
    g_assert_cmpint(r->status, ==, 0);
    JsonNode *n = json_from_string(r->out, NULL);
    g_assert_nonnull(n);
    JsonObject *o = json_object_ref(json_node_get_object(n));
    json_node_unref(n);
    return o;
}

/* The numbers of "points"[i][key]. */
static double point(JsonObject *o, guint i, const char *key)
{
    JsonArray *pts = json_object_get_array_member(o, "points");
    return json_object_get_double_member(json_array_get_object_element(pts, i), key);
}

#define SI_P "[{\"species\": \"P\", \"density_cm3\": 1e16}]"

/* 100:500:100 is 100, 200, ... 500; 0.1:0.5:0.1 ends on 0.3 and 0.5 as
 * written; 1e14:1e18:x10 is the five decades; items mix with numbers. */
static void test_ranges(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, "band-gap", "--material", "Si", "--temperatures-k", "100:500:100", "--json",
            NULL);
    g_autoptr(JsonObject) ra = response(&a);
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(ra, "points")), ==, 5);
    for (guint i = 0; i < 5; i++)
        g_assert_cmpfloat(point(ra, i, "temperature_k"), ==, 100.0 * (i + 1));

    g_auto(Run) b = { 0 };
    run_cli(&b, "fermi-integral", "--order", "0.5", "--eta", "0.1:0.5:0.1", "--json", NULL);
    g_autoptr(JsonObject) rb = response(&b);
    JsonArray *eta = json_object_get_array_member(rb, "eta");
    g_assert_cmpuint(json_array_get_length(eta), ==, 5);
    g_assert_cmpfloat(json_array_get_double_element(eta, 2), ==, 0.3);   /* as written */
    g_assert_cmpfloat(json_array_get_double_element(eta, 4), ==, 0.5);

    g_auto(Run) c = { 0 };
    run_cli(&c, "fermi-integral", "--order", "0", "--eta", "-3,1e-2:1e2:x10,7", "--json", NULL);
    g_autoptr(JsonObject) rc = response(&c);
    eta = json_object_get_array_member(rc, "eta");
    const double want[] = { -3, 1e-2, 1e-1, 1, 10, 100, 7 };
    g_assert_cmpuint(json_array_get_length(eta), ==, G_N_ELEMENTS(want));
    for (guint i = 0; i < G_N_ELEMENTS(want); i++)
        g_assert_cmpfloat(json_array_get_double_element(eta, i), ==, want[i]);

    /* a descending range */
    g_auto(Run) d = { 0 };
    run_cli(&d, "band-gap", "--material", "Si", "--temperatures-k", "400:100:-150", "--json",
            NULL);
    g_autoptr(JsonObject) rd = response(&d);
    g_assert_cmpfloat(point(rd, 2, "temperature_k"), ==, 100.0);
}

/* Malformed ranges and values with units: exit 2, the option as typed, the
 * form that is expected. */
static void test_bad_numbers(void)
{
    static const struct { const char *opt, *text, *fragment; } cases[] = {
        { "--temperature-k", "300K", "option --temperature-k: \"300K\" carries a unit" },
        { "--temperature-k", "300 K", "carries a unit" },
        { "--temperature-k", "inf", "option --temperature-k: \"inf\" is not a finite number" },
        { "--temperature-k", "nan", "is not a finite number" },
        { "--temperature-k", "-infinity", "is not a finite number" },
        { "--temperature-k", "0x1p70", "hexadecimal" },
        { "--temperature-k", "1e999", "beyond the range of a double" },
        { "--temperature-k", "1e-999", "too small to be represented" },
        { "--temperature-k", "100:500:50", "takes one number" },
        { "--temperature-k", "-5", "option --temperature-k: " },
        { "--temperatures-k", "100:500", "is not a range: write START:STOP:STEP" },
        { "--temperatures-k", "100:500:0", "must be non-zero" },
        { "--temperatures-k", "500:100:50", "lead from START to STOP" },
        { "--temperatures-k", "1:1e9:x1", "FACTOR > 1" },
        { "--temperatures-k", "0:100:x10", "START and STOP > 0" },
        { "--temperatures-k", "1:1e9:0.001", "at most 100000" },
        { "--temperatures-k", "100K:500K:50K", "START \"100K\" is not a finite decimal number" },
        { "--temperatures-k", "100,,200", "empty item" },
        { "--temperatures-k", "100,300K", "item 2 of \"100,300K\"" },
        { "--temperatures-k", "abc", "START:STOP:xFACTOR" },
    };
    for (gsize i = 0; i < G_N_ELEMENTS(cases); i++) {
        g_auto(Run) r = { 0 };
        run_cli(&r, "carrier-statistics", "--material", "Si", cases[i].opt, cases[i].text,
                NULL);
        assert_refused(&r, cases[i].fragment);
    }
    /* the option spelled with '=' is named as typed too */
    g_auto(Run) e = { 0 };
    run_cli(&e, "carrier-statistics", "--material", "Si", "--temperature-k=300K", NULL);
    assert_refused(&e, "option --temperature-k: ");
}

/* An integer option takes what was written exactly or refuses it: 1e23 and
 * 2^64 are no band index (once an undefined cast), 2e0 is band 2, and a
 * 64-bit value that is too large reaches the band check by its true value. */
static void test_integer_options(void)
{
    const char *data = g_getenv("BANDMASS_TEST_DATA");
    g_autofree char *table = g_build_filename(data, "table.csv", NULL);
    g_auto(Run) a = { 0 };
    run_cli(&a, "mass-tensor", "--table", table, "--band", "1e23", NULL);
    assert_refused(&a, "option --band: \"1e23\" is not an integer that can be used exactly");
    g_auto(Run) b = { 0 };
    run_cli(&b, "mass-tensor", "--table", table, "--band", "18446744073709551616", NULL);
    assert_refused(&b, "beyond the range of a 64-bit integer");
    g_auto(Run) c = { 0 };
    run_cli(&c, "mass-tensor", "--table", table, "--band", "9223372036854775807", NULL);
    assert_refused(&c, "9223372036854775807");
    g_autofree char *grid = g_build_filename(data, "grid-small.json", NULL);
    g_auto(Run) d = { 0 };
    run_cli(&d, "mass-tensor", "--grid", grid, "--band", "0e0", "--json", NULL);
    g_autoptr(JsonObject) rd = response(&d);
    g_assert_cmpint(json_object_get_int_member(json_object_get_object_member(rd, "band"),
                                               "index"), ==, 0);
    /* a number option keeps a 64-bit integer exact, and reads reals as doubles */
    g_auto(Run) e = { 0 };
    run_cli(&e, "drude", "--mass-me", "0.26", "--mobility-cm2-per-vs", "1400", "--density-cm3",
            "1e16", "--json", NULL);
    g_autoptr(JsonObject) re = response(&e);
    g_assert_cmpfloat(json_object_get_double_member(re, "density_cm3"), ==, 1e16);
}

/* --band may be left out for one-band data and must be given for more. */
static void test_band_optional(void)
{
    const char *data = g_getenv("BANDMASS_TEST_DATA");
    g_autofree char *grid = g_build_filename(data, "grid-small.json", NULL);
    g_autofree char *table = g_build_filename(data, "table.csv", NULL);
    g_auto(Run) a = { 0 };
    run_cli(&a, "mass-tensor", "--grid", grid, "--json", NULL);
    g_autoptr(JsonObject) ra = response(&a);
    g_assert_cmpint(json_object_get_int_member(json_object_get_object_member(ra, "band"),
                                               "index"), ==, 0);
    g_auto(Run) b = { 0 };
    run_cli(&b, "mass-tensor", "--table", table, NULL);
    assert_refused(&b, "missing key \"band\"");
    g_assert_nonnull(strstr(b.err, "holds 2 bands"));
}

/* Boolean options: alone (true), or followed by true or false, or with '=';
 * anything else is refused naming the option. */
static void test_booleans(void)
{
    /* F_{1/2}(eta) = 1 inverts to eta = 0.3487... (the forward value checked by
     * the fermi-integral tests; here only that the three spellings agree) */
    const char *spellings[][2] = { { "--inverse", NULL }, { "--inverse", "true" },
                                   { "--inverse=true", NULL } };
    double first = NAN;
    for (gsize i = 0; i < G_N_ELEMENTS(spellings); i++) {
        g_auto(Run) r = { 0 };
        if (spellings[i][1])
            run_cli(&r, "fermi-integral", "--order", "0.5", "--values", "1", spellings[i][0],
                    spellings[i][1], "--json", NULL);
        else
            run_cli(&r, "fermi-integral", "--order", "0.5", "--values", "1", spellings[i][0],
                    "--json", NULL);
        g_autoptr(JsonObject) o = response(&r);
        double eta = json_object_get_double_member(o, "eta");
        if (i == 0)
            first = eta;
        g_assert_cmpfloat(eta, ==, first);
    }
    g_auto(Run) f = { 0 };
    run_cli(&f, "fermi-integral", "--order", "0.5", "--eta", "1", "--inverse", "false", "--json",
            NULL);
    g_autoptr(JsonObject) of = response(&f);
    g_assert_false(json_object_has_member(of, "values") && JSON_NODE_HOLDS_NULL(
        json_object_get_member(of, "values")));
    g_auto(Run) g = { 0 };
    run_cli(&g, "fermi-integral", "--order", "0.5", "--values", "1", "--inverse", "yes", NULL);
    assert_refused(&g, "option --inverse: \"yes\" is not true or false");
    g_auto(Run) h = { 0 };
    run_cli(&h, "fermi-integral", "--order", "0.5", "--eta", "1", "--inverse", "false",
            "--inverse", NULL);
    assert_refused(&h, "option --inverse is given twice");
    /* --help says how they are written */
    g_auto(Run) help = { 0 };
    run_cli(&help, "fermi-integral", "--help", NULL);
    g_assert_nonnull(strstr(help.out, "--inverse [true|false]"));
}

/* A doping sweep over one donor species: one point per density, densities in
 * each point, ionised donors rising with the density; with temperatures,
 * every combination (donor density outermost). */
static void test_doping_sweep(void)
{
    g_auto(Run) a = { 0 };
    run_cli(&a, "carrier-statistics", "--material", "Si", "--temperatures-k", "200,300",
            "--donors", "[{\"species\": \"P\"}]", "--donor-densities-cm3", "1e14:1e16:x10",
            "--json", NULL);
    g_autoptr(JsonObject) o = response(&a);
    JsonArray *pts = json_object_get_array_member(o, "points");
    g_assert_cmpuint(json_array_get_length(pts), ==, 6);
    const double nd[3] = { 1e14, 1e15, 1e16 };
    for (guint i = 0; i < 6; i++) {
        g_assert_cmpfloat(point(o, i, "donor_density_cm3"), ==, nd[i / 2]);
        g_assert_cmpfloat(point(o, i, "temperature_k"), ==, i % 2 ? 300 : 200);
        /* charge neutrality, an identity: n + N_A- = p + N_D+ */
        double lhs = point(o, i, "n_cm3") + point(o, i, "ionized_acceptors_cm3");
        double rhs = point(o, i, "p_cm3") + point(o, i, "ionized_donors_cm3");
        g_assert_cmpfloat(fabs(lhs - rhs), <=, 1e-6 * rhs);
        if (i >= 2)
            g_assert_cmpfloat(point(o, i, "ionized_donors_cm3"), >,
                              point(o, i - 2, "ionized_donors_cm3"));
    }
    /* the same point as a single request gives the same numbers */
    g_auto(Run) b = { 0 };
    run_cli(&b, "carrier-statistics", "--material", "Si", "--temperature-k", "300",
            "--donors", "[{\"species\": \"P\", \"density_cm3\": 1e15}]", "--json", NULL);
    g_autoptr(JsonObject) ob = response(&b);
    g_assert_cmpfloat(json_object_get_double_member(ob, "n_cm3"), ==, point(o, 3, "n_cm3"));
    g_assert_cmpfloat(json_object_get_double_member(ob, "donor_density_cm3"), ==, 1e15);

    g_auto(Run) c = { 0 };
    run_cli(&c, "carrier-statistics", "--material", "Si", "--temperature-k", "300",
            "--donors", SI_P, "--donor-densities-cm3", "1e15", NULL);
    assert_refused(&c, "donors[0]: key \"density_cm3\" is not used with "
                       "\"donor_densities_cm3\"");
    g_auto(Run) d = { 0 };
    run_cli(&d, "carrier-statistics", "--material", "Si", "--temperature-k", "300",
            "--acceptor-densities-cm3", "1e15", NULL);
    assert_refused(&d, "give exactly one in \"acceptors\"");
    /* the readable table shows the swept densities and N_D+ / N_A- */
    g_auto(Run) e = { 0 };
    run_cli(&e, "carrier-statistics", "--material", "Si", "--temperature-k", "300",
            "--donors", "[{\"species\": \"P\"}]", "--donor-densities-cm3", "1e15,1e16", NULL);
    g_assert_cmpint(e.status, ==, 0);
    g_assert_nonnull(strstr(e.out, "N_D_cm3"));
    g_assert_nonnull(strstr(e.out, "N_D+_cm3"));
    g_assert_nonnull(strstr(e.out, "N_A-_cm3"));
}

/* The cells of a CSV line, with quoted cells (which may hold commas) counted once. */
static guint csv_cells(const char *line)
{
    guint n = 1;
    gboolean quoted = FALSE;
    for (const char *c = line; *c; c++) {
        if (*c == '"')
            quoted = !quoted;
        else if (*c == ',' && !quoted)
            n++;
    }
    return n;
}

/* The CSV text of a run: header names and row count. */
static void csv_shape(const Run *r, GStrv *header, guint *rows)
{
    g_assert_cmpint(r->status, ==, 0);
    g_auto(GStrv) lines = g_strsplit(r->out, "\n", -1);
    guint n = g_strv_length(lines);
    g_assert_cmpuint(n, >=, 2);
    g_assert_cmpstr(lines[n - 1], ==, "");
    *header = g_strsplit(lines[0], ",", -1);
    *rows = n - 2;
}

static gboolean has_column(GStrv header, const char *name)
{
    return g_strv_contains((const char *const *)header, name);
}

/* --csv for every operation with a table: single points too; species named. */
static void test_csv_everywhere(void)
{
    const char *data = g_getenv("BANDMASS_TEST_DATA");
    g_autofree char *grid = g_build_filename(data, "grid-small.json", NULL);
    struct { const char *args[14]; const char *column; guint rows; } cases[] = {
        { { "carrier-statistics", "--material", "Si", "--temperature-k", "300", "--donors",
            "[{\"species\": \"P\", \"density_cm3\": 1e16}, {\"ionization_ev\": 0.045, "
            "\"density_cm3\": 1e15}]", "--acceptors",
            "[{\"species\": \"B\", \"density_cm3\": 1e15}]", NULL },
          "ionized_donors_P_cm3", 1 },
        { { "carrier-statistics", "--material", "Si", "--temperatures-k", "200:400:100",
            "--acceptors", "[{\"species\": \"B\", \"density_cm3\": 1e15}]", NULL },
          "ionized_acceptors_B_cm3", 3 },
        { { "band-gap", "--material", "GaAs", "--temperature-k", "300", NULL },
          "band_gap_ev", 1 },
        { { "mass-tensor", "--grid", grid, NULL }, "principal_masses_1_me", 2 },
        { { "mass-tensor", "--grid", grid, "--band", "0", NULL }, "k_x_inv_angstrom", 2 },
        { { "valley-average", "--material", "Si", NULL }, "direction_1", 6 },
        { { "hole-mass", "--material", "Si", NULL }, "luttinger_mass_111_me", 3 },
        { { "fermi-integral", "--order", "0.5", "--eta", "0", NULL }, "values", 1 },
        { { "fermi-integral", "--order", "0.5", "--eta", "-1:1:1", NULL }, "eta", 3 },
        { { "sheet-density", "--subbands", "[{\"energy_ev\": 0, \"mass_me\": 0.067}]",
            "--temperature-k", "4", "--fermi-level-ev", "0.01", NULL }, "dos_cm2_per_ev", 1 },
        { { "materials", NULL }, "name", 0 },
        { { "constants", NULL }, "name", 0 },
        { { "drude", "--mass-me", "0.26", "--mobility-cm2-per-vs", "1400", NULL },
          "scattering_time_s", 1 },
    };
    for (gsize i = 0; i < G_N_ELEMENTS(cases); i++) {
        const char *argv[20] = { g_getenv("BANDMASS_CLI") };
        guint n = 1;
        for (guint k = 0; cases[i].args[k]; k++)
            argv[n++] = cases[i].args[k];
        argv[n++] = "--csv";
        g_autoptr(GError) error = NULL;
        g_autoptr(GSubprocess) p = g_subprocess_newv(argv, G_SUBPROCESS_FLAGS_STDOUT_PIPE
                                                     | G_SUBPROCESS_FLAGS_STDERR_PIPE, &error);
        g_assert_no_error(error);
        g_auto(Run) r = { 0 };
        g_subprocess_communicate_utf8(p, NULL, NULL, &r.out, &r.err, &error);
        g_assert_no_error(error);
        r.status = g_subprocess_get_exit_status(p);
        if (r.status != 0)
            g_error("%s --csv: exit %d: %s", cases[i].args[0], r.status, r.err);
        g_auto(GStrv) header = NULL;
        guint rows;
        csv_shape(&r, &header, &rows);
        if (!has_column(header, cases[i].column))
            g_error("%s --csv: no column %s in %s", cases[i].args[0], cases[i].column, r.out);
        if (cases[i].rows)
            g_assert_cmpuint(rows, ==, cases[i].rows);
        else
            g_assert_cmpuint(rows, >, 0);
        /* no column named by position where a species is known */
        g_assert_false(has_column(header, "ionized_donors_per_species_cm3_1"));
        /* every row has as many cells as the header (no quoted commas here) */
        g_auto(GStrv) lines = g_strsplit(r.out, "\n", -1);
        for (guint l = 1; l <= rows; l++)
            g_assert_cmpuint(csv_cells(lines[l]), ==, g_strv_length(header));
        if (i == 0) {
            g_assert_true(has_column(header, "ionized_donors_0.045eV_cm3"));
            g_assert_true(has_column(header, "ionized_acceptors_B_cm3"));
        }
    }
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/cli-options/ranges", test_ranges);
    g_test_add_func("/cli-options/bad-numbers", test_bad_numbers);
    g_test_add_func("/cli-options/integer-options", test_integer_options);
    g_test_add_func("/cli-options/band-optional", test_band_optional);
    g_test_add_func("/cli-options/booleans", test_booleans);
    g_test_add_func("/cli-options/doping-sweep", test_doping_sweep);
    g_test_add_func("/cli-options/csv-everywhere", test_csv_everywhere);
    return g_test_run();
}
