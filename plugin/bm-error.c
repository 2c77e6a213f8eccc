/* bm-error.c: the bandmass GError domain. */
#include "bm-error-private.h"

/* Not G_DEFINE_QUARK: its cached static is written unsynchronised on first
 * use from several threads at once. The lookup is cheap and thread-safe. */
GQuark bm_error_quark(void)
{
    return g_quark_from_static_string("bandmass-error-quark");
}

G_DEFINE_ENUM_TYPE(BmError, bm_error,
    G_DEFINE_ENUM_VALUE(BM_ERROR_INVALID_INPUT, "invalid-input"),
    G_DEFINE_ENUM_VALUE(BM_ERROR_IO, "io"),
    G_DEFINE_ENUM_VALUE(BM_ERROR_UNKNOWN_OPERATION, "unknown-operation"),
    G_DEFINE_ENUM_VALUE(BM_ERROR_NO_CONVERGENCE, "no-convergence"),
    G_DEFINE_ENUM_VALUE(BM_ERROR_INTERNAL, "internal"))

void bm_error_from_core(GError **error, const bm_errbuf *err, const char *context)
{
    BmError code;
    switch (err->status) {
    case BM_EINVAL:   code = BM_ERROR_INVALID_INPUT; break;
    case BM_ENOCONV:  code = BM_ERROR_NO_CONVERGENCE; break;
    default:          code = BM_ERROR_INTERNAL; break;
    }
    if (context)
        g_set_error(error, BM_ERROR, code, "%s: %s", context, err->message);
    else
        g_set_error_literal(error, BM_ERROR, code, err->message);
}

gboolean bm_error_invalid(GError **error, const char *context, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: %s", context, msg);
    return FALSE;
}

gboolean bm_error_read_file(const char *path, const char *what, char **text, gsize *length,
                            GError **error)
{
    g_autoptr(GError) io = NULL;
    if (g_file_get_contents(path, text, length, &io))
        return TRUE;
    g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot read %s: %s", what, io->message);
    return FALSE;
}
