/* ktable.c: reader for k-tables, plain CSV or TSV text.
 *
 * Layout:
 *   - lines whose first non-blank character is '#' are comments; blank lines
 *     are skipped; line ends may be LF or CRLF.
 *   - the first other line is the header row (required). It is tab-separated
 *     when it contains a tab, comma-separated otherwise; the whole file uses
 *     that separator. Fields are trimmed of blanks; a header may be wrapped
 *     in double quotes.
 *   - required columns: kx_inv_angstrom, ky_inv_angstrom, kz_inv_angstrom
 *     (Cartesian, 1/Angstrom; kz = 0 for 2D or line data), in any position;
 *     or, for a cut along one line, k_inv_angstrom alone (the signed distance
 *     along it, 1/Angstrom; the line's direction comes with the request);
 *   - every column whose header ends in "_ev" (case-insensitive) is one band,
 *     energies in eV; its band name is the header without the suffix (both
 *     forms are accepted when a band is looked up). At least one is needed.
 *   - any other column is ignored (indices, labels).
 *   - every data row has exactly as many fields as the header; the k and
 *     band fields are finite decimal numbers.
 *   - every band has its own non-empty name; a k-point listed twice is read
 *     once when its energies agree and refused when they differ.
 * Example:
 *   # GaAs-like model, conduction band near Gamma
 *   kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev
 *   0.00,0.00,0.00,1.519
 *   0.01,0.00,0.00,1.527 */
#include "ktable.h"
#include "bm-error-private.h"
#include "bm-json.h"

#include <errno.h>
#include <math.h>
#include <string.h>

static const char *k_columns[3] = { "kx_inv_angstrom", "ky_inv_angstrom", "kz_inv_angstrom" };

void bm_ktable_free(BmKTable *t)
{
    if (!t)
        return;
    g_strfreev(t->band_names);
    g_strfreev(t->band_headers);
    g_free(t->source);
    g_free(t->k);
    g_free(t->energies);
    g_free(t);
}

static gboolean has_ev_suffix(const char *h)
{
    size_t n = strlen(h);
    return n > 3 && g_ascii_strcasecmp(h + n - 3, "_ev") == 0;
}

/* Splits a line into trimmed fields (in place); returns a new array of pointers. */
static GPtrArray *split_fields(char *line, char sep)
{
    GPtrArray *f = g_ptr_array_new();
    char *p = line;
    for (;;) {
        char *e = strchr(p, sep);
        if (e)
            *e = '\0';
        g_ptr_array_add(f, g_strstrip(p));
        if (!e)
            break;
        p = e + 1;
    }
    return f;
}

static gboolean is_skippable(const char *line)
{
    while (*line == ' ' || *line == '\t')
        line++;
    return *line == '\0' || *line == '#';
}

static gboolean parse_field(const char *s, double *out)
{
    if (!*s)
        return FALSE;
    char *end = NULL;
    errno = 0;
    double v = g_ascii_strtod(s, &end);
    if (end == s || *end != '\0')
        return FALSE;
    *out = v;
    return TRUE;
}

/* User text for a message: 'text' when short and plain, else cut and
 * escaped (bm_text_for_message). Free it. */
static char *quote(const char *text)
{
    gboolean plain = strlen(text) <= BM_MESSAGE_TEXT_CHARS && g_utf8_validate(text, -1, NULL);
    for (const char *c = text; plain && *c; c++)
        plain = (guchar)*c >= 0x20 && *c != 0x7f && *c != '\'';
    return plain ? g_strdup_printf("'%s'", text) : bm_text_for_message(text, -1);
}

/* A k-point as a hash key: its three doubles, -0 read as 0. */
typedef struct {
    double k[3];
} kkey;

static guint kkey_hash(gconstpointer p)
{
    const kkey *a = p;
    guint h = 17;
    for (int d = 0; d < 3; d++) {
        guint64 bits;
        double v = a->k[d] == 0.0 ? 0.0 : a->k[d];
        memcpy(&bits, &v, sizeof bits);
        h = h * 31u + (guint)(bits ^ (bits >> 32));
    }
    return h;
}

static gboolean kkey_equal(gconstpointer pa, gconstpointer pb)
{
    const kkey *a = pa, *b = pb;
    return a->k[0] == b->k[0] && a->k[1] == b->k[1] && a->k[2] == b->k[2];
}

BmKTable *bm_ktable_load_from_data(const char *data, gsize length, const char *name,
                                   GError **error)
{
    g_return_val_if_fail(data != NULL, NULL);
    g_return_val_if_fail(error == NULL || *error == NULL, NULL);
    if (!name)
        name = "<k-table>";
    if (memchr(data, '\0', length)) {
        bm_error_invalid(error, name, "the table contains a NUL byte; expected CSV or TSV text");
        return NULL;
    }
    /* a UTF-8 byte-order mark, as spreadsheet programs write, is skipped */
    if (length >= 3 && memcmp(data, "\xEF\xBB\xBF", 3) == 0) {
        data += 3;
        length -= 3;
    }
    /* line ends are LF or CRLF; a CR alone would make the whole file one line */
    for (const char *c = memchr(data, '\r', length); c;
         c = memchr(c + 1, '\r', length - (gsize)(c + 1 - data))) {
        if ((gsize)(c + 1 - data) < length && c[1] == '\n')
            continue;
        size_t line = 1;
        for (const char *q = data; q < c; q++)
            line += *q == '\n';
        bm_error_invalid(error, name, "line %zu ends in a carriage return without a line feed "
                         "(CR-only line ends, as some older programs write): save the table "
                         "with LF or CRLF line ends", line);
        return NULL;
    }
    g_autofree char *text = g_strndup(data, length);
    g_auto(GStrv) lines = g_strsplit(text, "\n", -1);
    size_t nlines = g_strv_length(lines);
    for (size_t i = 0; i < nlines; i++) {
        size_t n = strlen(lines[i]);
        if (n && lines[i][n - 1] == '\r')
            lines[i][n - 1] = '\0';
    }

    size_t hline = 0;
    while (hline < nlines && is_skippable(lines[hline]))
        hline++;
    if (hline == nlines) {
        bm_error_invalid(error, name, "missing header row (expected e.g. "
                "kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,band_ev)");
        return NULL;
    }
    /* band names come from the header and go into every response: text */
    if (!g_utf8_validate(lines[hline], -1, NULL)) {
        g_autofree char *q = bm_text_for_message(lines[hline], -1);
        bm_error_invalid(error, name, "line %zu: the header row %s is not UTF-8 text (band "
                "names are written into every answer)", hline + 1, q);
        return NULL;
    }
    char sep = strchr(lines[hline], '\t') ? '\t' : ',';
    const char *sep_name = sep == '\t' ? "tab" : "comma";
    g_autoptr(GPtrArray) header = split_fields(lines[hline], sep);
    size_t ncol = header->len;
    for (size_t c = 0; c < ncol; c++) {
        char *h = header->pdata[c];
        size_t n = strlen(h);
        if (n >= 2 && h[0] == '"' && h[n - 1] == '"') {
            h[n - 1] = '\0';
            header->pdata[c] = g_strstrip(h + 1);
        }
    }

    gboolean all_numbers = TRUE;
    for (size_t c = 0; c < ncol && all_numbers; c++) {
        double v;
        all_numbers = parse_field(header->pdata[c], &v);
    }
    if (all_numbers) {
        bm_error_invalid(error, name, "missing header row: line %zu holds numbers; expected column "
                "names kx_inv_angstrom, ky_inv_angstrom, kz_inv_angstrom and band columns "
                "ending in _ev", hline + 1);
        return NULL;
    }

    /* role of each column: 0..2 a k component, 3 + b band b, -1 ignored;
     * headers and band names are looked up in hash tables (a header of
     * 100,000 columns is read in linear time) */
    int kcol[3] = { -1, -1, -1 }, cutcol = -1;
    g_autofree int *role = g_new(int, ncol);
    g_autoptr(GArray) band_cols = g_array_new(FALSE, FALSE, sizeof(int));
    g_autoptr(GHashTable) seen = g_hash_table_new(g_str_hash, g_str_equal);
    g_autoptr(GHashTable) names = g_hash_table_new_full(g_str_hash, g_str_equal, g_free, NULL);
    for (size_t c = 0; c < ncol; c++) {
        const char *h = header->pdata[c];
        role[c] = -1;
        gpointer first;
        if (*h && g_hash_table_lookup_extended(seen, h, NULL, &first)) {
            g_autofree char *q = quote(h);
            bm_error_invalid(error, name, "line %zu: column %zu repeats the header %s of column %zu",
                    hline + 1, c + 1, q, GPOINTER_TO_SIZE(first) + 1);
            return NULL;
        }
        g_hash_table_insert(seen, (gpointer)h, GSIZE_TO_POINTER(c));
        for (int d = 0; d < 3; d++)
            if (strcmp(h, k_columns[d]) == 0) {
                kcol[d] = (int)c;
                role[c] = d;
            }
        if (strcmp(h, "k_inv_angstrom") == 0) {
            cutcol = (int)c;
            role[c] = 0;
        }
        size_t n = strlen(h);
        if (role[c] < 0 && n >= 3 && g_ascii_strcasecmp(h + n - 3, "_ev") == 0) {
            if (!has_ev_suffix(h)) {
                bm_error_invalid(error, name, "line %zu: column %zu is headed '%s', a band "
                        "column without a name (band columns are NAME_ev)", hline + 1, c + 1, h);
                return NULL;
            }
            role[c] = 3 + (int)band_cols->len;
            int ci = (int)c;
            g_array_append_val(band_cols, ci);
        }
    }
    /* every band has one name: "cb_ev" and "cb_EV" would both be "cb", and
     * a band named after another's header ("cb_ev_ev") would make a lookup
     * ambiguous */
    for (guint b = 0; b < band_cols->len; b++) {
        int c = g_array_index(band_cols, int, b);
        const char *h = header->pdata[c];
        char *bname = g_strndup(h, strlen(h) - 3);
        gpointer other;
        if (g_hash_table_lookup_extended(names, bname, NULL, &other)
            || (g_hash_table_lookup_extended(seen, bname, NULL, &other)
                && GPOINTER_TO_SIZE(other) != (gsize)c && role[GPOINTER_TO_SIZE(other)] >= 3)) {
            g_autofree char *q = quote(bname), *qh = quote(h);
            bm_error_invalid(error, name, "line %zu: the band of column %zu (%s) would be named "
                    "%s, as the band of column %zu is: give each band its own name", hline + 1,
                    (size_t)c + 1, qh, q, GPOINTER_TO_SIZE(other) + 1);
            g_free(bname);
            return NULL;
        }
        g_hash_table_insert(names, bname, GSIZE_TO_POINTER((gsize)c));
    }
    if (cutcol >= 0 && (kcol[0] >= 0 || kcol[1] >= 0 || kcol[2] >= 0)) {
        bm_error_invalid(error, name, "line %zu: the header has both k_inv_angstrom (a cut "
                "along one line) and Cartesian k columns: give one or the other", hline + 1);
        return NULL;
    }
    for (int d = 0; d < 3 && cutcol < 0; d++)
        if (kcol[d] < 0) {
            GString *list = g_string_new(NULL);
            for (size_t c = 0; c < ncol && c < 20; c++) {
                g_autofree char *q = quote(header->pdata[c]);
                g_string_append_printf(list, c ? ", %s" : "%s", q);
            }
            if (ncol > 20)
                g_string_append_printf(list, " and %zu more", ncol - 20);
            bm_error_invalid(error, name, "line %zu: the header lacks the column '%s' (found %s; "
                    "expected kx_inv_angstrom, ky_inv_angstrom, kz_inv_angstrom, or "
                    "k_inv_angstrom for a cut along one line, and band columns ending in "
                    "_ev, separated by %ss)", hline + 1, k_columns[d],
                    list->str, sep_name);
            g_string_free(list, TRUE);
            return NULL;
        }
    if (band_cols->len == 0) {
        bm_error_invalid(error, name, "line %zu: no band columns; expected at least one header "
                "ending in _ev (energies in eV)", hline + 1);
        return NULL;
    }

    size_t npoints = 0;
    for (size_t i = hline + 1; i < nlines; i++)
        if (!is_skippable(lines[i]))
            npoints++;
    if (npoints == 0) {
        bm_error_invalid(error, name, "the table is empty: no data rows after the header on line %zu",
                hline + 1);
        return NULL;
    }
    size_t nbands = band_cols->len;
    if (npoints > G_MAXSIZE / sizeof(double) / (nbands + 3)) {
        bm_error_invalid(error, name, "the table is too large");
        return NULL;
    }

    /* a k-point listed twice is read once when its energies agree, refused
     * when they do not */
    g_autoptr(GHashTable) points = g_hash_table_new_full(kkey_hash, kkey_equal, g_free, NULL);
    g_autofree size_t *line_of = g_try_new(size_t, npoints);
    g_autofree double *row = g_new(double, 3 + nbands);
    BmKTable *t = g_new0(BmKTable, 1);
    t->source = g_strdup(name);
    t->k = g_try_new(double, npoints * 3);
    t->energies = g_try_new(double, npoints * nbands);
    if (!t->k || !t->energies || !line_of) {
        bm_error_invalid(error, name, "cannot allocate %zu k-points of %zu bands", npoints, nbands);
        goto fail;
    }
    t->band_names = g_new0(char *, nbands + 1);
    t->band_headers = g_new0(char *, nbands + 1);
    for (size_t b = 0; b < nbands; b++) {
        const char *h = header->pdata[g_array_index(band_cols, int, b)];
        t->band_headers[b] = g_strdup(h);
        t->band_names[b] = g_strndup(h, strlen(h) - 3);
    }

    t->cut = cutcol >= 0;
    size_t p = 0;
    for (size_t i = hline + 1; i < nlines; i++) {
        if (is_skippable(lines[i]))
            continue;
        row[1] = row[2] = 0.0;   /* a cut: (s, 0, 0) until oriented */
        g_autoptr(GPtrArray) f = split_fields(lines[i], sep);
        if (f->len != ncol) {
            bm_error_invalid(error, name, "line %zu: expected %zu %s-separated columns (as in the "
                    "header on line %zu), found %u", i + 1, ncol, sep_name, hline + 1, f->len);
            goto fail;
        }
        for (size_t c = 0; c < ncol; c++) {
            if (role[c] < 0)
                continue;
            const char *s = f->pdata[c];
            double v;
            if (!parse_field(s, &v) || !isfinite(v)) {
                g_autofree char *qh = quote(header->pdata[c]), *qs = quote(s);
                bm_error_invalid(error, name, "line %zu, column %zu (%s): %s is not a%s number",
                        i + 1, c + 1, qh, qs, parse_field(s, &v) ? " finite" : "");
                goto fail;
            }
            row[role[c]] = v;
        }
        kkey key = { { row[0], row[1], row[2] } };
        gpointer at;
        if (g_hash_table_lookup_extended(points, &key, NULL, &at)) {
            size_t q = GPOINTER_TO_SIZE(at);
            for (size_t b = 0; b < nbands; b++)
                if (t->energies[b * npoints + q] != row[3 + b]) {
                    bm_error_invalid(error, name, "lines %zu and %zu give the same k-point "
                            "(%g, %g, %g) with different energies (band '%s': %.17g and "
                            "%.17g eV): a k-point has one energy per band", line_of[q], i + 1,
                            t->k[3 * q], t->k[3 * q + 1], t->k[3 * q + 2], t->band_names[b],
                            t->energies[b * npoints + q], row[3 + b]);
                    goto fail;
                }
            continue;
        }
        memcpy(t->k + 3 * p, row, 3 * sizeof(double));
        for (size_t b = 0; b < nbands; b++)
            t->energies[b * npoints + p] = row[3 + b];
        line_of[p] = i + 1;
        g_hash_table_insert(points, g_memdup2(&key, sizeof key), GSIZE_TO_POINTER(p));
        p++;
    }
    if (p < npoints) {   /* repeats dropped: close the gaps between the bands */
        for (size_t b = 1; b < nbands; b++)
            memmove(t->energies + b * p, t->energies + b * npoints, p * sizeof(double));
    }
    t->table.npoints = p;
    t->table.k = t->k;
    t->table.nbands = nbands;
    t->table.energies = t->energies;
    return t;

fail:
    bm_ktable_free(t);
    return NULL;
}

gboolean bm_ktable_orient_cut(BmKTable *t, const double dir[3], GError **error)
{
    double n = sqrt(dir[0] * dir[0] + dir[1] * dir[1] + dir[2] * dir[2]);
    if (!isfinite(n) || n == 0.0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"cut_direction\" "
                    "(%g, %g, %g) is not a direction: give a non-zero finite Cartesian vector",
                    dir[0], dir[1], dir[2]);
        return FALSE;
    }
    for (size_t p = 0; p < t->table.npoints; p++) {
        double s = t->k[3 * p];
        for (int i = 0; i < 3; i++)
            t->k[3 * p + i] = s * dir[i] / n;
    }
    return TRUE;
}

BmKTable *bm_ktable_load(const char *path, GError **error)
{
    g_return_val_if_fail(path != NULL, NULL);
    g_autofree char *text = NULL;
    gsize len = 0;
    if (!bm_error_read_file(path, "k-table", &text, &len, error))
        return NULL;
    return bm_ktable_load_from_data(text, len, path, error);
}
