/* test-cli.c: the command line as a host of the registry: exit codes,
 * error messages, and that a friendly subcommand answers as `call` does. */
#define _DEFAULT_SOURCE 1   /* mknod, makedev */
#include <glib.h>
#include <glib/gstdio.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/resource.h>
#include <sys/sysmacros.h>
#include <sys/wait.h>
#include <unistd.h>
#include <fcntl.h>
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
    assert_bad_input(&d, "cannot read request: /nonexistent/request.json");
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

static struct stat stat_of(const char *path)
{
    struct stat st;
    g_assert_cmpint(lstat(path, &st), ==, 0);
    return st;
}

static char *contents_of(const char *path)
{
    char *text = NULL;
    g_assert_true(g_file_get_contents(path, &text, NULL, NULL));
    return text;
}

static gpointer fifo_reader(gpointer path)
{
    char *text = NULL;
    g_assert_true(g_file_get_contents(path, &text, NULL, NULL));   /* blocks for a writer */
    return text;
}

/* --output by kind of file: a regular file is replaced keeping its mode (and
 * owner), a FIFO and a character device are written through and stay what they
 * are, links (symbolic, dangling, hard) are refused and left alone, a
 * directory is refused. Regression tests. */
static void test_output_kinds(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-out-XXXXXX", &error);
    g_assert_no_error(error);
    g_autofree char *file = g_build_filename(dir, "result.json", NULL);

    /* a 0600 file keeps its mode; as root, also another user's owner and group */
    g_assert_true(g_file_set_contents(file, "old\n", -1, NULL));
    g_assert_cmpint(chmod(file, 0600), ==, 0);
    gboolean root = geteuid() == 0;
    if (root)
        g_assert_cmpint(chown(file, 65534, 65534), ==, 0);
    g_auto(Run) a = { 0 };
    run_cli(&a, "{}", "call", "constants", "--output", file, NULL);
    g_assert_cmpint(a.status, ==, 0);
    struct stat st = stat_of(file);
    g_assert_true(S_ISREG(st.st_mode));
    g_assert_cmpint(st.st_mode & 07777, ==, 0600);
    if (root) {
        g_assert_cmpint(st.st_uid, ==, 65534);
        g_assert_cmpint(st.st_gid, ==, 65534);
    }
    g_autofree char *got = contents_of(file);
    g_assert_true(g_str_has_prefix(got, "{"));

    /* a symbolic link, and a dangling one: refused by name, nothing changed */
    g_autofree char *sym = g_build_filename(dir, "link.json", NULL);
    g_assert_cmpint(symlink(file, sym), ==, 0);
    g_auto(Run) b = { 0 };
    run_cli(&b, "{}", "call", "constants", "--compact", "--output", sym, NULL);
    assert_bad_input(&b, "is a symbolic link");
    g_assert_nonnull(strstr(b.err, sym));
    g_assert_nonnull(strstr(b.err, "pass the resolved path"));
    g_assert_true(S_ISLNK(stat_of(sym).st_mode));
    g_autofree char *same = contents_of(file);
    g_assert_cmpstr(same, ==, got);
    g_autofree char *dangling = g_build_filename(dir, "dangling.json", NULL);
    g_autofree char *nowhere = g_build_filename(dir, "nowhere.json", NULL);
    g_assert_cmpint(symlink(nowhere, dangling), ==, 0);
    g_auto(Run) c = { 0 };
    run_cli(&c, "{}", "call", "constants", "--output", dangling, NULL);
    assert_bad_input(&c, "is a symbolic link");
    g_assert_nonnull(strstr(c.err, "does not exist"));
    g_assert_true(S_ISLNK(stat_of(dangling).st_mode));
    g_assert_false(g_file_test(nowhere, G_FILE_TEST_EXISTS));

    /* a file with two hard links: refused, both names keep the old text */
    g_autofree char *twin = g_build_filename(dir, "twin.json", NULL);
    g_assert_cmpint(link(file, twin), ==, 0);
    g_auto(Run) d = { 0 };
    run_cli(&d, "{}", "call", "constants", "--compact", "--output", twin, NULL);
    assert_bad_input(&d, "has 2 hard links");
    g_assert_cmpint(stat_of(file).st_nlink, ==, 2);
    g_autofree char *twin_text = contents_of(twin);
    g_assert_cmpstr(twin_text, ==, got);

    /* a directory: refused */
    g_auto(Run) e = { 0 };
    run_cli(&e, "{}", "call", "constants", "--output", dir, NULL);
    assert_bad_input(&e, "is a directory");

    /* a FIFO: a reader gets the response, the FIFO stays a FIFO */
    g_autofree char *fifo = g_build_filename(dir, "pipe", NULL);
    g_assert_cmpint(mkfifo(fifo, 0600), ==, 0);
    GThread *reader = g_thread_new("fifo-reader", fifo_reader, fifo);
    g_auto(Run) f = { 0 };
    run_cli(&f, "{}", "call", "constants", "--output", fifo, NULL);
    g_assert_cmpint(f.status, ==, 0);
    g_autofree char *through = g_thread_join(reader);
    g_assert_true(g_str_has_prefix(through, "{"));
    g_assert_true(S_ISFIFO(stat_of(fifo).st_mode));

    /* a character device: written through, still a device. As root, first a
     * private null device, so that a fault cannot reach the system's one */
    if (root) {
        g_autofree char *null = g_build_filename(dir, "null", NULL);
        g_assert_cmpint(mknod(null, S_IFCHR | 0666, makedev(1, 3)), ==, 0);
        g_auto(Run) g = { 0 };
        run_cli(&g, "{}", "call", "constants", "--output", null, NULL);
        g_assert_cmpint(g.status, ==, 0);
        g_assert_true(S_ISCHR(stat_of(null).st_mode));
        g_unlink(null);
    }
    if (g_file_test("/dev/null", G_FILE_TEST_EXISTS) && S_ISCHR(stat_of("/dev/null").st_mode)) {
        g_auto(Run) h = { 0 };
        run_cli(&h, "{}", "call", "constants", "--output", "/dev/null", NULL);
        g_assert_cmpint(h.status, ==, 0);
        g_assert_true(S_ISCHR(stat_of("/dev/null").st_mode));
    }

    g_unlink(fifo);
    g_unlink(twin);
    g_unlink(dangling);
    g_unlink(sym);
    g_unlink(file);
    g_assert_cmpint(g_rmdir(dir), ==, 0);   /* nothing else was left behind */
}

static void small_file_limit(gpointer data)
{
    (void)data;
    struct rlimit lim = { 100, 100 };
    setrlimit(RLIMIT_FSIZE, &lim);
}

/* A write cut short by the file-size limit (SIGXFSZ) removes its partial file
 * and leaves the target as it was; partial files a killed run left for the same
 * target are removed by the next run, those of live runs and of other targets
 * are kept. Regression test. */
static void test_output_partial_files(void)
{
    g_autoptr(GError) error = NULL;
    g_autofree char *dir = g_dir_make_tmp("bandmass-out-XXXXXX", &error);
    g_assert_no_error(error);
    g_autofree char *file = g_build_filename(dir, "out.json", NULL);
    g_assert_true(g_file_set_contents(file, "old\n", -1, NULL));

    g_autoptr(GSubprocessLauncher) l = g_subprocess_launcher_new(
        G_SUBPROCESS_FLAGS_STDIN_PIPE | G_SUBPROCESS_FLAGS_STDOUT_SILENCE
        | G_SUBPROCESS_FLAGS_STDERR_PIPE);
    g_subprocess_launcher_set_child_setup(l, small_file_limit, NULL, NULL);
    const char *argv[] = { g_getenv("BANDMASS_CLI"), "call", "constants", "--output", file, NULL };
    g_autoptr(GSubprocess) p = g_subprocess_launcher_spawnv(l, argv, &error);
    g_assert_no_error(error);
    g_autofree char *err = NULL;
    g_subprocess_communicate_utf8(p, "{}", NULL, NULL, &err, &error);
    g_assert_no_error(error);
    g_assert_true(g_subprocess_get_if_exited(p));   /* not killed by SIGXFSZ */
    g_assert_cmpint(g_subprocess_get_exit_status(p), ==, 2);
    g_assert_nonnull(strstr(err, "File too large"));
    g_autofree char *kept = contents_of(file);
    g_assert_cmpstr(kept, ==, "old\n");
    g_autoptr(GDir) d1 = g_dir_open(dir, 0, NULL);
    g_assert_cmpstr(g_dir_read_name(d1), ==, "out.json");
    g_assert_null(g_dir_read_name(d1));

    /* the PID of a process that has exited and been reaped (a plain fork:
     * a subprocess object forgets its identifier as soon as the child exits) */
    pid_t gone = fork();
    g_assert_cmpint(gone, >=, 0);
    if (gone == 0)
        _exit(0);
    int gone_status = 0;
    g_assert_cmpint(waitpid(gone, &gone_status, 0), ==, gone);
    g_autofree char *dead_pid = g_strdup_printf("%ld", (long)gone);
    g_autofree char *dead = g_strdup_printf("%s/.out.json.bandmass-partial-%s-Ab3dEf", dir,
                                            dead_pid);
    g_autofree char *live = g_strdup_printf("%s/.out.json.bandmass-partial-%ld-Ab3dEf", dir,
                                            (long)getpid());
    g_autofree char *other = g_strdup_printf("%s/.other.json.bandmass-partial-%s-Ab3dEf", dir,
                                             dead_pid);
    for (const char *const *f = (const char *const[]){ dead, live, other, NULL }; *f; f++)
        g_assert_true(g_file_set_contents(*f, "partial", -1, NULL));
    g_auto(Run) r = { 0 };
    run_cli(&r, "{}", "call", "constants", "--output", file, NULL);
    g_assert_cmpint(r.status, ==, 0);
    g_assert_false(g_file_test(dead, G_FILE_TEST_EXISTS));
    g_assert_true(g_file_test(live, G_FILE_TEST_EXISTS));
    g_assert_true(g_file_test(other, G_FILE_TEST_EXISTS));
    g_unlink(live);
    g_unlink(other);
    g_unlink(file);
    g_assert_cmpint(g_rmdir(dir), ==, 0);
}

/* A list of temperatures becomes CSV: a header of the point keys (per-species
 * arrays numbered) and one row per temperature. */
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
    g_assert_nonnull(strstr(lines[0], ",ionized_donors_P_cm3,"));
    g_assert_true(g_str_has_prefix(lines[1], "200,"));
    g_assert_true(g_str_has_prefix(lines[3], "400,"));
    g_auto(GStrv) head = g_strsplit(lines[0], ",", -1);
    guint cols = g_strv_length(head);
    for (int i = 1; i <= 3; i++) {
        g_assert_cmpuint(csv_cells(lines[i]), ==, cols);
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

/* Writes a little-endian float64 .npy of shape (1, 2, 2, 2) holding v. */
static void write_npy(const char *path, const double v[8], gsize body_bytes)
{
    const char *dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (1, 2, 2, 2), }";
    GString *h = g_string_new(dict);
    while ((10 + h->len + 1) % 64)
        g_string_append_c(h, ' ');
    g_string_append_c(h, '\n');
    GByteArray *b = g_byte_array_new();
    g_byte_array_append(b, (const guint8 *)"\x93NUMPY\x01\x00", 8);
    guint16 hl = GUINT16_TO_LE((guint16)h->len);
    g_byte_array_append(b, (const guint8 *)&hl, 2);
    g_byte_array_append(b, (const guint8 *)h->str, h->len);
    for (int i = 0; i < 8; i++) {
        guint64 bits;
        memcpy(&bits, &v[i], 8);
        bits = GUINT64_TO_LE(bits);
        g_byte_array_append(b, (const guint8 *)&bits, 8);
    }
    g_assert_true(g_file_set_contents(path, (const char *)b->data,
                                      (gssize)(b->len - (64 - body_bytes)), NULL));
    g_byte_array_unref(b);
    g_string_free(h, TRUE);
}

/* Bad band data reaches the user as exit 2 and a message naming the file
 * and the place, never as a crash or a number. */
static void test_mass_tensor_bad_files(void)
{
    g_autofree char *dir = g_dir_make_tmp("bandmass-bad-XXXXXX", NULL);
    g_autofree char *doc = g_build_filename(dir, "grid.json", NULL);
    g_autofree char *npy = g_build_filename(dir, "e.npy", NULL);
    g_assert_true(g_file_set_contents(doc,
        "{\"format\": \"bandmass-grid-1\", \"lattice_vectors_angstrom\": "
        "[[3,0,0],[0,3,0],[0,0,3]], \"mesh\": [2,2,2], \"energies_ev\": \"e.npy\"}", -1, NULL));
    double v[8] = { 0, 1, 1, 2, 1, 2, 2, NAN };

    write_npy(npy, v, 64);                       /* NaN at (1, 1, 1) */
    g_auto(Run) a = { 0 };
    run_cli(&a, NULL, "mass-tensor", "--grid", doc, "--band", "0", NULL);
    assert_bad_input(&a, "(1, 1, 1)");
    g_assert_nonnull(strstr(a.err, "not finite"));

    v[7] = 3;
    write_npy(npy, v, 40);                       /* body cut short */
    g_auto(Run) b = { 0 };
    run_cli(&b, NULL, "mass-tensor", "--grid", doc, "--band", "0", NULL);
    assert_bad_input(&b, "e.npy");

    write_npy(npy, v, 64);
    g_auto(Run) c = { 0 };
    run_cli(&c, NULL, "mass-tensor", "--grid", doc, "--band", "4", NULL);
    assert_bad_input(&c, "band index 4");

    g_autofree char *csv = g_build_filename(dir, "t.csv", NULL);
    g_assert_true(g_file_set_contents(csv,
        "kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev\n0,0,0,1\n0.1,0,0\n", -1, NULL));
    g_auto(Run) d = { 0 };
    run_cli(&d, NULL, "mass-tensor", "--table", csv, "--band", "cb", NULL);
    assert_bad_input(&d, "line 3");

    g_remove(doc);
    g_remove(npy);
    g_remove(csv);
    g_rmdir(dir);
}

/* A built-in material in valley-average: silicon's six Delta valleys
 * (textbook; Sze & Ng 2007, App. G, from memory). */
static void test_valley_material(void)
{
    g_auto(Run) r = { 0 };
    run_cli(&r, NULL, "valley-average", "--material", "Si", "--json", NULL);
    g_assert_cmpint(r.status, ==, 0);
    g_autoptr(JsonNode) n = json_from_string(r.out, NULL);
    g_assert_nonnull(n);
    JsonObject *o = json_node_get_object(n);
    g_assert_cmpfloat(json_object_get_double_member(o, "valley_count"), ==, 6.0);
    g_assert_cmpstr(json_object_get_string_member(o, "material"), ==, "Si");
}

/* The readable table shows each warning once, after the table: a Fermi
 * level 0.5 eV into the band at 300 K is degenerate (0.5 / 0.02585 = 19.3 kT,
 * kT from CODATA k_B). */
static void test_table_warnings_once(void)
{
    g_auto(Run) r = { 0 };
    run_cli(&r, NULL, "valley-average", "--valleys",
            "[{\"longitudinal_mass_me\": 0.98, \"transverse_mass_me\": 0.19, "
            "\"axis\": [1,0,0], \"energy_offset_ev\": 0.1}, {\"longitudinal_mass_me\": 0.98, "
            "\"transverse_mass_me\": 0.19, \"axis\": [0,1,0]}]",
            "--temperature-k", "300", "--fermi-level-ev", "0.5", NULL);
    g_assert_cmpint(r.status, ==, 0);
    g_auto(GStrv) parts = g_strsplit(r.out, "warning: the Fermi level lies 19.3 kT", -1);
    g_assert_cmpuint(g_strv_length(parts), ==, 2);
    g_assert_nonnull(strstr(parts[0], "population"));   /* after the table */
}

/* OP --help shows each key's unit, range, choices and default from the
 * table, and the response keys; a value outside the range is refused. */
/* 100,000 nested brackets in a request, an option and a grid document: a
 * clear error and exit 2, not a stack overflow in the parser. Regression test. */
static void test_deep_nesting(void)
{
    GString *deep = g_string_new("{\"eta\": ");
    for (int i = 0; i < 100000; i++)
        g_string_append_c(deep, '[');
    for (int i = 0; i < 100000; i++)
        g_string_append_c(deep, ']');
    g_string_append_c(deep, '}');
    g_auto(Run) a = { 0 };
    run_cli(&a, deep->str, "call", "fermi-integral", NULL);
    assert_bad_input(&a, "nested deeper than 64 levels");
    /* an option of 10,000 levels (one argument may not exceed 128 kB) */
    g_autofree char *opt = g_strdup_printf("{\"a\": %.*s%.*s}", 10000, deep->str + 8, 10000,
                                           deep->str + 8 + 100000);
    g_auto(Run) b = { 0 };
    run_cli(&b, NULL, "valley-average", "--valley", opt, "--point-group", "Oh", NULL);
    assert_bad_input(&b, "nested deeper than 64 levels");
    g_autofree char *path = g_build_filename(g_get_tmp_dir(), "bandmass-deep.json", NULL);
    g_assert_true(g_file_set_contents(path, deep->str, -1, NULL));
    g_auto(Run) c = { 0 };
    run_cli(&c, NULL, "mass-tensor", "--grid", path, "--band", "0", NULL);
    assert_bad_input(&c, "nested deeper than 64 levels");
    g_unlink(path);
    g_string_free(deep, TRUE);
}

/* A FIFO or a device given as an input file: refused at once (it would block
 * forever, or never end), naming the file. Regression test. */
static void test_special_inputs(void)
{
    g_autofree char *fifo = g_build_filename(g_get_tmp_dir(), "bandmass-fifo", NULL);
    g_unlink(fifo);
    g_assert_cmpint(mkfifo(fifo, 0600), ==, 0);
    const char *zero = g_file_test("/dev/zero", G_FILE_TEST_EXISTS) ? "/dev/zero" : fifo;
    g_auto(Run) a = { 0 };
    run_cli(&a, NULL, "mass-tensor", "--grid", fifo, "--band", "0", NULL);
    g_assert_cmpint(a.status, ==, 2);
    g_assert_nonnull(strstr(a.err, "not a regular file"));
    g_auto(Run) b = { 0 };
    run_cli(&b, NULL, "mass-tensor", "--table", zero, "--band", "0", NULL);
    g_assert_cmpint(b.status, ==, 2);
    g_assert_nonnull(strstr(b.err, "not a regular file"));
    g_auto(Run) c = { 0 };
    run_cli(&c, NULL, "call", "constants", "--input", fifo, NULL);
    g_assert_cmpint(c.status, ==, 2);
    g_assert_nonnull(strstr(c.err, "not a regular file"));
    g_auto(Run) d = { 0 };
    run_cli(&d, NULL, "carrier-statistics", "--material", zero, "--temperature-k", "300", NULL);
    g_assert_cmpint(d.status, ==, 2);
    g_assert_nonnull(strstr(d.err, "not a regular file"));
    g_unlink(fifo);
}

/* Standard output on a full device (/dev/full): a failed write is an error
 * with a message, never a signal or a silent exit 0. Regression test. */
static void test_stdout_full(void)
{
    if (!g_file_test("/dev/full", G_FILE_TEST_EXISTS)) {
        g_test_skip("no /dev/full");
        return;
    }
    static const char *const cases[][3] = {
        { "ops", NULL, NULL }, { "call", "constants", NULL }, { "constants", NULL, NULL },
        { "constants", "--json", NULL }, { "mass-tensor", "--help", NULL },
    };
    for (gsize i = 0; i < G_N_ELEMENTS(cases); i++) {
        g_autoptr(GError) error = NULL;
        g_autoptr(GSubprocessLauncher) l = g_subprocess_launcher_new(
            G_SUBPROCESS_FLAGS_STDIN_PIPE | G_SUBPROCESS_FLAGS_STDERR_PIPE);
        g_subprocess_launcher_set_stdout_file_path(l, "/dev/full");
        const char *argv[] = { g_getenv("BANDMASS_CLI"), cases[i][0], cases[i][1], NULL };
        g_autoptr(GSubprocess) p = g_subprocess_launcher_spawnv(l, argv, &error);
        g_assert_no_error(error);
        g_autofree char *err = NULL;
        g_subprocess_communicate_utf8(p, "{}", NULL, NULL, &err, &error);
        g_assert_no_error(error);
        g_assert_true(g_subprocess_get_if_exited(p));
        g_assert_cmpint(g_subprocess_get_exit_status(p), !=, 0);
        g_assert_nonnull(strstr(err, "could not write the output"));
        /* said once */
        g_assert_null(strstr(strstr(err, "could not write") + 1, "could not write"));
    }
}

static void test_help_from_tables(void)
{
    g_auto(Run) h = { 0 };
    run_cli(&h, NULL, "carrier-statistics", "--help", NULL);
    g_assert_cmpint(h.status, ==, 0);
    const char *want[] = { "--temperature-k", "[> 0 K]", "[default \"fermi-dirac\"]",
                           "boltzmann", "the non-degenerate limit", "Response",
                           "ni_cm3", "[cm^-3]", "warnings" };
    for (gsize i = 0; i < G_N_ELEMENTS(want); i++)
        if (!strstr(h.out, want[i]))
            g_error("carrier-statistics --help lacks \"%s\":\n%s", want[i], h.out);
    g_auto(Run) bad = { 0 };
    run_cli(&bad, NULL, "mass-tensor", "--grid", "x.json", "--band", "0", "--extremum", "lowest",
            NULL);
    assert_bad_input(&bad, "key \"extremum\" must be one of minimum, maximum, all "
                           "(got \"lowest\")");
    g_auto(Run) md = { 0 };
    run_cli(&md, NULL, "ops", "--markdown", NULL);
    g_assert_cmpint(md.status, ==, 0);
    g_assert_true(g_str_has_prefix(md.out, "# Operations\n"));
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/cli/version-and-ops", test_version_and_ops);
    g_test_add_func("/cli/bad-usage-exits-2", test_bad_usage);
    g_test_add_func("/cli/friendly-equals-call", test_friendly_equals_call);
    g_test_add_func("/cli/output-is-atomic", test_output_is_atomic);
    g_test_add_func("/cli/output-kinds", test_output_kinds);
    g_test_add_func("/cli/output-partial-files", test_output_partial_files);
    g_test_add_func("/cli/carrier-csv", test_carrier_csv);
    g_test_add_func("/cli/carrier-bad-input", test_carrier_bad_input);
    g_test_add_func("/cli/mass-tensor-bad-files", test_mass_tensor_bad_files);
    g_test_add_func("/cli/valley-material", test_valley_material);
    g_test_add_func("/cli/help-from-tables", test_help_from_tables);
    g_test_add_func("/cli/stdout-full", test_stdout_full);
    g_test_add_func("/cli/deep-nesting", test_deep_nesting);
    g_test_add_func("/cli/special-inputs", test_special_inputs);
    g_test_add_func("/cli/table-warnings-once", test_table_warnings_once);
    return g_test_run();
}
