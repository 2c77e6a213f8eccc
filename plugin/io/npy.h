/* npy.h: reads NumPy .npy files (format versions 1.0, 2.0, 3.0) holding
 * float64 arrays in C order into one caller-owned buffer. */
#ifndef BM_IO_NPY_H
#define BM_IO_NPY_H

#include <glib.h>

G_BEGIN_DECLS

#define BM_NPY_MAX_DIMS 8

/* A float64 array in C order, native byte order. The values live either in
 * a private read-only mapping of the file (little-endian data on a
 * little-endian host: no copy at all) or in one allocated buffer that a
 * single read fills (byte-swapped data, unaligned data, or a detached
 * array).
 *
 * A mapping shows what the file holds now: a file rewritten in place under
 * it changes the values, and one cut shorter makes reading the lost pages
 * raise SIGBUS. A mapped array is therefore for one call only, checked with
 * bm_npy_array_unchanged() before its answer is given; anything that lives
 * longer (a host's object) detaches it first (bm_npy_array_detach). */
typedef struct {
    const double *data;              /* count values, valid until freed */
    size_t count;                    /* product of shape */
    size_t ndim;
    size_t shape[BM_NPY_MAX_DIMS];
    /* private */
    void *map;                       /* mapping of the whole file, or NULL */
    size_t map_len;
    double *buffer;                  /* g_malloc'd storage, or NULL */
    int fd;                          /* the mapped file, open while mapped; else -1 */
    size_t data_offset;              /* where the values start in the file */
    char *path;                      /* for messages */
    /* the file as it was opened: size and modification time */
    guint64 file_size;
    gint64 file_mtime_ns;
} BmNpyArray;

/* Reads path (mapped when it is a regular file). Accepts dtype '<f8' and '>f8' (byte-swapped to native), with
 * fortran_order False. Everything else fails with BM_ERROR_INVALID_INPUT
 * (BM_ERROR_IO when the file cannot be opened or read); the message names
 * the file and the problem. Non-finite values are not checked here. */
BmNpyArray *bm_npy_read_f64(const char *path, GError **error);

void bm_npy_array_free(BmNpyArray *array);

/* FALSE, with BM_ERROR_IO naming the file, when the file of a mapped array
 * was rewritten or cut since it was opened (its size or modification time
 * differ): values read from the mapping may then mix old and new
 * data. TRUE for an array not mapped. A file replaced by a new one under
 * the same name (written elsewhere and renamed) leaves the mapping intact. */
gboolean bm_npy_array_unchanged(const BmNpyArray *array, GError **error);

/* Gives a mapped array storage of its own: one read() of the values from
 * the file (never through the mapping, so a file cut shorter meanwhile is an
 * error, not SIGBUS), then the same check as bm_npy_array_unchanged, then
 * the mapping is dropped. Afterwards nothing done to the file affects the
 * array. No-op for an array not mapped. */
gboolean bm_npy_array_detach(BmNpyArray *array, GError **error);

/* Formats the shape as "(2, 8, 8, 8)" into a newly allocated string. */
char *bm_npy_shape_string(const size_t *shape, size_t ndim);

G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmNpyArray, bm_npy_array_free)

G_END_DECLS

#endif
