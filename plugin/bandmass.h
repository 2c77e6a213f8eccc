/* bandmass.h: the public GObject API of libbandmass (GI namespace Bandmass 1.0):
 * calls into the operation registry, its self-description, in-memory band grids. */
#ifndef BANDMASS_H
#define BANDMASS_H

#include <glib-object.h>
#include "bm-error.h"

G_BEGIN_DECLS

/* ---- calling operations ------------------------------------------------ */

/**
 * bm_call:
 * @op: the operation name, as listed by bm_list_operations()
 * @request_json: (nullable): the request, a JSON object as text; %NULL means `{}`
 * @error: return location for a #GError in the %BM_ERROR domain
 *
 * Runs one operation of the registry: the same answer as
 * `bandmass call OP` gives for the same request.
 *
 * Returns: (transfer full): the response, a JSON object as text (compact),
 *   or %NULL with @error set (%BM_ERROR_UNKNOWN_OPERATION,
 *   %BM_ERROR_INVALID_INPUT, %BM_ERROR_IO, ...)
 */
char *bm_call(const char *op, const char *request_json, GError **error);

/**
 * bm_describe_operations:
 *
 * The registry's self-description as JSON text: the same array as
 * `bandmass ops --json` prints.
 *
 * Returns: (transfer full): a JSON array of operation descriptions
 */
char *bm_describe_operations(void);

/* ---- the operation list ------------------------------------------------ */

#define BM_TYPE_PARAM_INFO (bm_param_info_get_type())
G_DECLARE_FINAL_TYPE(BmParamInfo, bm_param_info, BM, PARAM_INFO, GObject)

const char *bm_param_info_get_name(BmParamInfo *self);
const char *const *bm_param_info_get_kinds(BmParamInfo *self);
gboolean bm_param_info_get_required(BmParamInfo *self);
const char *bm_param_info_get_default_json(BmParamInfo *self);
const char *bm_param_info_get_summary(BmParamInfo *self);

#define BM_TYPE_OPERATION_INFO (bm_operation_info_get_type())
G_DECLARE_FINAL_TYPE(BmOperationInfo, bm_operation_info, BM, OPERATION_INFO, GObject)

const char *bm_operation_info_get_name(BmOperationInfo *self);
const char *bm_operation_info_get_summary(BmOperationInfo *self);
GPtrArray *bm_operation_info_get_params(BmOperationInfo *self);

GPtrArray *bm_list_operations(void);
BmOperationInfo *bm_lookup_operation(const char *name);

/* ---- one extremum of a mass-tensor response ---------------------------- */

#define BM_TYPE_EXTREMUM (bm_extremum_get_type())
G_DECLARE_FINAL_TYPE(BmExtremum, bm_extremum, BM, EXTREMUM, GObject)

BmExtremum *bm_extremum_new_from_json(const char *json, GError **error);
const char *bm_extremum_get_kind(BmExtremum *self);
double bm_extremum_get_energy(BmExtremum *self);
const double *bm_extremum_get_k(BmExtremum *self);
const double *bm_extremum_get_k_fractional(BmExtremum *self);
const double *bm_extremum_get_principal_masses(BmExtremum *self);
const double *bm_extremum_get_principal_axes(BmExtremum *self);
const double *bm_extremum_get_inverse_mass_tensor(BmExtremum *self);
double bm_extremum_get_fit_rms(BmExtremum *self);
int bm_extremum_get_dims(BmExtremum *self);
gboolean bm_extremum_get_divergent(BmExtremum *self);
const char *const *bm_extremum_get_warnings(BmExtremum *self);
const char *bm_extremum_get_json(BmExtremum *self);

/* ---- band grids held in memory ----------------------------------------- */

#define BM_TYPE_BANDS (bm_bands_get_type())
G_DECLARE_FINAL_TYPE(BmBands, bm_bands, BM, BANDS, GObject)

BmBands *bm_bands_new_from_array(const double *energies, gsize n_values, guint nbands,
                                 const guint mesh[3], const double reciprocal_vectors[9],
                                 GError **error);
BmBands *bm_bands_new_from_lattice(const double *energies, gsize n_values, guint nbands,
                                   const guint mesh[3], const double lattice_vectors[9],
                                   GError **error);
BmBands *bm_bands_new_from_bytes(GBytes *energies, guint nbands, const guint mesh[3],
                                 const double reciprocal_vectors[9], GError **error);
BmBands *bm_bands_new_from_bytes_lattice(GBytes *energies, guint nbands, const guint mesh[3],
                                         const double lattice_vectors[9], GError **error);
BmBands *bm_bands_new_from_file(const char *path, GError **error);
guint bm_bands_get_nbands(BmBands *self);
const guint *bm_bands_get_mesh(BmBands *self);
const double *bm_bands_get_reciprocal_vectors(BmBands *self);
gboolean bm_bands_set_band_names(BmBands *self, const char *const *names, GError **error);
const char *const *bm_bands_get_band_names(BmBands *self);
char *bm_bands_call(BmBands *self, const char *op, const char *request_json, GError **error);
GPtrArray *bm_bands_find_extrema(BmBands *self, const char *request_json, GError **error);

G_END_DECLS

#endif
