/* bm-drude.c: Drude mobility, conductivity and thermal velocity
 * (mu = e tau / m, sigma = n e mu, v_th = sqrt(3 kT / m)). */
#include "bm-drude.h"

#include <math.h>
#include "bm-units.h"

static int given(double x)
{
    return !isnan(x) && x != 0.0;
}

bm_status bm_drude(const bm_drude_input *in, bm_drude_result *out, bm_errbuf *err)
{
    if (!in || !out)
        return bm_fail(err, BM_EINVAL, "drude: missing input or result");
    out->tau_s = out->mobility_cm2_vs = out->conductivity_s_cm = NAN;
    out->resistivity_ohm_cm = out->thermal_velocity_cm_s = out->mean_free_path_nm = NAN;
    if (!(in->mass > 0.0) || !isfinite(in->mass))
        return bm_fail(err, BM_EINVAL, "drude: mass %g m_e must be finite and > 0", in->mass);
    int has_tau = given(in->tau_s), has_mu = given(in->mobility_cm2_vs);
    if (has_tau == has_mu)
        return bm_fail(err, BM_EINVAL, "drude: give exactly one of scattering time "
                       "(%g s) and mobility (%g cm^2/Vs)", in->tau_s, in->mobility_cm2_vs);
    if (has_tau && (!(in->tau_s > 0.0) || !isfinite(in->tau_s)))
        return bm_fail(err, BM_EINVAL, "drude: scattering time %g s must be finite and > 0",
                       in->tau_s);
    if (has_mu && (!(in->mobility_cm2_vs > 0.0) || !isfinite(in->mobility_cm2_vs)))
        return bm_fail(err, BM_EINVAL, "drude: mobility %g cm^2/Vs must be finite and > 0",
                       in->mobility_cm2_vs);
    if (isnan(in->density_cm3) || in->density_cm3 < 0.0 || !isfinite(in->density_cm3))
        return bm_fail(err, BM_EINVAL, "drude: density %g cm^-3 must be finite and >= 0",
                       in->density_cm3);
    if (isnan(in->temperature_k) || in->temperature_k < 0.0 || !isfinite(in->temperature_k))
        return bm_fail(err, BM_EINVAL, "drude: temperature %g K must be finite and >= 0 "
                       "(0 skips the thermal velocity)", in->temperature_k);
    double m = in->mass * BM_ME;
    if (has_tau) {
        out->tau_s = in->tau_s;
        out->mobility_cm2_vs = BM_QE * in->tau_s / m * 1e4;       /* m^2/Vs -> cm^2/Vs */
    } else {
        out->mobility_cm2_vs = in->mobility_cm2_vs;
        out->tau_s = in->mobility_cm2_vs * 1e-4 * m / BM_QE;
    }
    /* cm^-3 * C * cm^2/(V s) = S/cm */
    out->conductivity_s_cm = in->density_cm3 * BM_QE * out->mobility_cm2_vs;
    out->resistivity_ohm_cm = 1.0 / out->conductivity_s_cm;
    if (in->temperature_k > 0.0) {
        out->thermal_velocity_cm_s = sqrt(3.0 * BM_KB * in->temperature_k / m) * 100.0;
        out->mean_free_path_nm = out->thermal_velocity_cm_s * 1e-2 * out->tau_s * 1e9;
    }
    return BM_OK;
}
