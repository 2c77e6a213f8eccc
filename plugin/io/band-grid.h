/* band-grid.h: reads a band grid document (JSON, "bandmass-grid-1") with
 * inline energies or a .npy file into a bm_grid view plus band names. */
#ifndef BM_IO_BAND_GRID_H
#define BM_IO_BAND_GRID_H

#include <glib.h>
#include "bm-bands.h"
#include "bm-status.h"

G_BEGIN_DECLS

#include "npy.h"

/* A loaded band grid. It owns the energies; grid.energies points into them
 * ([band][i][j][l], eV) and stays valid until bm_band_grid_free(). */
typedef struct {
    bm_grid grid;            /* the view the core reads */
    char **band_names;       /* NULL-terminated, grid.nbands entries, or NULL if
                                the document gives none */
    char *source;            /* the document path (or the name given for data) */
    bm_warnings warnings;    /* findings about the document (a suspect unit) */
    /* private */
    double *inline_energies; /* storage of inline energies, or NULL */
    BmNpyArray *array;       /* the .npy array holding the energies, or NULL */
} BmBandGrid;

/* The type tag (BmCallInputs) of a `const BmBandGrid *` handed to an
 * operation in place of its "grid" key: a grid already in memory. */
#define BM_INPUT_BAND_GRID "band grid"

/* Loads the document at path; a .npy energies file is found relative to the
 * document's folder. Errors: BM_ERROR_IO (unreadable) or
 * BM_ERROR_INVALID_INPUT, the message naming the file, key and expectation. */
BmBandGrid *bm_band_grid_load(const char *path, GError **error);

/* Parses a document held in memory. name is used in messages; base_dir
 * resolves a relative energies file name (NULL: current directory). */
BmBandGrid *bm_band_grid_load_from_data(const char *data, gssize length,
                                        const char *name, const char *base_dir,
                                        GError **error);

void bm_band_grid_free(BmBandGrid *grid);

/* Energies from a .npy file are mapped (npy.h): fine for one call, checked
 * with bm_band_grid_unchanged() before its answer is given (FALSE with
 * BM_ERROR_IO when the file was rewritten or cut meanwhile). A grid that
 * outlives the call (a host's BmBands) is detached: its energies are read
 * into memory of its own, and later changes to the file cannot reach it. */
gboolean bm_band_grid_unchanged(const BmBandGrid *grid, GError **error);
gboolean bm_band_grid_detach(BmBandGrid *grid, GError **error);

G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmBandGrid, bm_band_grid_free)

G_END_DECLS

#endif
