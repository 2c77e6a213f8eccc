/* bm-error.h: the GError domain of libbandmass and its codes (public,
 * installed). The mapping of core statuses onto these codes is private:
 * bm-error-private.h. */
#ifndef BM_ERROR_H
#define BM_ERROR_H

#include <glib-object.h>
#include "bandmass-export.h"

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

BM_PUBLIC GQuark bm_error_quark(void);

/* The BmError enum as a GType, so introspection maps the domain to it. */
BM_PUBLIC GType bm_error_get_type(void);
#define BM_TYPE_ERROR (bm_error_get_type())

G_END_DECLS

#endif
