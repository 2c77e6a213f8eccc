/* bm-error.h: the GError domain of the plugin and its codes. Core statuses
 * map onto these codes in one place (bm_error_from_core). */
#ifndef BM_ERROR_H
#define BM_ERROR_H

#include <glib-object.h>
#include "bm-status.h"

G_BEGIN_DECLS

#define BM_ERROR (bm_error_quark())

/**
 * BmError:
 * @BM_ERROR_INVALID_INPUT: a request, file or value is malformed or out of range
 * @BM_ERROR_IO: a file could not be read
 * @BM_ERROR_UNKNOWN_OPERATION: no operation of that name is registered
 * @BM_ERROR_NO_CONVERGENCE: an iterative solution did not converge
 * @BM_ERROR_INTERNAL: an internal failure (a bug)
 *
 * Error codes of the bandmass domain.
 */
typedef enum {
    BM_ERROR_INVALID_INPUT,
    BM_ERROR_IO,
    BM_ERROR_UNKNOWN_OPERATION,
    BM_ERROR_NO_CONVERGENCE,
    BM_ERROR_INTERNAL
} BmError;

GQuark bm_error_quark(void);

/* The BmError enum as a GType, so introspection maps the domain to it. */
GType bm_error_get_type(void);
#define BM_TYPE_ERROR (bm_error_get_type())

/**
 * bm_error_from_core: (skip)
 *
 * Turns a core error buffer into a GError, prefixing context (may be NULL).
 */
void bm_error_from_core(GError **error, const bm_errbuf *err, const char *context);

/* Sets BM_ERROR_INVALID_INPUT with "context: message" and returns FALSE, so
 * readers can write `return bm_error_invalid(error, path, "...", ...);`. */
gboolean bm_error_invalid(GError **error, const char *context, const char *fmt, ...)
    G_GNUC_PRINTF(3, 4);

G_END_DECLS

#endif
