/* test-carriers.c: effective densities of states, band gap forms, the
 * neutrality solver (worked examples, limits, robustness), 2D gases, Drude. */
#include <glib.h>
#include <math.h>
#include <string.h>

#include "bm-bandgap.h"
#include "bm-carriers.h"
#include "bm-drude.h"
#include "bm-fermi.h"
#include "bm-units.h"

#define KT300 (BM_KB_EV * 300.0)

static double rel(double a, double b)
{
    return fabs(a / b - 1.0);
}

/* DOS mass that gives a wanted N at 300 K: (N / 2.50941e19)^(2/3). */
static double mass_for(double n300)
{
    double n1;
    g_assert_cmpint(bm_effective_dos(1.0, 300.0, &n1, NULL), ==, BM_OK);
    return pow(n300 / n1, 2.0 / 3.0);
}

static void test_effective_dos(void)
{
    double n;
    /* 2 (2 pi m_e k T / h^2)^(3/2) = 2.50941e19 cm^-3 at 300 K (CODATA 2018, reference
     * list).  Tolerance 5e-6: six printed digits (2e-6) plus GSL's constants, which
     * are CODATA 2006 and give 2.509417e19 (1.8e-6 above the 2018 value). */
    g_assert_cmpint(bm_effective_dos(1.0, 300.0, &n, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(n, 2.50941e19), <, 5e-6);
    /* Si: m_dn 1.08 -> Nc = 2.8e19 (Sze & Ng 2007 App. G; from memory; 1 % for the
     * two-digit mass) */
    g_assert_cmpint(bm_effective_dos(1.08, 300.0, &n, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(n, 2.8e19), <, 0.01);
    /* T^(3/2) scaling (identity) */
    double n2;
    g_assert_cmpint(bm_effective_dos(1.0, 1200.0, &n2, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(n2 / n * pow(1.08, 1.5), 8.0), <, 1e-12);
}

static void test_intrinsic_silicon(void)
{
    /* Si at 300 K, Sze & Ng 2007 App. G (from memory): Nc = 2.8e19, Nv = 2.65e19,
     * Eg = 1.12 eV; textbook ni formula gives 1.07e10, within 15 % of the
     * published 9.65e9 (which comes from a refined model). */
    bm_semiconductor s = { 0 };
    s.band_gap_ev = 1.12;
    s.m_dos_electron = mass_for(2.8e19);
    s.m_dos_hole = mass_for(2.65e19);
    double ni, ni_fd, ei;
    g_assert_cmpint(bm_carriers_intrinsic(&s, 300.0, &ni, &ni_fd, &ei, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(ni, 1.07e10), <, 0.01);
    g_assert_cmpfloat(rel(ni, 9.65e9), <, 0.15);
    /* Far from degeneracy the Fermi-Dirac value equals the formula (F_1/2 = e^eta
     * to 1e-9 here, DLMF 25.12.16), and Ei = Eg/2 + (kT/2) ln(Nv/Nc) (textbook). */
    g_assert_cmpfloat(rel(ni_fd, ni), <, 1e-8);
    g_assert_cmpfloat(fabs(ei - (0.56 + 0.5 * KT300 * log(2.65 / 2.8))), <, 1e-9);
}

static void test_varshni_and_bose_einstein(void)
{
    double eg;
    bm_errbuf err;
    /* Si: 1.170, 4.73e-4, 636 -> 1.1245 eV at 300 K (Thurmond 1975; from memory) */
    bm_gap_model si = { .kind = BM_GAP_VARSHNI, .eg0_ev = 1.170, .alpha_ev_per_k = 4.73e-4, .beta_k = 636.0 };
    g_assert_cmpint(bm_gap_at(&si, 300.0, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(eg - 1.1245), <, 5e-5);
    /* GaAs: 1.519, 5.405e-4, 204 -> 1.4225 eV (Vurgaftman et al. 2001; from memory) */
    bm_gap_model gaas = { .kind = BM_GAP_VARSHNI, .eg0_ev = 1.519, .alpha_ev_per_k = 5.405e-4, .beta_k = 204.0 };
    g_assert_cmpint(bm_gap_at(&gaas, 300.0, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(eg - 1.4225), <, 5e-5);
    g_assert_cmpint(bm_gap_at(&gaas, 0.0, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(eg, ==, 1.519);
    /* Bose-Einstein form: Eg0 at 0 K; for T >> Theta, 1/(e^x - 1) = 1/x - 1/2 + x/12
     * (Bernoulli series), so Eg -> Eg0 - 2 a_B (T/Theta - 1/2 + Theta/(12 T)). */
    bm_gap_model be = { .kind = BM_GAP_BOSE_EINSTEIN, .eg0_ev = 1.52, .a_b_ev = 0.057, .theta_k = 240.0 };
    g_assert_cmpint(bm_gap_at(&be, 0.0, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(eg, ==, 1.52);
    g_assert_cmpint(bm_gap_at(&be, 1.0, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(eg, ==, 1.52);
    double t = 2400.0, x = 240.0 / t;   /* next term x^3/720: 2e-7 eV */
    g_assert_cmpint(bm_gap_at(&be, t, &eg, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs(eg - (1.52 - 2 * 0.057 * (1 / x - 0.5 + x / 12))), <, 1e-6);
    /* a gap that goes negative is returned with a warning */
    bm_warnings w = { 0 };
    g_assert_cmpint(bm_gap_at(&gaas, 5000.0, &eg, &w, &err), ==, BM_OK);
    g_assert_cmpfloat(eg, <, 0.0);
    g_assert_cmpint(w.count, ==, 1);
    g_assert_cmpint(w.items[0].code, ==, BM_WARN_GAP_NOT_POSITIVE);
    bm_warnings_clear(&w);
    /* bad input names the value */
    g_assert_cmpint(bm_gap_at(&si, -1.0, &eg, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "temperature -1 K"));
    bm_gap_model bad = { .kind = BM_GAP_VARSHNI, .eg0_ev = 1.1, .alpha_ev_per_k = 4e-4, .beta_k = 0.0 };
    g_assert_cmpint(bm_gap_at(&bad, 300.0, &eg, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "beta = 0"));
    bm_gap_model badbe = { .kind = BM_GAP_BOSE_EINSTEIN, .eg0_ev = 1.5, .a_b_ev = -0.1, .theta_k = 200.0 };
    g_assert_cmpint(bm_gap_at(&badbe, 300.0, &eg, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "a_B = -0.1"));
}

static bm_semiconductor silicon(void)
{
    bm_semiconductor s = { 0 };
    s.band_gap_ev = 1.12;
    s.m_dos_electron = mass_for(2.8e19);
    s.m_dos_hole = mass_for(2.65e19);
    return s;
}

static void test_worked_example_n_silicon(void)
{
    /* n-Si, N_D = 1e16 fully ionised at 300 K, Nc = 2.8e19: Ec - EF = kT ln(Nc/n)
     * = 0.2052 eV (textbook worked example, Boltzmann limit). The donor level is
     * put far above Ec so that it is fully ionised as the example assumes. */
    bm_semiconductor s = silicon();
    bm_dopant d = { 1e16, -2.0, 2.0 };
    s.donors = &d;
    s.ndonors = 1;
    s.statistics = BM_BOLTZMANN;
    bm_carrier_state st;
    bm_errbuf err;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_OK);
    g_assert_cmpfloat(fabs((1.12 - st.fermi_level_ev) - 0.2052), <, 1e-4);
    g_assert_cmpfloat(rel(st.n_cm3, 1e16), <, 1e-6);
    g_assert_cmpint(st.regime, ==, BM_REGIME_EXTRINSIC);
    /* The Fermi-Dirac comparison solve agrees to far better than 5 % here. */
    g_assert_cmpint(st.boltzmann_inaccurate, ==, 0);
    g_assert_cmpfloat(st.boltzmann_deviation, <, 1e-3);
    /* mass-action law n p = ni^2 in the Boltzmann limit (identity) */
    g_assert_cmpfloat(rel(st.n_cm3 * st.p_cm3, st.ni_cm3 * st.ni_cm3), <, 1e-9);

    /* With phosphorus (45 meV, g = 2: Sze & Ng 2007 chart; from memory) the donors
     * are still > 99 % ionised at 300 K and n = 1e16 to within 1 %. */
    d.ionisation_ev = 0.045;
    s.statistics = BM_FERMI_DIRAC;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_OK);
    g_assert_cmpfloat(st.donor_ionised_cm3[0] / 1e16, >, 0.99);
    g_assert_cmpfloat(rel(st.n_cm3, 1e16), <, 0.01);
}

static void test_fermi_level_at_band_edge(void)
{
    /* EF = Ec: n = Nc F_1/2(0) = 0.7651470246 Nc (identity, reference list). */
    bm_semiconductor s = silicon();
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_at_fermi_level(&s, 300.0, 1.12, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(st.n_cm3, 0.7651470246 * st.nc_cm3), <, 1e-9);
    s.statistics = BM_BOLTZMANN;
    g_assert_cmpint(bm_carriers_at_fermi_level(&s, 300.0, 1.12, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(st.n_cm3, st.nc_cm3), <, 1e-12);
}

static void test_freeze_out_limits(void)
{
    /* Textbook low-temperature limits (Boltzmann, one donor level, g = 2):
     * uncompensated n = sqrt(Nc N_D / g) exp(-E_d / 2kT) for n << N_D;
     * compensated (N_A >> n) n = (N_D - N_A) Nc / (g N_A) exp(-E_d / kT). */
    bm_semiconductor s = silicon();
    bm_dopant d = { 1e17, 0.045, 2.0 }, a = { 1e15, 0.045, 4.0 };
    s.donors = &d;
    s.ndonors = 1;
    bm_carrier_state st;
    double t = 20.0, kt = BM_KB_EV * t;
    g_assert_cmpint(bm_carriers_solve(&s, t, &st, NULL), ==, BM_OK);
    double expect = sqrt(st.nc_cm3 * 1e17 / 2.0) * exp(-0.045 / (2 * kt));
    g_assert_cmpfloat(rel(st.n_cm3, expect), <, 1e-3);
    g_assert_cmpint(st.regime, ==, BM_REGIME_FREEZE_OUT);
    s.acceptors = &a;
    s.nacceptors = 1;
    g_assert_cmpint(bm_carriers_solve(&s, t, &st, NULL), ==, BM_OK);
    expect = (1e17 - 1e15) * st.nc_cm3 / (2.0 * 1e15) * exp(-0.045 / kt);
    g_assert_cmpfloat(rel(st.n_cm3, expect), <, 1e-3);
    /* the acceptors are fully ionised by the donors' electrons */
    g_assert_cmpfloat(rel(st.acceptors_ionised_cm3, 1e15), <, 1e-9);
    /* regimes with temperature: extrinsic at 300 K, intrinsic at 1000 K for 1e14 */
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.regime, ==, BM_REGIME_EXTRINSIC);
    d.density_cm3 = 1e14;
    a.density_cm3 = 0.0;
    g_assert_cmpint(bm_carriers_solve(&s, 1000.0, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.regime, ==, BM_REGIME_INTRINSIC);
    /* Deep freeze-out (10 mK): n underflows to 0, the electrons sit on the
     * donors, and EF lies between the donor level and the band edge (the
     * T -> 0 limit of the uncompensated formula above, EF -> (Ec + E_D)/2). */
    d.density_cm3 = 1e17;
    g_assert_cmpint(bm_carriers_solve(&s, 0.01, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.regime, ==, BM_REGIME_FREEZE_OUT);
    g_assert_cmpfloat(fabs(st.fermi_level_ev - (1.12 - 0.045 / 2)), <, 1e-3);
}

/* ---- heavy doping: the model functions ---- */

static void test_hydrogenic_impurity(void)
{
    double e, a, nm;
    /* m = eps_r = 1: the hydrogen atom, Ry = 13.6057 eV and a0 = 0.529177 A
     * (CODATA; GSL's 2006 set agrees to 1e-6), Mott density (0.26 / a0)^3 */
    g_assert_cmpint(bm_hydrogenic_impurity(1.0, 1.0, &e, &a, &nm, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(e, 13.6057), <, 1e-5);
    g_assert_cmpfloat(rel(a, 0.529177), <, 1e-5);
    g_assert_cmpfloat(rel(nm, pow(0.26 / 0.529177e-8, 3)), <, 3e-5);
    /* scaling E_H ~ m / eps^2, a* ~ eps / m (identity) */
    double e2, a2;
    g_assert_cmpint(bm_hydrogenic_impurity(0.067, 12.9, &e2, &a2, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(e2, e * 0.067 / (12.9 * 12.9)), <, 1e-12);
    g_assert_cmpfloat(rel(a2, a * 12.9 / 0.067), <, 1e-12);
    /* GaAs donor 5.5 meV hydrogenic against 5.8 meV measured for Si on a Ga site
     * (Sze & Ng 2007 ionisation-energy chart; from memory): 10 % */
    g_assert_cmpfloat(rel(e2, 0.0058), <, 0.10);
    g_assert_cmpint(bm_hydrogenic_impurity(0.0, 12.9, &e2, NULL, NULL, NULL), ==, BM_EINVAL);
    g_assert_cmpint(bm_hydrogenic_impurity(0.1, NAN, &e2, NULL, NULL, NULL), ==, BM_EINVAL);
}

static void test_ionisation_models(void)
{
    bm_ionisation_model pb = { BM_IONISATION_PEARSON_BARDEEN, 3.1e-8, 0.0 };
    double e;
    int full;
    /* E(N) = E0 - alpha N^(1/3) (Pearson & Bardeen 1949, the form; identity):
     * 0.045 - 3.1e-8 * 1e6 = 0.014 eV at 1e18 cm^-3 */
    g_assert_cmpint(bm_ionisation_energy(&pb, 0.045, 1e18, &e, &full, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(e - 0.014), <, 1e-12);
    g_assert_cmpint(full, ==, 0);
    /* clamped at zero, fully ionised from (E0 / alpha)^3 = 3.06e18 on */
    double nstar = pow(0.045 / 3.1e-8, 3);
    g_assert_cmpint(bm_ionisation_energy(&pb, 0.045, nstar * 0.999, &e, &full, NULL), ==, BM_OK);
    g_assert_cmpint(full, ==, 0);
    g_assert_cmpfloat(e, >, 0.0);
    g_assert_cmpint(bm_ionisation_energy(&pb, 0.045, nstar * 1.001, &e, &full, NULL), ==, BM_OK);
    g_assert_cmpint(full, ==, 1);
    g_assert_cmpfloat(e, ==, 0.0);
    /* Mott: the level as given below the threshold, all ionised at and above */
    bm_ionisation_model mott = { BM_IONISATION_MOTT, NAN, 1.7e16 };
    g_assert_cmpint(bm_ionisation_energy(&mott, 0.0058, 1.69e16, &e, &full, NULL), ==, BM_OK);
    g_assert_cmpint(full, ==, 0);
    g_assert_cmpfloat(e, ==, 0.0058);
    g_assert_cmpint(bm_ionisation_energy(&mott, 0.0058, 1.7e16, &e, &full, NULL), ==, BM_OK);
    g_assert_cmpint(full, ==, 1);
    bm_ionisation_model bad = { BM_IONISATION_PEARSON_BARDEEN, 0.0, 0.0 };
    g_assert_cmpint(bm_ionisation_energy(&bad, 0.045, 1e18, &e, &full, NULL), ==, BM_EINVAL);
    bad = (bm_ionisation_model){ BM_IONISATION_MOTT, NAN, -1.0 };
    g_assert_cmpint(bm_ionisation_energy(&bad, 0.045, 1e18, &e, &full, NULL), ==, BM_EINVAL);
}

static const bm_bgn_model KLAASSEN = { BM_BGN_SLOTBOOM, 6.92e-3, 1.3e17, 0.5, 1, "test" };

static void test_bgn_formula(void)
{
    /* dEg = E1 [ln(N/N0) + sqrt(ln(N/N0)^2 + C)] with E1 6.92 meV, N0 1.3e17 cm^-3,
     * C 0.5 (Klaassen, Slotboom & de Graaff, Solid-State Electron. 35, 125 (1992);
     * from memory), evaluated by hand with Python's math module: */
    static const double n[] = { 1e16, 1e17, 1e18, 1e19, 1e20 };
    static const double want[] = { 0.6621272244966e-3, 3.4035829641014e-3,
                                   29.060563216632e-3, 60.500188095341e-3,
                                   92.231809713115e-3 };
    for (size_t i = 0; i < G_N_ELEMENTS(n); i++) {
        double d;
        g_assert_cmpint(bm_bgn_value(&KLAASSEN, n[i], &d, NULL), ==, BM_OK);
        g_assert_cmpfloat(rel(d, want[i]), <, 1e-11);
    }
    double d;
    g_assert_cmpint(bm_bgn_value(&KLAASSEN, 0.0, &d, NULL), ==, BM_OK);
    g_assert_cmpfloat(d, ==, 0.0);
    /* far below N0 the form tends to E1 C / (2 |ln(N/N0)|) > 0 (series; identity) */
    g_assert_cmpint(bm_bgn_value(&KLAASSEN, 1.0, &d, NULL), ==, BM_OK);
    double l = log(1.0 / 1.3e17);
    g_assert_cmpfloat(rel(d, 6.92e-3 * 0.5 / (2.0 * fabs(l))), <, 1e-3);
    bm_bgn_model bad = KLAASSEN;
    bad.n0_cm3 = 0.0;
    g_assert_cmpint(bm_bgn_value(&bad, 1e18, &d, NULL), ==, BM_EINVAL);
}

static void test_heavy_doping_solve(void)
{
    bm_semiconductor s = silicon();
    bm_dopant as = { 1e20, 0.054, 2.0 };   /* As in Si (Sze & Ng chart; from memory) */
    s.donors = &as;
    s.ndonors = 1;
    bm_carrier_state st;
    /* single level: the exact solution of the one-level model leaves most donors
     * neutral (regression figure, no outside source: n = 1.2e19 here) */
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(st.ionised_fraction, <, 0.2);
    g_assert_cmpint(st.donor_fully_ionised[0], ==, 0);
    g_assert_false(bm_warnings_has(&st.warnings, BM_WARN_ABOVE_MOTT_DENSITY));
    bm_warnings_clear(&st.warnings);
    /* the same with a known Mott density: warned */
    s.donor_ionisation.mott_density_cm3 = 3.7e18;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_true(bm_warnings_has(&st.warnings, BM_WARN_ABOVE_MOTT_DENSITY));
    bm_warnings_clear(&st.warnings);
    /* Pearson-Bardeen: 0.054 - 3.1e-8 * (1e20)^(1/3) < 0, so every donor is
     * ionised (the model's clamp) and n = N_D (neutrality; identity) */
    s.donor_ionisation = (bm_ionisation_model){ BM_IONISATION_PEARSON_BARDEEN, 3.1e-8, 3.7e18 };
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.donor_fully_ionised[0], ==, 1);
    g_assert_cmpfloat(st.donor_ionisation_ev[0], ==, 0.0);
    g_assert_cmpfloat(rel(st.n_cm3, 1e20), <, 1e-12);
    g_assert_cmpfloat(rel(st.donors_ionised_cm3, 1e20), <, 1e-15);
    g_assert_false(bm_warnings_has(&st.warnings, BM_WARN_ABOVE_MOTT_DENSITY));
    g_assert_cmpint(st.regime, ==, BM_REGIME_DEGENERATE);   /* EF above Ec */
    g_assert_cmpfloat(st.fermi_level_ev, >, st.effective_band_gap_ev);
    bm_warnings_clear(&st.warnings);
    /* at 1e17 the lowered level (0.054 - 0.0144 eV) still holds a few per cent */
    as.density_cm3 = 1e17;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(st.donor_ionisation_ev[0] - (0.054 - 3.1e-8 * cbrt(1e17))), <, 1e-15);
    g_assert_cmpfloat(st.ionised_fraction, >, 0.9);
    g_assert_cmpfloat(st.ionised_fraction, <, 1.0);
    bm_warnings_clear(&st.warnings);
}

static void test_bgn_solve(void)
{
    bm_semiconductor s = silicon();
    bm_dopant d = { 1e20, 0.0, 2.0 };
    s.donors = &d;
    s.ndonors = 1;
    s.donor_ionisation = (bm_ionisation_model){ BM_IONISATION_PEARSON_BARDEEN, 3.1e-8, 0.0 };
    s.band_gap_narrowing = &KLAASSEN;
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    double kt = BM_KB_EV * 300.0;
    /* An apparent narrowing is defined by n p = ni^2 exp(dEg_app / kT) (Klaassen et
     * al. 1992; Slotboom & de Graaff 1976; from memory): the Fermi-Dirac solve with
     * the corrected narrowing reproduces it (identity of the correction) */
    g_assert_cmpfloat(rel(st.apparent_narrowing_ev, 92.231809713115e-3), <, 1e-11);
    g_assert_cmpfloat(rel(st.n_cm3 * st.p_cm3,
                          st.ni_cm3 * st.ni_cm3 * exp(st.apparent_narrowing_ev / kt)), <, 1e-6);
    /* degenerate electrons: the real narrowing exceeds the apparent one by
     * kT [F_1/2^-1(n/Nc) - ln(n/Nc)] > 0 */
    double eta;
    g_assert_cmpint(bm_fermi_dirac_half_inverse(st.n_cm3 / st.nc_cm3, &eta, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(st.band_gap_narrowing_ev - st.apparent_narrowing_ev
                           - kt * (eta - log(st.n_cm3 / st.nc_cm3))), <, 1e-9);
    g_assert_cmpfloat(st.band_gap_narrowing_ev, >, st.apparent_narrowing_ev);
    g_assert_cmpfloat(rel(st.effective_band_gap_ev, 1.12 - st.band_gap_narrowing_ev), <, 1e-15);
    /* nie = ni exp(dEg / 2kT) (identity) */
    g_assert_cmpfloat(rel(st.nie_cm3, st.ni_cm3 * exp(st.band_gap_narrowing_ev / (2 * kt))),
                      <, 1e-12);
    bm_warnings_clear(&st.warnings);
    /* Boltzmann statistics use the apparent narrowing as fitted: the same n p */
    s.statistics = BM_BOLTZMANN;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(st.band_gap_narrowing_ev, ==, st.apparent_narrowing_ev);
    g_assert_cmpfloat(rel(st.n_cm3 * st.p_cm3,
                          st.ni_cm3 * st.ni_cm3 * exp(st.apparent_narrowing_ev / kt)), <, 1e-9);
    bm_warnings_clear(&st.warnings);
    /* non-degenerate doping: the correction vanishes as kT r / 2^(3/2), r = n / Nc
     * (F_1/2(eta) = e^eta (1 - e^eta / 2^(3/2) + ...), series; identity) */
    s.statistics = BM_FERMI_DIRAC;
    d.density_cm3 = 1e15;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(st.band_gap_narrowing_ev - st.apparent_narrowing_ev,
                          kt * st.n_cm3 / st.nc_cm3 / pow(2.0, 1.5)), <, 1e-3);
    bm_warnings_clear(&st.warnings);
}

/* Each regime boundary of bm-carriers.h, crossed both ways (the thresholds are
 * the project's definitions: common practice, no source). */
static bm_regime regime_of(bm_semiconductor *s, double t)
{
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_solve(s, t, &st, NULL), ==, BM_OK);
    bm_warnings_clear(&st.warnings);
    return st.regime;
}

static void test_regime_boundaries(void)
{
    bm_semiconductor s = silicon();
    bm_dopant d = { 1e16, 0.0, 2.0 }, a = { 0.0, 0.0, 4.0 };
    s.donors = &d;
    s.ndonors = 1;
    s.acceptors = &a;
    s.nacceptors = 1;
    double kt = BM_KB_EV * 300.0;
    bm_carrier_state st;

    /* degenerate: EF = Ec - 3 kT when n = Nc F_1/2(-3); fully ionised donors
     * (ionisation energy 0 but counted ionised by a Mott threshold) */
    s.donor_ionisation = (bm_ionisation_model){ BM_IONISATION_MOTT, NAN, 1.0 };
    double f3;
    g_assert_cmpint(bm_fermi_dirac(0.5, -3.0, &f3, NULL), ==, BM_OK);
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    double nc = st.nc_cm3;
    bm_warnings_clear(&st.warnings);
    d.density_cm3 = nc * f3 * 1.01;
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_DEGENERATE);
    d.density_cm3 = nc * f3 * 0.99;
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_EXTRINSIC);

    /* extrinsic / near-intrinsic / intrinsic: ni against N_net and 10 N_net
     * (undoped-like gap changed to move ni; full ionisation) */
    d.density_cm3 = 1e16;
    s.band_gap_ev = 1.12;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    double lnncnv = log(st.nc_cm3 * st.nv_cm3);
    bm_warnings_clear(&st.warnings);
    /* gap for ni = x: Eg = kT (ln(Nc Nv) - 2 ln x) */
    s.band_gap_ev = kt * (lnncnv - 2.0 * log(0.99e16));
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_EXTRINSIC);
    s.band_gap_ev = kt * (lnncnv - 2.0 * log(1.01e16));
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_NEAR_INTRINSIC);
    s.band_gap_ev = kt * (lnncnv - 2.0 * log(0.99e17));
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_NEAR_INTRINSIC);
    s.band_gap_ev = kt * (lnncnv - 2.0 * log(1.01e17));
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_INTRINSIC);
    s.band_gap_ev = 1.12;

    /* freeze-out / partial / extrinsic: the ionised fraction crosses 0.5 and 0.9
     * as the single level deepens (bisection on the ionisation energy) */
    s.donor_ionisation = (bm_ionisation_model){ 0 };
    for (int k = 0; k < 2; k++) {
        double target = k == 0 ? 0.9 : 0.5, lo = 0.0, hi = 0.5;
        for (int it = 0; it < 80; it++) {
            d.ionisation_ev = 0.5 * (lo + hi);
            g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
            bm_warnings_clear(&st.warnings);
            if (st.ionised_fraction > target)
                lo = d.ionisation_ev;
            else
                hi = d.ionisation_ev;
        }
        d.ionisation_ev = lo * 0.999;
        g_assert_cmpint(regime_of(&s, 300.0), ==, k == 0 ? BM_REGIME_EXTRINSIC
                                                         : BM_REGIME_PARTIAL);
        d.ionisation_ev = hi * 1.001;
        g_assert_cmpint(regime_of(&s, 300.0), ==, k == 0 ? BM_REGIME_PARTIAL
                                                         : BM_REGIME_FREEZE_OUT);
    }
    d.ionisation_ev = 0.045;

    /* compensated: N_net against 0.1 N_tot (N_A = 0.9 N_D is the boundary),
     * and exactly compensated Si at 77 K (not intrinsic: ni there is ~1e-20) */
    a.density_cm3 = 0.905e16;   /* N_net 0.095e16 < 0.1905e16 */
    a.ionisation_ev = 0.045;
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_COMPENSATED);
    a.density_cm3 = 0.8e16;     /* N_net 0.2e16 > 0.18e16 */
    g_assert_cmpint(regime_of(&s, 300.0), ==, BM_REGIME_EXTRINSIC);
    a.density_cm3 = 1e16;
    g_assert_cmpint(regime_of(&s, 77.0), ==, BM_REGIME_COMPENSATED);
    /* ... and intrinsic once ni passes 0.1 N_tot (1000 K) */
    g_assert_cmpint(regime_of(&s, 1000.0), ==, BM_REGIME_INTRINSIC);
    /* undoped: intrinsic at any temperature */
    d.density_cm3 = a.density_cm3 = 0.0;
    g_assert_cmpint(regime_of(&s, 77.0), ==, BM_REGIME_INTRINSIC);
    /* Si:P 1e16 at 600 K: ni = 4e15 < N_D, so extrinsic, not intrinsic (the
     * textbook saturation range of Sze & Ng 2007 ch. 1; from memory) */
    d.density_cm3 = 1e16;
    g_assert_cmpint(regime_of(&s, 600.0), ==, BM_REGIME_EXTRINSIC);
}

static void test_degenerate_flag(void)
{
    /* 1e20 cm^-3 of shallow donors in Si at 300 K puts EF above Ec: Boltzmann
     * statistics overestimates n at fixed EF by e^eta / F_1/2(eta) and the solve
     * differs by more than 5 % (common practice, no source: degenerate above
     * about Nc / 4). 1e15 is far from it. */
    bm_semiconductor s = silicon();
    bm_dopant d = { 1e20, -1.5, 2.0 };
    s.donors = &d;
    s.ndonors = 1;
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.boltzmann_inaccurate, ==, 1);
    g_assert_cmpint(st.warnings.count, >=, 1);
    g_assert_true(bm_warnings_has(&st.warnings, BM_WARN_BOLTZMANN_DEVIATION));
    bm_warnings_clear(&st.warnings);
    g_assert_cmpfloat(st.fermi_level_ev, >, 1.12);
    /* with the donors fully ionised, n = N_D in both statistics but EF moves:
     * the minority density carries the deviation */
    g_assert_cmpfloat(rel(st.n_cm3, 1e20), <, 1e-9);
    /* the FD level inverts n = Nc F_1/2(eta) (identity) */
    g_assert_cmpfloat(fabs(st.other_fermi_level_ev - (1.12 + KT300 * log(1e20 / st.nc_cm3))),
                      <, 1e-9);
    d.density_cm3 = 1e15;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    g_assert_cmpint(st.boltzmann_inaccurate, ==, 0);
    g_assert_cmpint(st.warnings.count, ==, 0);
}

static bm_status hook(double t_k, double *me, double *mh, void *data)
{
    (void)data;
    *me = 1.0 + 1e-4 * t_k;
    *mh = 0.5 + 1e-4 * t_k;
    return BM_OK;
}

/* Solves s at t_k and checks that Nc and Nv are those of DOS masses me and
 * mh (bm_effective_dos at that temperature), to rel_tol. */
static bm_carrier_state solve_with_masses(const bm_semiconductor *s, double t_k, double me,
                                          double mh, double rel_tol)
{
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_solve(s, t_k, &st, NULL), ==, BM_OK);
    double nc, nv;
    g_assert_cmpint(bm_effective_dos(me, t_k, &nc, NULL), ==, BM_OK);
    g_assert_cmpint(bm_effective_dos(mh, t_k, &nv, NULL), ==, BM_OK);
    g_assert_cmpfloat(rel(st.nc_cm3, nc), <, rel_tol);
    g_assert_cmpfloat(rel(st.nv_cm3, nv), <, rel_tol);
    return st;
}

static void test_mass_hook(void)
{
    bm_semiconductor s = silicon();
    s.dos_mass_hook = hook;
    bm_carrier_state st = solve_with_masses(&s, 500.0, 1.05, 0.55, 1e-14);
    g_assert_cmpfloat(st.m_dos_electron, ==, 1.05);
}

/* Tabulated masses: linear interpolation is exact on a straight line (identity:
 * m(T) = 1 + T/1000 sampled at 100, 300, 600 K gives 1.2 at 200 K and 1.45 at
 * 450 K), tabulated points come back unchanged, no extrapolation, and the
 * models feed the solver (Nc from bm_effective_dos at the interpolated mass). */
static void test_mass_table(void)
{
    const double t[3] = { 100.0, 300.0, 600.0 };
    const double me[3] = { 1.1, 1.3, 1.6 };
    const double mh[3] = { 0.5, 0.9, 0.9 };
    bm_dos_mass_model te = { .kind = BM_DOS_MASS_TABLE, .n = 3, .t_k = t, .mass = me };
    bm_dos_mass_model th = { .kind = BM_DOS_MASS_TABLE, .n = 3, .t_k = t, .mass = mh };
    double a, b;
    g_assert_cmpint(bm_dos_mass_at(&te, 200.0, "e", &a, NULL), ==, BM_OK);
    g_assert_cmpint(bm_dos_mass_at(&th, 200.0, "h", &b, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(a - 1.2), <, 1e-14);
    g_assert_cmpfloat(fabs(b - 0.7), <, 1e-14);
    g_assert_cmpint(bm_dos_mass_at(&te, 450.0, "e", &a, NULL), ==, BM_OK);
    g_assert_cmpint(bm_dos_mass_at(&th, 450.0, "h", &b, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(a - 1.45), <, 1e-14);
    g_assert_cmpfloat(b, ==, 0.9);
    g_assert_cmpint(bm_dos_mass_at(&te, 600.0, "e", &a, NULL), ==, BM_OK);
    g_assert_cmpfloat(a, ==, 1.6);
    bm_errbuf err;
    g_assert_cmpint(bm_dos_mass_at(&te, 700.0, "electron DOS mass", &a, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "100..600 K"));
    const double bad_t[3] = { 100.0, 100.0, 600.0 };
    bm_dos_mass_model bad = { .kind = BM_DOS_MASS_TABLE, .n = 3, .t_k = bad_t, .mass = me };
    g_assert_cmpint(bm_dos_mass_check(&bad, "e", &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "entry 1"));
    const double bad_m[3] = { 1.1, 0.0, 1.6 };
    bm_dos_mass_model bad2 = { .kind = BM_DOS_MASS_TABLE, .n = 3, .t_k = t, .mass = bad_m };
    g_assert_cmpint(bm_dos_mass_check(&bad2, "electron DOS mass", &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "electron DOS mass: entry 1 mass"));

    bm_semiconductor s = silicon();
    s.electron_dos_mass = &te;
    s.hole_dos_mass = &th;
    bm_carrier_state st = solve_with_masses(&s, 200.0, 1.2, 0.7, 1e-12);
    g_assert_cmpint(bm_carriers_solve(&s, 50.0, &st, &err), ==, BM_EINVAL);
}

/* Fixed and fitted masses, and the gap model evaluated by the solver: a fit
 * with only a0 is the constant a0^(2/3) (identity); the solver's gap is the
 * model's gap at the solve temperature. */
static void test_mass_models_and_gap(void)
{
    bm_dos_mass_model fixed = { .kind = BM_DOS_MASS_FIXED, .value = 0.81 };
    bm_dos_mass_model fit = { .kind = BM_DOS_MASS_FIT, .fit_numerator = { 0.729 } };
    double m;
    g_assert_cmpint(bm_dos_mass_at(&fixed, 10.0, "m", &m, NULL), ==, BM_OK);
    g_assert_cmpfloat(m, ==, 0.81);
    g_assert_cmpint(bm_dos_mass_at(&fit, 123.0, "m", &m, NULL), ==, BM_OK);
    g_assert_cmpfloat(fabs(m - 0.81), <, 1e-14);   /* 0.729^(2/3) = 0.81 */
    bm_dos_mass_model none = { 0 };
    bm_errbuf err;
    g_assert_cmpint(bm_dos_mass_at(&none, 300.0, "hole DOS mass", &m, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "hole DOS mass: none given"));
    bm_dos_mass_model badfit = { .kind = BM_DOS_MASS_FIT, .fit_numerator = { -1.0 } };
    g_assert_cmpint(bm_dos_mass_check(&badfit, "m", &err), ==, BM_EINVAL);

    bm_gap_model g = { .kind = BM_GAP_VARSHNI, .eg0_ev = 1.170, .alpha_ev_per_k = 4.73e-4,
                       .beta_k = 636.0 };
    bm_semiconductor s = silicon();
    s.gap = &g;
    s.band_gap_ev = NAN;   /* ignored when a model is given */
    bm_carrier_state st;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    double eg;
    g_assert_cmpint(bm_gap_at(&g, 300.0, &eg, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(st.band_gap_ev, ==, eg);
    bm_gap_model fixed_gap = { .kind = BM_GAP_FIXED, .eg0_ev = 0.85 };
    g_assert_cmpint(bm_gap_at(&fixed_gap, 500.0, &eg, NULL, NULL), ==, BM_OK);
    g_assert_cmpfloat(eg, ==, 0.85);
    bm_gap_model no_gap = { 0 };
    g_assert_cmpint(bm_gap_at(&no_gap, 300.0, &eg, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "no gap model"));
    /* a gap that goes negative warns once, from the gap model */
    bm_gap_model neg = { .kind = BM_GAP_FIXED, .eg0_ev = -0.1 };
    s.gap = &neg;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, NULL), ==, BM_OK);
    int gap_warnings = 0;
    for (size_t k = 0; k < st.warnings.count; k++)
        gap_warnings += st.warnings.items[k].code == BM_WARN_GAP_NOT_POSITIVE;
    g_assert_cmpint(gap_warnings, ==, 1);
    bm_warnings_clear(&st.warnings);
}

/* Charge balance of a state: the equation being solved (identity). */
static double imbalance(const bm_carrier_state *st)
{
    double pos = st->p_cm3 + st->donors_ionised_cm3, neg = st->n_cm3 + st->acceptors_ionised_cm3;
    return fabs(pos - neg) / fmax(pos, neg);
}

static void test_robustness_sweep(void)
{
    /* 1..1500 K, 1e10..1e21 cm^-3, uncompensated, heavily compensated,
     * exactly compensated, several species, degenerate: always converges,
     * never NaN, and balances the charge. */
    const double comp[] = { 0.0, 0.5, 0.99, 1.0, 1.01, 100.0 };
    bm_semiconductor s = silicon();
    bm_dopant d[2] = { { 0, 0.045, 2.0 }, { 0, 0.2, 2.0 } };
    bm_dopant a[2] = { { 0, 0.045, 4.0 }, { 0, 0.3, 4.0 } };
    s.donors = d;
    s.ndonors = 2;
    s.acceptors = a;
    s.nacceptors = 2;
    int count = 0;
    for (double t = 1.0; t <= 1500.0; t *= 1.45) {
        for (double nd = 1e10; nd <= 1e21; nd *= 7.3) {
            for (size_t c = 0; c < G_N_ELEMENTS(comp); c++) {
                d[0].density_cm3 = nd;
                d[1].density_cm3 = 0.1 * nd;
                a[0].density_cm3 = comp[c] * nd;
                a[1].density_cm3 = 0.05 * comp[c] * nd;
                bm_carrier_state st;
                bm_errbuf err;
                bm_status r = bm_carriers_solve(&s, t, &st, &err);
                if (r != BM_OK)
                    g_error("T=%g N_D=%g comp=%g: %s", t, nd, comp[c], err.message);
                g_assert_true(isfinite(st.fermi_level_ev));
                g_assert_true(isfinite(st.n_cm3) && isfinite(st.p_cm3));
                g_assert_true(isfinite(st.other_fermi_level_ev));
                /* balance to 1e-9 of the larger side: rounding of the sums of
                 * nearly equal charges sets the floor under heavy compensation */
                g_assert_cmpfloat(imbalance(&st), <, 1e-9);
                bm_warnings_clear(&st.warnings);
                count++;
            }
        }
    }
    g_assert_cmpint(count, >, 1000);
}

static void test_bad_input(void)
{
    bm_semiconductor s = silicon();
    bm_carrier_state st;
    bm_errbuf err;
    g_assert_cmpint(bm_carriers_solve(&s, 0.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "temperature 0 K"));
    g_assert_cmpint(bm_carriers_solve(&s, -5.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "temperature -5 K"));
    g_assert_cmpint(bm_carriers_solve(&s, 1e-320, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "between 0.001 and 1e+06 K"));
    bm_dopant d = { -1e15, 0.045, 2.0 };
    s.donors = &d;
    s.ndonors = 1;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "donor 0 density -1e+15"));
    d.density_cm3 = 1e308;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "atomic density"));
    s.ndonors = 0;
    s.m_dos_electron = 0.0;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "electron DOS mass 0"));
    s.m_dos_electron = 1.0;
    s.m_dos_hole = -0.3;
    g_assert_cmpint(bm_carriers_solve(&s, 300.0, &st, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "hole DOS mass -0.3"));
    double n;
    g_assert_cmpint(bm_effective_dos(0.0, 300.0, &n, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "mass 0"));
    g_assert_cmpint(bm_effective_dos(1.0, -3.0, &n, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "temperature -3 K"));
}

static void test_two_dimensional(void)
{
    double dos;
    bm_errbuf err;
    /* m/(pi hbar^2) = 4.17731e14 eV^-1 cm^-2 at m = m_e (CODATA, reference list) */
    g_assert_cmpint(bm_2d_dos(1.0, 1.0, &dos, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(dos, 4.17731e14), <, 2e-6);
    /* GaAs 2DEG, m = 0.067: 2.80e10 cm^-2 meV^-1 (reference list) */
    g_assert_cmpint(bm_2d_dos(0.067, 1.0, &dos, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(dos * 1e-3, 2.80e10), <, 0.002);

    /* Degenerate limit (kT << EF - E1): n = D (EF - E1) (ln(1 + e^x) -> x). */
    bm_subband one = { 0.0, 0.067, 1.0 };
    double ns, ef;
    g_assert_cmpint(bm_2d_sheet_density(&one, 1, 1.0, 0.010, &ns, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(ns, dos * 0.010), <, 1e-12);
    /* EF exactly at the edge: n = D kT ln 2 (identity) */
    g_assert_cmpint(bm_2d_sheet_density(&one, 1, 77.0, 0.0, &ns, NULL, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(ns, dos * BM_KB_EV * 77.0 * log(2.0)), <, 1e-12);

    /* Round trip EF -> ns -> EF over several subbands, temperatures, densities */
    bm_subband sub[3] = { { 0.0, 0.067, 1.0 }, { 0.030, 0.067, 1.0 }, { 0.012, 0.19, 2.0 } };
    for (double t = 1.0; t <= 400.0; t *= 3.0) {
        for (double e = -0.2; e <= 0.3; e += 0.0173) {
            double per[3], per2[3];
            g_assert_cmpint(bm_2d_sheet_density(sub, 3, t, e, &ns, per, &err), ==, BM_OK);
            if (!(ns > 1e-250))
                continue;
            g_assert_cmpint(bm_2d_fermi_level(sub, 3, t, ns, &ef, per2, &err), ==, BM_OK);
            g_assert_cmpfloat(fabs(ef - e), <, 1e-9 * fmax(1.0, BM_KB_EV * t * 1e3));
            g_assert_cmpfloat(rel(per[0] + per[1] + per[2], ns), <, 1e-12);
        }
    }
    /* bad input */
    g_assert_cmpint(bm_2d_fermi_level(sub, 3, 0.0, 1e12, &ef, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "temperature 0 K"));
    g_assert_cmpint(bm_2d_fermi_level(sub, 3, 4.0, -1e12, &ef, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "sheet density -1e+12"));
    bm_subband bad = { 0.0, 0.0, 1.0 };
    g_assert_cmpint(bm_2d_sheet_density(&bad, 1, 4.0, 0.0, &ns, NULL, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "subband 0 mass 0"));
}

static void test_drude(void)
{
    bm_drude_result r;
    bm_errbuf err;
    /* mu = e tau / m: e / m_e = 1.75882001e11 C/kg (CODATA 2018), so tau = 1e-13 s
     * at m = m_e gives 175.882 cm^2/Vs.  Tolerance 3e-7: GSL's constants are CODATA
     * 2006, whose e/m_e is 8e-8 above the 2018 value. */
    bm_drude_input in = { 1.0, 1e-13, NAN, 1e16, 300.0 };
    g_assert_cmpint(bm_drude(&in, &r, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(r.mobility_cm2_vs, 175.882001), <, 3e-7);
    /* sigma = n e mu in S/cm (e = 1.602176634e-19 C, exact in SI 2019; 3e-7 for
     * GSL's CODATA 2006 charge) and rho = 1 / sigma */
    g_assert_cmpfloat(rel(r.conductivity_s_cm, 1e16 * 1.602176634e-19 * r.mobility_cm2_vs),
                      <, 3e-7);
    g_assert_cmpfloat(rel(r.resistivity_ohm_cm * r.conductivity_s_cm, 1.0), <, 1e-15);
    /* v_th = sqrt(3 kT / m): 1.167934e7 cm/s for m_e at 300 K (computed with
     * scipy.constants, CODATA 2018; the trade's "about 1e7 cm/s") */
    g_assert_cmpfloat(rel(r.thermal_velocity_cm_s, 1.167934e7), <, 1e-6);
    /* from mobility: GaAs-like 8500 cm^2/Vs at m = 0.067 -> tau = mu m / e */
    bm_drude_input in2 = { 0.067, NAN, 8500.0, 1e15, 300.0 };
    g_assert_cmpint(bm_drude(&in2, &r, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(r.tau_s, 0.85 * 0.067 / 1.75882001e11), <, 3e-7);
    bm_drude_input back = { 0.067, r.tau_s, NAN, 1e15, 300.0 };
    bm_drude_result r2;
    g_assert_cmpint(bm_drude(&back, &r2, &err), ==, BM_OK);
    g_assert_cmpfloat(rel(r2.mobility_cm2_vs, 8500.0), <, 1e-14);
    /* bad input */
    bm_drude_input bad = { 0.0, 1e-13, NAN, 1e16, 300.0 };
    g_assert_cmpint(bm_drude(&bad, &r, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "mass 0"));
    bm_drude_input both = { 1.0, 1e-13, 100.0, 1e16, 300.0 };
    g_assert_cmpint(bm_drude(&both, &r, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "exactly one"));
    bm_drude_input negn = { 1.0, 1e-13, NAN, -1.0, 300.0 };
    g_assert_cmpint(bm_drude(&negn, &r, &err), ==, BM_EINVAL);
    g_assert_nonnull(strstr(err.message, "density -1"));
}

int main(int argc, char **argv)
{
    bm_core_init();
    g_test_init(&argc, &argv, NULL);
    g_test_add_func("/carriers/effective-dos", test_effective_dos);
    g_test_add_func("/carriers/intrinsic-silicon", test_intrinsic_silicon);
    g_test_add_func("/carriers/band-gap", test_varshni_and_bose_einstein);
    g_test_add_func("/carriers/mass-models-and-gap", test_mass_models_and_gap);
    g_test_add_func("/carriers/worked-example-n-silicon", test_worked_example_n_silicon);
    g_test_add_func("/carriers/fermi-level-at-band-edge", test_fermi_level_at_band_edge);
    g_test_add_func("/carriers/freeze-out-limits", test_freeze_out_limits);
    g_test_add_func("/carriers/degenerate-flag", test_degenerate_flag);
    g_test_add_func("/carriers/hydrogenic-impurity", test_hydrogenic_impurity);
    g_test_add_func("/carriers/ionisation-models", test_ionisation_models);
    g_test_add_func("/carriers/band-gap-narrowing-formula", test_bgn_formula);
    g_test_add_func("/carriers/heavy-doping-solve", test_heavy_doping_solve);
    g_test_add_func("/carriers/band-gap-narrowing-solve", test_bgn_solve);
    g_test_add_func("/carriers/regime-boundaries", test_regime_boundaries);
    g_test_add_func("/carriers/mass-hook", test_mass_hook);
    g_test_add_func("/carriers/mass-table", test_mass_table);
    g_test_add_func("/carriers/robustness-sweep", test_robustness_sweep);
    g_test_add_func("/carriers/bad-input", test_bad_input);
    g_test_add_func("/carriers/two-dimensional", test_two_dimensional);
    g_test_add_func("/carriers/drude", test_drude);
    return g_test_run();
}
