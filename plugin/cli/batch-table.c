/* batch-table.c: batch outputs as one CSV table (bandmass batch-table). */
#include "batch.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "bm-json.h"
#include "bm-error.h"
#include "csv.h"

/* One step of a field path: a key, or a list index (key NULL). */
typedef struct {
    char *key;
    guint64 index;
} Step;

static void step_clear(gpointer p)
{
    g_free(((Step *)p)->key);
}

static gboolean bad_path(GError **error, const char *path, gsize at, const char *why)
{
    g_autofree char *shown = bm_text_for_message(path, -1);
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "--fields: field %s, character %zu: "
                "%s (a field is keys joined by '.', each key optionally followed by list "
                "indexes [N] or .N, e.g. points[0].fermi_level_ev)", shown, at + 1, why);
    return FALSE;
}

/* Parses "a.b[0][2].c" into steps. */
static GArray *parse_path(const char *path, GError **error)
{
    GArray *steps = g_array_new(FALSE, FALSE, sizeof(Step));
    g_array_set_clear_func(steps, step_clear);
    gsize i = 0, n = strlen(path);
    if (n == 0) {
        bad_path(error, path, 0, "an empty field");
        g_array_unref(steps);
        return NULL;
    }
    while (i < n) {
        gsize start = i;
        while (i < n && path[i] != '.' && path[i] != '[' && path[i] != ']')
            i++;
        if (i == start) {
            bad_path(error, path, i, path[i] == '.' ? "an empty key" : path[i] == '['
                     ? "a list index must follow a key" : "a ']' without its '['");
            g_array_unref(steps);
            return NULL;
        }
        Step s = { g_strndup(path + start, i - start), 0 };
        g_array_append_val(steps, s);
        while (i < n && path[i] == '[') {
            gsize open = i++;
            gsize digits = i;
            while (i < n && g_ascii_isdigit(path[i]))
                i++;
            if (i == digits || i >= n || path[i] != ']' || i - digits > 9) {
                bad_path(error, path, open, "a list index is [N] with N a whole number "
                         "(0 is the first)");
                g_array_unref(steps);
                return NULL;
            }
            Step ix = { NULL, strtoull(path + digits, NULL, 10) };
            g_array_append_val(steps, ix);
            i++;
        }
        if (i < n && path[i] == ']') {
            bad_path(error, path, i, "a ']' without its '['");
            g_array_unref(steps);
            return NULL;
        }
        if (i < n && path[i] == '.') {
            i++;
            if (i == n) {
                bad_path(error, path, i - 1, "a '.' at the end");
                g_array_unref(steps);
                return NULL;
            }
        } else if (i < n) {
            bad_path(error, path, i, "a key or index must be followed by '.' or '['");
            g_array_unref(steps);
            return NULL;
        }
    }
    return steps;
}

static JsonNode *follow(JsonNode *n, GArray *steps)
{
    for (guint k = 0; n && k < steps->len; k++) {
        const Step *s = &g_array_index(steps, Step, k);
        if (s->key && JSON_NODE_HOLDS_ARRAY(n) && s->key[strspn(s->key, "0123456789")] == '\0'
            && strlen(s->key) <= 9) {
            /* "points.0": a whole number after a '.' indexes a list, as
             * bandmass plot reads its fields */
            JsonArray *a = json_node_get_array(n);
            guint64 ix = strtoull(s->key, NULL, 10);
            n = ix < json_array_get_length(a) ? json_array_get_element(a, (guint)ix) : NULL;
        } else if (s->key) {
            n = JSON_NODE_HOLDS_OBJECT(n)
                ? json_object_get_member(json_node_get_object(n), s->key) : NULL;
        } else {
            JsonArray *a = JSON_NODE_HOLDS_ARRAY(n) ? json_node_get_array(n) : NULL;
            n = a && s->index < json_array_get_length(a)
                ? json_array_get_element(a, (guint)s->index) : NULL;
        }
    }
    return n;
}

static char *cell_of(JsonNode *n)
{
    char *c = bm_cli_csv_cell(n);
    if (c)
        return c;
    g_autofree char *json = bm_json_to_string(n, FALSE);
    return bm_cli_csv_quoted(json);
}

gboolean bm_batch_table(const char *const *results, const char *fields, GString *out,
                        GError **error)
{
    g_auto(GStrv) names = g_strsplit(fields, ",", -1);
    g_autoptr(GPtrArray) paths = g_ptr_array_new_with_free_func((GDestroyNotify)g_array_unref);
    for (guint f = 0; names[f]; f++) {
        GArray *steps = parse_path(names[f], error);
        if (!steps)
            return FALSE;
        g_ptr_array_add(paths, steps);
    }
    g_string_append(out, "id,status");
    for (guint f = 0; names[f]; f++) {
        g_autofree char *h = bm_cli_csv_quoted(names[f]);
        g_string_append_printf(out, ",%s", h);
    }
    g_string_append_c(out, '\n');

    for (guint r = 0; results[r]; r++) {
        const char *file = results[r];
        g_autofree char *text = NULL;
        gsize len = 0;
        if (!bm_error_read_file(file, "batch output", &text, &len, error))
            return FALSE;
        guint line = 0;
        for (gsize at = 0; at < len;) {
            const char *nl = memchr(text + at, '\n', len - at);
            if (!nl)
                break;   /* a torn last line: an item still to be redone */
            gsize end = (gsize)(nl - text);
            line++;
            g_autofree char *what = g_strdup_printf("%s line %u", file, line);
            g_autoptr(JsonNode) node = bm_json_parse(text + at, (gssize)(end - at), what, error);
            at = end + 1;
            if (!node)
                return FALSE;
            JsonObject *o = JSON_NODE_HOLDS_OBJECT(node) ? json_node_get_object(node) : NULL;
            if (line == 1) {
                const char *format = o ? json_object_get_string_member_with_default(o, "format",
                                                                                     NULL) : NULL;
                if (!format || strcmp(format, BM_BATCH_FORMAT) != 0) {
                    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s is not the output "
                                "of bandmass batch (its first line is not a %s header)", file,
                                BM_BATCH_FORMAT);
                    return FALSE;
                }
                continue;
            }
            if (!o || !json_object_has_member(o, "id") || !json_object_has_member(o, "status")) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s line %u is not an "
                            "item of a batch output (no id and status)", file, line);
                return FALSE;
            }
            g_autofree char *id = cell_of(json_object_get_member(o, "id"));
            g_autofree char *status = cell_of(json_object_get_member(o, "status"));
            g_string_append_printf(out, "%s,%s", id, status);
            JsonNode *response = json_object_get_member(o, "response");
            for (guint f = 0; f < paths->len; f++) {
                JsonNode *v = response ? follow(response, paths->pdata[f]) : NULL;
                g_autofree char *c = cell_of(v);
                g_string_append_printf(out, ",%s", c);
            }
            g_string_append_c(out, '\n');
        }
    }
    return TRUE;
}
