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

/* ---- quoting user text in messages ---- */

char *bm_text_for_message(const char *text, gssize length)
{
    gsize n = length < 0 ? strlen(text) : (gsize)length;
    GString *out = g_string_new("\"");
    gsize shown = 0, i = 0;
    while (i < n && shown < BM_MESSAGE_TEXT_CHARS) {
        guchar c = (guchar)text[i];
        if (c == '"' || c == '\\') {
            g_string_append_c(out, '\\');
            g_string_append_c(out, (char)c);
            i++;
        } else if (c >= 0x20 && c < 0x7f) {
            g_string_append_c(out, (char)c);
            i++;
        } else if (c >= 0x80) {
            gunichar u = g_utf8_get_char_validated(text + i, (gssize)(n - i));
            if (u == (gunichar)-1 || u == (gunichar)-2) {
                g_string_append_printf(out, "\\x%02X", c);   /* not UTF-8: shown as a byte */
                i++;
            } else {
                const char *next = g_utf8_next_char(text + i);
                g_string_append_len(out, text + i, next - (text + i));
                i = (gsize)(next - text);
            }
        } else {
            g_string_append_printf(out, "\\x%02X", c);   /* control characters */
            i++;
        }
        shown++;
    }
    g_string_append(out, i < n ? "\"... (" : "\"");
    if (i < n)
        g_string_append_printf(out, "%zu bytes in all)", (size_t)n);
    return g_string_free(out, FALSE);
}

/* ---- the strict JSON check (one pass, no recursion) ---- */

typedef struct {
    char kind;              /* '{' or '[' */
    guint64 index;          /* element index of an array */
    GString *key;           /* the current key of an object */
    GHashTable *keys;       /* the keys seen in this object */
} Frame;

typedef struct {
    const char *text;
    gsize n;
    const char *what;
    Frame stack[BM_JSON_MAX_DEPTH];
    guint depth;
    GError **error;
} Scan;

/* "WHAT: line L, column C (byte B), at donors[0]."density_cm3": [not valid
 * JSON: ]MESSAGE": grammar errors say "not valid JSON", refusals of valid
 * JSON (depth, a repeated key, number ranges) do not. */
static gboolean scan_vfail(Scan *s, gsize pos, gboolean grammar, const char *fmt, va_list ap)
    G_GNUC_PRINTF(4, 0);
static gboolean scan_vfail(Scan *s, gsize pos, gboolean grammar, const char *fmt, va_list ap)
{
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    gsize line = 1, col = 1;
    for (gsize i = 0; i < pos && i < s->n; i++) {
        if (s->text[i] == '\n') {
            line++;
            col = 1;
        } else if (((guchar)s->text[i] & 0xC0) != 0x80) {
            col++;
        }
    }
    g_autoptr(GString) path = g_string_new(NULL);
    for (guint d = 0; d < s->depth; d++) {
        Frame *f = &s->stack[d];
        if (f->kind == '[') {
            g_string_append_printf(path, "[%" G_GUINT64_FORMAT "]", f->index);
        } else if (f->key->len) {
            g_autofree char *k = bm_text_for_message(f->key->str, (gssize)f->key->len);
            g_string_append_printf(path, "%s%s", path->len ? "." : "", k);
        }
    }
    g_set_error(s->error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "%s: line %zu, column %zu (byte %zu)%s%s: %s%s", s->what, (size_t)line,
                (size_t)col, (size_t)pos, path->len ? ", at " : "", path->str,
                grammar ? "not valid JSON: " : "", msg);
    return FALSE;
}

static gboolean scan_fail(Scan *s, gsize pos, const char *fmt, ...) G_GNUC_PRINTF(3, 4);
static gboolean scan_fail(Scan *s, gsize pos, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    scan_vfail(s, pos, TRUE, fmt, ap);
    va_end(ap);
    return FALSE;
}

static gboolean scan_refuse(Scan *s, gsize pos, const char *fmt, ...) G_GNUC_PRINTF(3, 4);
static gboolean scan_refuse(Scan *s, gsize pos, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    scan_vfail(s, pos, FALSE, fmt, ap);
    va_end(ap);
    return FALSE;
}

static int hex_digit(char c)
{
    return g_ascii_isxdigit(c) ? g_ascii_xdigit_value(c) : -1;
}

static gboolean scan_hex4(Scan *s, gsize at, gunichar *out)
{
    if (at + 4 > s->n)
        return scan_fail(s, at, "a \\u escape needs four hexadecimal digits");
    gunichar v = 0;
    for (int k = 0; k < 4; k++) {
        int d = hex_digit(s->text[at + (gsize)k]);
        if (d < 0)
            return scan_fail(s, at, "a \\u escape needs four hexadecimal digits");
        v = v * 16 + (gunichar)d;
    }
    *out = v;
    return TRUE;
}

/* The string starting at *pos (the opening quote); *pos ends after the
 * closing quote. Its value is appended to decoded when that is not NULL. */
static gboolean scan_string(Scan *s, gsize *pos, GString *decoded)
{
    gsize i = *pos + 1, run = i;
    for (;;) {
        if (i >= s->n)
            return scan_fail(s, *pos, "a string that is never closed");
        guchar c = (guchar)s->text[i];
        if (c == '"' || c == '\\' || c < 0x20) {
            const char *bad = NULL;
            if (!g_utf8_validate(s->text + run, (gssize)(i - run), &bad))
                return scan_fail(s, (gsize)(bad - s->text), "byte \\x%02X in a string is "
                                 "not UTF-8 text", (guchar)*bad);
            if (decoded)
                g_string_append_len(decoded, s->text + run, (gssize)(i - run));
        }
        if (c == '"') {
            *pos = i + 1;
            return TRUE;
        }
        if (c < 0x20)
            return scan_fail(s, i, c == 0 ? "a NUL byte inside a string"
                             : "control character \\x%02X inside a string (write it as an "
                               "escape such as \\n)", c);
        if (c != '\\') {
            i++;
            continue;
        }
        if (i + 1 >= s->n)
            return scan_fail(s, *pos, "a string that is never closed");
        char e = s->text[i + 1];
        const char *simple = strchr("\"\\/bfnrt", e);
        if (e && simple) {
            static const char to[] = "\"\\/\b\f\n\r\t";
            if (decoded)
                g_string_append_c(decoded, to[simple - "\"\\/bfnrt"]);
            i += 2;
        } else if (e == 'u') {
            gunichar u;
            if (!scan_hex4(s, i + 2, &u))
                return FALSE;
            gsize len = 6;
            if (u >= 0xD800 && u <= 0xDBFF) {
                gunichar lo;
                if (i + 12 > s->n || s->text[i + 6] != '\\' || s->text[i + 7] != 'u'
                    || !scan_hex4(s, i + 8, &lo) || lo < 0xDC00 || lo > 0xDFFF) {
                    g_clear_error(s->error);
                    return scan_fail(s, i, "\\u%04X is half a surrogate pair without its "
                                     "other half", u);
                }
                u = 0x10000 + ((u - 0xD800) << 10) + (lo - 0xDC00);
                len = 12;
            } else if (u >= 0xDC00 && u <= 0xDFFF) {
                return scan_fail(s, i, "\\u%04X is half a surrogate pair without its other "
                                 "half", u);
            } else if (u == 0) {
                return scan_fail(s, i, "\\u0000 (a NUL character) cannot be held in a string");
            }
            if (decoded)
                g_string_append_unichar(decoded, u);
            i += len;
        } else {
            return scan_fail(s, i, "\\%c is not a JSON escape", g_ascii_isprint(e) ? e : '?');
        }
        run = i;
    }
}

/* A number by JSON's grammar; integers must fit in 64 bits (json-glib reads
 * them as gint64 and would wrap), reals must not overflow a double. */
static gboolean scan_number(Scan *s, gsize *pos)
{
    const char *t = s->text;
    gsize i = *pos, start = i;
    gboolean negative = t[i] == '-';
    if (negative)
        i++;
    gsize digits = i;
    if (i < s->n && t[i] == '0') {
        i++;
        if (i < s->n && g_ascii_isdigit(t[i]))
            return scan_fail(s, start, "a number with a leading zero is not JSON");
    } else if (i < s->n && g_ascii_isdigit(t[i])) {
        while (i < s->n && g_ascii_isdigit(t[i]))
            i++;
    } else {
        return scan_fail(s, start, "'-' must be followed by digits");
    }
    gsize int_end = i;
    gboolean real = FALSE;
    if (i < s->n && t[i] == '.') {
        real = TRUE;
        i++;
        if (i >= s->n || !g_ascii_isdigit(t[i]))
            return scan_fail(s, start, "a decimal point must be followed by digits");
        while (i < s->n && g_ascii_isdigit(t[i]))
            i++;
    }
    if (i < s->n && (t[i] == 'e' || t[i] == 'E')) {
        real = TRUE;
        i++;
        if (i < s->n && (t[i] == '+' || t[i] == '-'))
            i++;
        if (i >= s->n || !g_ascii_isdigit(t[i]))
            return scan_fail(s, start, "an exponent must have digits");
        while (i < s->n && g_ascii_isdigit(t[i]))
            i++;
    }
    *pos = i;
    g_autofree char *shown = bm_text_for_message(t + start, (gssize)(i - start));
    if (!real) {
        static const char max[] = "9223372036854775807", min[] = "9223372036854775808";
        gsize nd = int_end - digits;
        const char *limit = negative ? min : max;
        if (nd > 19 || (nd == 19 && memcmp(t + digits, limit, 19) > 0))
            return scan_refuse(s, start, "the integer %s is beyond the 64-bit integers JSON is "
                             "read with (-2^63 .. 2^63 - 1); write it with a decimal point or "
                             "an exponent if a real number is meant", shown);
        return TRUE;
    }
    g_autofree char *copy = g_strndup(t + start, i - start);
    double v = g_ascii_strtod(copy, NULL);
    if (!isfinite(v))
        return scan_refuse(s, start, "the number %s is beyond the range of double-precision "
                         "numbers (about 1.8e308)", shown);
    return TRUE;
}

static gboolean scan_unexpected(Scan *s, gsize i, const char *expected)
{
    const char *t = s->text;
    guchar c = (guchar)t[i];
    if (c == '/' && i + 1 < s->n && (t[i + 1] == '*' || t[i + 1] == '/'))
        return scan_fail(s, i, "comments are not JSON (%s)", t[i + 1] == '*' ? "/* */" : "//");
    if (c == '\'')
        return scan_fail(s, i, "single-quoted strings are not JSON: use double quotes");
    if (c == 0)
        return scan_fail(s, i, "a NUL byte; a JSON text holds no NUL");
    if (i == 0 && s->n >= 3 && memcmp(t, "\xEF\xBB\xBF", 3) == 0)
        return scan_fail(s, i, "a UTF-8 byte-order mark; save the file without it");
    gsize w = i + (c == '-' || c == '+');
    if (w + 3 <= s->n && (g_ascii_strncasecmp(t + w, "nan", 3) == 0
                          || g_ascii_strncasecmp(t + w, "inf", 3) == 0))
        return scan_fail(s, i, "JSON has no NaN or Infinity (numbers must be finite)");
    if (c >= 0x21 && c < 0x7f)
        return scan_fail(s, i, "unexpected character '%c', expected %s", c, expected);
    return scan_fail(s, i, "unexpected byte \\x%02X, expected %s", c, expected);
}

static gboolean scan_literal(Scan *s, gsize *pos)
{
    static const char *const words[] = { "true", "false", "null" };
    for (gsize w = 0; w < G_N_ELEMENTS(words); w++) {
        gsize len = strlen(words[w]);
        if (s->n - *pos >= len && memcmp(s->text + *pos, words[w], len) == 0) {
            *pos += len;
            return TRUE;
        }
    }
    return scan_unexpected(s, *pos, "a value");
}

gboolean bm_json_check_text(const char *text, gssize length, const char *what, GError **error)
{
    Scan s = { .text = text ? text : "", .what = what ? what : "JSON text", .error = error };
    s.n = length < 0 ? strlen(s.text) : (gsize)length;
    enum { VALUE, VALUE_OR_CLOSE, KEY, KEY_OR_CLOSE, COLON, AFTER, DONE } state = VALUE;
    gboolean ok = TRUE;
    gsize i = 0;
    while (ok) {
        while (i < s.n && (s.text[i] == ' ' || s.text[i] == '\t' || s.text[i] == '\n'
                           || s.text[i] == '\r'))
            i++;
        if (i >= s.n) {
            if (s.depth == 0 && state == VALUE)
                ok = scan_fail(&s, i, "no JSON value (the text is empty)");
            else if (s.depth > 0)
                ok = scan_fail(&s, i, "the text ends inside %s",
                               s.stack[s.depth - 1].kind == '{' ? "an object" : "an array");
            break;
        }
        char c = s.text[i];
        Frame *top = s.depth ? &s.stack[s.depth - 1] : NULL;
        switch (state) {
        case DONE:
            ok = scan_fail(&s, i, "more text after the end of the JSON value (a document "
                           "holds one value: one request, one object)");
            break;
        case VALUE_OR_CLOSE:
            if (c == ']') {
                s.depth--;
                i++;
                state = AFTER;
                break;
            }
            G_GNUC_FALLTHROUGH;
        case VALUE:
            if (c == '{' || c == '[') {
                if (s.depth == BM_JSON_MAX_DEPTH) {
                    ok = scan_refuse(&s, i, "JSON nested deeper than %d levels; no bandmass "
                                   "document needs that many", BM_JSON_MAX_DEPTH);
                    break;
                }
                Frame *f = &s.stack[s.depth++];
                f->kind = c;
                f->index = 0;
                if (!f->key)
                    f->key = g_string_new(NULL);
                g_string_truncate(f->key, 0);
                if (f->keys)
                    g_hash_table_remove_all(f->keys);
                i++;
                state = c == '{' ? KEY_OR_CLOSE : VALUE_OR_CLOSE;
            } else if (c == '"') {
                ok = scan_string(&s, &i, NULL);
                state = AFTER;
            } else if ((c == '-' && (i + 1 >= s.n || g_ascii_isdigit(s.text[i + 1])))
                       || g_ascii_isdigit(c)) {
                ok = scan_number(&s, &i);
                state = AFTER;
            } else if (c == 't' || c == 'f' || (c == 'n' && (i + 1 >= s.n
                                                             || s.text[i + 1] != 'a'))) {
                ok = scan_literal(&s, &i);
                state = AFTER;
            } else {
                ok = scan_unexpected(&s, i, "a value");
            }
            break;
        case KEY_OR_CLOSE:
            if (c == '}') {
                s.depth--;
                i++;
                state = AFTER;
                break;
            }
            G_GNUC_FALLTHROUGH;
        case KEY: {
            if (c != '"') {
                ok = scan_unexpected(&s, i, "a key in double quotes");
                break;
            }
            gsize at = i;
            g_string_truncate(top->key, 0);
            ok = scan_string(&s, &i, top->key);
            if (!ok)
                break;
            if (!top->keys)
                top->keys = g_hash_table_new_full(g_str_hash, g_str_equal, g_free, NULL);
            if (memchr(top->key->str, '\0', top->key->len)) {
                ok = scan_fail(&s, at, "a key holding a NUL");
                break;
            }
            if (!g_hash_table_add(top->keys, g_strdup(top->key->str))) {
                g_autofree char *dup = bm_text_for_message(top->key->str, (gssize)top->key->len);
                g_string_truncate(top->key, 0);   /* the path names the enclosing object */
                ok = scan_refuse(&s, at, "the key %s appears twice in one object (only one "
                               "value can be meant)", dup);
                break;
            }
            state = COLON;
            break;
        }
        case COLON:
            if (c != ':') {
                ok = scan_unexpected(&s, i, "':' after the key");
                break;
            }
            i++;
            state = VALUE;
            break;
        case AFTER:
            if (!top) {
                state = DONE;
                break;
            }
            if (c == ',') {
                i++;
                if (top->kind == '[') {
                    top->index++;
                    state = VALUE;
                } else {
                    state = KEY;
                }
            } else if ((c == '}' && top->kind == '{') || (c == ']' && top->kind == '[')) {
                s.depth--;
                i++;
            } else {
                ok = scan_unexpected(&s, i, top->kind == '{' ? "',' or '}'" : "',' or ']'");
            }
            break;
        }
    }
    for (guint d = 0; d < BM_JSON_MAX_DEPTH; d++) {
        if (s.stack[d].key)
            g_string_free(s.stack[d].key, TRUE);
        if (s.stack[d].keys)
            g_hash_table_destroy(s.stack[d].keys);
    }
    return ok;
}

gboolean bm_json_check_depth(const char *text, gssize length, const char *what, GError **error)
{
    return bm_json_check_text(text, length, what, error);
}

JsonNode *bm_json_parse(const char *text, gssize length, const char *what, GError **error)
{
    if (!bm_json_check_text(text, length, what, error))
        return NULL;
    g_autoptr(JsonParser) parser = json_parser_new_immutable();
    g_autoptr(GError) parse = NULL;
    if (!json_parser_load_from_data(parser, text, length, &parse)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: not valid JSON: %s",
                    what ? what : "JSON text", parse->message);
        return NULL;
    }
    JsonNode *root = json_parser_get_root(parser);
    if (!root) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: no JSON value",
                    what ? what : "JSON text");
        return NULL;
    }
    return json_node_copy(root);
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

gssize bm_json_matrix_columns(JsonArray *a)
{
    gssize cols = -1;
    for (guint i = 0; i < json_array_get_length(a); i++) {
        JsonNode *r = json_array_get_element(a, i);
        if (!JSON_NODE_HOLDS_ARRAY(r))
            return -1;
        JsonArray *row = json_node_get_array(r);
        guint len = json_array_get_length(row);
        if (len == 0 || (cols >= 0 && (gssize)len != cols))
            return -1;
        for (guint j = 0; j < len; j++) {
            JsonNode *e = json_array_get_element(row, j);
            if (JSON_NODE_HOLDS_NULL(e))
                continue;
            GType t = JSON_NODE_HOLDS_VALUE(e) ? json_node_get_value_type(e) : G_TYPE_INVALID;
            if (t != G_TYPE_DOUBLE && t != G_TYPE_INT64)
                return -1;
        }
        cols = len;
    }
    return cols;
}
