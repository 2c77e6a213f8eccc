/* bandmass-operations.c: the GObject face of the registry: bm_call and the
 * operation list (BmOperationInfo, BmParamInfo) built from its tables. */
#include "bandmass.h"
#include "registry.h"
#include "bm-json.h"

char *bm_call(const char *op, const char *request_json, GError **error)
{
    g_return_val_if_fail(op != NULL, NULL);
    g_return_val_if_fail(error == NULL || *error == NULL, NULL);
    return bm_registry_call_json(op, request_json ? request_json : "{}", NULL, FALSE, error);
}

char *bm_describe_operations(void)
{
    g_autoptr(JsonNode) all = bm_registry_describe();
    return bm_json_to_string(all, FALSE);
}

/* ---- BmParamInfo ---- */

/**
 * BmParamInfo:
 *
 * One request key of an operation: its name (which carries the unit), the
 * JSON kinds it accepts, whether it is required, its default, a summary,
 * its unit, the bounds of its numbers and the names it may take.
 */
struct _BmParamInfo {
    GObject parent_instance;
    const BmParam *param;   /* static, from the registry's table */
    const char **kinds;     /* static strings */
    const char **choices;   /* static strings, or NULL */
    const char **choice_descriptions;
};

G_DEFINE_FINAL_TYPE(BmParamInfo, bm_param_info, G_TYPE_OBJECT)

static void bm_param_info_finalize(GObject *object)
{
    BmParamInfo *self = BM_PARAM_INFO(object);
    g_free(self->kinds);
    g_free(self->choices);
    g_free(self->choice_descriptions);
    G_OBJECT_CLASS(bm_param_info_parent_class)->finalize(object);
}

static void bm_param_info_class_init(BmParamInfoClass *klass)
{
    G_OBJECT_CLASS(klass)->finalize = bm_param_info_finalize;
}

static void bm_param_info_init(BmParamInfo *self)
{
    (void)self;
}

static BmParamInfo *param_info_new(const BmParam *p)
{
    BmParamInfo *self = g_object_new(BM_TYPE_PARAM_INFO, NULL);
    self->param = p;
    self->kinds = bm_value_kind_names(p->kinds);
    g_autofree const BmChoice **choices = bm_param_choices(p);
    if (choices) {
        guint n = 0;
        while (choices[n])
            n++;
        self->choices = g_new0(const char *, n + 1);
        self->choice_descriptions = g_new0(const char *, n + 1);
        for (guint i = 0; i < n; i++) {
            self->choices[i] = choices[i]->name;
            self->choice_descriptions[i] = choices[i]->description;
        }
    }
    return self;
}

/**
 * bm_param_info_get_name:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none): the request key, e.g. `temperature_k`
 */
const char *bm_param_info_get_name(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return self->param->name;
}

/**
 * bm_param_info_get_kinds:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none) (array zero-terminated=1): the JSON kinds the key
 *   accepts: "string", "number", "integer", "boolean", "array", "object"
 */
const char *const *bm_param_info_get_kinds(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return (const char *const *)self->kinds;
}

/**
 * bm_param_info_get_kind_flags:
 * @self: a #BmParamInfo
 *
 * Returns: the same kinds as a mask: string 1, number 2, integer 4,
 *   boolean 8, array 16, object 32
 */
guint bm_param_info_get_kind_flags(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), 0);
    return self->param->kinds;
}

/**
 * bm_param_info_get_unit:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none) (nullable): the unit of the key's numbers, e.g.
 *   "K", "eV", "cm^-3", "1/Angstrom", "m_e"; %NULL when it has none
 */
const char *bm_param_info_get_unit(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return self->param->unit;
}

static gboolean get_bound(const BmBound *b, double *value, gboolean *inclusive)
{
    if (value)
        *value = b->kind == BM_BOUND_NONE ? 0.0 : b->value;
    if (inclusive)
        *inclusive = b->kind == BM_BOUND_CLOSED;
    return b->kind != BM_BOUND_NONE;
}

/**
 * bm_param_info_get_minimum:
 * @self: a #BmParamInfo
 * @value: (out) (optional): the lower bound (0 when there is none)
 * @inclusive: (out) (optional): whether the bound itself is allowed
 *
 * The lower bound of the key's number, or of every number of its array.
 *
 * Returns: %TRUE when the key has a lower bound
 */
gboolean bm_param_info_get_minimum(BmParamInfo *self, double *value, gboolean *inclusive)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), FALSE);
    return get_bound(&self->param->lower, value, inclusive);
}

/**
 * bm_param_info_get_maximum:
 * @self: a #BmParamInfo
 * @value: (out) (optional): the upper bound (0 when there is none)
 * @inclusive: (out) (optional): whether the bound itself is allowed
 *
 * The upper bound of the key's number, or of every number of its array.
 *
 * Returns: %TRUE when the key has an upper bound
 */
gboolean bm_param_info_get_maximum(BmParamInfo *self, double *value, gboolean *inclusive)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), FALSE);
    return get_bound(&self->param->upper, value, inclusive);
}

/**
 * bm_param_info_get_choices:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none) (array zero-terminated=1) (nullable): the names
 *   a string value may take, or %NULL when any string is accepted
 */
const char *const *bm_param_info_get_choices(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return (const char *const *)self->choices;
}

/**
 * bm_param_info_get_choice_descriptions:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none) (array zero-terminated=1) (nullable): one line
 *   for each of bm_param_info_get_choices(), in the same order
 */
const char *const *bm_param_info_get_choice_descriptions(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return (const char *const *)self->choice_descriptions;
}

/**
 * bm_param_info_get_required:
 * @self: a #BmParamInfo
 *
 * Returns: whether a request must give this key
 */
gboolean bm_param_info_get_required(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), FALSE);
    return self->param->required;
}

/**
 * bm_param_info_get_default_json:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none) (nullable): the default as JSON text, or %NULL
 *   when the key has none
 */
const char *bm_param_info_get_default_json(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return self->param->default_json;
}

/**
 * bm_param_info_get_summary:
 * @self: a #BmParamInfo
 *
 * Returns: (transfer none): one line: meaning and unit
 */
const char *bm_param_info_get_summary(BmParamInfo *self)
{
    g_return_val_if_fail(BM_IS_PARAM_INFO(self), NULL);
    return self->param->summary;
}

/* ---- BmFieldInfo ---- */

/**
 * BmFieldInfo:
 *
 * One top-level key of an operation's response: name, unit, whether every
 * response has it, and its meaning.
 */
struct _BmFieldInfo {
    GObject parent_instance;
    const BmField *field;   /* static, from the registry's table */
};

G_DEFINE_FINAL_TYPE(BmFieldInfo, bm_field_info, G_TYPE_OBJECT)

static void bm_field_info_class_init(BmFieldInfoClass *klass)
{
    (void)klass;
}

static void bm_field_info_init(BmFieldInfo *self)
{
    (void)self;
}

static BmFieldInfo *field_info_new(const BmField *f)
{
    BmFieldInfo *self = g_object_new(BM_TYPE_FIELD_INFO, NULL);
    self->field = f;
    return self;
}

/**
 * bm_field_info_get_name:
 * @self: a #BmFieldInfo
 *
 * Returns: (transfer none): the response key, e.g. `fermi_level_ev`
 */
const char *bm_field_info_get_name(BmFieldInfo *self)
{
    g_return_val_if_fail(BM_IS_FIELD_INFO(self), NULL);
    return self->field->name;
}

/**
 * bm_field_info_get_unit:
 * @self: a #BmFieldInfo
 *
 * Returns: (transfer none) (nullable): the unit of its numbers, or %NULL
 */
const char *bm_field_info_get_unit(BmFieldInfo *self)
{
    g_return_val_if_fail(BM_IS_FIELD_INFO(self), NULL);
    return self->field->unit;
}

/**
 * bm_field_info_get_optional:
 * @self: a #BmFieldInfo
 *
 * Returns: %TRUE when only some responses carry the key
 */
gboolean bm_field_info_get_optional(BmFieldInfo *self)
{
    g_return_val_if_fail(BM_IS_FIELD_INFO(self), FALSE);
    return self->field->optional;
}

/**
 * bm_field_info_get_meaning:
 * @self: a #BmFieldInfo
 *
 * Returns: (transfer none): one line saying what the key holds
 */
const char *bm_field_info_get_meaning(BmFieldInfo *self)
{
    g_return_val_if_fail(BM_IS_FIELD_INFO(self), NULL);
    return self->field->meaning;
}

/* ---- BmOperationInfo ---- */

/**
 * BmOperationInfo:
 *
 * One operation of the registry: name, summary, request keys and response
 * keys.
 */
struct _BmOperationInfo {
    GObject parent_instance;
    const BmOperation *op;   /* static, from the registry */
    GPtrArray *params;       /* of BmParamInfo */
    GPtrArray *response;     /* of BmFieldInfo */
};

G_DEFINE_FINAL_TYPE(BmOperationInfo, bm_operation_info, G_TYPE_OBJECT)

static void bm_operation_info_finalize(GObject *object)
{
    g_ptr_array_unref(BM_OPERATION_INFO(object)->params);
    g_ptr_array_unref(BM_OPERATION_INFO(object)->response);
    G_OBJECT_CLASS(bm_operation_info_parent_class)->finalize(object);
}

static void bm_operation_info_class_init(BmOperationInfoClass *klass)
{
    G_OBJECT_CLASS(klass)->finalize = bm_operation_info_finalize;
}

static void bm_operation_info_init(BmOperationInfo *self)
{
    self->params = g_ptr_array_new_with_free_func(g_object_unref);
    self->response = g_ptr_array_new_with_free_func(g_object_unref);
}

static BmOperationInfo *operation_info_new(const BmOperation *op)
{
    BmOperationInfo *self = g_object_new(BM_TYPE_OPERATION_INFO, NULL);
    self->op = op;
    for (const BmParam *p = op->params; p && p->name; p++)
        g_ptr_array_add(self->params, param_info_new(p));
    for (const BmField *f = op->response; f && f->name; f++)
        g_ptr_array_add(self->response, field_info_new(f));
    for (const BmField *f = bm_common_fields; f->name; f++)
        g_ptr_array_add(self->response, field_info_new(f));
    return self;
}

/**
 * bm_operation_info_get_name:
 * @self: a #BmOperationInfo
 *
 * Returns: (transfer none): the operation name, e.g. `mass-tensor`
 */
const char *bm_operation_info_get_name(BmOperationInfo *self)
{
    g_return_val_if_fail(BM_IS_OPERATION_INFO(self), NULL);
    return self->op->name;
}

/**
 * bm_operation_info_get_summary:
 * @self: a #BmOperationInfo
 *
 * Returns: (transfer none): one line saying what the operation does
 */
const char *bm_operation_info_get_summary(BmOperationInfo *self)
{
    g_return_val_if_fail(BM_IS_OPERATION_INFO(self), NULL);
    return self->op->summary;
}

/**
 * bm_operation_info_get_params:
 * @self: a #BmOperationInfo
 *
 * Returns: (transfer none) (element-type BmParamInfo): the request keys, in
 *   the order of the registry's table
 */
GPtrArray *bm_operation_info_get_params(BmOperationInfo *self)
{
    g_return_val_if_fail(BM_IS_OPERATION_INFO(self), NULL);
    return self->params;
}

/**
 * bm_operation_info_get_response:
 * @self: a #BmOperationInfo
 *
 * Returns: (transfer none) (element-type BmFieldInfo): the top-level keys of
 *   the operation's response, "warnings" last
 */
GPtrArray *bm_operation_info_get_response(BmOperationInfo *self)
{
    g_return_val_if_fail(BM_IS_OPERATION_INFO(self), NULL);
    return self->response;
}

/**
 * bm_list_operations:
 *
 * Every operation of the registry, in its order (as `bandmass ops`).
 *
 * Returns: (transfer container) (element-type BmOperationInfo): the
 *   operations (the array holds a reference to each; unref it to release all)
 */
GPtrArray *bm_list_operations(void)
{
    guint n;
    const BmOperation *const *ops = bm_registry_operations(&n);
    GPtrArray *all = g_ptr_array_new_full(n, g_object_unref);
    for (guint i = 0; i < n; i++)
        g_ptr_array_add(all, operation_info_new(ops[i]));
    return all;
}

/**
 * bm_lookup_operation:
 * @name: an operation name
 *
 * Returns: (transfer full) (nullable): the operation, or %NULL if the
 *   registry has none of that name
 */
BmOperationInfo *bm_lookup_operation(const char *name)
{
    g_return_val_if_fail(name != NULL, NULL);
    const BmOperation *op = bm_registry_lookup(name);
    return op ? operation_info_new(op) : NULL;
}
