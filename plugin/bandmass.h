/* bandmass.h: the public GObject API of libbandmass (GI namespace Bandmass 1.0):
 * calls into the operation registry, its self-description, in-memory band grids. */
#ifndef BANDMASS_H
#define BANDMASS_H

#include <glib-object.h>
#include "bandmass-export.h"
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
BM_PUBLIC char *bm_call(const char *op, const char *request_json, GError **error);

/**
 * bm_describe_operations:
 *
 * The registry's self-description as JSON text: the same array as
 * `bandmass ops --json` prints.
 *
 * Returns: (transfer full): a JSON array of operation descriptions
 */
BM_PUBLIC char *bm_describe_operations(void);

/* ---- the operation list ------------------------------------------------ */

#define BM_TYPE_PARAM_INFO (bm_param_info_get_type())
BM_PUBLIC G_DECLARE_FINAL_TYPE(BmParamInfo, bm_param_info, BM, PARAM_INFO, GObject)

BM_PUBLIC const char *bm_param_info_get_name(BmParamInfo *self);
BM_PUBLIC const char *const *bm_param_info_get_kinds(BmParamInfo *self);
BM_PUBLIC gboolean bm_param_info_get_required(BmParamInfo *self);
BM_PUBLIC const char *bm_param_info_get_default_json(BmParamInfo *self);
BM_PUBLIC const char *bm_param_info_get_summary(BmParamInfo *self);
BM_PUBLIC guint bm_param_info_get_kind_flags(BmParamInfo *self);
BM_PUBLIC const char *bm_param_info_get_unit(BmParamInfo *self);
BM_PUBLIC gboolean bm_param_info_get_minimum(BmParamInfo *self, double *value, gboolean *inclusive);
BM_PUBLIC gboolean bm_param_info_get_maximum(BmParamInfo *self, double *value, gboolean *inclusive);
BM_PUBLIC const char *const *bm_param_info_get_choices(BmParamInfo *self);
BM_PUBLIC const char *const *bm_param_info_get_choice_descriptions(BmParamInfo *self);

#define BM_TYPE_FIELD_INFO (bm_field_info_get_type())
BM_PUBLIC G_DECLARE_FINAL_TYPE(BmFieldInfo, bm_field_info, BM, FIELD_INFO, GObject)

BM_PUBLIC const char *bm_field_info_get_name(BmFieldInfo *self);
BM_PUBLIC const char *bm_field_info_get_unit(BmFieldInfo *self);
BM_PUBLIC gboolean bm_field_info_get_optional(BmFieldInfo *self);
BM_PUBLIC const char *bm_field_info_get_meaning(BmFieldInfo *self);

#define BM_TYPE_OPERATION_INFO (bm_operation_info_get_type())
BM_PUBLIC G_DECLARE_FINAL_TYPE(BmOperationInfo, bm_operation_info, BM, OPERATION_INFO, GObject)

BM_PUBLIC const char *bm_operation_info_get_name(BmOperationInfo *self);
BM_PUBLIC const char *bm_operation_info_get_summary(BmOperationInfo *self);
BM_PUBLIC GPtrArray *bm_operation_info_get_params(BmOperationInfo *self);
BM_PUBLIC GPtrArray *bm_operation_info_get_response(BmOperationInfo *self);

BM_PUBLIC GPtrArray *bm_list_operations(void);
BM_PUBLIC BmOperationInfo *bm_lookup_operation(const char *name);

/* ---- one extremum of a mass-tensor response ---------------------------- */

#define BM_TYPE_EXTREMUM (bm_extremum_get_type())
BM_PUBLIC G_DECLARE_FINAL_TYPE(BmExtremum, bm_extremum, BM, EXTREMUM, GObject)

BM_PUBLIC BmExtremum *bm_extremum_new_from_json(const char *json, GError **error);
BM_PUBLIC const char *bm_extremum_get_kind(BmExtremum *self);
BM_PUBLIC double bm_extremum_get_energy(BmExtremum *self);
BM_PUBLIC const double *bm_extremum_get_k(BmExtremum *self);
BM_PUBLIC const double *bm_extremum_get_k_fractional(BmExtremum *self);
BM_PUBLIC const double *bm_extremum_get_principal_masses(BmExtremum *self);
BM_PUBLIC const double *bm_extremum_get_principal_axes(BmExtremum *self);
BM_PUBLIC const double *bm_extremum_get_inverse_mass_tensor(BmExtremum *self);
BM_PUBLIC double bm_extremum_get_fit_rms(BmExtremum *self);
BM_PUBLIC int bm_extremum_get_dims(BmExtremum *self);
BM_PUBLIC gboolean bm_extremum_get_divergent(BmExtremum *self);
BM_PUBLIC const char *const *bm_extremum_get_warnings(BmExtremum *self);
BM_PUBLIC const char *bm_extremum_get_json(BmExtremum *self);

/* ---- band grids held in memory ----------------------------------------- */

#define BM_TYPE_BANDS (bm_bands_get_type())
BM_PUBLIC G_DECLARE_FINAL_TYPE(BmBands, bm_bands, BM, BANDS, GObject)

BM_PUBLIC BmBands *bm_bands_new_from_array(const double *energies, gsize n_values, guint nbands,
                                 const guint mesh[3], const double reciprocal_vectors[9],
                                 GError **error);
BM_PUBLIC BmBands *bm_bands_new_from_lattice(const double *energies, gsize n_values, guint nbands,
                                   const guint mesh[3], const double lattice_vectors[9],
                                   GError **error);
BM_PUBLIC BmBands *bm_bands_new_from_bytes(GBytes *energies, guint nbands, const guint mesh[3],
                                 const double reciprocal_vectors[9], GError **error);
BM_PUBLIC BmBands *bm_bands_new_from_bytes_lattice(GBytes *energies, guint nbands, const guint mesh[3],
                                         const double lattice_vectors[9], GError **error);
BM_PUBLIC BmBands *bm_bands_new_from_file(const char *path, GError **error);
BM_PUBLIC guint bm_bands_get_nbands(BmBands *self);
BM_PUBLIC const guint *bm_bands_get_mesh(BmBands *self);
BM_PUBLIC const double *bm_bands_get_reciprocal_vectors(BmBands *self);
BM_PUBLIC gboolean bm_bands_set_band_names(BmBands *self, const char *const *names, GError **error);
BM_PUBLIC const char *const *bm_bands_get_band_names(BmBands *self);
BM_PUBLIC char *bm_bands_call(BmBands *self, const char *op, const char *request_json, GError **error);
BM_PUBLIC GPtrArray *bm_bands_find_extrema(BmBands *self, const char *request_json, GError **error);

G_END_DECLS

#endif
