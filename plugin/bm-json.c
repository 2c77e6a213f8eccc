/* bm-json.c: typed JSON access for operations. */
#include "bm-json.h"

#include <float.h>
#include <math.h>
#include <string.h>

#define WHERE(w) ((w) ? (w) : "request")

static gboolean node_number(JsonNode *n, double *out)
{
    if (!n || !JSON_NODE_HOLDS_VALUE(n))
        return FALSE;
    GType t = json_node_get_value_type(n);
    if (t == G_TYPE_DOUBLE)
        *out = json_node_get_double(n);
    else if (t == G_TYPE_INT64)
        *out = (double)json_node_get_int(n);
    else
        return FALSE;
    return TRUE;
}

static gboolean fail_kind(GError **error, const char *key, const char *where,
                          const char *what)
{
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "%s: key \"%s\" must be %s", WHERE(where), key, what);
    return FALSE;
}

gboolean bm_json_number(JsonObject *o, const char *key, const char *where,
                        double *out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!n) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: missing key \"%s\"", WHERE(where), key);
        return FALSE;
    }
    if (!node_number(n, out))
        return fail_kind(error, key, where, "a number");
    if (!isfinite(*out))
        return fail_kind(error, key, where, "a finite number");
    return TRUE;
}

gboolean bm_json_positive(JsonObject *o, const char *key, const char *where,
                          double *out, GError **error)
{
    if (!bm_json_number(o, key, where, out, error))
        return FALSE;
    if (!(*out > 0)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: key \"%s\" must be greater than zero (got %g)",
                    WHERE(where), key, *out);
        return FALSE;
    }
    return TRUE;
}

gboolean bm_json_number_opt(JsonObject *o, const char *key, const char *where,
                            double *out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!n || JSON_NODE_HOLDS_NULL(n))
        return TRUE;
    return bm_json_number(o, key, where, out, error);
}

static gboolean array_numbers(JsonArray *a, double *out, guint n)
{
    for (guint i = 0; i < n; i++)
        if (!node_number(json_array_get_element(a, i), &out[i]) || !isfinite(out[i]))
            return FALSE;
    return TRUE;
}

gboolean bm_json_vec3(JsonObject *o, const char *key, const char *where,
                      double out[3], GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (!n || !JSON_NODE_HOLDS_ARRAY(n) || json_array_get_length(json_node_get_array(n)) != 3
        || !array_numbers(json_node_get_array(n), out, 3))
        return fail_kind(error, key, where, "an array of 3 finite numbers");
    return TRUE;
}

gboolean bm_json_mat3(JsonObject *o, const char *key, const char *where,
                      double out[3][3], GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    JsonArray *rows = n && JSON_NODE_HOLDS_ARRAY(n) ? json_node_get_array(n) : NULL;
    if (!rows || json_array_get_length(rows) != 3)
        return fail_kind(error, key, where, "3 rows of 3 finite numbers");
    for (guint i = 0; i < 3; i++) {
        JsonNode *r = json_array_get_element(rows, i);
        if (!JSON_NODE_HOLDS_ARRAY(r) || json_array_get_length(json_node_get_array(r)) != 3
            || !array_numbers(json_node_get_array(r), out[i], 3))
            return fail_kind(error, key, where, "3 rows of 3 finite numbers");
    }
    return TRUE;
}

double *bm_json_numbers(JsonObject *o, const char *key, const char *where,
                        gsize *n_out, GError **error)
{
    JsonNode *n = json_object_get_member(o, key);
    if (n && JSON_NODE_HOLDS_VALUE(n)) {
        double v;
        if (!bm_json_number(o, key, where, &v, error))
            return NULL;
        double *one = g_new(double, 1);
        one[0] = v;
        *n_out = 1;
        return one;
    }
    if (!n || !JSON_NODE_HOLDS_ARRAY(n) || json_array_get_length(json_node_get_array(n)) == 0) {
        fail_kind(error, key, where, "a number or a non-empty array of numbers");
        return NULL;
    }
    JsonArray *a = json_node_get_array(n);
    guint len = json_array_get_length(a);
    double *v = g_new(double, len);
    for (guint i = 0; i < len; i++) {
        if (!node_number(json_array_get_element(a, i), &v[i]) || !isfinite(v[i])) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: element %u of \"%s\" must be a finite number",
                        WHERE(where), i, key);
            g_free(v);
            return NULL;
        }
    }
    *n_out = len;
    return v;
}

gboolean bm_json_only_keys(JsonObject *o, const char *const *allowed, const char *where,
                           GError **error)
{
    g_autoptr(GList) keys = json_object_get_members(o);
    for (GList *l = keys; l; l = l->next) {
        gboolean ok = FALSE;
        for (int i = 0; allowed[i] && !ok; i++)
            ok = strcmp(l->data, allowed[i]) == 0;
        if (!ok) {
            g_autofree char *list = g_strjoinv(", ", (char **)allowed);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: unknown key \"%s\" (expected %s)", WHERE(where),
                        (char *)l->data, list);
            return FALSE;
        }
    }
    return TRUE;
}

JsonObject *bm_json_element_object(JsonArray *a, guint i, const char *const *allowed,
                                   const char *where, GError **error)
{
    JsonNode *e = json_array_get_element(a, i);
    if (!JSON_NODE_HOLDS_OBJECT(e)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: must be an object",
                    WHERE(where));
        return NULL;
    }
    JsonObject *o = json_node_get_object(e);
    return bm_json_only_keys(o, allowed, where, error) ? o : NULL;
}

static JsonNode *number_node(double v)
{
    JsonNode *n = json_node_new(isfinite(v) ? JSON_NODE_VALUE : JSON_NODE_NULL);
    if (isfinite(v))
        json_node_set_double(n, v);
    return n;
}

void bm_json_set_number(JsonObject *o, const char *key, double v)
{
    json_object_set_member(o, key, number_node(v));
}

void bm_json_set_numbers(JsonObject *o, const char *key, const double *v, gsize n)
{
    JsonArray *a = json_array_sized_new(n);
    for (gsize i = 0; i < n; i++)
        json_array_add_element(a, number_node(v[i]));
    json_object_set_array_member(o, key, a);
}

void bm_json_set_vec3(JsonObject *o, const char *key, const double v[3])
{
    bm_json_set_numbers(o, key, v, 3);
}

void bm_json_set_mat3(JsonObject *o, const char *key, const double m[3][3])
{
    JsonArray *rows = json_array_sized_new(3);
    for (int i = 0; i < 3; i++) {
        JsonArray *r = json_array_sized_new(3);
        for (int j = 0; j < 3; j++)
            json_array_add_element(r, number_node(m[i][j]));
        json_array_add_array_element(rows, r);
    }
    json_object_set_array_member(o, key, rows);
}

void bm_json_warnings_ensure(JsonObject *o)
{
    if (!json_object_has_member(o, "warnings"))
        json_object_set_array_member(o, "warnings", json_array_new());
    if (!json_object_has_member(o, "warning_codes"))
        json_object_set_array_member(o, "warning_codes", json_array_new());
}

static void add_warning(JsonObject *o, bm_warn_code code, const char *text)
{
    bm_json_warnings_ensure(o);
    json_array_add_string_element(json_object_get_array_member(o, "warnings"), text);
    json_array_add_string_element(json_object_get_array_member(o, "warning_codes"),
                                  bm_warn_code_name(code));
}

void bm_json_warn(JsonObject *o, bm_warn_code code, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *text = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    add_warning(o, code, text);
}

/* ---- the JSON writer ---- */

void bm_json_write_double(GString *out, double v)
{
    if (!isfinite(v)) {
        g_string_append(out, "null");   /* JSON has no NaN or Inf */
        return;
    }
    /* The fewest digits that read back to the same double: %.15g gives the
     * shortest form whenever that has at most 15 digits (%g drops trailing
     * zeros), %.17g always reads back. Subnormals have fewer digits of
     * precision, so for them every count from 1 is tried. */
    char buf[G_ASCII_DTOSTR_BUF_SIZE];
    int first = fabs(v) < DBL_MIN ? 1 : 15;
    for (int digits = first; digits <= 17; digits++) {
        char fmt[8];
        g_snprintf(fmt, sizeof fmt, "%%.%dg", digits);
        g_ascii_formatd(buf, sizeof buf, fmt, v);
        if (g_ascii_strtod(buf, NULL) == v)
            break;
    }
    /* tidy the exponent ("1e+17" -> "1e17", "1e-05" -> "1e-5") */
    char *e = strchr(buf, 'e');
    if (e) {
        char *r = e + 1, *w = e + 1;
        if (*r == '+')
            r++;
        else if (*r == '-')
            *w++ = *r++;
        while (*r == '0' && r[1])
            r++;
        memmove(w, r, strlen(r) + 1);
        g_string_append(out, buf);
        return;
    }
    g_string_append(out, buf);
    if (!strchr(buf, '.'))
        g_string_append(out, ".0");   /* stays a real number when read back: 300.0, -0.0 */
}

static void write_string(GString *out, const char *s)
{
    g_string_append_c(out, '"');
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        switch (*p) {
        case '"':  g_string_append(out, "\\\""); break;
        case '\\': g_string_append(out, "\\\\"); break;
        case '\b': g_string_append(out, "\\b"); break;
        case '\f': g_string_append(out, "\\f"); break;
        case '\n': g_string_append(out, "\\n"); break;
        case '\r': g_string_append(out, "\\r"); break;
        case '\t': g_string_append(out, "\\t"); break;
        default:
            if (*p < 0x20 || *p == 0x7f)
                g_string_append_printf(out, "\\u%04x", *p);
            else
                g_string_append_c(out, (char)*p);
        }
    }
    g_string_append_c(out, '"');
}

static void write_value(GString *out, JsonNode *node)
{
    GType t = json_node_get_value_type(node);
    if (t == G_TYPE_INT64)
        g_string_append_printf(out, "%" G_GINT64_FORMAT, json_node_get_int(node));
    else if (t == G_TYPE_DOUBLE)
        bm_json_write_double(out, json_node_get_double(node));
    else if (t == G_TYPE_BOOLEAN)
        g_string_append(out, json_node_get_boolean(node) ? "true" : "false");
    else if (t == G_TYPE_STRING)
        write_string(out, json_node_get_string(node));
    else
        g_string_append(out, "null");
}

static void newline(GString *out, gboolean pretty, int depth)
{
    if (!pretty)
        return;
    g_string_append_c(out, '\n');
    for (int i = 0; i < depth; i++)
        g_string_append(out, "  ");
}

static void write_node(GString *out, JsonNode *node, gboolean pretty, int depth)
{
    switch (node ? json_node_get_node_type(node) : JSON_NODE_NULL) {
    case JSON_NODE_NULL:
        g_string_append(out, "null");
        return;
    case JSON_NODE_VALUE:
        write_value(out, node);
        return;
    case JSON_NODE_ARRAY: {
        JsonArray *a = json_node_get_array(node);
        guint n = json_array_get_length(a);
        g_string_append_c(out, '[');
        for (guint i = 0; i < n; i++) {
            if (i)
                g_string_append_c(out, ',');
            newline(out, pretty, depth + 1);
            write_node(out, json_array_get_element(a, i), pretty, depth + 1);
        }
        if (n)
            newline(out, pretty, depth);
        g_string_append_c(out, ']');
        return;
    }
    case JSON_NODE_OBJECT: {
        JsonObject *o = json_node_get_object(node);
        g_autoptr(GList) keys = json_object_get_members(o);
        g_string_append_c(out, '{');
        for (GList *l = keys; l; l = l->next) {
            if (l != keys)
                g_string_append_c(out, ',');
            newline(out, pretty, depth + 1);
            write_string(out, l->data);
            g_string_append(out, pretty ? " : " : ":");
            write_node(out, json_object_get_member(o, l->data), pretty, depth + 1);
        }
        if (keys)
            newline(out, pretty, depth);
        g_string_append_c(out, '}');
        return;
    }
    }
}

void bm_json_write(GString *out, JsonNode *node, gboolean pretty)
{
    write_node(out, node, pretty, 0);
}

gboolean bm_json_check_depth(const char *text, gssize length, const char *what, GError **error)
{
    gsize n = length < 0 ? strlen(text) : (gsize)length;
    guint depth = 0;
    gboolean in_string = FALSE;
    for (gsize i = 0; i < n; i++) {
        char ch = text[i];
        if (in_string) {
            if (ch == '\\')
                i++;
            else if (ch == '"')
                in_string = FALSE;
        } else if (ch == '"') {
            in_string = TRUE;
        } else if (ch == '[' || ch == '{') {
            if (++depth > BM_JSON_MAX_DEPTH) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: JSON nested deeper than "
                            "%d levels (at byte %zu); no bandmass document needs that many",
                            what, BM_JSON_MAX_DEPTH, (size_t)i);
                return FALSE;
            }
        } else if ((ch == ']' || ch == '}') && depth > 0) {
            depth--;
        }
    }
    return TRUE;
}

char *bm_json_to_string(JsonNode *node, gboolean pretty)
{
    GString *out = g_string_new(NULL);
    write_node(out, node, pretty, 0);
    return g_string_free(out, FALSE);
}

char *bm_json_object_to_string(JsonObject *o, gboolean pretty)
{
    g_autoptr(JsonNode) node = json_node_new(JSON_NODE_OBJECT);
    json_node_set_object(node, o);
    return bm_json_to_string(node, pretty);
}

void bm_json_warn_all(JsonObject *o, const bm_warnings *w)
{
    bm_json_warnings_ensure(o);
    for (size_t i = 0; i < w->count; i++)
        add_warning(o, w->items[i].code, w->items[i].text);
    if (w->lost)
        bm_json_warn(o, BM_WARN_WARNINGS_LOST, "%zu further warning%s lost: out of memory",
                     w->lost, w->lost == 1 ? " was" : "s were");
}
