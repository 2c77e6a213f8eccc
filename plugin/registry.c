/* registry.c: operation lookup, request validation against the parameter
 * descriptions, and the JSON string path shared by every host. */
#include "registry.h"
#include "bm-json.h"
#include "ops/ops.h"
#include "bm-status.h"

#include <math.h>

static const BmOperation *const operations[] = {
    BM_OPERATIONS_TABLE
};

void bm_registry_init(void)
{
    static gsize done = 0;
    if (g_once_init_enter(&done)) {
        bm_core_init();
        g_once_init_leave(&done, 1);
    }
}

const BmOperation *const *bm_registry_operations(guint *n_ops)
{
    if (n_ops)
        *n_ops = G_N_ELEMENTS(operations);
    return operations;
}

const BmOperation *bm_registry_lookup(const char *name)
{
    for (guint i = 0; i < G_N_ELEMENTS(operations); i++)
        if (g_strcmp0(operations[i]->name, name) == 0)
            return operations[i];
    return NULL;
}

static const BmParam *find_param(const BmOperation *op, const char *key)
{
    for (const BmParam *p = op->params; p && p->name; p++)
        if (strcmp(p->name, key) == 0)
            return p;
    return NULL;
}

static const struct { guint bit; const char *word; } kind_words[] = {
    { BM_VALUE_STRING, "string" }, { BM_VALUE_NUMBER, "number" },
    { BM_VALUE_INTEGER, "integer" }, { BM_VALUE_BOOLEAN, "boolean" },
    { BM_VALUE_ARRAY, "array" }, { BM_VALUE_OBJECT, "object" },
};

const char **bm_value_kind_names(guint kinds)
{
    const char **names = g_new0(const char *, G_N_ELEMENTS(kind_words) + 1);
    guint n = 0;
    for (guint i = 0; i < G_N_ELEMENTS(kind_words); i++)
        if (kinds & kind_words[i].bit)
            names[n++] = kind_words[i].word;
    return names;
}

static char *kinds_text(guint kinds)
{
    g_autofree const char **names = bm_value_kind_names(kinds);
    return g_strjoinv(" or ", (char **)names);
}

const BmChoice **bm_param_choices(const BmParam *p)
{
    if (!p->choices)
        return NULL;
    GPtrArray *a = g_ptr_array_new();
    for (const BmChoice *c = p->choices->choices; c->name; c++)
        if (!p->choice_subset
            || (c->value >= 0 && c->value < 32 && (p->choice_subset & (1u << c->value))))
            g_ptr_array_add(a, (gpointer)c);
    g_ptr_array_add(a, NULL);
    return (const BmChoice **)g_ptr_array_free(a, FALSE);
}

static char *choices_text(const BmParam *p)
{
    g_autofree const BmChoice **c = bm_param_choices(p);
    GString *s = g_string_new(NULL);
    for (guint i = 0; c[i]; i++)
        g_string_append_printf(s, "%s%s", i ? ", " : "", c[i]->name);
    return g_string_free(s, FALSE);
}

static void append_number(GString *s, double v, const char *unit)
{
    char buf[G_ASCII_DTOSTR_BUF_SIZE];
    g_string_append(s, g_ascii_formatd(buf, sizeof buf, "%.10g", v));
    if (unit)
        g_string_append_printf(s, " %s", unit);
}

char *bm_param_range_text(const BmParam *p)
{
    if (p->lower.kind == BM_BOUND_NONE && p->upper.kind == BM_BOUND_NONE)
        return NULL;
    GString *s = g_string_new(NULL);
    if (p->lower.kind != BM_BOUND_NONE) {
        g_string_append(s, p->lower.kind == BM_BOUND_OPEN ? "> " : ">= ");
        append_number(s, p->lower.value, p->unit);
    }
    if (p->upper.kind != BM_BOUND_NONE) {
        g_string_append(s, s->len ? " and " : "");
        g_string_append(s, p->upper.kind == BM_BOUND_OPEN ? "< " : "<= ");
        append_number(s, p->upper.value, p->unit);
    }
    return g_string_free(s, FALSE);
}

static gboolean in_range(const BmParam *p, double v)
{
    if (p->lower.kind == BM_BOUND_CLOSED && !(v >= p->lower.value))
        return FALSE;
    if (p->lower.kind == BM_BOUND_OPEN && !(v > p->lower.value))
        return FALSE;
    if (p->upper.kind == BM_BOUND_CLOSED && !(v <= p->upper.value))
        return FALSE;
    if (p->upper.kind == BM_BOUND_OPEN && !(v < p->upper.value))
        return FALSE;
    return TRUE;
}

static gboolean node_number(JsonNode *n, double *v)
{
    if (!JSON_NODE_HOLDS_VALUE(n))
        return FALSE;
    GType t = json_node_get_value_type(n);
    if (t != G_TYPE_INT64 && t != G_TYPE_DOUBLE)
        return FALSE;
    *v = json_node_get_double(n);
    return TRUE;
}

static gboolean range_error(const BmParam *p, const char *op_name, const char *what,
                            double v, GError **error)
{
    g_autofree char *range = bm_param_range_text(p);
    g_autoptr(GString) got = g_string_new(NULL);
    append_number(got, v, p->unit);
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "request for %s: %s must be %s (got %s)", op_name, what, range, got->str);
    return FALSE;
}

static gboolean node_has_kind(JsonNode *node, guint kinds)
{
    switch (json_node_get_node_type(node)) {
    case JSON_NODE_OBJECT: return (kinds & BM_VALUE_OBJECT) != 0;
    case JSON_NODE_ARRAY:  return (kinds & BM_VALUE_ARRAY) != 0;
    case JSON_NODE_NULL:   return FALSE;
    case JSON_NODE_VALUE:  break;
    }
    GType t = json_node_get_value_type(node);
    if (t == G_TYPE_STRING)
        return (kinds & BM_VALUE_STRING) != 0;
    if (t == G_TYPE_BOOLEAN)
        return (kinds & BM_VALUE_BOOLEAN) != 0;
    if (t == G_TYPE_INT64)
        return (kinds & (BM_VALUE_NUMBER | BM_VALUE_INTEGER)) != 0;
    if (t == G_TYPE_DOUBLE) {
        double v = json_node_get_double(node);
        if (kinds & BM_VALUE_NUMBER)
            return TRUE;
        return (kinds & BM_VALUE_INTEGER) && v == floor(v) && fabs(v) < 9e15;
    }
    return FALSE;
}

gboolean bm_param_check(const BmParam *p, const char *op_name, JsonNode *node,
                        GError **error)
{
    if (!node_has_kind(node, p->kinds)) {
        g_autofree char *want = kinds_text(p->kinds);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request key \"%s\" of %s must be %s", p->name, op_name, want);
        return FALSE;
    }
    if (JSON_NODE_HOLDS_ARRAY(node)
        && json_array_get_length(json_node_get_array(node)) > BM_MAX_LIST_LENGTH) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request key \"%s\" of %s holds %u elements; at most %d are taken in "
                    "one request (split the list over several requests)", p->name, op_name,
                    json_array_get_length(json_node_get_array(node)), BM_MAX_LIST_LENGTH);
        return FALSE;
    }
    double v;
    if (p->lower.kind != BM_BOUND_NONE || p->upper.kind != BM_BOUND_NONE) {
        if (node_number(node, &v) && !in_range(p, v)) {
            g_autofree char *what = g_strdup_printf("key \"%s\"", p->name);
            return range_error(p, op_name, what, v, error);
        }
        if (JSON_NODE_HOLDS_ARRAY(node)) {
            JsonArray *a = json_node_get_array(node);
            for (guint i = 0; i < json_array_get_length(a); i++)
                if (node_number(json_array_get_element(a, i), &v) && !in_range(p, v)) {
                    g_autofree char *what = g_strdup_printf("element %u of \"%s\"", i,
                                                            p->name);
                    return range_error(p, op_name, what, v, error);
                }
        }
    }
    if (p->choices && JSON_NODE_HOLDS_VALUE(node)
        && json_node_get_value_type(node) == G_TYPE_STRING) {
        const char *text = json_node_get_string(node);
        g_autofree const BmChoice **c = bm_param_choices(p);
        for (guint i = 0; c[i]; i++)
            if (strcmp(c[i]->name, text) == 0)
                return TRUE;
        g_autofree char *want = choices_text(p);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request for %s: key \"%s\" must be one of %s (got \"%s\")", op_name,
                    p->name, want, text);
        return FALSE;
    }
    return TRUE;
}

static gboolean validate(const BmOperation *op, JsonObject *request,
                         JsonObject *filled, GError **error)
{
    g_autoptr(GList) keys = json_object_get_members(request);
    for (GList *l = keys; l; l = l->next) {
        const char *key = l->data;
        const BmParam *p = find_param(op, key);
        if (!p) {
            g_autoptr(GString) known = g_string_new(NULL);
            for (const BmParam *q = op->params; q && q->name; q++)
                g_string_append_printf(known, "%s%s", known->len ? ", " : "", q->name);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request key \"%s\" is not a parameter of %s (%s%s)", key, op->name,
                        known->len ? "expected one of: " : "it takes no keys", known->str);
            return FALSE;
        }
        JsonNode *node = json_object_get_member(request, key);
        if (!bm_param_check(p, op->name, node, error))
            return FALSE;
        json_object_set_member(filled, key, json_node_copy(node));
    }
    for (const BmParam *p = op->params; p && p->name; p++) {
        if (json_object_has_member(filled, p->name))
            continue;
        if (p->required) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request for %s is missing the required key \"%s\" (%s)",
                        op->name, p->name, p->summary);
            return FALSE;
        }
        if (p->default_json) {
            JsonNode *def = json_from_string(p->default_json, NULL);
            g_assert(def != NULL);   /* defaults are compiled in: a bad one is a bug */
            json_object_set_member(filled, p->name, def);
        }
    }
    return TRUE;
}

const void *bm_call_inputs_lookup(const BmCallInputs *inputs, const char *key,
                                  const char *type, GError **error)
{
    for (gsize i = 0; inputs && i < inputs->n_inputs; i++) {
        const BmInput *in = &inputs->inputs[i];
        if (g_strcmp0(in->key, key) != 0)
            continue;
        if (g_strcmp0(in->type, type) != 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "the in-memory input for \"%s\" is a %s, expected a %s",
                        key, in->type ? in->type : "(untyped value)", type);
            return NULL;
        }
        return in->value;
    }
    return NULL;
}

/* Each in-memory input names a parameter of op that the request leaves out. */
static gboolean validate_inputs(const BmOperation *op, JsonObject *request,
                                const BmCallInputs *inputs, GError **error)
{
    for (gsize i = 0; inputs && i < inputs->n_inputs; i++) {
        const char *key = inputs->inputs[i].key;
        if (!key || !find_param(op, key)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "an in-memory input stands in for \"%s\", which is not a parameter "
                        "of %s", key ? key : "(null)", op->name);
            return FALSE;
        }
        for (gsize j = 0; j < i; j++)
            if (g_strcmp0(inputs->inputs[j].key, key) == 0) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "two in-memory inputs stand in for \"%s\" of %s", key, op->name);
                return FALSE;
            }
        if (json_object_has_member(request, key)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request key \"%s\" of %s is given twice: in the request and as an "
                        "in-memory input (drop it from the request)", key, op->name);
            return FALSE;
        }
    }
    return TRUE;
}

JsonObject *bm_registry_prepare(const BmOperation *op, JsonObject *request,
                                const BmCallInputs *inputs, GError **error)
{
    bm_registry_init();
    g_autoptr(JsonObject) filled = json_object_new();
    if (!validate_inputs(op, request, inputs, error)
        || !validate(op, request, filled, error))
        return NULL;
    return g_steal_pointer(&filled);
}

JsonObject *bm_registry_invoke(const BmOperation *op, JsonObject *request,
                               const BmCallInputs *inputs, GError **error)
{
    g_autoptr(JsonObject) filled = bm_registry_prepare(op, request, inputs, error);
    if (!filled)
        return NULL;
    JsonObject *response = op->run(filled, inputs, error);
    if (!response) {
        if (error && !*error)
            g_set_error(error, BM_ERROR, BM_ERROR_INTERNAL,
                        "%s failed without saying why", op->name);
        /* a second line of defence: a message is text a host can show,
         * whatever bytes of the user's a reader let into it */
        if (error && *error && !g_utf8_validate((*error)->message, -1, NULL)) {
            char *valid = g_utf8_make_valid((*error)->message, -1);
            g_free((*error)->message);
            (*error)->message = valid;
        }
        return NULL;
    }
    bm_json_warnings_ensure(response);
    return response;
}

char *bm_registry_call_json(const char *op_name, const char *request_json,
                            const BmCallInputs *inputs, gboolean pretty,
                            GError **error)
{
    const BmOperation *op = bm_registry_lookup(op_name);
    if (!op) {
        g_autofree char *q = bm_text_for_message(op_name ? op_name : "(null)", -1);
        g_set_error(error, BM_ERROR, BM_ERROR_UNKNOWN_OPERATION,
                    "no operation named %s (list them with: bandmass ops)", q);
        return NULL;
    }
    g_autoptr(GError) parse_error = NULL;
    g_autofree char *what = g_strdup_printf("request for %s", op_name);
    if (!bm_json_check_depth(request_json ? request_json : "", -1, what, error))
        return NULL;
    g_autoptr(JsonNode) root = json_from_string(request_json ? request_json : "", &parse_error);
    if (parse_error) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request for %s is not valid JSON: %s", op_name, parse_error->message);
        return NULL;
    }
    if (!root || !JSON_NODE_HOLDS_OBJECT(root)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request for %s must be a JSON object ({...})", op_name);
        return NULL;
    }
    g_autoptr(JsonObject) response = bm_registry_invoke(op, json_node_get_object(root),
                                                        inputs, error);
    if (!response)
        return NULL;
    g_autoptr(JsonNode) out = json_node_new(JSON_NODE_OBJECT);
    json_node_set_object(out, response);
    return bm_json_to_string(out, pretty);
}

const BmField bm_common_fields[] = {
    { "warnings", NULL, FALSE,
      "findings that make a number doubtful or non-physical, as sentences (always present)" },
    { "warning_codes", NULL, FALSE,
      "the stable code of each warning, in the same order (always present)" },
    BM_FIELD_END
};

static void add_bound(JsonBuilder *b, const char *member, const BmBound *bound)
{
    json_builder_set_member_name(b, member);
    if (bound->kind == BM_BOUND_NONE) {
        json_builder_add_null_value(b);
        return;
    }
    json_builder_begin_object(b);
    json_builder_set_member_name(b, "value");
    json_builder_add_double_value(b, bound->value);
    json_builder_set_member_name(b, "inclusive");
    json_builder_add_boolean_value(b, bound->kind == BM_BOUND_CLOSED);
    json_builder_end_object(b);
}

static void add_string_or_null(JsonBuilder *b, const char *member, const char *value)
{
    json_builder_set_member_name(b, member);
    if (value)
        json_builder_add_string_value(b, value);
    else
        json_builder_add_null_value(b);
}

static void add_field(JsonBuilder *b, const BmField *f)
{
    json_builder_begin_object(b);
    json_builder_set_member_name(b, "name");
    json_builder_add_string_value(b, f->name);
    add_string_or_null(b, "unit", f->unit);
    json_builder_set_member_name(b, "optional");
    json_builder_add_boolean_value(b, f->optional);
    json_builder_set_member_name(b, "meaning");
    json_builder_add_string_value(b, f->meaning);
    json_builder_end_object(b);
}

JsonNode *bm_operation_describe(const BmOperation *op)
{
    g_autoptr(JsonBuilder) b = json_builder_new();
    json_builder_begin_object(b);
    json_builder_set_member_name(b, "name");
    json_builder_add_string_value(b, op->name);
    json_builder_set_member_name(b, "summary");
    json_builder_add_string_value(b, op->summary);
    json_builder_set_member_name(b, "params");
    json_builder_begin_array(b);
    for (const BmParam *p = op->params; p && p->name; p++) {
        g_autofree const char **kinds = bm_value_kind_names(p->kinds);
        json_builder_begin_object(b);
        json_builder_set_member_name(b, "name");
        json_builder_add_string_value(b, p->name);
        g_autofree char *kinds_words = kinds_text(p->kinds);
        json_builder_set_member_name(b, "kinds");
        json_builder_add_string_value(b, kinds_words);
        json_builder_set_member_name(b, "kind_names");
        json_builder_begin_array(b);
        for (guint i = 0; kinds[i]; i++)
            json_builder_add_string_value(b, kinds[i]);
        json_builder_end_array(b);
        json_builder_set_member_name(b, "required");
        json_builder_add_boolean_value(b, p->required);
        json_builder_set_member_name(b, "default");
        if (p->default_json)
            json_builder_add_value(b, json_from_string(p->default_json, NULL));
        else
            json_builder_add_null_value(b);
        json_builder_set_member_name(b, "summary");
        json_builder_add_string_value(b, p->summary);
        add_string_or_null(b, "unit", p->unit);
        add_bound(b, "minimum", &p->lower);
        add_bound(b, "maximum", &p->upper);
        json_builder_set_member_name(b, "choices");
        g_autofree const BmChoice **choices = bm_param_choices(p);
        if (choices) {
            json_builder_begin_array(b);
            for (guint i = 0; choices[i]; i++) {
                json_builder_begin_object(b);
                json_builder_set_member_name(b, "name");
                json_builder_add_string_value(b, choices[i]->name);
                json_builder_set_member_name(b, "description");
                json_builder_add_string_value(b, choices[i]->description);
                json_builder_end_object(b);
            }
            json_builder_end_array(b);
        } else {
            json_builder_add_null_value(b);
        }
        json_builder_end_object(b);
    }
    json_builder_end_array(b);
    json_builder_set_member_name(b, "response");
    json_builder_begin_array(b);
    for (const BmField *f = op->response; f && f->name; f++)
        add_field(b, f);
    for (const BmField *f = bm_common_fields; f->name; f++)
        add_field(b, f);
    json_builder_end_array(b);
    json_builder_end_object(b);
    return json_builder_get_root(b);
}

JsonNode *bm_registry_describe(void)
{
    JsonArray *all = json_array_new();
    for (guint i = 0; i < G_N_ELEMENTS(operations); i++)
        json_array_add_element(all, bm_operation_describe(operations[i]));
    JsonNode *root = json_node_new(JSON_NODE_ARRAY);
    json_node_take_array(root, all);
    return root;
}
