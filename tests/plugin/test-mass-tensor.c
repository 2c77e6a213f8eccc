/* test-mass-tensor.c: the mass-tensor operation through the registry, on
 * band grids and k-tables written to a temporary folder, and its bad input. */
#include <math.h>
#include <string.h>
#include <glib.h>
#include <glib/gstdio.h>

#include "registry.h"
#include "render.h"
#include "bm-units.h"

static char *tmp_dir;

static char *tmp_path(const char *name)
{
    return g_build_filename(tmp_dir, name, NULL);
}

static void write_text(const char *name, const char *text)
{
    g_autofree char *p = tmp_path(name);
    GError *e = NULL;
    g_file_set_contents(p, text, -1, &e);
    g_assert_no_error(e);
}

/* A version 1.0 .npy file of little-endian float64 in C order. */
static void write_npy(const char *name, const double *v, const size_t shape[4])
{
    g_autofree char *dict = g_strdup_printf(
        "{'descr': '<f8', 'fortran_order': False, 'shape': (%zu, %zu, %zu, %zu), }",
        shape[0], shape[1], shape[2], shape[3]);
    size_t hl = strlen(dict) + 1;
    hl += (64 - (10 + hl) % 64) % 64;
    GString *s = g_string_new_len("\x93NUMPY\x01\x00", 8);
    g_string_append_c(s, (char)(hl & 0xff));
    g_string_append_c(s, (char)(hl >> 8));
    g_string_append(s, dict);
    while (s->len < 10 + hl - 1)
        g_string_append_c(s, ' ');
    g_string_append_c(s, '\n');
    size_t n = shape[0] * shape[1] * shape[2] * shape[3];
    g_assert_true(G_BYTE_ORDER == G_LITTLE_ENDIAN);
    g_string_append_len(s, (const char *)v, (gssize)(n * sizeof(double)));
    g_autofree char *p = tmp_path(name);
    GError *e = NULL;
    g_file_set_contents(p, s->str, (gssize)s->len, &e);
    g_assert_no_error(e);
    g_string_free(s, TRUE);
}

/* Tight-binding bands on a simple cubic lattice of spacing a:
 *   E(f) = E0 + s sum_d c_d (1 - cos 2 pi f_d),  k_d = 2 pi f_d / a.
 * Near f = 0, 1 - cos x = x^2/2 + O(x^4) (Taylor series), so the Hessian is
 * d2E/dk_d^2 = s c_d a^2 and the principal masses are
 * m_d / m_e = s hbar^2 / (m_e c_d a^2) exactly at the extremum. */
#define LAT_A 5.0
static const double cb_c[3] = { 1.0, 0.5, 0.25 };
static const double vb_c = 0.8;

static void write_cubic_grid(const size_t n[3], const double c3[3], const char *doc,
                             const char *npy)
{
    size_t shape[4] = { 2, n[0], n[1], n[2] };
    size_t count = 2 * n[0] * n[1] * n[2];
    g_autofree double *e = g_new(double, count);
    size_t q = 0;
    for (int b = 0; b < 2; b++)
        for (size_t i = 0; i < n[0]; i++)
            for (size_t j = 0; j < n[1]; j++)
                for (size_t l = 0; l < n[2]; l++) {
                    double x[3] = { 2 * G_PI * (double)i / (double)n[0],
                                    2 * G_PI * (double)j / (double)n[1],
                                    2 * G_PI * (double)l / (double)n[2] };
                    double v = 0.0;
                    for (int d = 0; d < 3; d++)
                        v += (b ? c3[d] : vb_c) * (1.0 - cos(x[d]));
                    e[q++] = b ? 1.5 + v : -v;
                }
    write_npy(npy, e, shape);
    g_autofree char *text = g_strdup_printf(
        "{\"format\": \"bandmass-grid-1\", \"lattice_vectors_angstrom\": "
        "[[%g, 0, 0], [0, %g, 0], [0, 0, %g]], \"mesh\": [%zu, %zu, %zu], "
        "\"energies_ev\": \"%s\", \"band_names\": [\"vb\", \"cb\"]}",
        LAT_A, LAT_A, LAT_A, n[0], n[1], n[2], npy);
    write_text(doc, text);
}

static JsonObject *call(const char *request_fmt, ...) G_GNUC_PRINTF(1, 2);

static JsonObject *call(const char *request_fmt, ...)
{
    va_list ap;
    va_start(ap, request_fmt);
    g_autofree char *req = g_strdup_vprintf(request_fmt, ap);
    va_end(ap);
    GError *e = NULL;
    g_autofree char *out = bm_registry_call_json("mass-tensor", req, NULL, FALSE, &e);
    g_assert_no_error(e);
    JsonNode *n = json_from_string(out, &e);
    g_assert_no_error(e);
    JsonObject *o = json_object_ref(json_node_get_object(n));
    json_node_unref(n);
    return o;
}

static void expect_error(const char *request, int code, const char *what, const char *what2)
{
    GError *e = NULL;
    g_autofree char *out = bm_registry_call_json("mass-tensor", request, NULL, FALSE, &e);
    g_assert_null(out);
    g_assert_nonnull(e);
    g_assert_true(e->domain == BM_ERROR);
    if (e->code != code)
        g_error("expected code %d, got %d: %s", code, e->code, e->message);
    if (!strstr(e->message, what) || (what2 && !strstr(e->message, what2)))
        g_error("message lacks \"%s\"/\"%s\": %s", what, what2 ? what2 : "", e->message);
    g_error_free(e);
}

/* expect_error for {"SOURCE": "path", KEYS} (SOURCE is "grid" or "table"). */
static void expect_file_error(const char *source, const char *path, const char *keys,
                              const char *what, const char *what2)
{
    g_autofree char *req = g_strdup_printf("{\"%s\": \"%s\", %s}", source, path, keys);
    expect_error(req, BM_ERROR_INVALID_INPUT, what, what2);
}

static double mass_at(JsonObject *ext, guint m)
{
    JsonArray *a = json_object_get_array_member(ext, "principal_masses_me");
    return json_array_get_double_element(a, m);
}

static void test_grid_roundtrip(void)
{
    g_autofree char *doc = tmp_path("cubic.json");
    g_autoptr(JsonObject) r = call("{\"grid\": \"%s\", \"band\": \"cb\", "
                                   "\"extremum\": \"minimum\"}", doc);
    JsonObject *b = json_object_get_object_member(r, "band");
    g_assert_cmpint(json_object_get_int_member(b, "index"), ==, 1);
    g_assert_cmpstr(json_object_get_string_member(b, "name"), ==, "cb");
    g_assert_cmpstr(json_object_get_string_member(r, "source"), ==, doc);
    JsonArray *ex = json_object_get_array_member(r, "extrema");
    g_assert_cmpuint(json_array_get_length(ex), ==, 1);
    JsonObject *m = json_array_get_object_element(ex, 0);
    g_assert_cmpstr(json_object_get_string_member(m, "kind"), ==, "minimum");
    g_assert_cmpfloat_with_epsilon(json_object_get_double_member(m, "energy_ev"), 1.5, 1e-9);
    /* masses ordered by increasing |m|: c = 1, 0.5, 0.25 (see write_cubic_grid) */
    for (guint d = 0; d < 3; d++) {
        double expect = BM_HBAR2_OVER_ME_EV_A2 / (cb_c[d] * LAT_A * LAT_A);
        g_assert_cmpfloat_with_epsilon(mass_at(m, d), expect, 1e-5 * expect);
    }
    /* the lightest mass lies along x: |axis 1 . x| = 1 */
    JsonArray *axes = json_object_get_array_member(m, "principal_axes");
    g_assert_cmpfloat_with_epsilon(
        fabs(json_array_get_double_element(json_array_get_array_element(axes, 0), 0)), 1.0, 1e-9);
    g_assert_true(JSON_NODE_HOLDS_ARRAY(json_object_get_member(m, "k_fractional")));

    /* "all" on the valence band: the maximum at Gamma and the minimum at R,
     * both with m = -hbar^2/(m_e c a^2) and +hbar^2/(m_e c a^2) */
    g_autoptr(JsonObject) all = call("{\"grid\": \"%s\", \"band\": 0}", doc);
    JsonArray *ea = json_object_get_array_member(all, "extrema");
    gboolean seen_max = FALSE;
    double mv = BM_HBAR2_OVER_ME_EV_A2 / (vb_c * LAT_A * LAT_A);
    for (guint i = 0; i < json_array_get_length(ea); i++) {
        JsonObject *x = json_array_get_object_element(ea, i);
        if (strcmp(json_object_get_string_member(x, "kind"), "maximum") == 0) {
            seen_max = TRUE;
            g_assert_cmpfloat_with_epsilon(json_object_get_double_member(x, "energy_ev"),
                                           0.0, 1e-9);
            for (guint d = 0; d < 3; d++)
                g_assert_cmpfloat_with_epsilon(mass_at(x, d), -mv, 1e-5 * mv);
        }
    }
    g_assert_true(seen_max);

    /* evaluation at a given point: Gamma of the conduction band */
    g_autoptr(JsonObject) at = call("{\"grid\": \"%s\", \"band\": 1, "
                                    "\"k_inv_angstrom\": [0, 0, 0]}", doc);
    JsonObject *x = json_array_get_object_element(json_object_get_array_member(at, "extrema"), 0);
    double expect = BM_HBAR2_OVER_ME_EV_A2 / (cb_c[2] * LAT_A * LAT_A);
    g_assert_cmpfloat_with_epsilon(mass_at(x, 2), expect, 1e-5 * expect);
}

/* A band flat along y and z: those principal masses have no finite value and
 * must come back as "divergent", with a warning. */
static void test_grid_divergent(void)
{
    size_t n[3] = { 12, 8, 8 };
    const double c3[3] = { 1.0, 0.0, 0.0 };
    write_cubic_grid(n, c3, "flat.json", "flat.npy");
    g_autofree char *doc = tmp_path("flat.json");
    g_autoptr(JsonObject) r = call("{\"grid\": \"%s\", \"band\": \"cb\", "
                                   "\"extremum\": \"minimum\"}", doc);
    JsonObject *m = json_array_get_object_element(json_object_get_array_member(r, "extrema"), 0);
    JsonArray *ms = json_object_get_array_member(m, "principal_masses_me");
    double expect = BM_HBAR2_OVER_ME_EV_A2 / (LAT_A * LAT_A);
    g_assert_cmpfloat_with_epsilon(json_array_get_double_element(ms, 0), expect, 1e-5 * expect);
    g_assert_cmpstr(json_array_get_string_element(ms, 1), ==, "divergent");
    g_assert_cmpstr(json_array_get_string_element(ms, 2), ==, "divergent");
    g_assert_true(json_object_get_boolean_member(m, "divergent"));
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(m, "warnings")), >, 0);
    g_assert_cmpuint(json_array_get_length(json_object_get_array_member(r, "warnings")), >, 0);
}

/* Twelve identical bands: the minimum of one lies on eleven others, eleven
 * degenerate-band warnings (more than any fixed table held); every one
 * arrives, with its code, the two arrays aligned. Counting only, no physics. */
static void test_many_warnings(void)
{
    enum { NB = 12 };
    size_t shape[4] = { NB, 8, 8, 8 };
    size_t per = 8 * 8 * 8;
    g_autofree double *e = g_new(double, NB * per);
    for (size_t q = 0; q < per; q++) {
        double x[3] = { 2 * G_PI * (double)(q / 64) / 8.0, 2 * G_PI * (double)(q / 8 % 8) / 8.0,
                        2 * G_PI * (double)(q % 8) / 8.0 };
        double v = 1.5;
        for (int d = 0; d < 3; d++)
            v += cb_c[d] * (1.0 - cos(x[d]));
        for (size_t b = 0; b < NB; b++)
            e[b * per + q] = v;
    }
    write_npy("many.npy", e, shape);
    g_autofree char *text = g_strdup_printf(
        "{\"format\": \"bandmass-grid-1\", \"lattice_vectors_angstrom\": "
        "[[%g, 0, 0], [0, %g, 0], [0, 0, %g]], \"mesh\": [8, 8, 8], "
        "\"energies_ev\": \"many.npy\"}", LAT_A, LAT_A, LAT_A);
    write_text("many.json", text);
    g_autofree char *doc = tmp_path("many.json");
    g_autoptr(JsonObject) r = call("{\"grid\": \"%s\", \"band\": 0, "
                                   "\"extremum\": \"minimum\"}", doc);
    JsonObject *m = json_array_get_object_element(json_object_get_array_member(r, "extrema"), 0);
    JsonObject *levels[] = { r, m };
    for (size_t l = 0; l < G_N_ELEMENTS(levels); l++) {
        JsonArray *w = json_object_get_array_member(levels[l], "warnings");
        JsonArray *c = json_object_get_array_member(levels[l], "warning_codes");
        g_assert_nonnull(w);
        g_assert_nonnull(c);
        g_assert_cmpuint(json_array_get_length(w), ==, json_array_get_length(c));
    }
    JsonArray *w = json_object_get_array_member(m, "warnings");
    JsonArray *c = json_object_get_array_member(m, "warning_codes");
    guint degenerate = 0;
    for (guint i = 0; i < json_array_get_length(c); i++)
        if (strcmp(json_array_get_string_element(c, i), "degenerate-band") == 0) {
            degenerate++;
            g_assert_nonnull(strstr(json_array_get_string_element(w, i), "degenerate"));
        }
    g_assert_cmpuint(degenerate, ==, NB - 1);
    JsonArray *top = json_object_get_array_member(r, "warning_codes");
    g_assert_cmpuint(json_array_get_length(top), ==, 1);
    g_assert_cmpstr(json_array_get_string_element(top, 0), ==, "extremum-warnings");
}

/* A 2D sheet (n3 = 1): the normal is not sampled, its mass is null. */
static void test_grid_sheet(void)
{
    size_t n[3] = { 12, 12, 1 };
    write_cubic_grid(n, cb_c, "sheet.json", "sheet.npy");
    g_autofree char *doc = tmp_path("sheet.json");
    g_autoptr(JsonObject) r = call("{\"grid\": \"%s\", \"band\": \"cb\", "
                                   "\"extremum\": \"minimum\"}", doc);
    JsonObject *m = json_array_get_object_element(json_object_get_array_member(r, "extrema"), 0);
    g_assert_cmpint(json_object_get_int_member(m, "dims"), ==, 2);
    JsonArray *ms = json_object_get_array_member(m, "principal_masses_me");
    for (guint d = 0; d < 2; d++) {
        double expect = BM_HBAR2_OVER_ME_EV_A2 / (cb_c[d] * LAT_A * LAT_A);
        g_assert_cmpfloat_with_epsilon(json_array_get_double_element(ms, d), expect,
                                       1e-5 * expect);
    }
    g_assert_true(JSON_NODE_HOLDS_NULL(json_array_get_element(ms, 2)));
}

/* A k-table of a parabolic valley E = E0 + (hbar^2/2 m_e) sum k_d^2 / m_d
 * (definition of the effective mass tensor); masses 0.067, 0.2, 0.5. */
static void test_table(void)
{
    const double md[3] = { 0.067, 0.2, 0.5 };
    GString *t = g_string_new("# parabolic valley\nkx_inv_angstrom,ky_inv_angstrom,"
                              "kz_inv_angstrom,cb_ev\n");
    for (int i = -3; i <= 3; i++)
        for (int j = -3; j <= 3; j++)
            for (int l = -3; l <= 3; l++) {
                double k[3] = { 0.01 * i, 0.01 * j, 0.01 * l }, e = 1.0;
                for (int d = 0; d < 3; d++)
                    e += BM_HBAR2_OVER_ME_EV_A2 * k[d] * k[d] / (2.0 * md[d]);
                g_string_append_printf(t, "%.10g,%.10g,%.10g,%.17g\n", k[0], k[1], k[2], e);
            }
    write_text("valley.csv", t->str);
    g_string_free(t, TRUE);
    g_autofree char *path = tmp_path("valley.csv");
    const char *bands[] = { "cb", "cb_ev", "0" };
    for (guint v = 0; v < G_N_ELEMENTS(bands); v++) {
        g_autoptr(JsonObject) r = call("{\"table\": \"%s\", \"band\": \"%s\", "
                                       "\"extremum\": \"minimum\"}", path, bands[v]);
        JsonObject *m = json_array_get_object_element(
            json_object_get_array_member(r, "extrema"), 0);
        g_assert_cmpstr(json_object_get_string_member(m, "kind"), ==, "minimum");
        g_assert_true(JSON_NODE_HOLDS_NULL(json_object_get_member(m, "k_fractional")));
        for (guint d = 0; d < 3; d++)
            g_assert_cmpfloat_with_epsilon(mass_at(m, d), md[d], 1e-6 * md[d]);
    }
}

static void test_render(void)
{
    g_autofree char *doc = tmp_path("cubic.json");
    g_autoptr(JsonObject) r = call("{\"grid\": \"%s\", \"band\": \"cb\", "
                                   "\"extremum\": \"minimum\"}", doc);
    const BmOperation *op = bm_registry_lookup("mass-tensor");
    g_assert_nonnull(op);
    g_autoptr(GString) out = g_string_new(NULL);
    bm_cli_render(op, r, out);
    g_autofree char *mass = g_strdup_printf("%.4f", BM_HBAR2_OVER_ME_EV_A2 / (LAT_A * LAT_A));
    g_assert_nonnull(strstr(out->str, "band 1 (cb) of"));
    g_assert_nonnull(strstr(out->str, "minimum"));
    g_assert_nonnull(strstr(out->str, mass));
    g_assert_nonnull(strstr(out->str, "axis 1:"));
}

static void test_bad(void)
{
    g_autofree char *doc = tmp_path("cubic.json");
    expect_error("{\"band\": 0}", BM_ERROR_INVALID_INPUT, "give \"grid\"", "\"table\"");
    expect_error("{\"grid\": \"a.json\", \"table\": \"b.csv\", \"band\": 0}",
                 BM_ERROR_INVALID_INPUT, "not both", NULL);
    /* "band" may be left out only when the data hold one band */
    g_autofree char *two = g_strdup_printf("{\"grid\": \"%s\"}", doc);
    expect_error(two, BM_ERROR_INVALID_INPUT, "missing key \"band\"", "holds 2 bands");
    expect_error("{\"grid\": \"/nonexistent/a.json\", \"band\": 0}", BM_ERROR_IO,
                 "/nonexistent/a.json", NULL);
    expect_file_error("grid", doc, "\"band\": \"so\"", "no band named 'so'", "'vb', 'cb'");
    expect_file_error("grid", doc, "\"band\": 2", "band index 2 is out of range", "indices 0..1");
    expect_file_error("grid", doc, "\"band\": 1, \"extremum\": \"lowest\"",
                      "\"extremum\" must be one of minimum, maximum, all", "lowest");
    expect_file_error("grid", doc, "\"band\": 1, \"fit_radius_inv_angstrom\": -1",
                      "fit_radius_inv_angstrom", ">= 0");
    expect_file_error("grid", doc, "\"band\": 1, \"degeneracy_tolerance_ev\": 0",
                      "degeneracy_tolerance_ev", "> 0 eV");
    expect_file_error("grid", doc, "\"band\": 1, \"k_inv_angstrom\": [0, 0]",
                      "k_inv_angstrom", "3 finite numbers");
    /* a NaN inside the .npy file: the message names the document, band and mesh index */
    const size_t nshape[4] = { 1, 4, 4, 1 };
    double nv[16] = { 0 };
    nv[6] = NAN;
    write_npy("nan.npy", nv, nshape);
    write_text("nan.json", "{\"format\": \"bandmass-grid-1\", \"reciprocal_vectors_inv_angstrom\": "
               "[[1, 0, 0], [0, 1, 0], [0, 0, 1]], \"mesh\": [4, 4, 1], \"energies_ev\": \"nan.npy\"}");
    g_autofree char *nandoc = tmp_path("nan.json");
    expect_file_error("grid", nandoc, "\"band\": 0",
                      "nan.json: band 0, mesh index (i, j, l) = (1, 2, 0)", "not finite");
    write_text("short.csv", "kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev\n0,0,0,1\n0,0\n");
    g_autofree char *csv = tmp_path("short.csv");
    expect_file_error("table", csv, "\"band\": 0", "short.csv: line 3: expected 4", "found 2");
}

int main(int argc, char **argv)
{
    g_test_init(&argc, &argv, NULL);
    GError *e = NULL;
    tmp_dir = g_dir_make_tmp("bm-mass-tensor-XXXXXX", &e);
    g_assert_no_error(e);
    /* the 16 x 12 x 10 cubic grid several tests read */
    const size_t cubic_mesh[3] = { 16, 12, 10 };
    write_cubic_grid(cubic_mesh, cb_c, "cubic.json", "cubic.npy");
    g_test_add_func("/mass-tensor/grid/round-trip", test_grid_roundtrip);
    g_test_add_func("/mass-tensor/grid/divergent", test_grid_divergent);
    g_test_add_func("/mass-tensor/grid/sheet", test_grid_sheet);
    g_test_add_func("/mass-tensor/grid/many-warnings", test_many_warnings);
    g_test_add_func("/mass-tensor/table/parabolic-valley", test_table);
    g_test_add_func("/mass-tensor/render", test_render);
    g_test_add_func("/mass-tensor/bad-input", test_bad);
    int rc = g_test_run();
    GDir *d = g_dir_open(tmp_dir, 0, NULL);
    const char *n;
    while (d && (n = g_dir_read_name(d))) {
        g_autofree char *p = tmp_path(n);
        g_unlink(p);
    }
    if (d)
        g_dir_close(d);
    g_rmdir(tmp_dir);
    g_free(tmp_dir);
    return rc;
}
