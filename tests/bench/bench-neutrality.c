/* bench-neutrality.c: times the charge-neutrality solver over a map of
 * 1000 temperatures x 1000 donor densities (donor + compensating acceptor). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#include "bm-bandgap.h"
#include "bm-carriers.h"

#define NT 1000
#define ND 1000

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return t.tv_sec + 1e-9 * t.tv_nsec;
}

/* One pass over the map; returns seconds and counts the Boltzmann flags. */
static double run_map(int check, long *flagged, double *checksum, int *maxit)
{
    /* Silicon-like: Varshni gap (Thurmond 1975), DOS masses 1.08 / 1.04,
     * phosphorus donor 45 meV swept 1e10..1e21 cm^-3, boron acceptor 45 meV
     * at 1e14 cm^-3; temperatures 1..1500 K log-spaced. */
    bm_gap_model si = { .kind = BM_GAP_VARSHNI, .eg0_ev = 1.170, .alpha_ev_per_k = 4.73e-4, .beta_k = 636.0 };
    bm_dopant donor = { 0.0, 0.045, 2.0 }, acceptor = { 1e14, 0.045, 4.0 };
    bm_semiconductor s = { 0 };
    s.m_dos_electron = 1.08;
    s.m_dos_hole = 1.04;
    s.donors = &donor;
    s.ndonors = 1;
    s.acceptors = &acceptor;
    s.nacceptors = 1;
    s.skip_statistics_check = !check;
    bm_carrier_state st;
    bm_errbuf err;
    *flagged = 0;
    *checksum = 0.0;
    *maxit = 0;
    double t0 = now();
    for (int i = 0; i < NT; i++) {
        double t = exp(log(1.0) + (log(1500.0) - log(1.0)) * i / (NT - 1));
        bm_gap_at(&si, t, &s.band_gap_ev, NULL, &err);
        for (int j = 0; j < ND; j++) {
            donor.density_cm3 = exp(log(1e10) + (log(1e21) - log(1e10)) * j / (ND - 1));
            if (bm_carriers_solve(&s, t, &st, &err) != BM_OK) {
                fprintf(stderr, "solve failed at T=%g ND=%g: %s\n", t, donor.density_cm3,
                        err.message);
                exit(1);
            }
            if (!isfinite(st.fermi_level_ev)) {
                fprintf(stderr, "non-finite Fermi level at T=%g ND=%g\n", t,
                        donor.density_cm3);
                exit(1);
            }
            *flagged += st.boltzmann_inaccurate;
            *checksum += st.fermi_level_ev;
            if (st.iterations > *maxit)
                *maxit = st.iterations;
        }
    }
    return now() - t0;
}

int main(void)
{
    long flagged;
    double sum;
    int maxit;
    double t_fd = run_map(0, &flagged, &sum, &maxit);
    printf("neutrality map %dx%d (Fermi-Dirac only): %.3f s, %.0f ns per solve, "
           "max iterations %d (checksum %.6f)\n", NT, ND, t_fd, 1e9 * t_fd / (NT * ND),
           maxit, sum);
    double t_both = run_map(1, &flagged, &sum, &maxit);
    printf("neutrality map %dx%d (with Boltzmann comparison): %.3f s, %.0f ns per solve, "
           "%ld solves flagged > 5 %%\n", NT, ND, t_both, 1e9 * t_both / (NT * ND), flagged);
    return t_fd < 1.0 ? 0 : 1;
}
