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
 * JSON kinds it accepts, whether it is required, its default and a summary.
 */
struct _BmParamInfo {
    GObject parent_instance;
    const BmParam *param;   /* static, from the registry's table */
    GStrv kinds;
};

G_DEFINE_FINAL_TYPE(BmParamInfo, bm_param_info, G_TYPE_OBJECT)

static void bm_param_info_finalize(GObject *object)
{
    g_strfreev(BM_PARAM_INFO(object)->kinds);
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

/* kinds_text is the registry's wording ("number or array"), split into words. */
static BmParamInfo *param_info_new(const BmParam *p, const char *kinds_text)
{
    BmParamInfo *self = g_object_new(BM_TYPE_PARAM_INFO, NULL);
    self->param = p;
    self->kinds = g_strsplit(kinds_text, " or ", -1);
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

/* ---- BmOperationInfo ---- */

/**
 * BmOperationInfo:
 *
 * One operation of the registry: name, summary and request keys.
 */
struct _BmOperationInfo {
    GObject parent_instance;
    const BmOperation *op;   /* static, from the registry */
    GPtrArray *params;       /* of BmParamInfo */
};

G_DEFINE_FINAL_TYPE(BmOperationInfo, bm_operation_info, G_TYPE_OBJECT)

static void bm_operation_info_finalize(GObject *object)
{
    g_ptr_array_unref(BM_OPERATION_INFO(object)->params);
    G_OBJECT_CLASS(bm_operation_info_parent_class)->finalize(object);
}

static void bm_operation_info_class_init(BmOperationInfoClass *klass)
{
    G_OBJECT_CLASS(klass)->finalize = bm_operation_info_finalize;
}

static void bm_operation_info_init(BmOperationInfo *self)
{
    self->params = g_ptr_array_new_with_free_func(g_object_unref);
}

static BmOperationInfo *operation_info_new(const BmOperation *op)
{
    BmOperationInfo *self = g_object_new(BM_TYPE_OPERATION_INFO, NULL);
    self->op = op;
    /* the kinds wording comes from the registry's own description */
    g_autoptr(JsonNode) described = bm_operation_describe(op);
    JsonArray *params = json_object_get_array_member(json_node_get_object(described), "params");
    guint i = 0;
    for (const BmParam *p = op->params; p && p->name; p++, i++) {
        JsonObject *d = json_array_get_object_element(params, i);
        g_ptr_array_add(self->params,
                        param_info_new(p, json_object_get_string_member(d, "kinds")));
    }
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
