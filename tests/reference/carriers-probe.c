/* carriers-probe.c: reads requests on stdin, prints the core's answers with
 * 17 digits, for the SciPy/mpmath comparison scripts beside it.
 *   fd J ETA                        -> F_J(ETA)
 *   inv VALUE                       -> eta with F_1/2(eta) = VALUE
 *   neutral T EG ME MH STATS ND ED NA EA   (STATS 0 Fermi-Dirac, 1 Boltzmann;
 *                                    one donor and one acceptor species, g 2 and 4)
 *                                   -> EF n p ND+ NA-
 *   constants                       -> h k_B m_e e (SI) as the core uses them */
#include <stdio.h>
#include <string.h>

#include "bm-carriers.h"
#include "bm-fermi.h"
#include "bm-units.h"

int main(void)
{
    bm_core_init();
    char word[16];
    while (scanf("%15s", word) == 1) {
        bm_errbuf err;
        if (!strcmp(word, "constants")) {
            printf("%.17g %.17g %.17g %.17g\n", BM_H, BM_KB, BM_ME, BM_QE);
        } else if (!strcmp(word, "fd")) {
            double j, eta, v;
            if (scanf("%lf %lf", &j, &eta) != 2)
                return 2;
            if (bm_fermi_dirac(j, eta, &v, &err))
                printf("error %s\n", err.message);
            else
                printf("%.17g\n", v);
        } else if (!strcmp(word, "inv")) {
            double v, eta;
            if (scanf("%lf", &v) != 1)
                return 2;
            if (bm_fermi_dirac_half_inverse(v, &eta, &err))
                printf("error %s\n", err.message);
            else
                printf("%.17g\n", eta);
        } else if (!strcmp(word, "neutral")) {
            double t;
            int stats;
            bm_semiconductor s = { 0 };
            bm_dopant d = { 0, 0, 2.0 }, a = { 0, 0, 4.0 };
            if (scanf("%lf %lf %lf %lf %d %lf %lf %lf %lf", &t, &s.band_gap_ev,
                      &s.m_dos_electron, &s.m_dos_hole, &stats, &d.density_cm3,
                      &d.ionisation_ev, &a.density_cm3, &a.ionisation_ev) != 9)
                return 2;
            s.statistics = stats ? BM_BOLTZMANN : BM_FERMI_DIRAC;
            s.donors = &d;
            s.ndonors = 1;
            s.acceptors = &a;
            s.nacceptors = 1;
            bm_carrier_state st;
            if (bm_carriers_solve(&s, t, &st, &err))
                printf("error %s\n", err.message);
            else
                printf("%.17g %.17g %.17g %.17g %.17g\n", st.fermi_level_ev, st.n_cm3,
                       st.p_cm3, st.donors_ionised_cm3, st.acceptors_ionised_cm3);
        } else {
            return 2;
        }
        fflush(stdout);
    }
    return 0;
}
