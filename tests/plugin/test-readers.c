/* test-readers.c: the band grid, .npy and k-table readers and band
 * selection: good files of each kind and every bad-input case. */
#include <fcntl.h>
#include <math.h>
#include <string.h>
#include <unistd.h>
#include <glib.h>
#include <glib/gstdio.h>

#include "bm-error-private.h"
#include "npy.h"
#include "band-grid.h"
#include "ktable.h"
#include "band-select.h"
#include "bm-extrema.h"

static char *data_path(const char *name)
{
    return g_build_filename(BM_TEST_DATA_DIR, name, NULL);
}

/* Fixture values written by tests/data/make-npy.py with NumPy. */
static double fixture_value(size_t b, size_t i, size_t j, size_t l)
{
    return 100.0 * (double)b + 10.0 * (double)i + (double)j + 0.25 * (double)l;
}

/* Asserts a BM_ERROR with code and every NULL-terminated substring in the message. */
static void assert_error(GError *error, int code, ...)
{
    g_assert_nonnull(error);
    g_assert_true(error->domain == BM_ERROR);
    if (error->code != code)
        g_error("expected code %d, got %d: %s", code, error->code, error->message);
    va_list ap;
    va_start(ap, code);
    const char *s;
    while ((s = va_arg(ap, const char *)))
        if (!strstr(error->message, s))
            g_error("message lacks \"%s\": %s", s, error->message);
    va_end(ap);
    if (g_test_verbose())
        g_test_message("%s", error->message);
}

/* A temporary directory removed at the end of a test. */
typedef struct {
    char *dir;
} tmpdir;

static void tmp_setup(tmpdir *t, gconstpointer data)
{
    (void)data;
    GError *e = NULL;
    t->dir = g_dir_make_tmp("bm-readers-XXXXXX", &e);
    g_assert_no_error(e);
}

static void tmp_teardown(tmpdir *t, gconstpointer data)
{
    (void)data;
    GDir *d = g_dir_open(t->dir, 0, NULL);
    const char *n;
    while (d && (n = g_dir_read_name(d))) {
        g_autofree char *p = g_build_filename(t->dir, n, NULL);
        g_unlink(p);
    }
    if (d)
        g_dir_close(d);
    g_rmdir(t->dir);
    g_free(t->dir);
}

static char *write_file(tmpdir *t, const char *name, const void *bytes, gssize len)
{
    char *p = g_build_filename(t->dir, name, NULL);
    GError *e = NULL;
    g_file_set_contents(p, bytes, len, &e);
    g_assert_no_error(e);
    return p;
}

/* ------------------------------------------------------------------ npy */

static void check_fixture_array(const BmNpyArray *a)
{
    g_assert_cmpuint(a->ndim, ==, 4);
    g_assert_cmpuint(a->shape[0], ==, 2);
    g_assert_cmpuint(a->shape[1], ==, 4);
    g_assert_cmpuint(a->shape[2], ==, 3);
    g_assert_cmpuint(a->shape[3], ==, 2);
    g_assert_cmpuint(a->count, ==, 48);
    size_t n = 0;
    for (size_t b = 0; b < 2; b++)
        for (size_t i = 0; i < 4; i++)
            for (size_t j = 0; j < 3; j++)
                for (size_t l = 0; l < 2; l++)
                    g_assert_cmpfloat(a->data[n++], ==, fixture_value(b, i, j, l));
}

/* Sizes that come from the mesh are checked, and allocated with a try:
 * an irreducible wedge of one point on a 65536^3 mesh (2^51 bytes of
 * energies, beyond any address space) or a 2^24-cube mesh (whose point
 * count overflows 64 bits) is an error, never an abort in GLib. */
static void test_grid_huge_mesh(void)
{
    static const char *docs[2] = {
        "{\"format\": \"bandmass-grid-1\", \"lattice_vectors_angstrom\": "
        "[[3,0,0],[0,3,0],[0,0,3]], \"mesh\": [65536, 65536, 65536], "
        "\"k_points_fractional\": [[0,0,0]], \"energies_ev\": [[1.0]], "
        "\"positions_fractional\": [[0,0,0]], \"species\": [\"X\"]}",
        "{\"format\": \"bandmass-grid-1\", \"lattice_vectors_angstrom\": "
        "[[3,0,0],[0,3,0],[0,0,3]], \"mesh\": [16777216, 16777216, 16777216], "
        "\"k_points_fractional\": [[0,0,0]], \"energies_ev\": [[1.0]], "
        "\"positions_fractional\": [[0,0,0]], \"species\": [\"X\"]}",
    };
    static const char *want[2] = { "cannot allocate the 65536 x 65536 x 65536 mesh",
                                   "is too large" };
    for (int i = 0; i < 2; i++) {
        GError *e = NULL;
        g_assert_null(bm_band_grid_load_from_data(docs[i], -1, "huge.json", NULL, &e));
        assert_error(e, BM_ERROR_INVALID_INPUT, "huge.json", want[i], NULL);
        g_error_free(e);
    }
}

/* A copy of grid-le.npy in the temporary folder; its path. */
static char *copy_fixture(tmpdir *t, const char *name)
{
    g_autofree char *src = data_path("grid-le.npy");
    g_autofree char *bytes = NULL;
    gsize len = 0;
    g_assert_true(g_file_get_contents(src, &bytes, &len, NULL));
    return write_file(t, name, bytes, (gssize)len);
}

/* A mapped array for one call: a file rewritten in place (same size) or cut
 * shorter is told before an answer is given; the check reads nothing
 * through the mapping, so a shortened file raises no SIGBUS. A file
 * replaced by rename leaves the mapping with the old values. */
static void test_npy_file_changes(tmpdir *t, gconstpointer data)
{
    (void)data;
    GError *e = NULL;
    g_autofree char *p = copy_fixture(t, "live.npy");
    g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
    g_assert_no_error(e);
    g_assert_nonnull(a->map);
    g_assert_true(bm_npy_array_unchanged(a, &e));
    g_usleep(20000);   /* past the file system's time stamp granularity */
    int fd = open(p, O_WRONLY);
    g_assert_cmpint(fd, >=, 0);
    double v = -1.0;
    g_assert_cmpint(pwrite(fd, &v, sizeof v, 128), ==, (ssize_t)sizeof v);
    close(fd);
    g_assert_false(bm_npy_array_unchanged(a, &e));
    assert_error(e, BM_ERROR_IO, "live.npy", "was rewritten while it was being read", NULL);
    g_clear_error(&e);
    g_assert_false(bm_npy_array_detach(a, &e));   /* the copy would be mixed as well */
    assert_error(e, BM_ERROR_IO, "rewritten", NULL);
    g_clear_error(&e);

    g_autofree char *q = copy_fixture(t, "short.npy");
    g_autoptr(BmNpyArray) b = bm_npy_read_f64(q, &e);
    g_assert_no_error(e);
    g_assert_cmpint(truncate(q, 130), ==, 0);
    g_assert_false(bm_npy_array_unchanged(b, &e));
    assert_error(e, BM_ERROR_IO, "short.npy", "cut shorter", NULL);
    g_clear_error(&e);
    g_assert_false(bm_npy_array_detach(b, &e));   /* read(), not the mapping: no SIGBUS */
    assert_error(e, BM_ERROR_IO, "cut shorter", NULL);
    g_clear_error(&e);

    g_autofree char *r = copy_fixture(t, "renamed.npy");
    g_autoptr(BmNpyArray) c = bm_npy_read_f64(r, &e);
    g_assert_no_error(e);
    g_autofree char *other = write_file(t, "other.npy", "\x93NUMPY", 6);
    g_assert_cmpint(g_rename(other, r), ==, 0);
    g_assert_true(bm_npy_array_unchanged(c, &e));
    check_fixture_array(c);
}

/* A detached array owns its values: the file rewritten or emptied later
 * changes nothing, and reading every value raises no SIGBUS. */
static void test_npy_detached(tmpdir *t, gconstpointer data)
{
    (void)data;
    GError *e = NULL;
    g_autofree char *p = copy_fixture(t, "kept.npy");
    g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
    g_assert_no_error(e);
    g_assert_true(bm_npy_array_detach(a, &e));
    g_assert_no_error(e);
    g_assert_null(a->map);
    int fd = open(p, O_WRONLY);
    double v[48];
    for (int i = 0; i < 48; i++)
        v[i] = -7.0;
    g_assert_cmpint(pwrite(fd, v, sizeof v, 128), ==, (ssize_t)sizeof v);
    close(fd);
    g_assert_cmpint(truncate(p, 0), ==, 0);
    g_assert_true(bm_npy_array_unchanged(a, &e));
    check_fixture_array(a);
}

static void test_npy_good(void)
{
    const char *files[] = { "grid-le.npy", "grid-be.npy", "grid-v2.npy", "grid-v3.npy" };
    for (size_t f = 0; f < G_N_ELEMENTS(files); f++) {
        g_autofree char *p = data_path(files[f]);
        GError *e = NULL;
        g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
        g_assert_no_error(e);
        check_fixture_array(a);
    }
}

/* Builds a version 1.0 file from a header dict and a body. */
static GByteArray *npy_bytes(const char *dict, const void *body, size_t body_len)
{
    GByteArray *b = g_byte_array_new();
    g_byte_array_append(b, (const guint8 *)"\x93NUMPY\x01\x00", 8);
    size_t hl = strlen(dict) + 1;
    guint8 len[2] = { (guint8)(hl & 0xff), (guint8)(hl >> 8) };
    g_byte_array_append(b, len, 2);
    g_byte_array_append(b, (const guint8 *)dict, (guint)strlen(dict));
    g_byte_array_append(b, (const guint8 *)"\n", 1);
    if (body_len)
        g_byte_array_append(b, body, (guint)body_len);
    return b;
}

static void expect_npy_error(tmpdir *t, const char *name, const void *bytes, size_t len,
                             int code, const char *what)
{
    g_autofree char *p = write_file(t, name, bytes, (gssize)len);
    GError *e = NULL;
    g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
    g_assert_null(a);
    assert_error(e, code, name, what, NULL);
    g_error_free(e);
}

static void test_npy_bad(tmpdir *t, gconstpointer data)
{
    (void)data;
    double body[6] = { 1, 2, 3, 4, 5, 6 };
    const char *good = "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }";

    /* a hand-built good file first, so the bad ones differ by one thing */
    {
        g_autoptr(GByteArray) b = npy_bytes(good, body, sizeof body);
        g_autofree char *p = write_file(t, "good.npy", b->data, b->len);
        GError *e = NULL;
        g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
        g_assert_no_error(e);
        g_assert_cmpuint(a->ndim, ==, 2);
        g_assert_cmpfloat(a->data[5], ==, 6.0);
    }
    expect_npy_error(t, "magic.npy", "\x93NUMPX\x01\x00\x10\x00{}", 12,
                     BM_ERROR_INVALID_INPUT, "bad magic");
    expect_npy_error(t, "empty.npy", "", 0, BM_ERROR_INVALID_INPUT, "bad magic");
    expect_npy_error(t, "short.npy", "\x93NUMPY\x01", 7, BM_ERROR_INVALID_INPUT,
                     "truncated inside the preamble");
    expect_npy_error(t, "version.npy", "\x93NUMPY\x04\x00\x10\x00", 10,
                     BM_ERROR_INVALID_INPUT, "unsupported .npy format version 4.0");
    expect_npy_error(t, "headcut.npy", "\x93NUMPY\x01\x00\x40\x00{'descr'", 18,
                     BM_ERROR_INVALID_INPUT, "truncated inside the header");
    struct { const char *name, *dict, *what; } cases[] = {
        { "notdict.npy", "['<f8', False, (2, 3)]", "not a valid dict literal" },
        { "unclosed.npy", "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3)",
          "not a valid dict literal" },
        { "i4.npy", "{'descr': '<i4', 'fortran_order': False, 'shape': (2, 3), }",
          "unsupported dtype \"<i4\"; expected '<f8' or '>f8'" },
        { "f4.npy", "{'descr': '<f4', 'fortran_order': False, 'shape': (2, 3), }",
          "unsupported dtype \"<f4\"" },
        { "struct.npy", "{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (2, 3), }",
          "structured dtype" },
        { "fortran.npy", "{'descr': '<f8', 'fortran_order': True, 'shape': (2, 3), }",
          "fortran_order is True" },
        { "noshape.npy", "{'descr': '<f8', 'fortran_order': False, }", "lacks the key 'shape'" },
        { "badshape.npy", "{'descr': '<f8', 'fortran_order': False, 'shape': (2, x), }",
          "'shape' must be a tuple" },
        { "extra.npy", "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), 'x': 1}",
          "unexpected key \"x\"" },
        { "bool.npy", "{'descr': '<f8', 'fortran_order': Maybe, 'shape': (2, 3), }",
          "'fortran_order' must be True or False" },
        { "huge.npy", "{'descr': '<f8', 'fortran_order': False, "
          "'shape': (99999999999, 99999999999, 99999999999), }", "too large" },
    };
    for (size_t c = 0; c < G_N_ELEMENTS(cases); c++) {
        g_autoptr(GByteArray) b = npy_bytes(cases[c].dict, body, sizeof body);
        expect_npy_error(t, cases[c].name, b->data, b->len, BM_ERROR_INVALID_INPUT,
                         cases[c].what);
    }
    {
        g_autoptr(GByteArray) b = npy_bytes(good, body, sizeof body - 8);
        expect_npy_error(t, "truncated.npy", b->data, b->len, BM_ERROR_INVALID_INPUT,
                         "truncated body: shape (2, 3) needs 48 bytes of float64 data, "
                         "the file holds 40");
    }
    {
        g_autoptr(GByteArray) b = npy_bytes(good, body, sizeof body);
        g_byte_array_append(b, (const guint8 *)"xx", 2);
        expect_npy_error(t, "long.npy", b->data, b->len, BM_ERROR_INVALID_INPUT,
                         "oversized body");
    }
    /* NumPy-written files that are not float64 C order */
    struct { const char *file, *what; } numpy_cases[] = {
        { "grid-fortran.npy", "fortran_order is True" },
        { "grid-f4.npy", "unsupported dtype \"<f4\"" },
    };
    for (size_t c = 0; c < G_N_ELEMENTS(numpy_cases); c++) {
        g_autofree char *p = data_path(numpy_cases[c].file);
        GError *e = NULL;
        g_autoptr(BmNpyArray) a = bm_npy_read_f64(p, &e);
        g_assert_null(a);
        assert_error(e, BM_ERROR_INVALID_INPUT, numpy_cases[c].file, numpy_cases[c].what, NULL);
        g_error_free(e);
    }
    /* a missing file is an I/O error */
    g_autofree char *missing = g_build_filename(t->dir, "absent.npy", NULL);
    GError *e = NULL;
    g_assert_null(bm_npy_read_f64(missing, &e));
    assert_error(e, BM_ERROR_IO, "absent.npy", "cannot open", NULL);
    g_error_free(e);
}

/* ------------------------------------------------------------ band grid */

static void test_grid_inline(void)
{
    g_autofree char *p = data_path("grid-inline.json");
    GError *e = NULL;
    g_autoptr(BmBandGrid) g = bm_band_grid_load(p, &e);
    g_assert_no_error(e);
    g_assert_cmpuint(g->grid.nbands, ==, 2);
    g_assert_cmpuint(g->grid.mesh[0], ==, 2);
    g_assert_cmpuint(g->grid.mesh[1], ==, 3);
    g_assert_cmpuint(g->grid.mesh[2], ==, 1);
    g_assert_cmpfloat(g->grid.recip[1][1], ==, 2.0);
    g_assert_cmpfloat(g->grid.recip[2][2], ==, 0.5);
    g_assert_true(g->grid.energies == g->inline_energies);
    size_t n = 0;
    for (size_t b = 0; b < 2; b++)
        for (size_t i = 0; i < 2; i++)
            for (size_t j = 0; j < 3; j++)
                g_assert_cmpfloat(g->grid.energies[n++], ==, fixture_value(b, i, j, 0));
    g_assert_cmpstr(g->band_names[0], ==, "vb");
    g_assert_cmpstr(g->band_names[1], ==, "cb");
    g_assert_null(g->band_names[2]);
    g_assert_cmpstr(g->source, ==, p);
}

static void test_grid_npy(void)
{
    const char *docs[] = { "grid-npy-le.json", "grid-npy-be.json", "grid-npy-v2.json",
                           "grid-npy-v3.json" };
    for (size_t d = 0; d < G_N_ELEMENTS(docs); d++) {
        g_autofree char *p = data_path(docs[d]);
        GError *e = NULL;
        g_autoptr(BmBandGrid) g = bm_band_grid_load(p, &e);
        g_assert_no_error(e);
        g_assert_cmpuint(g->grid.nbands, ==, 2);
        g_assert_cmpuint(g->grid.mesh[0], ==, 4);
        g_assert_cmpuint(g->grid.mesh[1], ==, 3);
        g_assert_cmpuint(g->grid.mesh[2], ==, 2);
        g_assert_cmpfloat(g->grid.recip[0][0], ==, 1.1);
        g_assert_null(g->band_names);
        size_t n = 0;
        for (size_t b = 0; b < 2; b++)
            for (size_t i = 0; i < 4; i++)
                for (size_t j = 0; j < 3; j++)
                    for (size_t l = 0; l < 2; l++)
                        g_assert_cmpfloat(g->grid.energies[n++], ==, fixture_value(b, i, j, l));
    }
}

static void test_grid_lattice(void)
{
    g_autofree char *p = data_path("grid-lattice.json");
    GError *e = NULL;
    g_autoptr(BmBandGrid) g = bm_band_grid_load(p, &e);
    g_assert_no_error(e);
    const double a[3][3] = { { 0.0, 2.825, 2.825 }, { 2.825, 0.0, 2.825 },
                             { 2.825, 2.825, 0.0 } };
    /* Identity: A B^T = 2 pi I, i.e. a_i . b_j = 2 pi delta_ij (definition of
     * the reciprocal lattice; any solid-state text). */
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double dot = 0.0;
            for (int c = 0; c < 3; c++)
                dot += a[i][c] * g->grid.recip[j][c];
            g_assert_cmpfloat_with_epsilon(dot, i == j ? 2.0 * G_PI : 0.0, 1e-12);
        }
    /* fcc with a1 = a/2 (0,1,1) etc. has the bcc reciprocal b1 = 2 pi/a (-1,1,1)
     * (textbook result, from memory). */
    const double s = 2.0 * G_PI / 5.65;
    g_assert_cmpfloat_with_epsilon(g->grid.recip[0][0], -s, 1e-12);
    g_assert_cmpfloat_with_epsilon(g->grid.recip[0][1], s, 1e-12);
    g_assert_cmpfloat_with_epsilon(g->grid.recip[0][2], s, 1e-12);
    g_assert_cmpstr(g->band_names[1], ==, "light");
}

/* Loads a document held in memory from the data folder, expecting failure. */
static void expect_grid_error(const char *doc, int code, const char *what, const char *what2)
{
    GError *e = NULL;
    g_autoptr(BmBandGrid) g = bm_band_grid_load_from_data(doc, -1, "bad.json",
                                                          BM_TEST_DATA_DIR, &e);
    g_assert_null(g);
    assert_error(e, code, "bad.json: ", what, what2, NULL);
    g_error_free(e);
}

#define HEAD "{\"format\": \"bandmass-grid-1\", "

/* Units named in the keys: hartree and bohr are converted with CODATA values
 * (GSL: a0 = 0.529177 Angstrom, E_h = 27.2114 eV), lattice and reciprocal
 * vectors may come together when a_i . b_j = 2 pi delta_ij, and eV energies
 * of several bands spanning under 1.5 eV draw a unit warning. */
static void test_grid_units(void)
{
    const char *bands = "[[[[0.0]],[[0.1]]],[[[0.2]],[[0.3]]],[[[0.4]],[[0.5]]],[[[0.6]],[[0.7]]]]";
    g_autofree char *ev = g_strdup_printf("{\"format\": \"bandmass-grid-1\", "
        "\"lattice_vectors_bohr\": [[1,0,0],[0,1,0],[0,0,2]], "
        "\"reciprocal_vectors_inv_angstrom\": [[%.17g,0,0],[0,%.17g,0],[0,0,%.17g]], "
        "\"mesh\": [2, 1, 1], \"energies_hartree\": %s}",
        2 * G_PI / 0.529177210903, 2 * G_PI / 0.529177210903, G_PI / 0.529177210903, bands);
    g_autoptr(GError) error = NULL;
    g_autoptr(BmBandGrid) g = bm_band_grid_load_from_data(ev, -1, "units.json", NULL, &error);
    g_assert_no_error(error);
    /* 0.1 hartree = 2.72114 eV (CODATA 2018 via GSL; the sixth digit depends on the set) */
    g_assert_cmpfloat_with_epsilon(g->grid.energies[1], 2.7211386, 1e-5);
    g_assert_cmpuint(g->warnings.count, ==, 0);
    g_autofree char *same = g_strdup_printf("{\"format\": \"bandmass-grid-1\", "
        "\"lattice_vectors_angstrom\": [[1,0,0],[0,1,0],[0,0,1]], \"mesh\": [2, 1, 1], "
        "\"energies_ev\": %s}", bands);
    g_autoptr(BmBandGrid) h = bm_band_grid_load_from_data(same, -1, "ev.json", NULL, &error);
    g_assert_no_error(error);
    g_assert_cmpuint(h->warnings.count, ==, 1);
    g_assert_cmpint(h->warnings.items[0].code, ==, BM_WARN_UNIT_SUSPECT);
    g_assert_nonnull(strstr(h->warnings.items[0].text, "energies_hartree"));
}
#define RECIP "\"reciprocal_vectors_inv_angstrom\": [[1,0,0],[0,1,0],[0,0,1]], "
#define MESH "\"mesh\": [4, 3, 2], "

static void test_grid_bad(void)
{
    expect_grid_error("", BM_ERROR_INVALID_INPUT, "empty", NULL);
    expect_grid_error("{\"format\": ", BM_ERROR_INVALID_INPUT, "not valid JSON", NULL);
    expect_grid_error("[1, 2]", BM_ERROR_INVALID_INPUT, "expected a JSON object", "an array");
    expect_grid_error("{\"mesh\": [1,1,1]}", BM_ERROR_INVALID_INPUT,
                      "missing key 'format'", "bandmass-grid-1");
    expect_grid_error("{\"format\": \"bandmass-grid-2\"}", BM_ERROR_INVALID_INPUT,
                      "unknown 'format' \"bandmass-grid-2\"", "expected \"bandmass-grid-1\"");
    expect_grid_error("{\"format\": 1}", BM_ERROR_INVALID_INPUT, "'format'", "found a number");
    expect_grid_error(HEAD MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "missing key 'reciprocal_vectors_inv_angstrom'",
                      "'lattice_vectors_angstrom'");
    expect_grid_error(HEAD RECIP "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "missing key 'mesh'", NULL);
    expect_grid_error(HEAD RECIP MESH "\"band_names\": []}", BM_ERROR_INVALID_INPUT,
                      "missing key 'energies_ev'", NULL);
    expect_grid_error(HEAD RECIP MESH "\"energies\": [], \"energies_ev\": \"grid-le.npy\"}",
                      BM_ERROR_INVALID_INPUT, "unknown key 'energies'", NULL);
    /* both sets: a_i . b_j = delta_ij is the missing 2 pi, named as such */
    expect_grid_error(HEAD RECIP "\"lattice_vectors_angstrom\": [[1,0,0],[0,1,0],[0,0,1]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "lack the factor 2 pi", NULL);
    expect_grid_error(HEAD RECIP "\"lattice_vectors_angstrom\": [[2,0,0],[0,1,0],[0,0,1]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "do not belong together", NULL);
    expect_grid_error(HEAD RECIP "\"reciprocal_vectors_inv_bohr\": [[1,0,0],[0,1,0],[0,0,1]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "not both", NULL);
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-le.npy\", "
                      "\"energies_hartree\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "not both", NULL);

    /* reciprocal and lattice vectors */
    expect_grid_error(HEAD "\"reciprocal_vectors_inv_angstrom\": [[1,0,0],[0,1,0]], " MESH
                      "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "'reciprocal_vectors_inv_angstrom': expected 3 rows, found 2", NULL);
    expect_grid_error(HEAD "\"reciprocal_vectors_inv_angstrom\": [[1,0,0],[0,1,\"x\"],[0,0,1]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "'reciprocal_vectors_inv_angstrom'[1][2]: expected a number",
                      "found a string");
    expect_grid_error(HEAD "\"reciprocal_vectors_inv_angstrom\": [[1,0,0],[0,1,0],[1,1,0]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "'reciprocal_vectors_inv_angstrom' is singular", "linearly independent");
    expect_grid_error(HEAD "\"lattice_vectors_angstrom\": [[1,2,3],[2,4,6],[0,0,1]], "
                      MESH "\"energies_ev\": \"grid-le.npy\"}", BM_ERROR_INVALID_INPUT,
                      "'lattice_vectors_angstrom' is singular", "determinant");

    /* mesh */
    expect_grid_error(HEAD RECIP "\"mesh\": [4, 3], \"energies_ev\": \"grid-le.npy\"}",
                      BM_ERROR_INVALID_INPUT, "'mesh': expected an array of 3 positive integers",
                      NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [4, 0, 2], \"energies_ev\": \"grid-le.npy\"}",
                      BM_ERROR_INVALID_INPUT, "'mesh'[1]: expected a positive integer",
                      "found 0");
    expect_grid_error(HEAD RECIP "\"mesh\": [4, 3.5, 2], \"energies_ev\": \"grid-le.npy\"}",
                      BM_ERROR_INVALID_INPUT, "'mesh'[1]: expected a positive integer",
                      "found a number");

    /* inline energies: ragged, depth, non-numbers, non-finite */
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3]]]]}", BM_ERROR_INVALID_INPUT,
                      "'energies_ev'[0][1]: expected 2 entries (n2 = 2), found 1", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[1,2],[3,4]]]}", BM_ERROR_INVALID_INPUT,
                      "'energies_ev'[0][0][0]: expected an array of 1 entries, found a number",
                      "4 levels");
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[[4]]]]]}", BM_ERROR_INVALID_INPUT,
                      "'energies_ev'[0][1][1][0]: expected a number (eV), found an array", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[\"4\"]]]]}", BM_ERROR_INVALID_INPUT,
                      "'energies_ev'[0][1][1][0]: expected a number (eV), found a string", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[null]]]]}", BM_ERROR_INVALID_INPUT,
                      "found null", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[1e999]]]]}", BM_ERROR_INVALID_INPUT,
                      "at \"energies_ev\"[0][1][1][0]: the number \"1e999\" is beyond the range "
                      "of double-precision numbers", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[NaN]]]]}", BM_ERROR_INVALID_INPUT,
                      "not valid JSON", "JSON has no NaN or Infinity");
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": "
                      "[[[[1],[2]],[[3],[-Infinity]]]]}", BM_ERROR_INVALID_INPUT,
                      "not valid JSON", "JSON has no NaN or Infinity");
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": []}",
                      BM_ERROR_INVALID_INPUT, "'energies_ev' is empty", NULL);
    expect_grid_error(HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": true}",
                      BM_ERROR_INVALID_INPUT, "'energies_ev': expected a nested array",
                      "found a boolean");

    /* .npy energies */
    expect_grid_error(HEAD RECIP "\"mesh\": [4, 3, 3], \"energies_ev\": \"grid-le.npy\"}",
                      BM_ERROR_INVALID_INPUT, "'mesh' [4, 3, 3] disagrees with the shape "
                      "(2, 4, 3, 2)", "expected (nbands, 4, 3, 3)");
    expect_grid_error(HEAD RECIP "\"mesh\": [4, 3, 2], \"energies_ev\": \"grid-rank3.npy\"}",
                      BM_ERROR_INVALID_INPUT, "disagrees with the shape (4, 3, 2)",
                      "grid-rank3.npy");
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-fortran.npy\"}",
                      BM_ERROR_INVALID_INPUT, "grid-fortran.npy", "fortran_order is True");
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"no-such-file.npy\"}",
                      BM_ERROR_IO, "no-such-file.npy", "cannot open");
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"\"}",
                      BM_ERROR_INVALID_INPUT, "empty file name", NULL);

    /* band names */
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-le.npy\", "
                      "\"band_names\": [\"vb\"]}", BM_ERROR_INVALID_INPUT,
                      "'band_names' has 1 names but the energies have 2 bands", NULL);
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-le.npy\", "
                      "\"band_names\": [\"vb\", 3]}", BM_ERROR_INVALID_INPUT,
                      "'band_names'[1]: expected a string", NULL);
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-le.npy\", "
                      "\"band_names\": [\"vb\", \"vb\"]}", BM_ERROR_INVALID_INPUT,
                      "'band_names'[1] repeats the name 'vb'", NULL);
    expect_grid_error(HEAD RECIP MESH "\"energies_ev\": \"grid-le.npy\", "
                      "\"band_names\": \"vb\"}", BM_ERROR_INVALID_INPUT,
                      "'band_names': expected an array of strings", NULL);
}

static void test_grid_bad_files(tmpdir *t, gconstpointer data)
{
    (void)data;
    /* non-finite values inside a .npy file */
    double body[4] = { 1.0, 2.0, NAN, 4.0 };
    g_autoptr(GByteArray) b = npy_bytes("{'descr': '<f8', 'fortran_order': False, "
                                        "'shape': (1, 2, 2, 1), }", body, sizeof body);
    g_autofree char *np = write_file(t, "nan.npy", b->data, b->len);
    g_assert_nonnull(np);
    const char *doc = HEAD RECIP "\"mesh\": [2, 2, 1], \"energies_ev\": \"nan.npy\"}";
    g_autofree char *dp = write_file(t, "nan.json", doc, -1);
    GError *e = NULL;
    /* the reader takes the values as they are; the core's validation names
     * the band and mesh index of the bad value */
    g_autoptr(BmBandGrid) g = bm_band_grid_load(dp, &e);
    g_assert_no_error(e);
    bm_errbuf err = { BM_OK, "" };
    g_assert_cmpint(bm_grid_validate(&g->grid, &err), ==, BM_EINVAL);
    bm_error_from_core(&e, &err, g->source);
    assert_error(e, BM_ERROR_INVALID_INPUT, "nan.json", "band 0", "(1, 0, 0)", "not finite",
                 NULL);
    g_clear_error(&e);

    /* unreadable document */
    g_autofree char *absent = g_build_filename(t->dir, "absent.json", NULL);
    g_assert_null(bm_band_grid_load(absent, &e));
    assert_error(e, BM_ERROR_IO, "absent.json", NULL);
    g_clear_error(&e);
}

/* -------------------------------------------------------------- k-table */

static void test_ktable_csv(void)
{
    g_autofree char *p = data_path("table.csv");
    GError *e = NULL;
    g_autoptr(BmKTable) t = bm_ktable_load(p, &e);
    g_assert_no_error(e);
    g_assert_cmpuint(t->table.npoints, ==, 3);
    g_assert_cmpuint(t->table.nbands, ==, 2);
    g_assert_cmpstr(t->band_names[0], ==, "vb");
    g_assert_cmpstr(t->band_names[1], ==, "cb");
    g_assert_cmpstr(t->band_headers[1], ==, "cb_eV");
    g_assert_cmpfloat(t->table.k[3], ==, 0.1);
    g_assert_cmpfloat(t->table.k[8], ==, -0.1);
    /* energies [band][point] */
    g_assert_cmpfloat(t->table.energies[0], ==, -0.5);
    g_assert_cmpfloat(t->table.energies[2], ==, -0.51);
    g_assert_cmpfloat(t->table.energies[3], ==, 1.5);
    g_assert_cmpfloat(t->table.energies[5], ==, 1.52);
}

static void test_ktable_tsv(void)
{
    g_autofree char *p = data_path("table.tsv");
    GError *e = NULL;
    g_autoptr(BmKTable) t = bm_ktable_load(p, &e);
    g_assert_no_error(e);
    g_assert_cmpuint(t->table.npoints, ==, 3);
    g_assert_cmpuint(t->table.nbands, ==, 1);
    g_assert_cmpstr(t->band_names[0], ==, "cb");
    /* columns were cb, kz, ky, kx: k must come back as (kx, ky, kz) */
    g_assert_cmpfloat(t->table.k[3], ==, 0.1);
    g_assert_cmpfloat(t->table.k[4], ==, 0.0);
    g_assert_cmpfloat(t->table.k[6], ==, 0.0);
    g_assert_cmpfloat(t->table.k[7], ==, 0.1);
    g_assert_cmpfloat(t->table.k[8], ==, -0.1);
    g_assert_cmpfloat(t->table.energies[1], ==, 1.53);
}

#define KHEAD "kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom"

/* A spreadsheet's byte-order mark is skipped; CRLF line ends are read; a
 * k-point repeated with the same energies is read once (the bands stay in
 * step). */
static void test_ktable_forgiven(void)
{
    static const char text[] = "\xEF\xBB\xBF" KHEAD ",vb_ev,cb_ev\r\n"
                               "0,0,0,-1,1\r\n0.1,0,0,-1.1,1.2\r\n-0.0,0,0,-1,1\r\n"
                               "0,0.1,0,-1.3,1.4\r\n";
    GError *e = NULL;
    g_autoptr(BmKTable) t = bm_ktable_load_from_data(text, sizeof text - 1, "ok.csv", &e);
    g_assert_no_error(e);
    g_assert_cmpuint(t->table.npoints, ==, 3);
    g_assert_cmpstr(t->band_names[0], ==, "vb");
    g_assert_cmpfloat(t->table.k[7], ==, 0.1);
    static const double want[6] = { -1, -1.1, -1.3, 1, 1.2, 1.4 };
    for (int i = 0; i < 6; i++)
        g_assert_cmpfloat(t->table.energies[i], ==, want[i]);
}

/* 100,000 columns: the header is read in linear time (it was quadratic, 43 s);
 * a generous bound on a shared machine. */
static void test_ktable_wide(void)
{
    GString *s = g_string_new(KHEAD ",cb_ev");
    for (int c = 0; c < 100000; c++)
        g_string_append_printf(s, ",x%d", c);
    g_string_append_c(s, '\n');
    for (int r = 0; r < 5; r++) {
        g_string_append_printf(s, "0.%d,0,0,%d", r, r);
        for (int c = 0; c < 100000; c++)
            g_string_append(s, ",7");
        g_string_append_c(s, '\n');
    }
    gint64 t0 = g_get_monotonic_time();
    GError *e = NULL;
    BmKTable *t = bm_ktable_load_from_data(s->str, s->len, "wide.csv", &e);
    double seconds = (double)(g_get_monotonic_time() - t0) * 1e-6;
    g_assert_no_error(e);
    g_assert_cmpuint(t->table.npoints, ==, 5);
    g_assert_cmpfloat(t->table.energies[4], ==, 4.0);
    g_test_message("100,000 columns x 5 rows read in %.3f s", seconds);
    g_assert_cmpfloat(seconds, <, 5.0);
    bm_ktable_free(t);
    g_string_free(s, TRUE);
}

static void expect_table_error(const char *text, const char *what, const char *what2)
{
    GError *e = NULL;
    g_autoptr(BmKTable) t = bm_ktable_load_from_data(text, strlen(text), "bad.csv", &e);
    g_assert_null(t);
    assert_error(e, BM_ERROR_INVALID_INPUT, "bad.csv: ", what, what2, NULL);
    g_error_free(e);
}


static void test_ktable_bad(void)
{
    expect_table_error("", "missing header row", NULL);
    expect_table_error("# only a comment\n\n", "missing header row", NULL);
    expect_table_error("kx_inv_angstrom,ky_inv_angstrom,cb_ev\n0,0,1\n",
                       "line 1: the header lacks the column 'kz_inv_angstrom'",
                       "found 'kx_inv_angstrom', 'ky_inv_angstrom', 'cb_ev'");
    expect_table_error("0.0,0.0,0.0,1.5\n", "missing header row: line 1 holds numbers", NULL);
    expect_table_error(KHEAD ",label\n0,0,0,a\n", "line 1: no band columns",
                       "ending in _ev");
    expect_table_error(KHEAD ",cb_ev,cb_ev\n", "column 5 repeats the header 'cb_ev'", NULL);
    expect_table_error("# header only\n" KHEAD ",cb_ev\n\n", "the table is empty",
                       "line 2");
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1\n0,0,0.1\n",
                       "line 3: expected 4 comma-separated columns (as in the header on line 1), "
                       "found 3", NULL);
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1,2\n",
                       "line 2: expected 4 comma-separated columns", "found 5");
    expect_table_error("kx_inv_angstrom\tky_inv_angstrom\tkz_inv_angstrom\tcb_ev\n"
                       "0\t0\t0\t1\n0,0,0,1\n",
                       "line 3: expected 4 tab-separated columns", "found 1");
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1\n0,abc,0,1\n",
                       "line 3, column 2 ('ky_inv_angstrom'): 'abc' is not a number", NULL);
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1.5eV\n",
                       "line 2, column 4 ('cb_ev'): '1.5eV' is not a number", NULL);
    expect_table_error(KHEAD ",cb_ev\n0,0,0,\n",
                       "line 2, column 4 ('cb_ev'): '' is not a number", NULL);
    expect_table_error(KHEAD ",cb_ev\n0,0,0,nan\n",
                       "line 2, column 4 ('cb_ev'): 'nan' is not a finite number", NULL);
    expect_table_error(KHEAD ",cb_ev\n0,-inf,0,1\n",
                       "line 2, column 2 ('ky_inv_angstrom'): '-inf' is not a finite number",
                       NULL);
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1e999\n", "'1e999' is not a finite number", NULL);
    /* line ends: a CR alone is named, never read as one long line */
    expect_table_error(KHEAD ",cb_ev\r0,0,0,1\r0.1,0,0,2\r",
                       "line 1 ends in a carriage return without a line feed", "LF or CRLF");
    expect_table_error(KHEAD ",cb_ev\r\n0,0,0,1\r\n0.1,0,0,2\r0.2,0,0,3\n",
                       "line 3 ends in a carriage return", NULL);
    /* band names: each band its own, never empty */
    expect_table_error(KHEAD ",_ev\n0,0,0,1\n", "column 4 is headed '_ev', a band column "
                       "without a name", NULL);
    expect_table_error(KHEAD ",cb_ev,cb_EV\n0,0,0,1,2\n", "the band of column 5 ('cb_EV') would "
                       "be named 'cb', as the band of column 4 is", NULL);
    expect_table_error(KHEAD ",cb_ev,cb_ev_ev\n0,0,0,1,2\n", "the band of column 5 "
                       "('cb_ev_ev') would be named 'cb_ev'", NULL);
    /* one k-point, two energies */
    expect_table_error(KHEAD ",cb_ev\n0,0,0,1\n0.1,0,0,2\n0,-0,0.0,1.5\n",
                       "lines 2 and 4 give the same k-point (0, 0, 0) with different energies",
                       "band 'cb': 1 and 1.5 eV");
    /* user text in messages is cut short */
    g_autoptr(GString) huge = g_string_new(KHEAD ",cb_ev\n0,0,0,");
    for (int i = 0; i < 100000; i++)
        g_string_append_c(huge, 'x');
    g_string_append_c(huge, '\n');
    GError *he = NULL;
    g_assert_null(bm_ktable_load_from_data(huge->str, huge->len, "bad.csv", &he));
    assert_error(he, BM_ERROR_INVALID_INPUT, "line 2, column 4", "(100000 bytes in all)", NULL);
    g_assert_cmpuint(strlen(he->message), <, 300);
    g_error_free(he);
    static const char nul[] = KHEAD ",cb_ev\n0,0,0\0,1\n";
    GError *e = NULL;
    g_assert_null(bm_ktable_load_from_data(nul, sizeof nul - 1, "bad.csv", &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "bad.csv: ", "NUL byte", NULL);
    g_error_free(e);
}

/* ------------------------------------------------------- band selection */

static void test_band_select(void)
{
    const char *names[] = { "vb", "cb", NULL };
    const char *headers[] = { "vb_ev", "cb_ev", NULL };
    size_t b = 99;
    GError *e = NULL;

    g_assert_true(bm_band_select("cb", names, headers, 2, "t.csv", &b, &e));
    g_assert_cmpuint(b, ==, 1);
    g_assert_true(bm_band_select("vb_ev", names, headers, 2, "t.csv", &b, &e));
    g_assert_cmpuint(b, ==, 0);
    g_assert_true(bm_band_select("1", names, headers, 2, "t.csv", &b, &e));
    g_assert_cmpuint(b, ==, 1);
    g_assert_no_error(e);

    g_assert_false(bm_band_select("2", names, headers, 2, "t.csv", &b, &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "t.csv", "band index 2 is out of range",
                 "2 bands, indices 0..1", "'vb', 'cb'", NULL);
    g_clear_error(&e);
    g_assert_false(bm_band_select("so", names, headers, 2, "t.csv", &b, &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "no band named 'so'", "'vb', 'cb'", NULL);
    g_clear_error(&e);
    g_assert_false(bm_band_select("99999999999999999999999", NULL, NULL, 3, "g.json", &b, &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "band index 99999999999999999999999 is out of range",
                 "3 bands, indices 0..2, no names",
                 NULL);
    g_clear_error(&e);

    g_autoptr(JsonNode) idx = json_node_init_int(json_node_alloc(), 0);
    g_assert_true(bm_band_select_node(idx, names, NULL, 2, "t.csv", &b, &e));
    g_assert_cmpuint(b, ==, 0);
    g_autoptr(JsonNode) neg = json_node_init_int(json_node_alloc(), -1);
    g_assert_false(bm_band_select_node(neg, names, NULL, 2, "t.csv", &b, &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "band index -1 is negative", NULL);
    g_clear_error(&e);
    g_autoptr(JsonNode) name = json_node_init_string(json_node_alloc(), "cb");
    g_assert_true(bm_band_select_node(name, names, NULL, 2, "t.csv", &b, &e));
    g_assert_cmpuint(b, ==, 1);
    g_autoptr(JsonNode) dbl = json_node_init_double(json_node_alloc(), 1.5);
    g_assert_false(bm_band_select_node(dbl, names, NULL, 2, "t.csv", &b, &e));
    assert_error(e, BM_ERROR_INVALID_INPUT, "'band' must be a 0-based integer index or a band name",
                 NULL);
    g_clear_error(&e);
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/readers/npy/good", test_npy_good);
    g_test_add("/readers/npy/bad", tmpdir, NULL, tmp_setup, test_npy_bad, tmp_teardown);
    g_test_add("/readers/npy/file-changes", tmpdir, NULL, tmp_setup, test_npy_file_changes,
               tmp_teardown);
    g_test_add_func("/readers/grid/huge-mesh", test_grid_huge_mesh);
    g_test_add("/readers/npy/detached", tmpdir, NULL, tmp_setup, test_npy_detached,
               tmp_teardown);
    g_test_add_func("/readers/grid/inline", test_grid_inline);
    g_test_add_func("/readers/grid/npy", test_grid_npy);
    g_test_add_func("/readers/grid/lattice-vectors", test_grid_lattice);
    g_test_add_func("/readers/grid/bad", test_grid_bad);
    g_test_add_func("/readers/grid/units", test_grid_units);
    g_test_add("/readers/grid/bad-files", tmpdir, NULL, tmp_setup, test_grid_bad_files,
               tmp_teardown);
    g_test_add_func("/readers/ktable/csv", test_ktable_csv);
    g_test_add_func("/readers/ktable/tsv", test_ktable_tsv);
    g_test_add_func("/readers/ktable/bad", test_ktable_bad);
    g_test_add_func("/readers/ktable/forgiven", test_ktable_forgiven);
    g_test_add_func("/readers/ktable/wide", test_ktable_wide);
    g_test_add_func("/readers/band-select", test_band_select);
    return g_test_run();
}
