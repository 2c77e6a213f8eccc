/* ktable.h: reads a k-table (CSV or TSV of Cartesian k-points, or of the
 * distance along one line, and band energies) into a bm_ktable view plus
 * band names. */
#ifndef BM_IO_KTABLE_H
#define BM_IO_KTABLE_H

#include <glib.h>
#include "bm-bands.h"

G_BEGIN_DECLS

/* A loaded k-table. It owns k and energies; table points into them. */
typedef struct {
    bm_ktable table;         /* the view the core reads */
    char **band_names;       /* NULL-terminated: headers without the "_ev" suffix */
    char **band_headers;     /* NULL-terminated: the full column headers */
    char *source;            /* the file path (or the name given for data) */
    double *k;               /* [point][3], 1/Angstrom */
    double *energies;        /* [band][point], eV */
    gboolean cut;            /* a two-column cut: k holds (s, 0, 0), s along a direction
                                the file does not give (bm_ktable_orient_cut sets it) */
} BmKTable;

/* Loads a table file. Errors: BM_ERROR_IO (unreadable) or
 * BM_ERROR_INVALID_INPUT naming the file, line and column at fault. */
BmKTable *bm_ktable_load(const char *path, GError **error);

/* Parses table text held in memory; name is used in messages. */
BmKTable *bm_ktable_load_from_data(const char *data, gsize length, const char *name,
                                   GError **error);

/* Puts a cut's points along the Cartesian direction dir (normalised here):
 * k = s dir. Errors (BM_ERROR_INVALID_INPUT) for a zero or non-finite dir. */
gboolean bm_ktable_orient_cut(BmKTable *table, const double dir[3], GError **error);

void bm_ktable_free(BmKTable *table);

G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmKTable, bm_ktable_free)

G_END_DECLS

#endif
