/* band-select.h: resolves a band given as a 0-based index or a name against
 * the band names of a grid or a k-table. */
#ifndef BM_IO_BAND_SELECT_H
#define BM_IO_BAND_SELECT_H

#include <glib.h>
#include <json-glib/json-glib.h>

G_BEGIN_DECLS

/* spec is a name or a decimal index. A name is matched against names, then
 * against alt_names (either list may be NULL; both NULL-terminated, nbands
 * long); a spec that matches no name and is all digits is an index. source
 * names the data in messages. Fails with BM_ERROR_INVALID_INPUT naming the
 * index or name and the available count or names. */
gboolean bm_band_select(const char *spec, const char *const *names,
                        const char *const *alt_names, size_t nbands,
                        const char *source, size_t *band, GError **error);

/* The same for a JSON value: an integer is an index, a string as above. */
gboolean bm_band_select_node(JsonNode *node, const char *const *names,
                             const char *const *alt_names, size_t nbands,
                             const char *source, size_t *band, GError **error);

G_END_DECLS

#endif
