/* ops.h: every operation of the registry, one file each under plugin/ops/.
 * To add one: define `const BmOperation bm_op_NAME` in NAME.c, declare it
 * here, list it in BM_OPERATIONS_TABLE and in plugin/meson.build. */
#ifndef BM_OPS_H
#define BM_OPS_H

#include "registry.h"

extern const BmOperation bm_op_constants;
extern const BmOperation bm_op_mass_tensor;
extern const BmOperation bm_op_valley_average;
extern const BmOperation bm_op_hole_mass;
extern const BmOperation bm_op_fermi_integral;
extern const BmOperation bm_op_band_gap;
extern const BmOperation bm_op_carrier_statistics;
extern const BmOperation bm_op_sheet_density;
extern const BmOperation bm_op_drude;
extern const BmOperation bm_op_materials;
extern const BmOperation bm_op_thermal_mass;
extern const BmOperation bm_op_kane_fit;
extern const BmOperation bm_op_cyclotron_ellipsoid;
extern const BmOperation bm_op_cyclotron_holes;
extern const BmOperation bm_op_resonance;
extern const BmOperation bm_op_oscillation_damping;
extern const BmOperation bm_op_specific_heat_mass;

#define BM_OPERATIONS_TABLE \
    &bm_op_constants, \
    &bm_op_mass_tensor, \
    &bm_op_valley_average, \
    &bm_op_hole_mass, \
    &bm_op_fermi_integral, \
    &bm_op_band_gap, \
    &bm_op_carrier_statistics, \
    &bm_op_sheet_density, \
    &bm_op_drude, \
    &bm_op_materials, \
    &bm_op_thermal_mass, \
    &bm_op_kane_fit, \
    &bm_op_cyclotron_ellipsoid, \
    &bm_op_cyclotron_holes, \
    &bm_op_resonance, \
    &bm_op_oscillation_damping, \
    &bm_op_specific_heat_mass,

#endif
