/* options.c: option text -> JSON values. A number is what the user wrote or
 * it is refused: finite decimal numbers only, integers kept exact, lists and
 * ranges expanded here, every message naming the option as it was typed. */
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "options.h"
#include "bm-json.h"

#define RANGE_FORMS "a number (300), a list (100,200,300), a linear range START:STOP:STEP " \
                    "(100:500:50) or a geometric range START:STOP:xFACTOR (1e14:1e20:x10), " \
                    "or a mix (50,100:500:100)"

static gboolean invalid(GError **error, const char *fmt, ...) G_GNUC_PRINTF(2, 3);
static gboolean invalid(GError **error, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT, msg);
    return FALSE;
}

/* Length of the decimal number at the start of s, 0 when there is none:
 * [+-] (digits [. [digits]] | . digits) [(e|E) [+-] digits]. *integer: no
 * point and no exponent. */
static size_t decimal_prefix(const char *s, gboolean *integer)
{
    size_t i = 0, digits = 0;
    if (s[i] == '+' || s[i] == '-')
        i++;
    while (g_ascii_isdigit(s[i]))
        i++, digits++;
    gboolean plain = TRUE;
    if (s[i] == '.') {
        plain = FALSE;
        i++;
        while (g_ascii_isdigit(s[i]))
            i++, digits++;
    }
    if (digits == 0)
        return 0;
    if (s[i] == 'e' || s[i] == 'E') {
        size_t j = i + 1;
        if (s[j] == '+' || s[j] == '-')
            j++;
        if (g_ascii_isdigit(s[j])) {
            while (g_ascii_isdigit(s[j]))
                j++;
            i = j;
            plain = FALSE;
        }
    }
    if (integer)
        *integer = plain;
    return i;
}

/* What a value of p looks like, for messages. */
static char *number_hint(const BmParam *p)
{
    if (p->unit)
        return g_strdup_printf("write the number alone, in %s (a decimal number such as 300, "
                               "0.5 or 1e16)", p->unit);
    return g_strdup("write a decimal number (such as 300, 0.5 or 1e16)");
}

/* Why text (not a whole decimal number) is refused. */
static gboolean not_a_number(const BmParam *p, const char *option, const char *text,
                             GError **error)
{
    g_autofree char *hint = number_hint(p);
    const char *s = text + (text[0] == '+' || text[0] == '-');
    gboolean integer;
    size_t len = decimal_prefix(text, &integer);
    const char *why = "is not a number";
    if (s[0] == '0' && (s[1] == 'x' || s[1] == 'X'))
        why = "is a hexadecimal number, which options do not take";
    else if (!g_ascii_strncasecmp(s, "inf", 3) || !g_ascii_strncasecmp(s, "nan", 3))
        why = "is not a finite number";
    else if (len > 0 && (g_ascii_isalpha(text[len]) || text[len] == ' ' || text[len] == '%'))
        why = "carries a unit, which is not part of the value";
    return invalid(error, "option %s: \"%s\" %s: %s", option, text, why, hint);
}

/* A finite double from a whole decimal number, or an error. */
static gboolean parse_real(const BmParam *p, const char *option, const char *text,
                           double *v, gboolean *integer, GError **error)
{
    size_t len = decimal_prefix(text, integer);
    if (len == 0 || text[len] != '\0')
        return not_a_number(p, option, text, error);
    errno = 0;
    *v = g_ascii_strtod(text, NULL);
    if (errno == ERANGE && isinf(*v))
        return invalid(error, "option %s: \"%s\" is beyond the range of a double "
                       "(about 1.8e308)", option, text);
    if (errno == ERANGE && *v == 0.0 && strpbrk(text, "123456789") != NULL
        && strpbrk(text, "123456789") < text + strcspn(text, "eE"))
        return invalid(error, "option %s: \"%s\" is too small to be represented "
                       "(below about 4.9e-324); write 0 if zero is meant", option, text);
    return TRUE;
}

/* An exact 64-bit integer from an integer literal, or an error. */
static gboolean parse_int64(const char *option, const char *text, gint64 *v, GError **error)
{
    errno = 0;
    char *end = NULL;
    long long x = strtoll(text, &end, 10);
    if (errno == ERANGE || *end != '\0')
        return invalid(error, "option %s: \"%s\" is beyond the range of a 64-bit integer "
                       "(%" G_GINT64_FORMAT " to %" G_GINT64_FORMAT ")", option, text,
                       G_MININT64, G_MAXINT64);
    *v = (gint64)x;
    return TRUE;
}

/* 15 significant digits: a range's values as they would be written
 * (0.1:0.5:0.1 gives 0.3, not 0.30000000000000004). */
static double as_written(double v)
{
    char buf[G_ASCII_DTOSTR_BUF_SIZE];
    g_ascii_formatd(buf, sizeof buf, "%.15g", v);
    return g_ascii_strtod(buf, NULL);
}

static const BmParam any_number = { .name = "", .kinds = BM_VALUE_NUMBER };

double *bm_cli_expand_range(const char *item, const char *option, gsize *n, GError **error)
{
    g_auto(GStrv) f = g_strsplit(item, ":", -1);
    if (g_strv_length(f) != 3) {
        invalid(error, "option %s: \"%s\" is not a range: write START:STOP:STEP (100:500:50) "
                "or START:STOP:xFACTOR (1e14:1e20:x10)", option, item);
        return NULL;
    }
    gboolean geometric = f[2][0] == 'x';
    double start, stop, step;
    gboolean integer;
    const char *what[3] = { "START", "STOP", geometric ? "FACTOR" : "STEP" };
    double *slot[3] = { &start, &stop, &step };
    for (int i = 0; i < 3; i++) {
        const char *t = i == 2 && geometric ? f[2] + 1 : f[i];
        g_autoptr(GError) e = NULL;
        if (!parse_real(&any_number, option, t, slot[i], &integer, &e)) {
            invalid(error, "option %s: range \"%s\": %s \"%s\" is not a finite decimal number "
                    "(write START:STOP:STEP, 100:500:50, or START:STOP:xFACTOR, "
                    "1e14:1e20:x10; no units)", option, item, what[i], t);
            return NULL;
        }
    }
    double count;
    if (geometric) {
        if (!(start > 0 && stop > 0) || !(step > 0) || step == 1.0
            || (stop > start && step < 1) || (stop < start && step > 1)) {
            invalid(error, "option %s: range \"%s\": a geometric range START:STOP:xFACTOR "
                    "needs START and STOP > 0 and a FACTOR > 1 from low to high (< 1 from "
                    "high to low)", option, item);
            return NULL;
        }
        count = floor(log(stop / start) / log(step) + 1e-9) + 1;
    } else {
        if (step == 0 || (stop - start) * step < 0) {
            invalid(error, "option %s: range \"%s\": the STEP of START:STOP:STEP must be "
                    "non-zero and lead from START to STOP", option, item);
            return NULL;
        }
        count = floor((stop - start) / step + 1e-9) + 1;
    }
    if (!(count >= 1 && count <= BM_CLI_MAX_RANGE_VALUES)) {
        invalid(error, "option %s: range \"%s\" gives %.3g values (at most %d)", option, item,
                count, BM_CLI_MAX_RANGE_VALUES);
        return NULL;
    }
    *n = (gsize)count;
    double *v = g_new(double, *n);
    for (gsize i = 0; i < *n; i++)
        v[i] = as_written(geometric ? start * pow(step, (double)i) : start + (double)i * step);
    /* the last value is STOP when the steps land on it within rounding */
    double last = v[*n - 1];
    if (fabs(last - stop) <= 1e-9 * fabs(stop))
        v[*n - 1] = stop;
    return v;
}

/* A number node for a single value of p. */
static JsonNode *single_number(const BmParam *p, const char *option, const char *text,
                               GError **error)
{
    double v;
    gboolean integer;
    if (!parse_real(p, option, text, &v, &integer, error))
        return NULL;
    JsonNode *node = json_node_new(JSON_NODE_VALUE);
    gboolean integer_only = (p->kinds & BM_VALUE_INTEGER) && !(p->kinds & BM_VALUE_NUMBER);
    if (integer) {
        gint64 i = 0;
        if (parse_int64(option, text, &i, integer_only ? error : NULL)) {
            json_node_set_int(node, i);
            return node;
        }
        if (integer_only) {
            json_node_unref(node);
            return NULL;
        }
    } else if (integer_only) {
        /* 2e3 is the integer 2000; 1e23 or 2.5 is no integer the key can take */
        if (v != floor(v) || fabs(v) > 9007199254740992.0) {
            json_node_unref(node);
            invalid(error, "option %s: \"%s\" is not an integer that can be used exactly "
                    "(write a whole number between -2^53 and 2^53, such as 3)", option, text);
            return NULL;
        }
        json_node_set_int(node, (gint64)v);
        return node;
    }
    json_node_set_double(node, v);
    return node;
}

/* A list of numbers and ranges. */
static JsonNode *number_list(const BmParam *p, const char *option, const char *text,
                             GError **error)
{
    g_auto(GStrv) items = g_strsplit(text, ",", -1);
    g_autoptr(JsonArray) a = json_array_new();
    for (guint i = 0; items[i]; i++) {
        const char *item = items[i];
        if (item[0] == '\0') {
            invalid(error, "option %s: \"%s\" has an empty item: write %s", option, text,
                    RANGE_FORMS);
            return NULL;
        }
        if (strchr(item, ':')) {
            gsize n;
            g_autofree double *v = bm_cli_expand_range(item, option, &n, error);
            if (!v)
                return NULL;
            if (json_array_get_length(a) + n > BM_CLI_MAX_RANGE_VALUES) {
                invalid(error, "option %s: more than %d values", option,
                        BM_CLI_MAX_RANGE_VALUES);
                return NULL;
            }
            for (gsize k = 0; k < n; k++)
                json_array_add_double_element(a, v[k]);
            continue;
        }
        double v;
        gboolean integer;
        g_autoptr(GError) e = NULL;
        if (!parse_real(p, option, item, &v, &integer, &e)) {
            if (!items[1]) {
                /* a single item: say what a number is and what a list may hold */
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s; the option takes %s",
                            e->message, RANGE_FORMS);
            } else {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "%s (item %u of \"%s\"); the option takes %s", e->message, i + 1,
                            text, RANGE_FORMS);
            }
            return NULL;
        }
        gint64 exact = 0;
        if (integer && parse_int64(option, item, &exact, NULL)
            && exact > -((gint64)1 << 53) && exact < ((gint64)1 << 53))
            json_array_add_int_element(a, exact);
        else
            json_array_add_double_element(a, v);
    }
    JsonNode *node = json_node_new(JSON_NODE_ARRAY);
    json_node_set_array(node, a);
    return node;
}

gboolean bm_cli_boolean_word(const char *text, gboolean *value)
{
    if (!strcmp(text, "true") || !strcmp(text, "false")) {
        *value = text[0] == 't';
        return TRUE;
    }
    return FALSE;
}

JsonNode *bm_cli_option_value(const BmParam *p, const char *option, const char *text,
                              GError **error)
{
    if ((p->kinds & (BM_VALUE_ARRAY | BM_VALUE_OBJECT)) && (text[0] == '[' || text[0] == '{')) {
        g_autofree char *what = g_strdup_printf("option %s", option);
        return bm_json_parse(text, -1, what, error);
    }
    gboolean numeric_kinds = (p->kinds & (BM_VALUE_NUMBER | BM_VALUE_INTEGER)) != 0;
    gboolean looks_numeric = decimal_prefix(text, NULL) > 0 || text[0] == '-'
                             || text[0] == '+' || text[0] == '.';
    if (p->kinds & BM_VALUE_STRING) {
        /* a key that is a number or a name (a band): numbers are numbers */
        gboolean integer;
        size_t len = decimal_prefix(text, &integer);
        if (numeric_kinds && len > 0 && text[len] == '\0')
            return single_number(p, option, text, error);
        JsonNode *node = json_node_new(JSON_NODE_VALUE);
        json_node_set_string(node, text);
        return node;
    }
    if (p->kinds & BM_VALUE_ARRAY) {
        gboolean list = strchr(text, ',') || strchr(text, ':');
        if (numeric_kinds && !list) {
            g_autoptr(GError) e = NULL;
            JsonNode *node = single_number(p, option, text, &e);
            if (!node)
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s; the option takes %s",
                            e->message, RANGE_FORMS);
            return node;
        }
        if (numeric_kinds || looks_numeric)
            return number_list(p, option, text, error);
        invalid(error, "option %s: \"%s\" is not a JSON array: write it as JSON ('[...]'; "
                "bandmass OP --help says what the elements are)", option, text);
        return NULL;
    }
    if (numeric_kinds) {
        if (strchr(text, ',') || strchr(text, ':')) {
            g_autofree char *hint = number_hint(p);
            invalid(error, "option %s: \"%s\": the option takes one number (lists and "
                    "ranges are for list options): %s", option, text, hint);
            return NULL;
        }
        return single_number(p, option, text, error);
    }
    if (p->kinds & BM_VALUE_BOOLEAN) {
        gboolean b;
        if (!bm_cli_boolean_word(text, &b)) {
            invalid(error, "option %s: \"%s\" is not true or false (the option alone means "
                    "true)", option, text);
            return NULL;
        }
        JsonNode *node = json_node_new(JSON_NODE_VALUE);
        json_node_set_boolean(node, b);
        return node;
    }
    if (p->kinds & BM_VALUE_OBJECT) {
        invalid(error, "option %s: \"%s\" is not a JSON object: write it as JSON ('{...}')",
                option, text);
        return NULL;
    }
    invalid(error, "option %s: cannot use \"%s\" here", option, text);
    return NULL;
}
