/* bm-drude.h: Drude transport quantities from a mass and a scattering time or
 * a mobility: mobility, conductivity, thermal velocity, mean free path. */
#ifndef BM_DRUDE_H
#define BM_DRUDE_H

#include "bm-status.h"

/* Inputs: the conductivity mass (m_e) and either tau_s (seconds) or
 * mobility_cm2_vs; leave the other NAN (or 0).  density_cm3 >= 0 (0 gives zero
 * conductivity); temperature_k > 0 for the thermal velocity (0 skips it). */
typedef struct {
    double mass;               /* m_e */
    double tau_s;              /* scattering time, s */
    double mobility_cm2_vs;    /* cm^2 / (V s) */
    double density_cm3;
    double temperature_k;
} bm_drude_input;

typedef struct {
    double tau_s;                    /* tau = mu m / e when mobility was given */
    double mobility_cm2_vs;          /* mu = e tau / m */
    double conductivity_s_cm;        /* sigma = n e mu */
    double resistivity_ohm_cm;       /* 1 / sigma (INFINITY at n = 0) */
    double thermal_velocity_cm_s;    /* sqrt(3 k T / m); NAN without T */
    double mean_free_path_nm;        /* v_th tau; NAN without T */
} bm_drude_result;

/* BM_EINVAL names the bad field (mass <= 0, both or neither of tau/mobility,
 * negative values). */
bm_status bm_drude(const bm_drude_input *in, bm_drude_result *out, bm_errbuf *err);

#endif
