/* bm-error-private.h: the plugin's side of the error domain, not installed:
 * core error buffers become GErrors in one place (bm_error_from_core), and a
 * shorthand for invalid-input errors, and file reading with an error that
 * says what was being read. */
#ifndef BM_ERROR_PRIVATE_H
#define BM_ERROR_PRIVATE_H

#include "bm-error.h"
#include "bm-status.h"

G_BEGIN_DECLS

/* Turns a core error buffer into a GError, prefixing context (may be NULL). */
void bm_error_from_core(GError **error, const bm_errbuf *err, const char *context);

/* Sets BM_ERROR_INVALID_INPUT with "context: message" and returns FALSE, so
 * readers can write `return bm_error_invalid(error, path, "...", ...);`. */
gboolean bm_error_invalid(GError **error, const char *context, const char *fmt, ...)
    G_GNUC_PRINTF(3, 4);

/* Documents (requests, grid documents, k-tables, material files) larger than
 * this are refused rather than read: a request never needs more. */
#define BM_MAX_DOCUMENT_BYTES ((gsize)1 << 30)

/* Reads the whole file at path into *text (free it, NUL-terminated) and
 * *length (may be NULL); on failure sets BM_ERROR_IO "cannot read WHAT:
 * reason" and returns FALSE. The reason names the file. Only a regular file
 * is read (a FIFO would block forever, /dev/zero would never end), and none
 * larger than BM_MAX_DOCUMENT_BYTES. */
gboolean bm_error_read_file(const char *path, const char *what, char **text, gsize *length,
                            GError **error);

G_END_DECLS

#endif
