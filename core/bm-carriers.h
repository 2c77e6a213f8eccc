/* bm-carriers.h: carrier statistics: effective densities of states, intrinsic
 * density, charge-neutrality Fermi level with many dopant species, and 2D gases. */
#ifndef BM_CARRIERS_H
#define BM_CARRIERS_H

#include <stddef.h>
#include "bm-bandgap.h"
#include "bm-status.h"

/* Energies are measured from the valence-band maximum: Ev = 0, Ec = Eg.
 * Densities in cm^-3 (cm^-2 for 2D), masses in m_e, temperatures in K. */

#define BM_MAX_DOPANTS 8

/* The solver's domain: below 1 mK kT underflows against eV-scale energies;
 * above 1e6 K no band model means anything; no solid holds more than about
 * 1e23 atoms per cm^3, so larger dopant densities are input errors. */
#define BM_CARRIERS_MIN_T_K 1e-3
#define BM_CARRIERS_MAX_T_K 1e6
#define BM_CARRIERS_MAX_DENSITY_CM3 1e24

/* Effective density of states 2 (2 pi m k T / h^2)^(3/2) in cm^-3
 * (2.50941e19 cm^-3 at m = 1, T = 300 K).  m, T > 0, else BM_EINVAL. */
bm_status bm_effective_dos(double mass, double t_k, double *n_cm3, bm_errbuf *err);

typedef struct {
    double density_cm3;    /* >= 0 */
    double ionisation_ev;  /* donors: Ec - E_D; acceptors: E_A - Ev */
    double degeneracy;     /* ground-state degeneracy factor g; 0 selects the
                              default, 2 for donors and 4 for acceptors */
} bm_dopant;

typedef enum {
    BM_FERMI_DIRAC = 0,    /* n = Nc F_1/2(eta): the default */
    BM_BOLTZMANN = 1       /* n = Nc exp(eta): on request */
} bm_statistics;

/* The domain of a density-of-states mass in carrier statistics (m_e): wide
 * enough for heavy-fermion compounds, narrow enough that Nc and Nv stay far
 * from overflow at any temperature of the solver. */
#define BM_DOS_MASS_MIN_ME 1e-4
#define BM_DOS_MASS_MAX_ME 1e4

/* Optional temperature-dependent density-of-states masses: called once per
 * solve with the temperature; return BM_OK and fill both masses (m_e). */
typedef bm_status (*bm_dos_mass_hook)(double t_k, double *m_dos_electron,
                                      double *m_dos_hole, void *data);

/* A density-of-states mass as a function of temperature, m_e:
 *   FIXED  value at every temperature;
 *   TABLE  n points (t_k strictly increasing, mass > 0), linear interpolation,
 *          no extrapolation (n = 1: that temperature only);
 *   FIT    m(T) = [(a0 + a1 T + ... + a4 T^4) / (1 + b1 T + ... + b4 T^4)]^(2/3)
 *          with fit_numerator = {a0..a4}, fit_denominator = {b1..b4} (the form
 *          of the silicon hole fit quoted by Green, J. Appl. Phys. 67, 2944
 *          (1990); from memory).  A fit is evaluated at any T > 0; its
 *          published range is the source's and is not checked here. */
typedef enum {
    BM_DOS_MASS_NONE = 0,
    BM_DOS_MASS_FIXED,
    BM_DOS_MASS_TABLE,
    BM_DOS_MASS_FIT
} bm_dos_mass_kind;

#define BM_DOS_FIT_NUMERATOR 5
#define BM_DOS_FIT_DENOMINATOR 4

typedef struct {
    bm_dos_mass_kind kind;
    double value;                 /* FIXED */
    double error;                 /* FIXED: its standard error, m_e (0: none given) */
    size_t n;                     /* TABLE */
    const double *t_k, *mass;
    double fit_numerator[BM_DOS_FIT_NUMERATOR];      /* FIT */
    double fit_denominator[BM_DOS_FIT_DENOMINATOR];
    const char *source;           /* where the mass comes from */
} bm_dos_mass_model;

const char *bm_dos_mass_kind_name(bm_dos_mass_kind kind); /* "fixed", "table", "fit", "none" */

/* Validates the model (BM_EINVAL naming `what`, the entry and field at fault). */
bm_status bm_dos_mass_check(const bm_dos_mass_model *m, const char *what, bm_errbuf *err);

/* The mass at t_k (>= 0); BM_EINVAL naming `what` for a bad model, a
 * temperature outside a table, or a fit that is not positive there. */
bm_status bm_dos_mass_at(const bm_dos_mass_model *m, double t_k, const char *what,
                         double *mass, bm_errbuf *err);

/* ---- Heavy doping ----
 * How a dopant level's ionisation energy depends on the density of its kind
 * (all donors for a donor level, all acceptors for an acceptor level):
 *   SINGLE_LEVEL     the energy as given, at every density (zero-initialised);
 *   PEARSON_BARDEEN  E(N) = E0 - alpha N^(1/3) (Pearson & Bardeen, Phys. Rev. 75,
 *                    865 (1949); from memory), clamped at zero; once it reaches
 *                    zero the level has merged with the band and every dopant of
 *                    the kind counts ionised (no Fermi-level dependence left);
 *   MOTT             the energy as given below the Mott density, and every dopant
 *                    of the kind ionised at and above it (the donors form a band:
 *                    N_c^(1/3) a* = 0.26, Mott; Edwards & Sienko, Phys. Rev. B 17,
 *                    2575 (1978); from memory).
 * Both heavy-doping forms jump from partial to full ionisation at one density
 * ((E0/alpha)^3, or the Mott density): the transition is sharp in the model,
 * gradual in a crystal. */
typedef enum {
    BM_IONISATION_SINGLE_LEVEL = 0,
    BM_IONISATION_PEARSON_BARDEEN,
    BM_IONISATION_MOTT
} bm_ionisation_kind;

typedef struct {
    bm_ionisation_kind kind;
    double alpha_ev_cm;        /* PEARSON_BARDEEN: alpha in eV cm, > 0 */
    double mott_density_cm3;   /* MOTT: the threshold, > 0; with the other kinds a
                                  Mott density (or 0 when unknown) only for the
                                  above-mott-density warning of SINGLE_LEVEL */
} bm_ionisation_model;

const char *bm_ionisation_kind_name(bm_ionisation_kind k);  /* "single-level",
                                                               "pearson-bardeen", "mott" */

/* The ionisation energy of a level of zero-density energy e0_ev in a crystal
 * holding density_cm3 dopants of its kind; *fully_ionised = 1 when the model
 * counts them all ionised there (the energy is then 0 for PEARSON_BARDEEN and
 * e0_ev for MOTT).  BM_EINVAL for a bad model or density. */
bm_status bm_ionisation_energy(const bm_ionisation_model *m, double e0_ev, double density_cm3,
                               double *energy_ev, int *fully_ionised, bm_errbuf *err);

/* Hydrogenic impurity in a dielectric: binding energy E_H = Ry m* / eps_r^2
 * (13.606 eV m* / eps_r^2), effective Bohr radius a* = a0 eps_r / m*
 * (0.529177 A eps_r / m*), and the Mott density (0.26 / a*)^3 (Mott criterion,
 * Edwards & Sienko 1978; from memory), from CODATA's Rydberg energy and Bohr
 * radius.  mass (m_e) and eps_r finite and > 0, else BM_EINVAL; any output may
 * be NULL. */
#define BM_MOTT_CONSTANT 0.26
bm_status bm_hydrogenic_impurity(double mass, double eps_r, double *binding_ev,
                                 double *bohr_radius_angstrom, double *mott_density_cm3,
                                 bm_errbuf *err);

/* Band-gap narrowing dEg(N) with N the total dopant density (donors plus
 * acceptors):
 *   SLOTBOOM  dEg = E1 [ln(N/N0) + sqrt(ln(N/N0)^2 + C)], the form of Slotboom &
 *             de Graaff (Solid-State Electron. 19, 857 (1976); from memory),
 *             with the parameters of the set given (silicon: Klaassen, Slotboom
 *             & de Graaff, Solid-State Electron. 35, 125 (1992): E1 6.92 meV,
 *             N0 1.3e17 cm^-3, C 0.5; from memory).
 * apparent = 1 marks a set fitted to measurements analysed with Boltzmann
 * statistics (an "apparent" narrowing, defined by n p = ni^2 exp(dEg/kT)).
 * With Fermi-Dirac statistics the solver then uses the real narrowing
 *   dEg_FD = dEg_app + kT [F_1/2^-1(r) - ln(r)],  r = majority density / N_band,
 * solved self-consistently with the majority density, so that n p reproduces
 * the apparent narrowing the fit was made from (the correction vanishes for
 * non-degenerate carriers).  With Boltzmann statistics dEg_app is used as it is. */
typedef enum { BM_BGN_NONE = 0, BM_BGN_SLOTBOOM } bm_bgn_kind;

typedef struct {
    bm_bgn_kind kind;
    double e1_ev, n0_cm3, c;   /* SLOTBOOM: E1 > 0, N0 > 0, C >= 0 */
    int apparent;              /* 1: a Boltzmann-statistics (apparent) fit */
    const char *source;
} bm_bgn_model;

const char *bm_bgn_kind_name(bm_bgn_kind k);   /* "none", "slotboom" */

/* The model's own dEg at total density n_cm3 (>= 0; 0 gives 0), eV. */
bm_status bm_bgn_value(const bm_bgn_model *m, double n_cm3, double *dEg_ev, bm_errbuf *err);

/* A zero-initialised struct plus gap, masses and dopants is a valid input.
 * The models gap, electron_dos_mass and hole_dos_mass, when given, are
 * evaluated at the solve temperature and replace band_gap_ev, m_dos_electron
 * and m_dos_hole (and the hook): the temperature is then given once, to the
 * solver. */
typedef struct {
    double band_gap_ev;        /* Ec - Ev at the solve temperature (may be <= 0:
                                  overlap, warned) */
    double m_dos_electron;     /* conduction-band DOS mass (all valleys), m_e */
    double m_dos_hole;         /* valence-band DOS mass, m_e */
    bm_dos_mass_hook dos_mass_hook;  /* NULL: use the two masses above */
    void *hook_data;
    const bm_gap_model *gap;                     /* NULL: band_gap_ev */
    const bm_dos_mass_model *electron_dos_mass;  /* NULL: m_dos_electron (or the hook) */
    const bm_dos_mass_model *hole_dos_mass;      /* the statistics hole DOS mass m_dh(T);
                                                    NULL: m_dos_hole (or the hook) */
    const bm_dopant *donors;   size_t ndonors;     /* <= BM_MAX_DOPANTS */
    const bm_dopant *acceptors; size_t nacceptors; /* <= BM_MAX_DOPANTS */
    bm_statistics statistics;
    int skip_statistics_check; /* 1: do not re-solve with Boltzmann statistics
                                  to fill the comparison fields */
    bm_ionisation_model donor_ionisation, acceptor_ionisation;  /* zero: single level */
    const bm_bgn_model *band_gap_narrowing;   /* NULL (or kind NONE): none */
} bm_semiconductor;

/* Regimes, the first that applies in this order (thresholds chosen here; the
 * trade uses the words loosely).  Ec = the (narrowed) gap above Ev = 0;
 * N_D, N_A the total donor and acceptor densities, N_net = |N_D - N_A|,
 * N_tot = N_D + N_A; ni the intrinsic density of the (narrowed) gap;
 * f = (n - p) / (N_D - N_A) the ionised fraction of the net doping:
 *   DEGENERATE   EF within 3 kT of a band edge or inside a band
 *                (EF > Ec - 3 kT or EF < 3 kT): Boltzmann counting fails;
 *   INTRINSIC    ni >= 10 N_net and ni >= 0.1 N_tot (undoped included):
 *                thermal generation across the gap outweighs the doping;
 *   COMPENSATED  N_D > 0, N_A > 0 and N_net < 0.1 N_tot: the dopants largely
 *                cancel, the carriers are far fewer than the dopants;
 *   FREEZE_OUT   f < 0.5: most of the net doping holds its carriers (outside
 *                DEGENERATE this needs an ionisation energy above about 2.3 kT,
 *                so it is a low-temperature or deep-level state);
 *   PARTIAL      0.5 <= f < 0.9: partly ionised;
 *   NEAR_INTRINSIC  f >= 0.9 and ni >= N_net: minority carriers are no longer
 *                negligible;
 *   EXTRINSIC    f >= 0.9 and ni < N_net (saturation): the majority density is
 *                the net doping. */
typedef enum {
    BM_REGIME_FREEZE_OUT,
    BM_REGIME_EXTRINSIC,
    BM_REGIME_INTRINSIC,
    BM_REGIME_DEGENERATE,
    BM_REGIME_COMPENSATED,
    BM_REGIME_PARTIAL,
    BM_REGIME_NEAR_INTRINSIC
} bm_regime;

const char *bm_regime_name(bm_regime r);  /* "freeze-out", "extrinsic", "intrinsic",
                                             "degenerate", "compensated",
                                             "partial-ionization", "near-intrinsic" */

typedef struct {
    double temperature_k;
    double kt_ev;
    double band_gap_ev;
    double m_dos_electron, m_dos_hole;     /* the masses used (after the hook) */
    double nc_cm3, nv_cm3;
    double ni_cm3;                 /* textbook sqrt(Nc Nv) exp(-Eg / 2kT), undoped gap */
    double band_gap_narrowing_ev;  /* dEg used in the solve (0 without a model) */
    double apparent_narrowing_ev;  /* the model's own value (0 without a model) */
    double effective_band_gap_ev;  /* band_gap_ev - band_gap_narrowing_ev */
    double nie_cm3;                /* sqrt(Nc Nv) exp(-effective gap / 2kT) */
    double donor_ionisation_ev[BM_MAX_DOPANTS];   /* energies used (heavy-doping model) */
    double acceptor_ionisation_ev[BM_MAX_DOPANTS];
    int donor_fully_ionised[BM_MAX_DOPANTS];      /* 1: counted ionised by the model */
    int acceptor_fully_ionised[BM_MAX_DOPANTS];
    double ionised_fraction;       /* (n - p) / (N_D - N_A); NAN without net doping */
    double fermi_level_ev;         /* from Ev of the (narrowed) crystal */
    double n_cm3, p_cm3;
    double donors_ionised_cm3, acceptors_ionised_cm3;
    double donor_ionised_cm3[BM_MAX_DOPANTS];
    double acceptor_ionised_cm3[BM_MAX_DOPANTS];
    bm_regime regime;
    bm_statistics statistics;      /* the statistics of the numbers above */
    /* The other statistics (Boltzmann when the result is Fermi-Dirac and vice
     * versa), NAN when skip_statistics_check is set: */
    double other_fermi_level_ev, other_n_cm3, other_p_cm3;
    /* max(|n_B/n_FD - 1|, |p_B/p_FD - 1|) over the non-vanishing densities;
     * boltzmann_inaccurate = 1 (and a warning) when above 0.05. */
    double boltzmann_deviation;
    int boltzmann_inaccurate;
    int iterations;                /* root-finder iterations of the main solve */
    bm_warnings warnings;      /* the caller frees them: bm_warnings_clear */
} bm_carrier_state;

/* Solves p + sum N_D+ - n - sum N_A- = 0 for the Fermi level at t_k.
 * Safeguarded Newton on ln(positive charge / negative charge), always kept
 * inside a bracket from physical bounds (bisection fallback); converges for any
 * T > 0 and densities in double range.  Allocates only to record a
 * warning (free out->warnings with bm_warnings_clear). */
bm_status bm_carriers_solve(const bm_semiconductor *s, double t_k,
                            bm_carrier_state *out, bm_errbuf *err);

/* Densities for a given Fermi level (no neutrality): n, p, ionised dopants and
 * the regime fields; the comparison fields are NAN. */
bm_status bm_carriers_at_fermi_level(const bm_semiconductor *s, double t_k,
                                     double fermi_level_ev, bm_carrier_state *out,
                                     bm_errbuf *err);

/* Intrinsic density: the textbook formula and the Fermi-Dirac-consistent value
 * (n = p at the solved intrinsic level ei_ev); dopants in s are ignored. */
bm_status bm_carriers_intrinsic(const bm_semiconductor *s, double t_k,
                                double *ni_textbook_cm3, double *ni_fd_cm3,
                                double *ei_ev, bm_errbuf *err);

/* ---- Two-dimensional electron gas ----
 * Subband i: n_i = (g_v m_i k T / (pi hbar^2)) ln(1 + exp((EF - E_i) / kT)),
 * spin degeneracy 2 included in m/(pi hbar^2). */
typedef struct {
    double energy_ev;           /* subband edge */
    double mass;                /* in-plane DOS mass, m_e */
    double valley_degeneracy;   /* g_v >= 1 (0 means 1) */
} bm_subband;

#define BM_MAX_SUBBANDS 32

/* Density of states of one subband, g_v m / (pi hbar^2), in cm^-2 eV^-1
 * (4.17731e14 at m = 1, g_v = 1). */
bm_status bm_2d_dos(double mass, double valley_degeneracy, double *dos_cm2_ev,
                    bm_errbuf *err);

/* Sheet density (cm^-2) for a Fermi level; per_subband (may be NULL) gets
 * nsub values. */
bm_status bm_2d_sheet_density(const bm_subband *sub, size_t nsub, double t_k,
                              double fermi_level_ev, double *sheet_cm2,
                              double *per_subband, bm_errbuf *err);

/* The Fermi level that gives sheet_cm2 > 0 (monotone; bracketed Newton). */
bm_status bm_2d_fermi_level(const bm_subband *sub, size_t nsub, double t_k,
                            double sheet_cm2, double *fermi_level_ev,
                            double *per_subband, bm_errbuf *err);

#endif
