/* npy.c: reader for NumPy .npy float64 arrays (format versions 1.0, 2.0, 3.0).
 * One read of the data straight into the final buffer, no intermediate copy.
 *
 * The .npy layout (open specification, numpy.lib.format):
 *   bytes 0-5   magic "\x93NUMPY"
 *   byte  6, 7  major, minor version (1.0, 2.0 or 3.0)
 *   then        header length: uint16 little endian (1.0) or uint32 little
 *               endian (2.0, 3.0)
 *   then        the header: a Python dict literal, e.g.
 *               {'descr': '<f8', 'fortran_order': False, 'shape': (2, 8, 8, 8), }
 *               padded with spaces and ended by '\n' (latin-1 in 1.0/2.0,
 *               UTF-8 in 3.0)
 *   then        the raw data, product(shape) values.
 * This reader accepts descr '<f8' or '>f8' (big endian is swapped to native),
 * fortran_order False, and any shape of rank 0..8; the data must be exactly
 * product(shape) * 8 bytes long.
 *
 * Reading: a regular file whose data need no byte swap is mapped privately
 * and read-only, pre-faulted (MAP_POPULATE where available), so the page
 * cache is the final buffer and the values are never copied. Otherwise one
 * read() fills one allocated buffer, which is then swapped in place.
 * The mapping is for one call (see npy.h): bm_npy_array_unchanged() tells a
 * file rewritten under it, bm_npy_array_detach() copies the values out with
 * read() for arrays that outlive the call. */
#define _DEFAULT_SOURCE 1   /* MAP_POPULATE */
#include "npy.h"
#include "bm-json.h"
#include "bm-error-private.h"

#include <errno.h>
#include <fcntl.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

#define NPY_MAGIC "\x93NUMPY"
#define NPY_MAGIC_LEN 6
#define NPY_MAX_HEADER (1u << 24)   /* far above anything numpy writes */

void bm_npy_array_free(BmNpyArray *array)
{
    if (!array)
        return;
    if (array->map)
        munmap(array->map, array->map_len);
    if (array->fd >= 0)
        close(array->fd);
    g_free(array->buffer);
    g_free(array->path);
    g_free(array);
}

static gint64 ns_of(const struct timespec *t)
{
    return (gint64)t->tv_sec * 1000000000 + t->tv_nsec;
}

gboolean bm_npy_array_unchanged(const BmNpyArray *a, GError **error)
{
    if (!a || !a->map || a->fd < 0)
        return TRUE;
    struct stat st;
    if (fstat(a->fd, &st) != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: cannot check the file: %s", a->path,
                    g_strerror(errno));
        return FALSE;
    }
    /* a write or a truncation sets the modification time; the change time
     * is not compared, since the rename of another file over this one
     * (which leaves the mapped data alone) sets it too */
    if ((guint64)st.st_size != a->file_size || ns_of(&st.st_mtim) != a->file_mtime_ns) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: the file was %s while it was being "
                    "read (%" G_GUINT64_FORMAT " bytes when opened, %" G_GUINT64_FORMAT " now): "
                    "no answer is given from data that may mix old and new values; run again "
                    "once the file is complete (writing it elsewhere and renaming it over "
                    "the old one is always safe)", a->path,
                    (guint64)st.st_size < a->file_size ? "cut shorter" : "rewritten",
                    a->file_size, (guint64)st.st_size);
        return FALSE;
    }
    return TRUE;
}

gboolean bm_npy_array_detach(BmNpyArray *a, GError **error)
{
    if (!a || !a->map)
        return TRUE;
    size_t nbytes = a->count * sizeof(double);
    double *copy = g_try_malloc(nbytes ? nbytes : 1);
    if (!copy) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: cannot allocate %zu bytes for the array",
                    a->path, nbytes);
        return FALSE;
    }
    size_t done = 0;
    while (done < nbytes) {
        ssize_t r = pread(a->fd, (char *)copy + done, nbytes - done,
                          (off_t)(a->data_offset + done));
        if (r < 0 && errno == EINTR)
            continue;
        if (r <= 0) {
            if (r < 0)
                g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: cannot read: %s", a->path,
                            g_strerror(errno));
            else
                g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: the file was cut shorter while "
                            "it was being read (%zu of %zu bytes of values)", a->path,
                            done, nbytes);
            g_free(copy);
            return FALSE;
        }
        done += (size_t)r;
    }
    if (!bm_npy_array_unchanged(a, error)) {
        g_free(copy);
        return FALSE;
    }
    munmap(a->map, a->map_len);
    a->map = NULL;
    close(a->fd);
    a->fd = -1;
    a->buffer = copy;
    a->data = copy;
    return TRUE;
}

char *bm_npy_shape_string(const size_t *shape, size_t ndim)
{
    GString *s = g_string_new("(");
    for (size_t i = 0; i < ndim; i++)
        g_string_append_printf(s, i ? ", %zu" : "%zu", shape[i]);
    if (ndim == 1)
        g_string_append_c(s, ',');
    g_string_append_c(s, ')');
    return g_string_free(s, FALSE);
}

/* ---- header dict parser: just enough Python literal syntax ---- */

typedef struct {
    const char *p, *end;
    const char *path;
    GError **error;
} hparser;

static gboolean hfail(hparser *h, const char *what)
{
    g_set_error(h->error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                "%s: .npy header is not a valid dict literal: %s", h->path, what);
    return FALSE;
}

static void hskip(hparser *h)
{
    while (h->p < h->end && (*h->p == ' ' || *h->p == '\t' || *h->p == '\n' || *h->p == '\r'))
        h->p++;
}

static gboolean hexpect(hparser *h, char c)
{
    hskip(h);
    if (h->p >= h->end || *h->p != c) {
        char msg[32];
        g_snprintf(msg, sizeof msg, "expected '%c'", c);
        return hfail(h, msg);
    }
    h->p++;
    return TRUE;
}

/* A quoted string; returns a new string or NULL. */
static char *hstring(hparser *h)
{
    hskip(h);
    if (h->p >= h->end || (*h->p != '\'' && *h->p != '"')) {
        hfail(h, "expected a quoted string");
        return NULL;
    }
    char q = *h->p++;
    const char *start = h->p;
    while (h->p < h->end && *h->p != q) {
        if (*h->p == '\\')
            h->p++;
        h->p++;
    }
    if (h->p >= h->end) {
        hfail(h, "unterminated string");
        return NULL;
    }
    char *s = g_strndup(start, (gsize)(h->p - start));
    h->p++;
    return s;
}

static gboolean hword(hparser *h, const char *w)
{
    size_t n = strlen(w);
    if ((size_t)(h->end - h->p) >= n && memcmp(h->p, w, n) == 0) {
        h->p += n;
        return TRUE;
    }
    return FALSE;
}

/* The shape tuple "(a, b, c)" or "()" or "(a,)". */
static gboolean hshape(hparser *h, size_t *shape, size_t *ndim)
{
    if (!hexpect(h, '('))
        return FALSE;
    *ndim = 0;
    for (;;) {
        hskip(h);
        if (h->p < h->end && *h->p == ')') {
            h->p++;
            return TRUE;
        }
        if (h->p >= h->end || !g_ascii_isdigit(*h->p))
            return hfail(h, "'shape' must be a tuple of non-negative integers");
        guint64 v = 0;
        while (h->p < h->end && g_ascii_isdigit(*h->p)) {
            if (v > (G_MAXUINT64 - 9) / 10)
                return hfail(h, "a 'shape' entry is too large");
            v = v * 10 + (guint64)(*h->p - '0');
            h->p++;
        }
        hskip(h);
        if (h->p < h->end && *h->p == 'L')   /* old Python 2 long suffix */
            h->p++;
        if (*ndim >= BM_NPY_MAX_DIMS)
            return hfail(h, "'shape' has more than 8 dimensions");
        if (v > G_MAXSIZE)
            return hfail(h, "a 'shape' entry is too large");
        shape[(*ndim)++] = (size_t)v;
        hskip(h);
        if (h->p < h->end && *h->p == ',') {
            h->p++;
            continue;
        }
        if (h->p < h->end && *h->p == ')') {
            h->p++;
            return TRUE;
        }
        return hfail(h, "'shape' tuple is not closed");
    }
}

typedef struct {
    char *descr;
    int fortran;        /* -1 unset */
    gboolean have_shape;
    size_t shape[BM_NPY_MAX_DIMS];
    size_t ndim;
} npy_header;

static gboolean parse_header(const char *text, size_t len, const char *path,
                             npy_header *hd, GError **error)
{
    hparser h = { text, text + len, path, error };
    hd->descr = NULL;
    hd->fortran = -1;
    hd->have_shape = FALSE;
    hd->ndim = 0;

    hskip(&h);
    if (h.p >= h.end || *h.p != '{')
        return hfail(&h, "it does not start with '{'");
    h.p++;
    for (;;) {
        hskip(&h);
        if (h.p < h.end && *h.p == '}') {
            h.p++;
            break;
        }
        g_autofree char *key = hstring(&h);
        if (!key)
            return FALSE;
        if (!hexpect(&h, ':'))
            return FALSE;
        hskip(&h);
        if (strcmp(key, "descr") == 0) {
            if (h.p < h.end && (*h.p == '[' || *h.p == '('))
                return g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                                   "%s: structured dtype is not supported; expected "
                                   "'<f8' or '>f8' (float64)", path), FALSE;
            g_free(hd->descr);
            hd->descr = hstring(&h);
            if (!hd->descr)
                return FALSE;
        } else if (strcmp(key, "fortran_order") == 0) {
            if (hword(&h, "True"))
                hd->fortran = 1;
            else if (hword(&h, "False"))
                hd->fortran = 0;
            else
                return hfail(&h, "'fortran_order' must be True or False");
        } else if (strcmp(key, "shape") == 0) {
            if (!hshape(&h, hd->shape, &hd->ndim))
                return FALSE;
            hd->have_shape = TRUE;
        } else {
            g_autofree char *q = bm_text_for_message(key, -1);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: .npy header has an unexpected key %s (expected "
                        "'descr', 'fortran_order' and 'shape')", path, q);
            return FALSE;
        }
        hskip(&h);
        if (h.p < h.end && *h.p == ',') {
            h.p++;
            continue;
        }
        if (h.p < h.end && *h.p == '}') {
            h.p++;
            break;
        }
        return hfail(&h, "expected ',' or '}' after a value");
    }
    hskip(&h);
    if (h.p != h.end)
        return hfail(&h, "text after the closing '}'");
    if (!hd->descr || hd->fortran < 0 || !hd->have_shape) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: .npy header lacks the key '%s'", path,
                    !hd->descr ? "descr" : hd->fortran < 0 ? "fortran_order" : "shape");
        return FALSE;
    }
    return TRUE;
}

/* ---- file reading ---- */

/* Reads exactly n bytes unless end of file comes first; returns bytes read or -1. */
static gssize read_full(int fd, void *buf, size_t n)
{
    size_t done = 0;
    while (done < n) {
        ssize_t r = read(fd, (char *)buf + done, n - done);
        if (r < 0) {
            if (errno == EINTR)
                continue;
            return -1;
        }
        if (r == 0)
            break;
        done += (size_t)r;
    }
    return (gssize)done;
}

static BmNpyArray *fail_io(const char *path, int err, const char *what, GError **error)
{
    g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: cannot %s: %s", path, what,
                g_strerror(err));
    return NULL;
}

BmNpyArray *bm_npy_read_f64(const char *path, GError **error)
{
    g_return_val_if_fail(path != NULL, NULL);
    g_return_val_if_fail(error == NULL || *error == NULL, NULL);

    int fd = open(path, O_RDONLY | O_CLOEXEC | O_NONBLOCK);
    if (fd < 0)
        return fail_io(path, errno, "open the .npy file", error);
    struct stat fst;
    if (fstat(fd, &fst) != 0 || !S_ISREG(fst.st_mode)) {
        close(fd);
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "%s: not a regular file (a FIFO, a device or a "
                    "directory cannot be read as a .npy array)", path);
        return NULL;
    }

    BmNpyArray *result = NULL;
    g_autofree char *header = NULL;
    npy_header hd = { 0 };
    unsigned char pre[12];

    gssize got = read_full(fd, pre, 10);
    if (got < 0) {
        fail_io(path, errno, "read", error);
        goto out;
    }
    if (got < NPY_MAGIC_LEN || memcmp(pre, NPY_MAGIC, NPY_MAGIC_LEN) != 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: not a NumPy .npy file (bad magic string; expected \\x93NUMPY)",
                    path);
        goto out;
    }
    if (got < 10) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: .npy file truncated inside the preamble", path);
        goto out;
    }
    int major = pre[6], minor = pre[7];
    size_t header_len, pre_len;
    if (major == 1 && minor == 0) {
        header_len = (size_t)pre[8] | ((size_t)pre[9] << 8);
        pre_len = 10;
    } else if ((major == 2 || major == 3) && minor == 0) {
        if (read_full(fd, pre + 10, 2) != 2) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: .npy file truncated inside the preamble", path);
            goto out;
        }
        header_len = (size_t)pre[8] | ((size_t)pre[9] << 8) |
                     ((size_t)pre[10] << 16) | ((size_t)pre[11] << 24);
        pre_len = 12;
    } else {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: unsupported .npy format version %d.%d (expected 1.0, 2.0 or 3.0)",
                    path, major, minor);
        goto out;
    }
    if (header_len == 0 || header_len > NPY_MAX_HEADER) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: implausible .npy header length %zu", path, header_len);
        goto out;
    }
    header = g_malloc(header_len + 1);
    got = read_full(fd, header, header_len);
    if (got < 0) {
        fail_io(path, errno, "read", error);
        goto out;
    }
    if ((size_t)got < header_len) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: .npy file truncated inside the header (%zu of %zu bytes)",
                    path, (size_t)got, header_len);
        goto out;
    }
    header[header_len] = '\0';
    if (memchr(header, '\0', header_len)) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: .npy header contains a NUL byte", path);
        goto out;
    }
    if (!parse_header(header, header_len, path, &hd, error))
        goto out;

    gboolean swap;
    if (strcmp(hd.descr, "<f8") == 0)
        swap = (G_BYTE_ORDER == G_BIG_ENDIAN);
    else if (strcmp(hd.descr, ">f8") == 0)
        swap = (G_BYTE_ORDER == G_LITTLE_ENDIAN);
    else {
        g_autofree char *q = bm_text_for_message(hd.descr, -1);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: unsupported dtype %s; expected '<f8' or '>f8' (float64)", path, q);
        goto out;
    }
    if (hd.fortran) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: fortran_order is True; only C-ordered arrays are read "
                    "(save with numpy.ascontiguousarray)", path);
        goto out;
    }

    size_t count = 1;
    for (size_t i = 0; i < hd.ndim; i++) {
        if (hd.shape[i] != 0 && count > G_MAXSIZE / 8 / hd.shape[i]) {
            g_autofree char *s = bm_npy_shape_string(hd.shape, hd.ndim);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: shape %s is too large", path, s);
            goto out;
        }
        count *= hd.shape[i];
    }
    size_t nbytes = count * sizeof(double);
    size_t data_offset = pre_len + header_len;

    struct stat st;
    gboolean regular = fstat(fd, &st) == 0 && S_ISREG(st.st_mode);
    if (regular) {
        size_t have = (size_t)st.st_size > data_offset ? (size_t)st.st_size - data_offset : 0;
        if (have != nbytes) {
            g_autofree char *s = bm_npy_shape_string(hd.shape, hd.ndim);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: %s body: shape %s needs %zu bytes of float64 data, "
                        "the file holds %zu", path,
                        have < nbytes ? "truncated" : "oversized", s, nbytes, have);
            goto out;
        }
    }

    result = g_new0(BmNpyArray, 1);
    result->fd = -1;
    result->path = g_strdup(path);
    result->count = count;
    result->ndim = hd.ndim;
    memcpy(result->shape, hd.shape, sizeof hd.shape);

    if (regular && !swap && nbytes > 0 && data_offset % sizeof(double) == 0) {
        int flags = MAP_PRIVATE;
#ifdef MAP_POPULATE
        flags |= MAP_POPULATE;
#endif
        size_t len = data_offset + nbytes;
        void *map = mmap(NULL, len, PROT_READ, flags, fd, 0);
        if (map != MAP_FAILED) {
            result->map = map;
            result->map_len = len;
            result->data = (const double *)(const void *)((const char *)map + data_offset);
            result->data_offset = data_offset;
            result->file_size = (guint64)st.st_size;
            result->file_mtime_ns = ns_of(&st.st_mtim);
            result->fd = fd;    /* kept open to check the file later */
            fd = -1;
            goto out;
        }
        /* a file system without mmap: fall through to read() */
    }

    double *data = g_try_malloc(nbytes ? nbytes : 1);
    if (!data) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO,
                    "%s: cannot allocate %zu bytes for the array", path, nbytes);
        g_clear_pointer(&result, bm_npy_array_free);
        goto out;
    }
    result->buffer = data;
    result->data = data;
    got = read_full(fd, data, nbytes);
    if (got < 0) {
        fail_io(path, errno, "read", error);
        g_clear_pointer(&result, bm_npy_array_free);
        goto out;
    }
    char extra;
    if ((size_t)got < nbytes || read_full(fd, &extra, 1) != 0) {
        g_autofree char *s = bm_npy_shape_string(hd.shape, hd.ndim);
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: %s body: shape %s needs %zu bytes of float64 data",
                    path, (size_t)got < nbytes ? "truncated" : "oversized", s, nbytes);
        g_clear_pointer(&result, bm_npy_array_free);
        goto out;
    }
    if (swap) {
        guint64 *u = (guint64 *)(void *)data;
        for (size_t i = 0; i < count; i++)
            u[i] = GUINT64_SWAP_LE_BE(u[i]);
    }

out:
    g_free(hd.descr);
    if (fd >= 0)
        close(fd);
    return result;
}
