/* bandmass_octave.c: the Octave host (a MEX file built with mkoctfile --mex):
 * bandmass(op, request) builds the request object straight from the Octave
 * value, calls the registry on it (bm_registry_invoke) and turns the
 * response object straight into Octave values: no JSON text in between. */
#include <math.h>
#include <stdint.h>
#include <string.h>
#include "mex.h"
#include "registry.h"
#include "bm-json.h"

/*
 * Octave -> JSON (requests):
 *   struct 1x1 -> object; struct array -> array of objects;
 *   char row -> string; logical scalar -> boolean;
 *   numeric scalar -> number; numeric 1xN or Nx1 -> array of numbers;
 *   MxN -> array of M rows; empty -> []; cell array -> array of its
 *   elements converted.
 *   Numbers are sent exactly: a double (or single) that is a whole number
 *   below 2^53 in size goes as a JSON integer, any other double as that
 *   very double (1e17, 1e300, -0.0); int8 ... int64 and uint8 ... uint64
 *   go as JSON integers, exact beyond 2^53. Refused, with the field path:
 *   NaN and Inf, uint64 above 2^63 - 1, text with a NUL or bytes that are
 *   not UTF-8, and every class or shape listed in refusal() (complex,
 *   sparse, more than 2 dimensions, char matrices, cell and struct arrays
 *   that are not vectors, function handles, objects, ...). Every empty
 *   numeric or logical array (0x0, 3x0, 0x3) goes as [].
 * JSON -> Octave (responses; as Octave's jsondecode):
 *   object -> struct; number -> double; boolean -> logical; string -> char;
 *   null -> [] (NaN inside numeric arrays);
 *   array of numbers (null as NaN) -> row vector;
 *   array of equal-length number arrays -> matrix, rows = outer index;
 *   array of objects with the same keys -> struct array (1xN), otherwise a
 *   cell array; array of strings or of mixed values -> cell array (1xN);
 *   [] -> [] (0x0 double).
 */

typedef struct {
    const char *id;
    char message[1024];
} Failure;

static gboolean fail(Failure *f, const char *id, const char *fmt, ...) G_GNUC_PRINTF(3, 4);
static gboolean fail(Failure *f, const char *id, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    f->id = id;
    g_vsnprintf(f->message, sizeof f->message, fmt, ap);
    va_end(ap);
    return FALSE;
}

/* ---- what cannot be sent: every refusal is here ---- */

/* Why a value of this class or shape cannot be sent, or NULL when it can. */
static const char *refusal(const mxArray *a)
{
    if (mxIsComplex(a))
        return "complex numbers cannot be sent";
    if (mxIsSparse(a))
        return "sparse matrices cannot be sent (use full())";
    if (mxGetNumberOfDimensions(a) > 2)
        return "arrays of more than 2 dimensions cannot be sent";
    if (mxIsChar(a))
        return mxGetM(a) > 1 ? "a char array must be one row" : NULL;
    if ((mxIsStruct(a) || mxIsCell(a)) && mxGetM(a) > 1 && mxGetN(a) > 1)
        return mxIsCell(a) ? "a cell array must be 1xN or Nx1 (its elements go as one list)"
                           : "a struct array must be 1xN or Nx1 (its elements go as one list)";
    if (mxIsStruct(a) || mxIsCell(a) || mxIsLogical(a))
        return NULL;
    switch (mxGetClassID(a)) {
    case mxDOUBLE_CLASS: case mxSINGLE_CLASS:
    case mxINT8_CLASS:   case mxUINT8_CLASS:
    case mxINT16_CLASS:  case mxUINT16_CLASS:
    case mxINT32_CLASS:  case mxUINT32_CLASS:
    case mxINT64_CLASS:  case mxUINT64_CLASS:
        return NULL;
    default:
        return "this class cannot be sent (use structs, numbers, logicals, strings and cells)";
    }
}

static gboolean refuse(const mxArray *a, const char *path, Failure *f)
{
    const char *why = refusal(a);
    if (!why)
        return TRUE;
    return fail(f, "bandmass:invalidInput", "%s: a %s value: %s", path, mxGetClassName(a), why);
}

/* A char row goes as its text: refused when it holds a NUL (which would cut
 * it short) or bytes that are not UTF-8 (Octave keeps text as UTF-8). */
static gboolean refuse_text(const char *s, size_t count, const char *path, Failure *f)
{
    if (strlen(s) != count)
        return fail(f, "bandmass:invalidInput", "%s: a char value: character %zu is NUL, "
                    "which cannot be sent in a string", path, strlen(s) + 1);
    const char *bad = NULL;
    if (!g_utf8_validate(s, -1, &bad))
        return fail(f, "bandmass:invalidInput", "%s: a char value: byte %zu (\\x%02X) is "
                    "not UTF-8 text", path, (size_t)(bad - s) + 1, (unsigned)(guchar)*bad);
    return TRUE;
}

static gboolean refuse_real(double v, const char *path, Failure *f)
{
    if (isfinite(v))
        return TRUE;
    return fail(f, "bandmass:invalidInput",
                "%s: NaN and Inf cannot be sent (JSON has no such numbers)", path);
}

static gboolean refuse_uint64(uint64_t v, const char *path, Failure *f)
{
    if (v <= (uint64_t)INT64_MAX)
        return TRUE;
    return fail(f, "bandmass:invalidInput",
                "%s: the uint64 value %" G_GUINT64_FORMAT " cannot be sent (JSON integers "
                "are read up to 2^63 - 1 = %" G_GINT64_FORMAT ")", path, v, (gint64)INT64_MAX);
}

/* ---- Octave -> JSON ---- */

static JsonNode *to_json(const mxArray *a, const char *path, Failure *f);

static JsonNode *int_node(gint64 v)
{
    JsonNode *n = json_node_new(JSON_NODE_VALUE);
    json_node_set_int(n, v);
    return n;
}

/* A whole double below 2^53 goes as an integer (so that keys which take an
 * integer accept it); anything else as the double itself. Both are exact. */
static JsonNode *real_node(double v)
{
    if (v == floor(v) && fabs(v) < 9007199254740992.0 && !(v == 0.0 && signbit(v)))
        return int_node((gint64)v);
    JsonNode *n = json_node_new(JSON_NODE_VALUE);
    json_node_set_double(n, v);
    return n;
}

/* Element i (column-major) of a numeric or logical array, refusals checked. */
static JsonNode *scalar_at(const mxArray *a, size_t i, const char *path, Failure *f)
{
    if (mxIsLogical(a)) {
        JsonNode *n = json_node_new(JSON_NODE_VALUE);
        json_node_set_boolean(n, mxGetLogicals(a)[i] != 0);
        return n;
    }
    const void *d = mxGetData(a);
    switch (mxGetClassID(a)) {
    case mxDOUBLE_CLASS: {
        double v = ((const double *)d)[i];
        return refuse_real(v, path, f) ? real_node(v) : NULL;
    }
    case mxSINGLE_CLASS: {
        double v = ((const float *)d)[i];
        return refuse_real(v, path, f) ? real_node(v) : NULL;
    }
    case mxINT8_CLASS:   return int_node(((const int8_t *)d)[i]);
    case mxUINT8_CLASS:  return int_node(((const uint8_t *)d)[i]);
    case mxINT16_CLASS:  return int_node(((const int16_t *)d)[i]);
    case mxUINT16_CLASS: return int_node(((const uint16_t *)d)[i]);
    case mxINT32_CLASS:  return int_node(((const int32_t *)d)[i]);
    case mxUINT32_CLASS: return int_node(((const uint32_t *)d)[i]);
    case mxINT64_CLASS:  return int_node(((const int64_t *)d)[i]);
    case mxUINT64_CLASS: {
        uint64_t v = ((const uint64_t *)d)[i];
        return refuse_uint64(v, path, f) ? int_node((gint64)v) : NULL;
    }
    default:
        /* refusal() lets no other class through */
        fail(f, "bandmass:internal", "%s: unexpected class %s", path, mxGetClassName(a));
        return NULL;
    }
}

static JsonNode *array_node(JsonArray *a)
{
    JsonNode *n = json_node_new(JSON_NODE_ARRAY);
    json_node_take_array(n, a);
    return n;
}

static JsonNode *matrix_to_json(const mxArray *a, const char *path, Failure *f)
{
    size_t m = mxGetM(a), n = mxGetN(a);
    if (mxGetNumberOfElements(a) == 1)
        return scalar_at(a, 0, path, f);
    if (m == 0 || n == 0)   /* 0x0, 3x0 and 0x3 alike */
        return array_node(json_array_new());
    g_autoptr(JsonArray) out = json_array_sized_new((guint)(m == 1 || n == 1 ? m * n : m));
    if (m == 1 || n == 1) {   /* a vector, either way round, or empty */
        for (size_t i = 0; i < m * n; i++) {
            JsonNode *e = scalar_at(a, i, path, f);
            if (!e)
                return NULL;
            json_array_add_element(out, e);
        }
        return array_node(g_steal_pointer(&out));
    }
    for (size_t r = 0; r < m; r++) {
        JsonArray *row = json_array_sized_new((guint)n);
        json_array_add_element(out, array_node(row));
        for (size_t c = 0; c < n; c++) {
            JsonNode *e = scalar_at(a, r + c * m, path, f);   /* column-major */
            if (!e)
                return NULL;
            json_array_add_element(row, e);
        }
    }
    return array_node(g_steal_pointer(&out));
}

static JsonNode *struct_to_json(const mxArray *a, size_t index, const char *path, Failure *f)
{
    g_autoptr(JsonObject) o = json_object_new();
    int nf = mxGetNumberOfFields(a);
    for (int k = 0; k < nf; k++) {
        const char *name = mxGetFieldNameByNumber(a, k);
        g_autofree char *sub = g_strdup_printf("%s.%s", path, name);
        const mxArray *v = mxGetFieldByNumber(a, index, k);
        JsonNode *node = v ? to_json(v, sub, f) : json_node_new(JSON_NODE_NULL);
        if (!node)
            return NULL;
        json_object_set_member(o, name, node);
    }
    JsonNode *n = json_node_new(JSON_NODE_OBJECT);
    json_node_take_object(n, g_steal_pointer(&o));
    return n;
}

static JsonNode *to_json(const mxArray *a, const char *path, Failure *f)
{
    if (!refuse(a, path, f))
        return NULL;
    size_t count = mxGetNumberOfElements(a);
    if (mxIsChar(a)) {
        char *s = mxArrayToString(a);
        if (s && !refuse_text(s, count, path, f)) {
            mxFree(s);
            return NULL;
        }
        JsonNode *n = json_node_new(JSON_NODE_VALUE);
        json_node_set_string(n, s ? s : "");
        mxFree(s);
        return n;
    }
    if (mxIsStruct(a)) {
        if (count == 1)
            return struct_to_json(a, 0, path, f);
        g_autoptr(JsonArray) out = json_array_new();
        for (size_t i = 0; i < count; i++) {
            g_autofree char *sub = g_strdup_printf("%s(%zu)", path, i + 1);
            JsonNode *e = struct_to_json(a, i, sub, f);
            if (!e)
                return NULL;
            json_array_add_element(out, e);
        }
        return array_node(g_steal_pointer(&out));
    }
    if (mxIsCell(a)) {
        g_autoptr(JsonArray) out = json_array_new();
        for (size_t i = 0; i < count; i++) {
            g_autofree char *sub = g_strdup_printf("%s{%zu}", path, i + 1);
            const mxArray *c = mxGetCell(a, i);
            JsonNode *e = c ? to_json(c, sub, f) : array_node(json_array_new());
            if (!e)
                return NULL;
            json_array_add_element(out, e);
        }
        return array_node(g_steal_pointer(&out));
    }
    return matrix_to_json(a, path, f);
}

/* ---- JSON -> Octave ---- */

static mxArray *from_json(JsonNode *n);

static gboolean is_number_or_null(JsonNode *n)
{
    if (JSON_NODE_HOLDS_NULL(n))
        return TRUE;
    if (!JSON_NODE_HOLDS_VALUE(n))
        return FALSE;
    GType t = json_node_get_value_type(n);
    return t == G_TYPE_DOUBLE || t == G_TYPE_INT64;
}

static double number_of(JsonNode *n)
{
    return JSON_NODE_HOLDS_NULL(n) ? NAN : json_node_get_double(n);
}

/* Whether every element is an object with the same keys in the same order. */
static gboolean same_objects(JsonArray *a)
{
    GList *first = NULL;
    gboolean same = TRUE;
    for (guint i = 0; same && i < json_array_get_length(a); i++) {
        JsonNode *e = json_array_get_element(a, i);
        if (!JSON_NODE_HOLDS_OBJECT(e)) {
            same = FALSE;
            break;
        }
        GList *keys = json_object_get_members(json_node_get_object(e));
        if (i == 0) {
            first = keys;
            continue;
        }
        GList *p = first, *q = keys;
        for (; p && q; p = p->next, q = q->next)
            if (strcmp(p->data, q->data) != 0)
                break;
        same = !p && !q;
        g_list_free(keys);
    }
    g_list_free(first);
    return same;
}

static mxArray *object_into(JsonObject *o, mxArray *s, mwIndex index)
{
    g_autoptr(GList) keys = json_object_get_members(o);
    for (GList *l = keys; l; l = l->next) {
        int field = mxGetFieldNumber(s, l->data);
        if (field < 0)
            field = mxAddField(s, l->data);
        mxSetFieldByNumber(s, index, field, from_json(json_object_get_member(o, l->data)));
    }
    return s;
}

static mxArray *array_from_json(JsonArray *a)
{
    guint n = json_array_get_length(a);
    if (n == 0)
        return mxCreateDoubleMatrix(0, 0, mxREAL);
    gboolean numbers = TRUE, booleans = TRUE;
    for (guint i = 0; i < n; i++) {
        JsonNode *e = json_array_get_element(a, i);
        numbers = numbers && is_number_or_null(e);
        booleans = booleans && JSON_NODE_HOLDS_VALUE(e)
                   && json_node_get_value_type(e) == G_TYPE_BOOLEAN;
    }
    if (numbers) {
        mxArray *v = mxCreateDoubleMatrix(1, n, mxREAL);
        double *d = mxGetPr(v);
        for (guint i = 0; i < n; i++)
            d[i] = number_of(json_array_get_element(a, i));
        return v;
    }
    if (booleans) {
        mxArray *v = mxCreateLogicalMatrix(1, n);
        for (guint i = 0; i < n; i++)
            mxGetLogicals(v)[i] = json_array_get_boolean_element(a, i);
        return v;
    }
    gssize cols = bm_json_matrix_columns(a);
    if (cols > 0) {
        mxArray *m = mxCreateDoubleMatrix(n, (mwSize)cols, mxREAL);
        double *d = mxGetPr(m);
        for (guint r = 0; r < n; r++) {
            JsonArray *row = json_array_get_array_element(a, r);
            for (gssize c = 0; c < cols; c++)   /* column-major */
                d[r + (size_t)c * n] = number_of(json_array_get_element(row, (guint)c));
        }
        return m;
    }
    if (same_objects(a)) {
        mxArray *s = mxCreateStructMatrix(1, n, 0, NULL);
        for (guint i = 0; i < n; i++)
            object_into(json_array_get_object_element(a, i), s, i);
        return s;
    }
    mxArray *c = mxCreateCellMatrix(1, n);
    for (guint i = 0; i < n; i++)
        mxSetCell(c, i, from_json(json_array_get_element(a, i)));
    return c;
}

static mxArray *from_json(JsonNode *n)
{
    switch (json_node_get_node_type(n)) {
    case JSON_NODE_OBJECT:
        return object_into(json_node_get_object(n), mxCreateStructMatrix(1, 1, 0, NULL), 0);
    case JSON_NODE_ARRAY:
        return array_from_json(json_node_get_array(n));
    case JSON_NODE_NULL:
        return mxCreateDoubleMatrix(0, 0, mxREAL);
    case JSON_NODE_VALUE:
        break;
    }
    GType t = json_node_get_value_type(n);
    if (t == G_TYPE_STRING)
        return mxCreateString(json_node_get_string(n));
    if (t == G_TYPE_BOOLEAN)
        return mxCreateLogicalScalar(json_node_get_boolean(n));
    return mxCreateDoubleScalar(json_node_get_double(n));
}

/* ---- the gateway ---- */

static const char *error_id(const GError *error)
{
    if (error->domain == BM_ERROR) {
        switch ((BmError)error->code) {
        case BM_ERROR_INVALID_INPUT:     return "bandmass:invalidInput";
        case BM_ERROR_IO:                return "bandmass:io";
        case BM_ERROR_UNKNOWN_OPERATION: return "bandmass:unknownOperation";
        case BM_ERROR_NO_CONVERGENCE:    return "bandmass:noConvergence";
        case BM_ERROR_INTERNAL:          break;
        }
    }
    return "bandmass:internal";
}

static const char usage[] =
    "usage: r = bandmass(op, request)   request: a struct or JSON text (default: none)\n"
    "       ops = bandmass()            the operations (name, summary, params)\n"
    "       text = bandmass('--encode', value)   the JSON a value is sent as\n"
    "       value = bandmass('--decode', text)   a JSON text as bandmass returns it";

/* Text of a char argument, or NULL after fail(). */
static char *text_arg(const mxArray *a, const char *what, Failure *f)
{
    if (!mxIsChar(a) || mxGetM(a) > 1) {
        fail(f, "bandmass:usage", "%s must be a string\n%s", what, usage);
        return NULL;
    }
    char *s = mxArrayToString(a);
    char *copy = g_strdup(s ? s : "");
    mxFree(s);
    return copy;
}

static mxArray *decode(const char *text, Failure *f)
{
    g_autoptr(GError) error = NULL;
    if (!bm_json_check_depth(text, -1, "JSON text", &error)) {
        fail(f, "bandmass:invalidInput", "%s", error->message);
        return NULL;
    }
    g_autoptr(JsonNode) root = json_from_string(text, &error);
    if (!root) {
        fail(f, "bandmass:invalidInput", "not valid JSON: %s",
             error ? error->message : "empty text");
        return NULL;
    }
    return from_json(root);
}

/* Does the work; returns the answer, or NULL with f filled in. Keeps every
 * allocation of its own inside, so the caller may raise the Octave error. */
static mxArray *run(int nrhs, const mxArray *prhs[], Failure *f)
{
    bm_registry_init();
    if (nrhs == 0) {
        g_autoptr(JsonNode) all = bm_registry_describe();
        return from_json(all);
    }
    if (nrhs > 2) {
        fail(f, "bandmass:usage", "too many arguments\n%s", usage);
        return NULL;
    }
    g_autofree char *op = text_arg(prhs[0], "the operation name", f);
    if (!op)
        return NULL;
    if (strcmp(op, "--encode") == 0 || strcmp(op, "--decode") == 0) {
        if (nrhs != 2) {
            fail(f, "bandmass:usage", "%s takes one value\n%s", op, usage);
            return NULL;
        }
        if (strcmp(op, "--decode") == 0) {
            g_autofree char *text = text_arg(prhs[1], "the JSON text", f);
            return text ? decode(text, f) : NULL;
        }
        g_autoptr(JsonNode) node = to_json(prhs[1], "value", f);
        if (!node)
            return NULL;
        g_autofree char *text = bm_json_to_string(node, FALSE);
        return mxCreateString(text);
    }
    const BmOperation *operation = bm_registry_lookup(op);
    if (!operation) {
        fail(f, "bandmass:unknownOperation",
             "no operation named \"%s\" (bandmass() lists them)", op);
        return NULL;
    }
    g_autoptr(JsonNode) request = NULL;
    if (nrhs == 1 || (mxIsEmpty(prhs[1]) && !mxIsChar(prhs[1]) && !mxIsStruct(prhs[1]))) {
        request = json_node_new(JSON_NODE_OBJECT);
        json_node_take_object(request, json_object_new());
    } else if (mxIsChar(prhs[1])) {
        /* JSON text given by the caller: parsed once, as every host does */
        g_autofree char *text = text_arg(prhs[1], "a JSON request", f);
        if (!text)
            return NULL;
        g_autoptr(GError) parse_error = NULL;
        if (!bm_json_check_depth(text, -1, "request", &parse_error)) {
            fail(f, "bandmass:invalidInput", "%s", parse_error->message);
            return NULL;
        }
        request = json_from_string(text, &parse_error);
        if (parse_error || !request || !JSON_NODE_HOLDS_OBJECT(request)) {
            fail(f, "bandmass:invalidInput", "request for %s is not valid JSON%s%s", op,
                 parse_error ? ": " : " (expected an object {...})",
                 parse_error ? parse_error->message : "");
            return NULL;
        }
    } else if (mxIsStruct(prhs[1]) && mxGetNumberOfElements(prhs[1]) == 1) {
        request = to_json(prhs[1], "request", f);
        if (!request)
            return NULL;
    } else {
        fail(f, "bandmass:usage", "the request must be a 1x1 struct or JSON text\n%s", usage);
        return NULL;
    }
    g_autoptr(GError) error = NULL;
    g_autoptr(JsonObject) response = bm_registry_invoke(operation, json_node_get_object(request),
                                                        NULL, &error);
    if (!response) {
        fail(f, error_id(error), "%s", error->message);
        return NULL;
    }
    g_autoptr(JsonNode) root = json_node_new(JSON_NODE_OBJECT);
    json_node_set_object(root, response);
    return from_json(root);
}

void mexFunction(int nlhs, mxArray *plhs[], int nrhs, const mxArray *prhs[])
{
    (void)nlhs;
    Failure f = { NULL, "" };
    mxArray *answer = run(nrhs, prhs, &f);
    if (!answer)
        mexErrMsgIdAndTxt(f.id, "%s", f.message);   /* does not return */
    plhs[0] = answer;
}
