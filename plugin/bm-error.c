/* bm-error.c: the bandmass GError domain. */
#include "bm-error-private.h"

#include <errno.h>
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

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
    /* non-blocking open, so that a FIFO cannot hang us before the check */
    int fd = open(path, O_RDONLY | O_CLOEXEC | O_NONBLOCK);
    struct stat st;
    const char *why = NULL;
    int err = 0;
    if (fd < 0 || fstat(fd, &st) != 0)
        err = errno;
    else if (!S_ISREG(st.st_mode))
        why = "not a regular file (a FIFO, a device or a directory cannot be read as a document)";
    else if ((guint64)st.st_size > BM_MAX_DOCUMENT_BYTES)
        why = "larger than the 1 GiB a document may have";
    if (err == ENOENT && !g_path_is_absolute(path)) {
        /* say where a relative name was looked for: the usual mistake */
        g_autofree char *cwd = g_get_current_dir();
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot read %s: %s: no such file in %s "
                    "(relative names are read from the folder the program runs in; give "
                    "the path from there or an absolute one)", what, path, cwd);
        return FALSE;
    }
    if (err || why) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot read %s: %s: %s", what, path,
                    why ? why : g_strerror(err));
        if (fd >= 0)
            close(fd);
        return FALSE;
    }
    gsize cap = (gsize)st.st_size, len = 0;
    char *buf = g_malloc(cap + 1);
    for (;;) {
        if (len == cap) {
            /* the file grew since fstat: read on, within the limit */
            if (cap >= BM_MAX_DOCUMENT_BYTES) {
                why = "larger than the 1 GiB a document may have";
                break;
            }
            cap = MIN(2 * cap + 4096, BM_MAX_DOCUMENT_BYTES);
            buf = g_realloc(buf, cap + 1);
        }
        gssize got = read(fd, buf + len, cap - len);
        if (got < 0 && errno == EINTR)
            continue;
        if (got < 0) {
            err = errno;
            break;
        }
        if (got == 0)
            break;
        len += (gsize)got;
    }
    close(fd);
    if (err || why) {
        g_free(buf);
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot read %s: %s: %s", what, path,
                    why ? why : g_strerror(err));
        return FALSE;
    }
    buf[len] = '\0';
    *text = buf;
    if (length)
        *length = len;
    return TRUE;
}
