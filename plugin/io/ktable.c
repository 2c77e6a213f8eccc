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
 *   - every column whose header ends in "_ev" (case-insensitive) is one band,
 *     energies in eV; its band name is the header without the suffix (both
 *     forms are accepted when a band is looked up). At least one is needed.
 *   - any other column is ignored (indices, labels).
 *   - every data row has exactly as many fields as the header; the k and
 *     band fields are finite decimal numbers.
 * Example:
 *   # GaAs-like model, conduction band near Gamma
 *   kx_inv_angstrom,ky_inv_angstrom,kz_inv_angstrom,cb_ev
 *   0.00,0.00,0.00,1.519
 *   0.01,0.00,0.00,1.527 */
#include "ktable.h"
#include "bm-error-private.h"

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

    int kcol[3] = { -1, -1, -1 };
    g_autoptr(GArray) band_cols = g_array_new(FALSE, FALSE, sizeof(int));
    for (size_t c = 0; c < ncol; c++) {
        const char *h = header->pdata[c];
        for (size_t d = 0; d < c; d++)
            if (*h && strcmp(h, header->pdata[d]) == 0) {
                bm_error_invalid(error, name, "line %zu: column %zu repeats the header '%s' of column %zu",
                        hline + 1, c + 1, h, d + 1);
                return NULL;
            }
        gboolean is_k = FALSE;
        for (int d = 0; d < 3; d++)
            if (strcmp(h, k_columns[d]) == 0) {
                kcol[d] = (int)c;
                is_k = TRUE;
            }
        if (!is_k && has_ev_suffix(h)) {
            int ci = (int)c;
            g_array_append_val(band_cols, ci);
        }
    }
    for (int d = 0; d < 3; d++)
        if (kcol[d] < 0) {
            GString *list = g_string_new(NULL);
            for (size_t c = 0; c < ncol; c++)
                g_string_append_printf(list, c ? ", '%s'" : "'%s'", (char *)header->pdata[c]);
            bm_error_invalid(error, name, "line %zu: the header lacks the column '%s' (found %s; "
                    "expected kx_inv_angstrom, ky_inv_angstrom, kz_inv_angstrom and band "
                    "columns ending in _ev, separated by %ss)", hline + 1, k_columns[d],
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

    BmKTable *t = g_new0(BmKTable, 1);
    t->source = g_strdup(name);
    t->k = g_new(double, npoints * 3);
    t->energies = g_new(double, npoints * nbands);
    t->band_names = g_new0(char *, nbands + 1);
    t->band_headers = g_new0(char *, nbands + 1);
    for (size_t b = 0; b < nbands; b++) {
        const char *h = header->pdata[g_array_index(band_cols, int, b)];
        t->band_headers[b] = g_strdup(h);
        t->band_names[b] = g_strndup(h, strlen(h) - 3);
    }

    size_t p = 0;
    for (size_t i = hline + 1; i < nlines; i++) {
        if (is_skippable(lines[i]))
            continue;
        g_autoptr(GPtrArray) f = split_fields(lines[i], sep);
        if (f->len != ncol) {
            bm_error_invalid(error, name, "line %zu: expected %zu %s-separated columns (as in the "
                    "header on line %zu), found %u", i + 1, ncol, sep_name, hline + 1, f->len);
            goto fail;
        }
        for (size_t c = 0; c < ncol; c++) {
            int role = -1;   /* 0..2: k component; 3+b: band b */
            for (int d = 0; d < 3; d++)
                if (kcol[d] == (int)c)
                    role = d;
            for (size_t b = 0; role < 0 && b < nbands; b++)
                if (g_array_index(band_cols, int, b) == (int)c)
                    role = 3 + (int)b;
            if (role < 0)
                continue;
            const char *s = f->pdata[c];
            double v;
            if (!parse_field(s, &v)) {
                bm_error_invalid(error, name, "line %zu, column %zu ('%s'): '%s' is not a number",
                        i + 1, c + 1, (char *)header->pdata[c], s);
                goto fail;
            }
            if (!isfinite(v)) {
                bm_error_invalid(error, name, "line %zu, column %zu ('%s'): '%s' is not a finite number",
                        i + 1, c + 1, (char *)header->pdata[c], s);
                goto fail;
            }
            if (role < 3)
                t->k[3 * p + (size_t)role] = v;
            else
                t->energies[(size_t)(role - 3) * npoints + p] = v;
        }
        p++;
    }
    t->table.npoints = npoints;
    t->table.k = t->k;
    t->table.nbands = nbands;
    t->table.energies = t->energies;
    return t;

fail:
    bm_ktable_free(t);
    return NULL;
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
