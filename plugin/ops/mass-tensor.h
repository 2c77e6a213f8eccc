/* mass-tensor.h: the one plugin function that runs the core's extremum
 * search for the mass-tensor operation. The operation turns its result into
 * JSON; BmBands.find_extrema turns it into BmExtremum objects; neither
 * computes anything else. */
#ifndef BM_OPS_MASS_TENSOR_H
#define BM_OPS_MASS_TENSOR_H

#include "registry.h"
#include "bm-extrema.h"
#include "band-grid.h"
#include "ktable.h"

G_BEGIN_DECLS

typedef struct {
    bm_mass_tensor *tensors;   /* n_tensors extrema, then n_beyond estimates of a table
                                  fit's stationary point beyond the data */
    size_t n_tensors;
    size_t n_beyond;
    size_t band;               /* the band searched, 0-based */
    const char *band_name;     /* its name, or NULL */
    const char *source;        /* where the band data came from */
    gboolean fractional;       /* a grid: k_fractional is meaningful */
    double recip[3][3];        /* a grid's reciprocal vectors (rows), for stencils */
    bm_warnings warnings;      /* warnings of the whole search */
    /* private */
    BmBandGrid *grid;          /* loaded for this search, or NULL */
    BmKTable *table;
} BmMassTensorSearch;

/* Runs the search a mass-tensor request asks for. request must have been
 * through bm_registry_prepare() (defaults filled in); inputs may hand over
 * a band grid for "grid" (BM_INPUT_BAND_GRID). NULL with error set on bad
 * input or a core failure. */
BmMassTensorSearch *bm_mass_tensor_search(JsonObject *request, const BmCallInputs *inputs,
                                          GError **error);
void bm_mass_tensor_search_free(BmMassTensorSearch *s);
G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmMassTensorSearch, bm_mass_tensor_search_free)

/* How principal mass m of t is reported: a finite number, "divergent"
 * (vanishing curvature or a conical point) or not sampled (null). */
typedef enum {
    BM_MASS_FINITE,
    BM_MASS_DIVERGENT,
    BM_MASS_UNSAMPLED,
    BM_MASS_DEGENERATE          /* bands touch at the extremum: no single-band mass */
} BmMassState;
BmMassState bm_mass_tensor_mass_state(const bm_mass_tensor *t, int m);

const char *bm_mass_tensor_kind_text(bm_extremum_kind k);

/* One element of the response's "extrema" array. */
JsonObject *bm_mass_tensor_object(const bm_mass_tensor *t, gboolean fractional);

G_END_DECLS

#endif
