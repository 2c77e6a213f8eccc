/* bandmass_r.c: the R host (a shared object for dyn.load, called with .Call
 * from bandmass.R): bandmass_call(op, request) builds the request object
 * straight from the R value, calls the registry on it (bm_registry_invoke)
 * and turns the response object straight into R values: no JSON text in
 * between. */
#include <math.h>
#include <stdint.h>
#include <string.h>
#include "registry.h"
#include "bm-json.h"
/* after GLib: R's Boolean.h replaces GLib's TRUE and FALSE macros by its
 * own enumeration constants of the same values */
#define R_NO_REMAP
#define STRICT_R_HEADERS
#include <Rinternals.h>
#include <R_ext/Rdynload.h>

/*
 * R -> JSON (requests):
 *   named list -> object (every element named, names distinct);
 *   unnamed list -> array of its elements; data frame -> array of one object
 *   per row; NULL -> null; a vector (double, integer, logical, character)
 *   of length 1 -> number, boolean or string, of another length -> array
 *   (I(x) sends an array whatever the length; so does a top-level key that
 *   takes only an array); matrix -> array of its rows (m[1, ] first);
 *   bit64 integer64 -> JSON integer, exact to 2^63 - 1.
 *   Numbers are sent exactly: a whole double below 2^53 in size goes as a
 *   JSON integer, any other double as that very double (1e17, 1e300, -0;
 *   from 2^53 up a double, which keys that take an integer refuse).
 *   Refused, naming the path of the value (request$donors[[1]]$density_cm3):
 *   NA, NaN and Inf; text that is not UTF-8 (or marked as bytes); and every
 *   type or class listed in refusal() (S4 objects such as the Matrix
 *   package's sparse matrices, complex, raw, factors, other classed vectors,
 *   environments, functions, arrays of more than 2 dimensions, vectors
 *   with names, lists only partly named or with repeated names).
 * JSON -> R (responses):
 *   object -> named list; number -> double; boolean -> logical;
 *   string -> character; null -> NULL (NA inside a vector or column);
 *   array of numbers, of booleans or of strings (null as NA) -> vector;
 *   array of equal-length number arrays -> matrix, rows = outer index;
 *   array of objects with the same keys in the same order, whose values
 *   are scalars or flat arrays -> data frame (a key with scalars of one
 *   type is a plain column, any other a list column); any other array ->
 *   unnamed list; [] -> list(), except "warnings" and "warning_codes",
 *   which are always character vectors.
 */

typedef enum {
    BM_R_INVALID_INPUT,
    BM_R_IO,
    BM_R_UNKNOWN_OPERATION,
    BM_R_NO_CONVERGENCE,
    BM_R_INTERNAL,
    BM_R_USAGE
} BmRFailure;

/* The code a condition carries (as the warning codes, kebab-case) and its
 * class, one row per kind of failure. */
static const struct {
    const char *code, *class_name;
} failure_names[] = {
    [BM_R_INVALID_INPUT]     = { "invalid-input", "bandmass_invalid_input" },
    [BM_R_IO]                = { "io", "bandmass_io" },
    [BM_R_UNKNOWN_OPERATION] = { "unknown-operation", "bandmass_unknown_operation" },
    [BM_R_NO_CONVERGENCE]    = { "no-convergence", "bandmass_no_convergence" },
    [BM_R_INTERNAL]          = { "internal", "bandmass_internal" },
    [BM_R_USAGE]             = { "usage", "bandmass_usage" },
};

typedef struct {
    gboolean failed;
    BmRFailure kind;
    char message[1024];
} Failure;

static gboolean fail(Failure *f, BmRFailure kind, const char *fmt, ...) G_GNUC_PRINTF(3, 4);
static gboolean fail(Failure *f, BmRFailure kind, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    f->failed = TRUE;
    f->kind = kind;
    g_vsnprintf(f->message, sizeof f->message, fmt, ap);
    va_end(ap);
    return FALSE;
}

/* The path of the value being converted, as R would index it
 * (request$donors[[1]]$density_cm3). A fixed buffer: nothing to free when
 * R unwinds out of a conversion. */
typedef struct {
    char text[512];
    size_t len;
    int depth;
} Path;

static size_t path_push(Path *p, const char *fmt, ...) G_GNUC_PRINTF(2, 3);
static size_t path_push(Path *p, const char *fmt, ...)
{
    size_t old = p->len;
    if (p->len < sizeof p->text - 1) {
        va_list ap;
        va_start(ap, fmt);
        g_vsnprintf(p->text + p->len, sizeof p->text - p->len, fmt, ap);
        va_end(ap);
        p->len += strlen(p->text + p->len);
    }
    p->depth++;
    return old;
}

static void path_pop(Path *p, size_t old)
{
    p->len = old;
    p->text[old] = '\0';
    p->depth--;
}

/* ---- what cannot be sent: every refusal is here ---- */

/* The first class of x, or NULL when it has none. */
static const char *class_of(SEXP x)
{
    SEXP c = Rf_getAttrib(x, R_ClassSymbol);
    return TYPEOF(c) == STRSXP && XLENGTH(c) > 0 ? CHAR(STRING_ELT(c, 0)) : NULL;
}

/* Whether x is a bit64 integer64 vector: int64 values in the bits of doubles. */
static gboolean is_integer64(SEXP x)
{
    return TYPEOF(x) == REALSXP && Rf_inherits(x, "integer64");
}

/* Why a value of this type, class or shape cannot be sent, or NULL when it can. */
static const char *refusal(SEXP x)
{
    if (IS_S4_OBJECT(x))
        return "an S4 object cannot be sent (a sparse matrix of the Matrix package: "
               "use as.matrix())";
    switch (TYPEOF(x)) {
    case NILSXP:
        return NULL;
    case VECSXP: {
        const char *c = class_of(x);
        if (c && !Rf_inherits(x, "data.frame") && !Rf_inherits(x, "AsIs"))
            return "a list with a class cannot be sent (use unclass() or a plain list)";
        SEXP names = Rf_getAttrib(x, R_NamesSymbol);
        if (names != R_NilValue && !Rf_inherits(x, "data.frame")) {
            R_xlen_t n = XLENGTH(names), named = 0;
            for (R_xlen_t i = 0; i < n; i++)
                named += STRING_ELT(names, i) != NA_STRING && CHAR(STRING_ELT(names, i))[0];
            if (named != n)
                return "a list must have a name for every element (an object) or for none "
                       "(an array)";
            for (R_xlen_t i = 0; i < n; i++)
                for (R_xlen_t j = 0; j < i; j++)
                    if (strcmp(CHAR(STRING_ELT(names, i)), CHAR(STRING_ELT(names, j))) == 0)
                        return "a list with a repeated name cannot be sent (an object's keys "
                               "are distinct)";
        }
        return NULL;
    }
    case REALSXP: case INTSXP: case LGLSXP: case STRSXP: {
        if (Rf_isFactor(x))
            return "a factor cannot be sent (use as.character() for its labels)";
        const char *c = class_of(x);
        if (c && !Rf_inherits(x, "AsIs") && !is_integer64(x))
            return "a vector with a class cannot be sent (unclass() it to send the bare "
                   "numbers, in the unit the key names)";
        SEXP dim = Rf_getAttrib(x, R_DimSymbol);
        if (dim != R_NilValue && XLENGTH(dim) > 2)
            return "arrays of more than 2 dimensions cannot be sent";
        if (Rf_getAttrib(x, R_NamesSymbol) != R_NilValue)
            return "a vector with names cannot be sent (as.list() makes it an object, "
                   "unname() an array)";
        return NULL;
    }
    case CPLXSXP:
        return "complex numbers cannot be sent";
    case RAWSXP:
        return "raw bytes cannot be sent";
    case ENVSXP:
        return "an environment cannot be sent";
    case CLOSXP: case BUILTINSXP: case SPECIALSXP:
        return "a function cannot be sent";
    default:
        return "this type cannot be sent (use lists, numbers, logicals and character)";
    }
}

static gboolean refuse(SEXP x, const Path *path, Failure *f)
{
    const char *why = refusal(x);
    if (!why)
        return TRUE;
    const char *c = class_of(x);
    return fail(f, BM_R_INVALID_INPUT, "%s: a value of type %s%s%s: %s", path->text,
                Rf_type2char(TYPEOF(x)), c ? " and class " : "", c ? c : "", why);
}

static gboolean refuse_na(const Path *path, Failure *f)
{
    return fail(f, BM_R_INVALID_INPUT, "%s: NA (a missing value) cannot be sent", path->text);
}

static gboolean refuse_real(double v, const Path *path, Failure *f)
{
    if (isfinite(v))
        return TRUE;
    return fail(f, BM_R_INVALID_INPUT, ISNA(v)
                ? "%s: NA (a missing value) cannot be sent"
                : "%s: NaN and Inf cannot be sent (JSON has no such numbers)", path->text);
}

/* The UTF-8 text of a string element, or NULL after fail(). */
static const char *text_of(SEXP s, const Path *path, Failure *f)
{
    if (s == NA_STRING) {
        refuse_na(path, f);
        return NULL;
    }
    cetype_t ce = Rf_getCharCE(s);
    if (ce == CE_BYTES) {
        fail(f, BM_R_INVALID_INPUT, "%s: a string marked as bytes cannot be sent "
             "(give its encoding with Encoding() or iconv())", path->text);
        return NULL;
    }
    const char *t = ce == CE_UTF8 ? CHAR(s) : Rf_translateCharUTF8(s);
    const char *bad = NULL;
    if (!g_utf8_validate(t, -1, &bad)) {
        fail(f, BM_R_INVALID_INPUT, "%s: byte %zu (\\x%02X) is not UTF-8 text", path->text,
             (size_t)(bad - t) + 1, (unsigned)(guchar)*bad);
        return NULL;
    }
    return t;
}

/* ---- R -> JSON ---- */

/* The tree is built from the top: each node is put into its parent (as
 * null) before it is filled, so the root owns everything made so far when R
 * unwinds out of a conversion. */

static void set_real(JsonNode *n, double v)
{
    /* a whole double below 2^53 goes as an integer (so that keys which take
     * an integer accept it); anything else as the double itself: both exact */
    if (v == floor(v) && fabs(v) < 9007199254740992.0 && !(v == 0.0 && signbit(v))) {
        json_node_init_int(n, (gint64)v);
        return;
    }
    json_node_init_double(n, v);
}

/* Element i of an atomic vector (double, integer, integer64, logical,
 * character) into n, refusals checked. */
static gboolean fill_element(JsonNode *n, SEXP x, R_xlen_t i, const Path *path, Failure *f)
{
    switch (TYPEOF(x)) {
    case REALSXP: {
        if (is_integer64(x)) {
            gint64 v;
            memcpy(&v, &REAL(x)[i], sizeof v);
            if (v == INT64_MIN)   /* bit64's NA */
                return refuse_na(path, f);
            json_node_init_int(n, v);
            return TRUE;
        }
        double v = REAL(x)[i];
        if (!refuse_real(v, path, f))
            return FALSE;
        set_real(n, v);
        return TRUE;
    }
    case INTSXP:
        if (INTEGER(x)[i] == NA_INTEGER)
            return refuse_na(path, f);
        json_node_init_int(n, INTEGER(x)[i]);
        return TRUE;
    case LGLSXP:
        if (LOGICAL(x)[i] == NA_LOGICAL)
            return refuse_na(path, f);
        json_node_init_boolean(n, LOGICAL(x)[i] != 0);
        return TRUE;
    case STRSXP: {
        const char *t = text_of(STRING_ELT(x, i), path, f);
        if (!t)
            return FALSE;
        json_node_init_string(n, t);
        return TRUE;
    }
    default:
        /* refusal() lets no other atomic type through */
        return fail(f, BM_R_INTERNAL, "%s: unexpected type %s", path->text,
                    Rf_type2char(TYPEOF(x)));
    }
}

static JsonNode *new_element(JsonArray *a)
{
    JsonNode *e = json_node_init_null(json_node_alloc());
    json_array_add_element(a, e);
    return e;
}

static JsonNode *new_member(JsonObject *o, const char *name)
{
    JsonNode *e = json_node_init_null(json_node_alloc());
    json_object_set_member(o, name, e);
    return e;
}

static gboolean fill(JsonNode *n, SEXP x, gboolean as_array, Path *path, Failure *f);

/* An atomic vector or matrix into n. */
static gboolean fill_atomic(JsonNode *n, SEXP x, gboolean as_array, Path *path, Failure *f)
{
    SEXP dim = Rf_getAttrib(x, R_DimSymbol);
    R_xlen_t count = XLENGTH(x);
    if (dim != R_NilValue && XLENGTH(dim) == 2) {
        int rows = INTEGER(dim)[0], cols = INTEGER(dim)[1];
        JsonArray *out = json_array_sized_new((guint)rows);
        json_node_init_array(n, out);
        json_array_unref(out);
        for (int r = 0; r < rows; r++) {
            JsonArray *row = json_array_sized_new((guint)cols);
            json_node_init_array(new_element(out), row);
            json_array_unref(row);
            for (int c = 0; c < cols; c++) {
                size_t old = path_push(path, "[%d, %d]", r + 1, c + 1);
                gboolean ok = fill_element(new_element(row), x, r + (R_xlen_t)c * rows, path, f);
                path_pop(path, old);
                if (!ok)
                    return FALSE;
            }
        }
        return TRUE;
    }
    if (count == 1 && !as_array && !Rf_inherits(x, "AsIs"))
        return fill_element(n, x, 0, path, f);
    JsonArray *out = json_array_sized_new((guint)count);
    json_node_init_array(n, out);
    json_array_unref(out);
    for (R_xlen_t i = 0; i < count; i++) {
        size_t old = path_push(path, "[%td]", (ptrdiff_t)i + 1);
        gboolean ok = fill_element(new_element(out), x, i, path, f);
        path_pop(path, old);
        if (!ok)
            return FALSE;
    }
    return TRUE;
}

/* A data frame into n: one object per row, its columns as keys. */
static gboolean fill_data_frame(JsonNode *n, SEXP x, Path *path, Failure *f)
{
    SEXP names = Rf_getAttrib(x, R_NamesSymbol);
    R_xlen_t cols = XLENGTH(x);
    R_xlen_t rows = cols > 0 ? Rf_xlength(VECTOR_ELT(x, 0)) : 0;
    for (R_xlen_t c = 0; c < cols; c++) {
        SEXP col = VECTOR_ELT(x, c);
        const char *name = text_of(STRING_ELT(names, c), path, f);
        if (!name)
            return FALSE;
        size_t old = path_push(path, "$%s", name);
        gboolean ok = refuse(col, path, f);
        if (ok && Rf_inherits(col, "data.frame"))
            ok = fail(f, BM_R_INVALID_INPUT, "%s: a data frame inside a data frame cannot be "
                      "sent (use a list column)", path->text);
        if (ok && Rf_getAttrib(col, R_DimSymbol) != R_NilValue)
            ok = fail(f, BM_R_INVALID_INPUT, "%s: a matrix column of a data frame cannot be "
                      "sent (use a list column)", path->text);
        if (ok && Rf_xlength(col) != rows)
            ok = fail(f, BM_R_INTERNAL, "%s: columns of unequal length", path->text);
        path_pop(path, old);
        if (!ok)
            return FALSE;
    }
    JsonArray *out = json_array_sized_new((guint)rows);
    json_node_init_array(n, out);
    json_array_unref(out);
    for (R_xlen_t r = 0; r < rows; r++) {
        JsonObject *o = json_object_new();
        json_node_init_object(new_element(out), o);
        json_object_unref(o);
        for (R_xlen_t c = 0; c < cols; c++) {
            SEXP col = VECTOR_ELT(x, c);
            const char *name = text_of(STRING_ELT(names, c), path, f);   /* checked above */
            if (!name)
                return FALSE;
            size_t old = path_push(path, "$%s[%td]", name, (ptrdiff_t)r + 1);
            JsonNode *e = new_member(o, name);
            gboolean ok = TYPEOF(col) == VECSXP ? fill(e, VECTOR_ELT(col, r), FALSE, path, f)
                                                : fill_element(e, col, r, path, f);
            path_pop(path, old);
            if (!ok)
                return FALSE;
        }
    }
    return TRUE;
}

/* The parameter of op named name, or NULL. */
static const BmParam *param_named(const BmOperation *op, const char *name)
{
    for (const BmParam *p = op ? op->params : NULL; p && p->name; p++)
        if (strcmp(p->name, name) == 0)
            return p;
    return NULL;
}

/* A list into n: an object when named, an array otherwise. At the top of
 * a request (op given), a key that takes only an array gets one from a
 * vector of length 1 as well. */
static gboolean fill_list(JsonNode *n, SEXP x, const BmOperation *op, Path *path, Failure *f)
{
    SEXP names = Rf_getAttrib(x, R_NamesSymbol);
    R_xlen_t count = XLENGTH(x);
    if (names == R_NilValue) {
        JsonArray *out = json_array_sized_new((guint)count);
        json_node_init_array(n, out);
        json_array_unref(out);
        for (R_xlen_t i = 0; i < count; i++) {
            size_t old = path_push(path, "[[%td]]", (ptrdiff_t)i + 1);
            gboolean ok = fill(new_element(out), VECTOR_ELT(x, i), FALSE, path, f);
            path_pop(path, old);
            if (!ok)
                return FALSE;
        }
        return TRUE;
    }
    JsonObject *o = json_object_new();
    json_node_init_object(n, o);
    json_object_unref(o);
    for (R_xlen_t i = 0; i < count; i++) {
        const char *name = text_of(STRING_ELT(names, i), path, f);
        if (!name)
            return FALSE;
        const BmParam *p = param_named(op, name);
        gboolean only_array = p && (p->kinds & BM_VALUE_ARRAY)
            && !(p->kinds & (BM_VALUE_STRING | BM_VALUE_NUMBER | BM_VALUE_INTEGER
                             | BM_VALUE_BOOLEAN | BM_VALUE_OBJECT));
        size_t old = path_push(path, "$%s", name);
        gboolean ok = fill(new_member(o, name), VECTOR_ELT(x, i), only_array, path, f);
        path_pop(path, old);
        if (!ok)
            return FALSE;
    }
    return TRUE;
}

static gboolean fill(JsonNode *n, SEXP x, gboolean as_array, Path *path, Failure *f)
{
    if (!refuse(x, path, f))
        return FALSE;
    if (path->depth > BM_JSON_MAX_DEPTH)
        return fail(f, BM_R_INVALID_INPUT, "%s: nested deeper than %d levels", path->text,
                    BM_JSON_MAX_DEPTH);
    switch (TYPEOF(x)) {
    case NILSXP:
        return TRUE;   /* n is null already */
    case VECSXP:
        return Rf_inherits(x, "data.frame") ? fill_data_frame(n, x, path, f)
                                            : fill_list(n, x, NULL, path, f);
    default:
        return fill_atomic(n, x, as_array, path, f);
    }
}

/* ---- JSON -> R ---- */

/* A character vector of length 1 holding the UTF-8 text s. */
static SEXP string1(const char *s)
{
    SEXP v = PROTECT(Rf_allocVector(STRSXP, 1));
    SET_STRING_ELT(v, 0, Rf_mkCharCE(s, CE_UTF8));
    UNPROTECT(1);
    return v;
}

static SEXP from_json(JsonNode *n, const char *key);

static gboolean is_number(JsonNode *n)
{
    if (!JSON_NODE_HOLDS_VALUE(n))
        return FALSE;
    GType t = json_node_get_value_type(n);
    return t == G_TYPE_DOUBLE || t == G_TYPE_INT64;
}

static gboolean is_type(JsonNode *n, GType t)
{
    return JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == t;
}

/* The vector type that holds every element of a (null as NA), or NILSXP
 * when none does. An array of nulls only is logical. */
static SEXPTYPE vector_type(JsonArray *a)
{
    gboolean numbers = TRUE, booleans = TRUE, strings = TRUE;
    for (guint i = 0; i < json_array_get_length(a); i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (JSON_NODE_HOLDS_NULL(e))
            continue;
        numbers = numbers && is_number(e);
        booleans = booleans && is_type(e, G_TYPE_BOOLEAN);
        strings = strings && is_type(e, G_TYPE_STRING);
    }
    return booleans ? LGLSXP : numbers ? REALSXP : strings ? STRSXP : NILSXP;
}

static void set_vector_element(SEXP v, R_xlen_t i, JsonNode *e)
{
    gboolean null = JSON_NODE_HOLDS_NULL(e);
    switch (TYPEOF(v)) {
    case REALSXP:
        REAL(v)[i] = null ? NA_REAL : json_node_get_double(e);
        break;
    case LGLSXP:
        LOGICAL(v)[i] = null ? NA_LOGICAL : json_node_get_boolean(e);
        break;
    default:
        SET_STRING_ELT(v, i, null ? NA_STRING : Rf_mkCharCE(json_node_get_string(e), CE_UTF8));
        break;
    }
}

/* Whether a value may stand in a data-frame cell: a scalar, null or an
 * array of scalars. */
static gboolean flat(JsonNode *n)
{
    if (JSON_NODE_HOLDS_OBJECT(n))
        return FALSE;
    if (!JSON_NODE_HOLDS_ARRAY(n))
        return TRUE;
    JsonArray *a = json_node_get_array(n);
    for (guint i = 0; i < json_array_get_length(a); i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (JSON_NODE_HOLDS_OBJECT(e) || JSON_NODE_HOLDS_ARRAY(e))
            return FALSE;
    }
    return TRUE;
}

/* Whether a is a table: objects with the same keys in the same order,
 * every value flat. */
static gboolean is_table(JsonArray *a)
{
    guint n = json_array_get_length(a);
    GList *first = NULL;
    gboolean same = n > 0;
    for (guint i = 0; same && i < n; i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (!JSON_NODE_HOLDS_OBJECT(e)) {
            same = FALSE;
            break;
        }
        JsonObject *o = json_node_get_object(e);
        GList *keys = json_object_get_members(o);
        for (GList *l = keys; same && l; l = l->next)
            same = flat(json_object_get_member(o, l->data));
        if (i == 0) {
            first = keys;
            continue;
        }
        GList *p = first, *q = keys;
        for (; p && q; p = p->next, q = q->next)
            if (strcmp(p->data, q->data) != 0)
                break;
        same = same && !p && !q;
        g_list_free(keys);
    }
    g_list_free(first);
    return same;
}

static SEXP table_from_json(JsonArray *a)
{
    guint rows = json_array_get_length(a);
    JsonObject *o0 = json_array_get_object_element(a, 0);
    g_autoptr(GList) keys = json_object_get_members(o0);
    guint cols = g_list_length(keys);
    SEXP df = PROTECT(Rf_allocVector(VECSXP, cols));
    SEXP names = PROTECT(Rf_allocVector(STRSXP, cols));
    guint c = 0;
    for (GList *l = keys; l; l = l->next, c++) {
        const char *key = l->data;
        SET_STRING_ELT(names, c, Rf_mkCharCE(key, CE_UTF8));
        gboolean scalars = TRUE;
        gboolean numbers = TRUE, booleans = TRUE, strings = TRUE;
        for (guint r = 0; r < rows; r++) {
            JsonNode *e = json_object_get_member(json_array_get_object_element(a, r), key);
            if (JSON_NODE_HOLDS_NULL(e))
                continue;
            scalars = scalars && JSON_NODE_HOLDS_VALUE(e);
            numbers = numbers && is_number(e);
            booleans = booleans && is_type(e, G_TYPE_BOOLEAN);
            strings = strings && is_type(e, G_TYPE_STRING);
        }
        SEXPTYPE type = !scalars ? VECSXP : booleans ? LGLSXP : numbers ? REALSXP
                        : strings ? STRSXP : VECSXP;
        SEXP col = PROTECT(Rf_allocVector(type, rows));
        for (guint r = 0; r < rows; r++) {
            JsonNode *e = json_object_get_member(json_array_get_object_element(a, r), key);
            if (type == VECSXP)
                SET_VECTOR_ELT(col, r, from_json(e, key));
            else
                set_vector_element(col, r, e);
        }
        SET_VECTOR_ELT(df, c, col);
        UNPROTECT(1);
    }
    Rf_setAttrib(df, R_NamesSymbol, names);
    SEXP row_names = PROTECT(Rf_allocVector(INTSXP, 2));   /* compact: 1..rows */
    INTEGER(row_names)[0] = NA_INTEGER;
    INTEGER(row_names)[1] = -(int)rows;
    Rf_setAttrib(df, R_RowNamesSymbol, row_names);
    SEXP df_class = PROTECT(Rf_mkString("data.frame"));
    Rf_setAttrib(df, R_ClassSymbol, df_class);
    UNPROTECT(4);
    return df;
}

static SEXP array_from_json(JsonArray *a, const char *key)
{
    guint n = json_array_get_length(a);
    if (n == 0) {
        gboolean text = key && (strcmp(key, "warnings") == 0 || strcmp(key, "warning_codes") == 0);
        return Rf_allocVector(text ? STRSXP : VECSXP, 0);
    }
    SEXPTYPE type = vector_type(a);
    if (type != NILSXP) {
        SEXP v = PROTECT(Rf_allocVector(type, n));
        for (guint i = 0; i < n; i++)
            set_vector_element(v, i, json_array_get_element(a, i));
        UNPROTECT(1);
        return v;
    }
    gssize cols = bm_json_matrix_columns(a);
    if (cols > 0) {
        SEXP m = PROTECT(Rf_allocMatrix(REALSXP, (int)n, (int)cols));
        for (guint r = 0; r < n; r++) {
            JsonArray *row = json_array_get_array_element(a, r);
            for (gssize c = 0; c < cols; c++) {   /* column-major */
                JsonNode *e = json_array_get_element(row, (guint)c);
                REAL(m)[r + (R_xlen_t)c * n] = JSON_NODE_HOLDS_NULL(e) ? NA_REAL
                                                                       : json_node_get_double(e);
            }
        }
        UNPROTECT(1);
        return m;
    }
    if (is_table(a))
        return table_from_json(a);
    SEXP l = PROTECT(Rf_allocVector(VECSXP, n));
    for (guint i = 0; i < n; i++)
        SET_VECTOR_ELT(l, i, from_json(json_array_get_element(a, i), NULL));
    UNPROTECT(1);
    return l;
}

static SEXP object_from_json(JsonObject *o)
{
    g_autoptr(GList) keys = json_object_get_members(o);
    guint n = g_list_length(keys), i = 0;
    SEXP l = PROTECT(Rf_allocVector(VECSXP, n));
    SEXP names = PROTECT(Rf_allocVector(STRSXP, n));
    for (GList *k = keys; k; k = k->next, i++) {
        SET_STRING_ELT(names, i, Rf_mkCharCE(k->data, CE_UTF8));
        SET_VECTOR_ELT(l, i, from_json(json_object_get_member(o, k->data), k->data));
    }
    Rf_setAttrib(l, R_NamesSymbol, names);
    UNPROTECT(2);
    return l;
}

/* n as an R value; key is the member name n stands under, or NULL. */
static SEXP from_json(JsonNode *n, const char *key)
{
    switch (json_node_get_node_type(n)) {
    case JSON_NODE_OBJECT:
        return object_from_json(json_node_get_object(n));
    case JSON_NODE_ARRAY:
        return array_from_json(json_node_get_array(n), key);
    case JSON_NODE_NULL:
        return R_NilValue;
    case JSON_NODE_VALUE:
        break;
    }
    GType t = json_node_get_value_type(n);
    if (t == G_TYPE_STRING)
        return string1(json_node_get_string(n));
    if (t == G_TYPE_BOOLEAN)
        return Rf_ScalarLogical(json_node_get_boolean(n));
    return Rf_ScalarReal(json_node_get_double(n));
}

/* ---- the entry points ---- */

/* One call's state. What GLib allocated hangs here, so the cleanup frees it
 * whether the work ends normally or R unwinds out of it (an R error while
 * values are converted). */
typedef struct {
    SEXP op, request;      /* the arguments */
    JsonNode *sent;        /* the request object, or the value to encode */
    JsonNode *answer;      /* the response, or a decoded text */
    char *text;            /* an encoded value */
    Path path;
    Failure f;
} Call;

static void call_cleanup(void *data)
{
    Call *c = data;
    g_clear_pointer(&c->sent, json_node_unref);
    g_clear_pointer(&c->answer, json_node_unref);
    g_clear_pointer(&c->text, g_free);
}

/* The text of a character(1) argument, or NULL after fail(). */
static const char *text_arg(SEXP x, const char *what, Failure *f)
{
    if (TYPEOF(x) != STRSXP || XLENGTH(x) != 1 || STRING_ELT(x, 0) == NA_STRING) {
        fail(f, BM_R_USAGE, "%s must be one string (a character vector of length 1)", what);
        return NULL;
    }
    Path p = { .text = "", .len = 0, .depth = 0 };
    g_strlcpy(p.text, what, sizeof p.text);
    return text_of(STRING_ELT(x, 0), &p, f);
}

/* A JSON text into c->answer, or FALSE after fail(). */
static gboolean parse(Call *c, const char *text, const char *what)
{
    g_autoptr(GError) error = NULL;
    if (!bm_json_check_depth(text, -1, what, &error))
        return fail(&c->f, BM_R_INVALID_INPUT, "%s", error->message);
    c->answer = json_from_string(text, &error);
    if (!c->answer)
        return fail(&c->f, BM_R_INVALID_INPUT, "%s is not valid JSON: %s", what,
                    error ? error->message : "empty text");
    return TRUE;
}

static BmRFailure failure_of(const GError *error)
{
    if (error->domain == BM_ERROR) {
        switch ((BmError)error->code) {
        case BM_ERROR_INVALID_INPUT:     return BM_R_INVALID_INPUT;
        case BM_ERROR_IO:                return BM_R_IO;
        case BM_ERROR_UNKNOWN_OPERATION: return BM_R_UNKNOWN_OPERATION;
        case BM_ERROR_NO_CONVERGENCE:    return BM_R_NO_CONVERGENCE;
        case BM_ERROR_INTERNAL:          break;
        }
    }
    return BM_R_INTERNAL;
}

static SEXP call_body(void *data)
{
    Call *c = data;
    bm_registry_init();
    const char *name = text_arg(c->op, "the operation name", &c->f);
    if (!name)
        return R_NilValue;
    const BmOperation *operation = bm_registry_lookup(name);
    if (!operation) {
        fail(&c->f, BM_R_UNKNOWN_OPERATION,
             "no operation named \"%s\" (bandmass_operations() lists them)", name);
        return R_NilValue;
    }
    SEXP r = c->request;
    if (TYPEOF(r) == STRSXP) {
        /* JSON text given by the caller: parsed once, as every host does */
        const char *text = text_arg(r, "a JSON request", &c->f);
        if (!text || !parse(c, text, "request"))
            return R_NilValue;
        c->sent = g_steal_pointer(&c->answer);
        if (!JSON_NODE_HOLDS_OBJECT(c->sent)) {
            fail(&c->f, BM_R_INVALID_INPUT, "request for %s is not a JSON object {...}", name);
            return R_NilValue;
        }
    } else {
        g_strlcpy(c->path.text, "request", sizeof c->path.text);
        c->path.len = strlen(c->path.text);
        /* a node is initialised once only: json-glib frees the object of an
         * object node twice when the node is initialised again */
        c->sent = json_node_init_null(json_node_alloc());
        if (r == R_NilValue || (TYPEOF(r) == VECSXP && XLENGTH(r) == 0 && !OBJECT(r))) {
            JsonObject *empty = json_object_new();
            json_node_init_object(c->sent, empty);
            json_object_unref(empty);
        } else {
            if (!refuse(r, &c->path, &c->f))
                return R_NilValue;
            if (TYPEOF(r) != VECSXP || Rf_inherits(r, "data.frame")
                || Rf_getAttrib(r, R_NamesSymbol) == R_NilValue) {
                fail(&c->f, BM_R_USAGE, "request: the request must be a named list "
                     "(list(key = value, ...)) or JSON text; this is %s%s",
                     TYPEOF(r) != VECSXP ? "a value of type " : "",
                     TYPEOF(r) != VECSXP ? Rf_type2char(TYPEOF(r))
                     : Rf_inherits(r, "data.frame") ? "a data frame" : "an unnamed list");
                return R_NilValue;
            }
            if (!fill_list(c->sent, r, operation, &c->path, &c->f))
                return R_NilValue;
        }
    }
    g_autoptr(GError) error = NULL;
    JsonObject *response = bm_registry_invoke(operation, json_node_get_object(c->sent), NULL,
                                              &error);
    if (!response) {
        fail(&c->f, failure_of(error), "%s", error->message);
        return R_NilValue;
    }
    c->answer = json_node_init_object(json_node_alloc(), response);
    json_object_unref(response);
    return from_json(c->answer, NULL);
}

static SEXP operations_body(void *data)
{
    Call *c = data;
    bm_registry_init();
    c->answer = bm_registry_describe();
    return from_json(c->answer, NULL);
}

static SEXP encode_body(void *data)
{
    Call *c = data;
    g_strlcpy(c->path.text, "value", sizeof c->path.text);
    c->path.len = strlen(c->path.text);
    c->sent = json_node_init_null(json_node_alloc());
    if (!fill(c->sent, c->request, FALSE, &c->path, &c->f))
        return R_NilValue;
    c->text = bm_json_to_string(c->sent, FALSE);
    return string1(c->text);
}

static SEXP decode_body(void *data)
{
    Call *c = data;
    const char *text = text_arg(c->request, "the JSON text", &c->f);
    if (!text || !parse(c, text, "JSON text"))
        return R_NilValue;
    return from_json(c->answer, NULL);
}

/* A failure as an R condition object: list(message, call = NULL, code)
 * with classes c(<kind>, "bandmass_error", "error", "condition"). bandmass.R
 * signals it with stop(), so that the R error names the R call. */
static SEXP condition(const Failure *f)
{
    SEXP cond = PROTECT(Rf_allocVector(VECSXP, 3));
    SEXP names = PROTECT(Rf_allocVector(STRSXP, 3));
    SET_STRING_ELT(names, 0, Rf_mkChar("message"));
    SET_STRING_ELT(names, 1, Rf_mkChar("call"));
    SET_STRING_ELT(names, 2, Rf_mkChar("code"));
    SET_VECTOR_ELT(cond, 0, string1(f->message));
    SET_VECTOR_ELT(cond, 2, Rf_mkString(failure_names[f->kind].code));
    Rf_setAttrib(cond, R_NamesSymbol, names);
    SEXP classes = PROTECT(Rf_allocVector(STRSXP, 4));
    SET_STRING_ELT(classes, 0, Rf_mkChar(failure_names[f->kind].class_name));
    SET_STRING_ELT(classes, 1, Rf_mkChar("bandmass_error"));
    SET_STRING_ELT(classes, 2, Rf_mkChar("error"));
    SET_STRING_ELT(classes, 3, Rf_mkChar("condition"));
    Rf_setAttrib(cond, R_ClassSymbol, classes);
    UNPROTECT(3);
    return cond;
}

static SEXP run(SEXP (*body)(void *), SEXP op, SEXP request)
{
    Call c = { .op = op, .request = request };
    SEXP answer = R_ExecWithCleanup(body, &c, call_cleanup, &c);
    return c.f.failed ? condition(&c.f) : answer;
}

/* .Call entry points: each returns its answer or, on failure, a condition
 * object for bandmass.R to signal. */
static SEXP bandmass_r_call(SEXP op, SEXP request)
{
    return run(call_body, op, request);
}

static SEXP bandmass_r_operations(void)
{
    return run(operations_body, R_NilValue, R_NilValue);
}

static SEXP bandmass_r_encode(SEXP value)
{
    return run(encode_body, R_NilValue, value);
}

static SEXP bandmass_r_decode(SEXP text)
{
    return run(decode_body, R_NilValue, text);
}

static const R_CallMethodDef call_methods[] = {
    { "bandmass_r_call", (DL_FUNC)(void (*)(void))bandmass_r_call, 2 },
    { "bandmass_r_operations", (DL_FUNC)(void (*)(void))bandmass_r_operations, 0 },
    { "bandmass_r_encode", (DL_FUNC)(void (*)(void))bandmass_r_encode, 1 },
    { "bandmass_r_decode", (DL_FUNC)(void (*)(void))bandmass_r_decode, 1 },
    { NULL, NULL, 0 }
};

/* Called by dyn.load: registers the entry points, and only those. */
G_MODULE_EXPORT void R_init_bandmass_r(DllInfo *dll);
G_MODULE_EXPORT void R_init_bandmass_r(DllInfo *dll)
{
    R_registerRoutines(dll, NULL, call_methods, NULL, NULL);
    R_useDynamicSymbols(dll, FALSE);
}
