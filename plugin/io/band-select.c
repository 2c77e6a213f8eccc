/* band-select.c: band lookup by 0-based index or by name, with messages that
 * list what is available. */
#include "band-select.h"
#include "bm-error-private.h"

#include <string.h>

static char *available(const char *const *names, size_t nbands)
{
    if (!names)
        return g_strdup_printf("%zu bands, indices 0..%zu, no names", nbands,
                               nbands ? nbands - 1 : 0);
    GString *s = g_string_new(NULL);
    g_string_append_printf(s, "%zu bands, indices 0..%zu, names ", nbands,
                           nbands ? nbands - 1 : 0);
    for (size_t i = 0; i < nbands && names[i]; i++)
        g_string_append_printf(s, i ? ", '%s'" : "'%s'", names[i]);
    return g_string_free(s, FALSE);
}

static gboolean by_index(guint64 index, const char *shown, const char *const *names,
                         size_t nbands, const char *source, size_t *band, GError **error)
{
    if (index >= nbands) {
        g_autofree char *av = available(names, nbands);
        g_autofree char *num = g_strdup_printf("%" G_GUINT64_FORMAT, index);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: band index %s is out of range (%s)", source, shown ? shown : num, av);
        return FALSE;
    }
    *band = (size_t)index;
    return TRUE;
}

gboolean bm_band_select(const char *spec, const char *const *names,
                        const char *const *alt_names, size_t nbands,
                        const char *source, size_t *band, GError **error)
{
    g_return_val_if_fail(spec != NULL && band != NULL, FALSE);
    if (!source)
        source = "band data";
    for (size_t i = 0; names && i < nbands && names[i]; i++)
        if (strcmp(names[i], spec) == 0)
            return *band = i, TRUE;
    for (size_t i = 0; alt_names && i < nbands && alt_names[i]; i++)
        if (strcmp(alt_names[i], spec) == 0)
            return *band = i, TRUE;
    if (*spec && strspn(spec, "0123456789") == strlen(spec)) {
        guint64 v;
        if (!g_ascii_string_to_unsigned(spec, 10, 0, G_MAXUINT64, &v, NULL))
            v = G_MAXUINT64;
        return by_index(v, spec, names, nbands, source, band, error);
    }
    g_autofree char *av = available(names, nbands);
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "%s: no band named '%s' (%s)", source, spec, av);
    return FALSE;
}

gboolean bm_band_select_node(JsonNode *node, const char *const *names,
                             const char *const *alt_names, size_t nbands,
                             const char *source, size_t *band, GError **error)
{
    if (!source)
        source = "band data";
    if (node && JSON_NODE_TYPE(node) == JSON_NODE_VALUE) {
        GType t = json_node_get_value_type(node);
        if (t == G_TYPE_INT64) {
            gint64 v = json_node_get_int(node);
            if (v < 0) {
                g_autofree char *av = available(names, nbands);
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "%s: band index %" G_GINT64_FORMAT " is negative (%s)",
                            source, v, av);
                return FALSE;
            }
            return by_index((guint64)v, NULL, names, nbands, source, band, error);
        }
        if (t == G_TYPE_STRING)
            return bm_band_select(json_node_get_string(node), names, alt_names, nbands,
                                  source, band, error);
    }
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "%s: 'band' must be a 0-based integer index or a band name", source);
    return FALSE;
}
