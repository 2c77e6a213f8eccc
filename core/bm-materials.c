/* bm-materials.c: the built-in semiconductor parameter table. Every value
 * carries its source here and in the matching source string. */
#include "bm-materials.h"
#include "bm-mat3.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

/* Source strings (printed by hosts).  "from memory" marks values recalled,
 * not re-read from the book or paper named. */
#define SZE "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007), Appendix G; from memory"
#define SZE_CHART "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007), impurity " \
                  "ionisation-energy chart; from memory"
#define THURMOND "Thurmond, J. Electrochem. Soc. 122, 1133 (1975); from memory"
#define VMR "Vurgaftman, Meyer & Ram-Mohan, J. Appl. Phys. 89, 5815 (2001); from memory"
#define MADELUNG "Madelung, Semiconductors: Data Handbook, 3rd ed. (2004); from memory"
#define LAWAETZ "Lawaetz, Phys. Rev. B 4, 3460 (1971); from memory"
#define LEVINSHTEIN "Levinshtein, Rumyantsev & Shur (eds.), Properties of Advanced " \
                    "Semiconductor Materials: GaN, AlN, InN, BN, SiC, SiGe (Wiley, 2001); from memory"
#define VOLM "Volm et al., Phys. Rev. B 53, 15409 (1996), cyclotron resonance; from memory"
#define DERIVED_DOS_E "derived: Nv^(2/3) (m_l m_t1 m_t2)^(1/3) from the valley masses listed"
#define DERIVED_DOS_H "derived: (m_hh^(3/2) + m_lh^(3/2))^(2/3) from the parabolic hole " \
                      "masses listed, held fixed in T (no published Nv used; the warped " \
                      "bands and their temperature dependence are left out)"
#define GREEN "M. A. Green, J. Appl. Phys. 67, 2944 (1990); from memory"
#define DERIVED_LUTT "derived from the Luttinger parameters listed, along [001]: " \
                     "m_hh = 1/(g1 - 2 g2), m_lh = 1/(g1 + 2 g2)"
#define NONE "not in the sources used here"
#define SZE_EPS "Sze & Ng, Physics of Semiconductor Devices, 3rd ed. (2007), Appendix " \
                "(properties of important semiconductors); from memory"
#define PB_SI "Pearson & Bardeen, Phys. Rev. 75, 865 (1949), for P and B in Si, applied " \
              "here to every Si dopant of the kind; from memory"
#define KSG "Klaassen, Slotboom & de Graaff, Solid-State Electron. 35, 125 (1992): apparent " \
            "(Boltzmann-analysed) narrowing of n- and p-type Si, E1 6.92 meV, N0 1.3e17 " \
            "cm^-3, C 0.5, in the form of Slotboom & de Graaff, Solid-State Electron. 19, " \
            "857 (1976); from memory"
#define NO_PB "no Pearson-Bardeen alpha in the sources used here"
#define NO_EPS "not in the sources used here (anisotropic crystal)"
#define EPS(v, src) .relative_permittivity = { v, src }
#define NO_ALPHA .donor_ionisation_alpha = { NAN, NO_PB }, \
                 .acceptor_ionisation_alpha = { NAN, NO_PB }
#define GDEF "degeneracy: common practice, no source"

#define VARSHNI(eg0, alpha, beta, src) \
    { .kind = BM_GAP_VARSHNI, .eg0_ev = eg0, .alpha_ev_per_k = alpha, .beta_k = beta, \
      .source = src }
#define FIXED(v, src) { .kind = BM_DOS_MASS_FIXED, .value = v, .source = src }

#define DON(el, e, src) { el, BM_DOPANT_DONOR, e, 2.0, src "; " GDEF }
#define ACC(el, e, src) { el, BM_DOPANT_ACCEPTOR, e, 4.0, src "; " GDEF }

static const bm_material table[] = {
    {
        .name = "Si", .long_name = "silicon", .structure = "diamond", .point_group = "Oh",
        .direct_gap = 0,
        /* Eg0 1.170 eV, alpha 4.73e-4 eV/K, beta 636 K: Thurmond 1975, from memory */
        .gap = VARSHNI(1.170, 4.73e-4, 636.0, THURMOND),
        /* six Delta valleys near X along <100>, m_l 0.98, m_t 0.19: Sze & Ng 2007 App. G,
         * from memory */
        .electron = { "Delta", BM_SITE_INTERIOR, { 1, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      6, 6.0, 0.98, 0.19, 0.19, SZE },
        /* 1.08: Sze & Ng 2007 App. G, from memory */
        .electron_dos_mass = FIXED(1.08, SZE),
        /* m_dh(T) = [(a + bT + cT^2 + dT^3 + eT^4) / (1 + fT + gT^2 + hT^3 + iT^4)]^(2/3)
         * with the coefficients below: the fit quoted by Green 1990 (from memory);
         * 0.582 at 0 K, 1.152 at 300 K (Nv 3.10e19 cm^-3).  Sze & Ng's Nv(300 K)
         * 2.65e19 (m_dh 1.04) is 15 % lower: both are published. */
        .statistics_hole_dos_mass = {
            .kind = BM_DOS_MASS_FIT,
            .fit_numerator = { 0.4435870, 0.3609528e-2, 0.1173515e-3, 0.1263218e-5,
                               0.3025581e-8 },
            .fit_denominator = { 0.4683382e-2, 0.2286895e-3, 0.7469271e-6, 0.1727481e-8 },
            .source = "temperature-dependent fit m_dh(T) quoted by " GREEN
                      "; gives Nv(300 K) = 3.10e19 cm^-3 (Sze & Ng 2007, App. G, give "
                      "2.65e19, from memory: both published)" },
        /* m_hh 0.49, m_lh 0.16: Sze & Ng 2007 App. G, from memory */
        .heavy_hole_mass = { 0.49, SZE }, .light_hole_mass = { 0.16, SZE },
        /* m_so 0.234, Delta_so 0.044 eV: Madelung 2004, from memory */
        .split_off_mass = { 0.234, MADELUNG }, .split_off_ev = { 0.044, MADELUNG },
        /* 4.285, 0.339, 1.446: Madelung 2004, from memory */
        .luttinger = { 4.285, 0.339, 1.446 }, .luttinger_source = MADELUNG,
        /* Sze & Ng 2007 ionisation-energy chart, from memory */
        .ndopants = 7,
        .dopants = { DON("P", 0.045, SZE_CHART), DON("As", 0.054, SZE_CHART),
                     DON("Sb", 0.039, SZE_CHART), ACC("B", 0.045, SZE_CHART),
                     ACC("Al", 0.067, SZE_CHART), ACC("Ga", 0.072, SZE_CHART),
                     ACC("In", 0.16, SZE_CHART) },
        /* eps_r 11.7: Sze & Ng 2007 Appendix, from memory */
        EPS(11.7, SZE_EPS),
        /* alpha 3.1e-8 eV cm: Pearson & Bardeen 1949, from memory; E_ion reaches 0
         * at (E0 / alpha)^3 = 3.1e18 (P, B) and 5.3e18 cm^-3 (As) */
        .donor_ionisation_alpha = { 3.1e-8, PB_SI },
        .acceptor_ionisation_alpha = { 3.1e-8, PB_SI },
        /* E1 6.92 meV, N0 1.3e17 cm^-3, C 0.5: Klaassen et al. 1992, from memory */
        .band_gap_narrowing = { .kind = BM_BGN_SLOTBOOM, .e1_ev = 6.92e-3, .n0_cm3 = 1.3e17,
                                .c = 0.5, .apparent = 1, .source = KSG },
    },
    {
        .name = "Ge", .long_name = "germanium", .structure = "diamond", .point_group = "Oh",
        .direct_gap = 0,
        /* Eg0 0.7437 eV, alpha 4.774e-4 eV/K, beta 235 K: Thurmond 1975, from memory */
        .gap = VARSHNI(0.7437, 4.774e-4, 235.0, THURMOND),
        /* eight L half-valleys on the zone faces = 4; m_l 1.64, m_t 0.082: Sze & Ng 2007
         * App. G, from memory */
        .electron = { "L", BM_SITE_FACE, { 1, 1, 1 }, BM_DIRECTION_CARTESIAN,
                      8, 4.0, 1.64, 0.082, 0.082, SZE },
        /* 4^(2/3) (1.64 * 0.082^2)^(1/3) = 0.561 */
        .electron_dos_mass = FIXED(0.561, DERIVED_DOS_E),
        /* Nv(300 K) = 6.0e18 cm^-3 (Sze & Ng 2007 App. G, from memory):
         * (6.0e18 / 2.50941e19)^(2/3) = 0.385 */
        .statistics_hole_dos_mass = FIXED(0.385,
            "derived from Nv(300 K) = 6.0e18 cm^-3 as (Nv / 2.50941e19 cm^-3)^(2/3), "
            "held fixed in T; Nv: " SZE),
        /* m_hh 0.28, m_lh 0.044: Sze & Ng 2007 App. G, from memory */
        .heavy_hole_mass = { 0.28, SZE }, .light_hole_mass = { 0.044, SZE },
        /* m_so 0.084, Delta_so 0.29 eV: Madelung 2004, from memory */
        .split_off_mass = { 0.084, MADELUNG }, .split_off_ev = { 0.29, MADELUNG },
        /* 13.38, 4.24, 5.69: Lawaetz 1971, from memory */
        .luttinger = { 13.38, 4.24, 5.69 }, .luttinger_source = LAWAETZ,
        .ndopants = 7,
        .dopants = { DON("P", 0.012, SZE_CHART), DON("As", 0.013, SZE_CHART),
                     DON("Sb", 0.0096, SZE_CHART), ACC("B", 0.010, SZE_CHART),
                     ACC("Al", 0.010, SZE_CHART), ACC("Ga", 0.011, SZE_CHART),
                     ACC("In", 0.011, SZE_CHART) },
        /* eps_r 16.2: Sze & Ng 2007 Appendix, from memory */
        EPS(16.2, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "GaAs", .long_name = "gallium arsenide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 1,
        /* Eg0 1.519 eV, alpha 5.405e-4 eV/K, beta 204 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(1.519, 5.405e-4, 204.0, VMR),
        /* Gamma valley, m_e 0.067: Vurgaftman et al. 2001, from memory */
        .electron = { "Gamma", BM_SITE_GAMMA, { 0, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      1, 1.0, 0.067, 0.067, 0.067, VMR },
        .electron_dos_mass = FIXED(0.067,
        "single isotropic valley: the valley mass, " VMR),
        /* Nv(300 K) = 9.0e18 cm^-3 (Sze & Ng 2007 App. G, from memory):
         * (9.0e18 / 2.50941e19)^(2/3) = 0.505 */
        .statistics_hole_dos_mass = FIXED(0.505,
            "derived from Nv(300 K) = 9.0e18 cm^-3 as (Nv / 2.50941e19 cm^-3)^(2/3), "
            "held fixed in T; Nv: " SZE),
        /* 1/(6.98 - 4.12) = 0.350, 1/(6.98 + 4.12) = 0.0901 */
        .heavy_hole_mass = { 0.350, DERIVED_LUTT }, .light_hole_mass = { 0.0901, DERIVED_LUTT },
        /* m_so 0.172, Delta_so 0.341 eV: Vurgaftman et al. 2001, from memory */
        .split_off_mass = { 0.172, VMR }, .split_off_ev = { 0.341, VMR },
        .luttinger = { 6.98, 2.06, 2.93 }, .luttinger_source = VMR,
        /* Sze & Ng 2007 chart, from memory */
        .ndopants = 7,
        .dopants = { DON("Si", 0.0058, SZE_CHART), DON("S", 0.006, SZE_CHART),
                     DON("Se", 0.0059, SZE_CHART), DON("Te", 0.0058, SZE_CHART),
                     ACC("C", 0.026, SZE_CHART), ACC("Be", 0.028, SZE_CHART),
                     ACC("Zn", 0.031, SZE_CHART) },
        /* eps_r 12.9: Sze & Ng 2007 Appendix, from memory */
        EPS(12.9, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "InP", .long_name = "indium phosphide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 1,
        /* 1.4236 eV, 3.63e-4 eV/K, 162 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(1.4236, 3.63e-4, 162.0, VMR),
        .electron = { "Gamma", BM_SITE_GAMMA, { 0, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      1, 1.0, 0.0795, 0.0795, 0.0795, VMR },
        .electron_dos_mass = FIXED(0.0795,
        "single isotropic valley: the valley mass, " VMR),
        .statistics_hole_dos_mass = FIXED(0.570, DERIVED_DOS_H),
        /* 1/(5.08 - 3.20) = 0.532, 1/(5.08 + 3.20) = 0.121 */
        .heavy_hole_mass = { 0.532, DERIVED_LUTT }, .light_hole_mass = { 0.121, DERIVED_LUTT },
        .split_off_mass = { 0.21, VMR }, .split_off_ev = { 0.108, VMR },
        .luttinger = { 5.08, 1.60, 2.10 }, .luttinger_source = VMR,
        .ndopants = 2,
        .dopants = { DON("Si", 0.0057, MADELUNG), ACC("Zn", 0.035, MADELUNG) },
        /* eps_r 12.56: Sze & Ng 2007 Appendix, from memory */
        EPS(12.56, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "InAs", .long_name = "indium arsenide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 1,
        /* 0.417 eV, 2.76e-4 eV/K, 93 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(0.417, 2.76e-4, 93.0, VMR),
        .electron = { "Gamma", BM_SITE_GAMMA, { 0, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      1, 1.0, 0.026, 0.026, 0.026, VMR },
        .electron_dos_mass = FIXED(0.026,
        "single isotropic valley: the valley mass, " VMR),
        .statistics_hole_dos_mass = FIXED(0.338, DERIVED_DOS_H),
        /* 1/(20.0 - 17.0) = 0.333, 1/(20.0 + 17.0) = 0.0270 */
        .heavy_hole_mass = { 0.333, DERIVED_LUTT }, .light_hole_mass = { 0.0270, DERIVED_LUTT },
        .split_off_mass = { 0.14, VMR }, .split_off_ev = { 0.39, VMR },
        .luttinger = { 20.0, 8.5, 9.2 }, .luttinger_source = VMR,
        .ndopants = 0,   /* shallow levels within a few meV of the band: " NONE " */
        /* eps_r 15.15: Sze & Ng 2007 Appendix, from memory */
        EPS(15.15, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "InSb", .long_name = "indium antimonide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 1,
        /* 0.235 eV, 3.2e-4 eV/K, 170 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(0.235, 3.2e-4, 170.0, VMR),
        .electron = { "Gamma", BM_SITE_GAMMA, { 0, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      1, 1.0, 0.0135, 0.0135, 0.0135, VMR },
        .electron_dos_mass = FIXED(0.0135,
        "single isotropic valley: the valley mass, " VMR),
        .statistics_hole_dos_mass = FIXED(0.266, DERIVED_DOS_H),
        /* 1/(34.8 - 31.0) = 0.263, 1/(34.8 + 31.0) = 0.0152 */
        .heavy_hole_mass = { 0.263, DERIVED_LUTT }, .light_hole_mass = { 0.0152, DERIVED_LUTT },
        .split_off_mass = { 0.11, VMR }, .split_off_ev = { 0.81, VMR },
        .luttinger = { 34.8, 15.5, 16.5 }, .luttinger_source = VMR,
        .ndopants = 0,
        /* eps_r 16.8: Sze & Ng 2007 Appendix, from memory */
        EPS(16.8, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "GaN", .long_name = "gallium nitride (wurtzite)", .structure = "wurtzite",
        .point_group = "C6v", .direct_gap = 1,
        /* 3.510 eV, 9.09e-4 eV/K, 830 K: Vurgaftman et al. 2001 (wurtzite), from memory */
        .gap = VARSHNI(3.510, 9.09e-4, 830.0, VMR),
        /* m_e 0.20, taken isotropic: Vurgaftman et al. 2001, from memory */
        .electron = { "Gamma", BM_SITE_GAMMA, { 0, 0, 0 }, BM_DIRECTION_HEXAGONAL,
                      1, 1.0, 0.20, 0.20, 0.20, VMR },
        .electron_dos_mass = FIXED(0.20,
        "single isotropic valley: the valley mass, " VMR),
        /* (1.4^1.5 + 0.3^1.5)^(2/3) = 1.49 */
        .statistics_hole_dos_mass = FIXED(1.49, DERIVED_DOS_H),
        /* m_hh 1.4, m_lh 0.3, split-off (crystal-field) band 0.6: Levinshtein 2001,
         * from memory; Delta_so 0.017 eV: Vurgaftman et al. 2001, from memory */
        .heavy_hole_mass = { 1.4, LEVINSHTEIN }, .light_hole_mass = { 0.3, LEVINSHTEIN },
        .split_off_mass = { 0.6, "mass: " LEVINSHTEIN "; energy: " VMR },
        .split_off_ev = { 0.017, "mass: " LEVINSHTEIN "; energy: " VMR },
        .luttinger = { NAN, NAN, NAN },
        .luttinger_source = "not applicable: wurtzite valence bands need the A1..A6 set",
        .ndopants = 2,
        .dopants = { DON("Si", 0.015, LEVINSHTEIN), ACC("Mg", 0.17, LEVINSHTEIN) },
        EPS(NAN, NO_EPS), NO_ALPHA,
    },
    {
        .name = "4H-SiC", .long_name = "silicon carbide (4H)", .structure = "4H polytype",
        .point_group = "C6v", .direct_gap = 0,
        /* Eg(T) = 3.265 - 6.5e-4 T^2 / (T + 1300): Levinshtein 2001, from memory */
        .gap = VARSHNI(3.265, 6.5e-4, 1300.0, LEVINSHTEIN),
        /* three M valleys (six M points on the zone face, counted 1/2), M along a1*:
         * m along Gamma-M 0.58, along M-K 0.31, along c 0.33 (the axis order of
         * bm_valley_info): Volm et al. 1996, from memory */
        .electron = { "M", BM_SITE_FACE, { 1, 0, 0 }, BM_DIRECTION_HEXAGONAL,
                      6, 3.0, 0.58, 0.31, 0.33, VOLM },
        /* 3^(2/3) (0.58 * 0.31 * 0.33)^(1/3) = 0.811 */
        .electron_dos_mass = FIXED(0.811, DERIVED_DOS_E),
        /* 1.0: Levinshtein 2001, from memory */
        .statistics_hole_dos_mass = FIXED(1.0, LEVINSHTEIN),
        .heavy_hole_mass = { NAN, NONE }, .light_hole_mass = { NAN, NONE },
        .split_off_mass = { NAN, NONE }, .split_off_ev = { NAN, NONE },
        .luttinger = { NAN, NAN, NAN },
        .luttinger_source = "not applicable: hexagonal polytype",
        .ndopants = 4,
        .dopants = { DON("N (hexagonal site)", 0.052, LEVINSHTEIN),
                     DON("N (cubic site)", 0.092, LEVINSHTEIN),
                     ACC("Al", 0.19, LEVINSHTEIN), ACC("B", 0.29, LEVINSHTEIN) },
        EPS(NAN, NO_EPS), NO_ALPHA,
    },
    {
        .name = "AlAs", .long_name = "aluminium arsenide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 0,
        /* X gap 2.24 eV, 7.0e-4 eV/K, 530 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(2.24, 7.0e-4, 530.0, VMR),
        /* X valleys (six on the zone faces, counted 1/2): m_l 0.97, m_t 0.22:
         * Vurgaftman et al. 2001, from memory */
        .electron = { "X", BM_SITE_FACE, { 1, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      6, 3.0, 0.97, 0.22, 0.22, VMR },
        /* 3^(2/3) (0.97 * 0.22^2)^(1/3) = 0.750 */
        .electron_dos_mass = FIXED(0.750, DERIVED_DOS_E),
        .statistics_hole_dos_mass = FIXED(0.546, DERIVED_DOS_H),
        /* 1/(3.76 - 1.64) = 0.472, 1/(3.76 + 1.64) = 0.185 */
        .heavy_hole_mass = { 0.472, DERIVED_LUTT }, .light_hole_mass = { 0.185, DERIVED_LUTT },
        .split_off_mass = { 0.28, VMR }, .split_off_ev = { 0.28, VMR },
        .luttinger = { 3.76, 0.82, 1.42 }, .luttinger_source = VMR,
        .ndopants = 0,
        /* eps_r 10.06: Sze & Ng 2007 Appendix, from memory */
        EPS(10.06, SZE_EPS), NO_ALPHA,
    },
    {
        .name = "GaP", .long_name = "gallium phosphide", .structure = "zincblende",
        .point_group = "Td", .direct_gap = 0,
        /* X gap 2.35 eV, 5.771e-4 eV/K, 372 K: Vurgaftman et al. 2001, from memory */
        .gap = VARSHNI(2.35, 5.771e-4, 372.0, VMR),
        /* X valleys: m_l 2.0, m_t 0.253: Vurgaftman et al. 2001, from memory */
        .electron = { "X", BM_SITE_FACE, { 1, 0, 0 }, BM_DIRECTION_CARTESIAN,
                      6, 3.0, 2.0, 0.253, 0.253, VMR },
        /* 3^(2/3) (2.0 * 0.253^2)^(1/3) = 1.048 */
        .electron_dos_mass = FIXED(1.048, DERIVED_DOS_E),
        .statistics_hole_dos_mass = FIXED(0.422, DERIVED_DOS_H),
        /* 1/(4.05 - 0.98) = 0.326, 1/(4.05 + 0.98) = 0.199 */
        .heavy_hole_mass = { 0.326, DERIVED_LUTT }, .light_hole_mass = { 0.199, DERIVED_LUTT },
        .split_off_mass = { 0.25, VMR }, .split_off_ev = { 0.08, VMR },
        .luttinger = { 4.05, 0.49, 2.93 }, .luttinger_source = VMR,
        .ndopants = 4,
        .dopants = { DON("S", 0.107, MADELUNG), DON("Te", 0.093, MADELUNG),
                     ACC("Zn", 0.064, MADELUNG), ACC("Mg", 0.054, MADELUNG) },
        /* eps_r 11.1: Sze & Ng 2007 Appendix, from memory */
        EPS(11.1, SZE_EPS), NO_ALPHA,
    },
};

#define NTABLE (sizeof table / sizeof table[0])

const char *bm_valley_site_name(bm_valley_site s)
{
    switch (s) {
    case BM_SITE_GAMMA:    return "gamma";
    case BM_SITE_INTERIOR: return "interior";
    case BM_SITE_FACE:     return "face";
    }
    return "unknown";
}

bm_status bm_valley_site_parse(const char *name, bm_valley_site *out, bm_errbuf *err)
{
    static const bm_valley_site all[] = { BM_SITE_GAMMA, BM_SITE_INTERIOR, BM_SITE_FACE };
    for (size_t i = 0; name && i < sizeof all / sizeof all[0]; i++)
        if (!strcmp(name, bm_valley_site_name(all[i]))) {
            *out = all[i];
            return BM_OK;
        }
    return bm_fail(err, BM_EINVAL, "must be gamma, interior or face (got \"%.40s\")",
                   name ? name : "nothing");
}

size_t bm_material_count(void)
{
    return NTABLE;
}

const bm_material *bm_material_at(size_t i)
{
    return i < NTABLE ? &table[i] : NULL;
}

static int same_ci(const char *a, const char *b)
{
    for (; *a && *b; a++, b++) {
        char x = *a, y = *b;
        if (x >= 'A' && x <= 'Z')
            x = (char)(x - 'A' + 'a');
        if (y >= 'A' && y <= 'Z')
            y = (char)(y - 'A' + 'a');
        if (x != y)
            return 0;
    }
    return *a == *b;
}

const bm_material *bm_material_find(const char *name, bm_errbuf *err)
{
    if (!name) {
        bm_fail(err, BM_EINVAL, "materials: no material name given");
        return NULL;
    }
    for (size_t i = 0; i < NTABLE; i++)
        if (same_ci(name, table[i].name) || same_ci(name, table[i].long_name))
            return &table[i];
    char known[256] = "";
    size_t len = 0;
    for (size_t i = 0; i < NTABLE && len < sizeof known; i++) {
        int w = snprintf(known + len, sizeof known - len, "%s%s", i ? ", " : "",
                         table[i].name);
        if (w < 0)
            break;
        len += (size_t)w;
    }
    bm_fail(err, BM_EINVAL, "materials: unknown material '%.100s' (built in: %s)", name, known);
    return NULL;
}

const bm_material_dopant *bm_material_find_dopant(const bm_material *m, const char *element,
                                                  bm_dopant_kind kind, bm_errbuf *err)
{
    if (!m || !element) {
        bm_fail(err, BM_EINVAL, "materials: no material or dopant element given");
        return NULL;
    }
    const char *what = kind == BM_DOPANT_DONOR ? "donor" : "acceptor";
    int other = 0;
    for (size_t i = 0; i < m->ndopants && i < BM_MATERIAL_MAX_DOPANTS; i++) {
        if (!same_ci(element, m->dopants[i].element))
            continue;
        if (m->dopants[i].kind == kind)
            return &m->dopants[i];
        other = 1;
    }
    if (other) {
        bm_fail(err, BM_EINVAL, "materials: '%.40s' is %s in %s, not %s", element,
                kind == BM_DOPANT_DONOR ? "an acceptor" : "a donor", m->name,
                kind == BM_DOPANT_DONOR ? "a donor" : "an acceptor");
        return NULL;
    }
    char known[200] = "";
    size_t len = 0;
    for (size_t i = 0; i < m->ndopants && i < BM_MATERIAL_MAX_DOPANTS; i++) {
        if (m->dopants[i].kind != kind || len >= sizeof known)
            continue;
        int w = snprintf(known + len, sizeof known - len, "%s%s", len ? ", " : "",
                         m->dopants[i].element);
        if (w < 0)
            break;
        len += (size_t)w;
    }
    bm_fail(err, BM_EINVAL, "materials: no %s '%.40s' in %s (known %ss: %s)", what, element,
            m->name, what, len ? known : "none");
    return NULL;
}

bm_status bm_material_band_gap(const bm_material *m, double t_k, double *eg_ev,
                               bm_warnings *w, bm_errbuf *err)
{
    if (!m)
        return bm_fail(err, BM_EINVAL, "materials: no material given");
    return bm_gap_at(&m->gap, t_k, eg_ev, w, err);
}

bm_status bm_material_hydrogenic(const bm_material *m, bm_dopant_kind kind,
                                 bm_hydrogenic_info *out, bm_errbuf *err)
{
    if (!m || !out)
        return bm_fail(err, BM_EINVAL, "materials: no material or result given");
    *out = (bm_hydrogenic_info){ NAN, NULL, NAN, NAN, NAN };
    if (kind == BM_DOPANT_DONOR) {
        const bm_valley_info *v = &m->electron;
        double p = v->m_longitudinal * v->m_transverse * v->m_transverse2;
        if (v->label && p > 0.0 && isfinite(p)) {
            out->mass = cbrt(p);
            out->mass_source = "(m_l m_t m_t2)^(1/3) of the conduction valley";
        } else if (m->electron_dos_mass.kind == BM_DOS_MASS_FIXED) {
            out->mass = m->electron_dos_mass.value;
            out->mass_source = "the fixed electron DOS mass (one valley assumed)";
        } else {
            out->mass_source = "none: no conduction valley and no fixed electron DOS mass";
            return BM_OK;
        }
    } else {
        double hh = m->heavy_hole_mass.value, lh = m->light_hole_mass.value;
        if (hh > 0.0 && lh > 0.0 && isfinite(hh) && isfinite(lh)) {
            out->mass = pow(pow(hh, 1.5) + pow(lh, 1.5), 2.0 / 3.0);
            out->mass_source = "(m_hh^(3/2) + m_lh^(3/2))^(2/3) of the parabolic holes "
                               "(hydrogenic acceptor: rough)";
        } else if (m->statistics_hole_dos_mass.kind == BM_DOS_MASS_FIXED) {
            out->mass = m->statistics_hole_dos_mass.value;
            out->mass_source = "the fixed statistics hole DOS mass (hydrogenic acceptor: rough)";
        } else {
            out->mass_source = "none: no parabolic hole masses and no fixed hole DOS mass";
            return BM_OK;
        }
    }
    double eps = m->relative_permittivity.value;
    if (!(eps > 0.0) || !isfinite(eps)) {
        out->mass_source = "none: no relative permittivity";
        return BM_OK;
    }
    return bm_hydrogenic_impurity(out->mass, eps, &out->binding_ev, &out->bohr_radius_angstrom,
                                  &out->mott_density_cm3, err);
}

bm_status bm_material_ionisation_model(const bm_material *m, bm_dopant_kind kind,
                                       int requested, bm_ionisation_model *out,
                                       bm_errbuf *err)
{
    if (!m || !out)
        return bm_fail(err, BM_EINVAL, "materials: no material or result given");
    bm_hydrogenic_info h;
    bm_status st = bm_material_hydrogenic(m, kind, &h, err);
    if (st)
        return st;
    const char *what = kind == BM_DOPANT_DONOR ? "donor" : "acceptor";
    double alpha = kind == BM_DOPANT_DONOR ? m->donor_ionisation_alpha.value
                                           : m->acceptor_ionisation_alpha.value;
    int has_alpha = alpha > 0.0 && isfinite(alpha);
    int has_mott = h.mott_density_cm3 > 0.0 && isfinite(h.mott_density_cm3);
    *out = (bm_ionisation_model){ BM_IONISATION_SINGLE_LEVEL, NAN,
                                  has_mott ? h.mott_density_cm3 : 0.0 };
    int k = requested;
    if (k < 0)
        k = has_alpha ? BM_IONISATION_PEARSON_BARDEEN
            : has_mott ? BM_IONISATION_MOTT : BM_IONISATION_SINGLE_LEVEL;
    switch (k) {
    case BM_IONISATION_SINGLE_LEVEL:
        return BM_OK;
    case BM_IONISATION_PEARSON_BARDEEN:
        if (!has_alpha)
            return bm_fail(err, BM_EINVAL, "materials: %s has no Pearson-Bardeen alpha for "
                           "%ss (material key \"%s_ionization_lowering_ev_cm\")",
                           m->name ? m->name : "the material", what, what);
        out->kind = BM_IONISATION_PEARSON_BARDEEN;
        out->alpha_ev_cm = alpha;
        return BM_OK;
    case BM_IONISATION_MOTT:
        if (!has_mott)
            return bm_fail(err, BM_EINVAL, "materials: %s has no Mott density for %ss (it "
                           "needs \"relative_permittivity\" and a %s mass: %s)",
                           m->name ? m->name : "the material", what,
                           kind == BM_DOPANT_DONOR ? "conduction-valley" : "hole",
                           h.mass_source);
        out->kind = BM_IONISATION_MOTT;
        return BM_OK;
    default:
        break;
    }
    return bm_fail(err, BM_EINVAL, "materials: unknown ionisation model %d", requested);
}

bm_status bm_material_statistics_hole_dos_mass(const bm_material *m, double t_k,
                                               double *mass, bm_errbuf *err)
{
    if (!m)
        return bm_fail(err, BM_EINVAL, "materials: no material given");
    return bm_dos_mass_at(&m->statistics_hole_dos_mass, t_k, "statistics hole DOS mass",
                          mass, err);
}

static void cross(const double a[3], const double b[3], double out[3])
{
    out[0] = a[1] * b[2] - a[2] * b[1];
    out[1] = a[2] * b[0] - a[0] * b[2];
    out[2] = a[0] * b[1] - a[1] * b[0];
}

static int normalise(double v[3])
{
    double n = bm_v3_norm(v);
    if (!(n > 1e-12) || !isfinite(n))
        return 0;
    for (int i = 0; i < 3; i++)
        v[i] /= n;
    return 1;
}

bm_status bm_valley_info_direction(const bm_valley_info *v, double out[3], bm_errbuf *err)
{
    if (!v)
        return bm_fail(err, BM_EINVAL, "materials: no valley given");
    const double *d = v->direction;
    if (v->basis == BM_DIRECTION_HEXAGONAL) {
        if ((d[0] != 0.0 || d[1] != 0.0) && d[2] != 0.0)
            return bm_fail(err, BM_EINVAL, "materials: valley %s: a hexagonal direction mixing "
                           "in-plane and c* components needs c/a", v->label);
        /* a1* ~ (sqrt 3/2, 1/2, 0), a2* ~ (0, 1, 0) for a1 = a (1, 0, 0),
         * a2 = a (-1/2, sqrt 3/2, 0); equal lengths 4 pi / (sqrt 3 a) */
        out[0] = 0.5 * sqrt(3.0) * d[0];
        out[1] = 0.5 * d[0] + d[1];
        out[2] = d[2];
    } else {
        memcpy(out, d, 3 * sizeof *out);
    }
    int ok = normalise(out);
    if (!ok && v->site == BM_SITE_GAMMA && bm_v3_norm(d) == 0.0) {
        out[0] = out[1] = out[2] = 0.0;
        return BM_OK;
    }
    if (!ok)
        return bm_fail(err, BM_EINVAL, "materials: valley %s: direction [%g %g %g] is zero or "
                       "not finite", v->label, d[0], d[1], d[2]);
    return BM_OK;
}

bm_status bm_valley_info_shape(const bm_valley_info *v, bm_valley_shape *shape,
                               double dir[3], bm_errbuf *err)
{
    bm_status st = bm_valley_info_direction(v, dir, err);
    if (st != BM_OK)
        return st;
    double e1[3] = { 0, 0, 1 }, e2[3], e3[3];
    if (bm_v3_norm(dir) > 0.0)
        memcpy(e1, dir, sizeof e1);
    if (v->m_transverse == v->m_transverse2)
        return bm_valley_shape_spheroid(v->m_longitudinal, v->m_transverse, e1, shape, err);
    static const double z[3] = { 0, 0, 1 }, y[3] = { 0, 1, 0 };
    cross(z, e1, e2);
    if (!normalise(e2)) {
        cross(y, e1, e2);
        normalise(e2);
    }
    cross(e1, e2, e3);
    const double m[3] = { v->m_longitudinal, v->m_transverse, v->m_transverse2 };
    for (int i = 0; i < 3; i++) {
        if (!(m[i] > 0.0) || !isfinite(m[i]))
            return bm_fail(err, BM_EINVAL, "materials: valley %s: masses must be positive "
                           "and finite (got %g, %g, %g)", v->label, m[0], m[1], m[2]);
        shape->masses[i] = m[i];
        shape->axes[0][i] = e1[i];
        shape->axes[1][i] = e2[i];
        shape->axes[2][i] = e3[i];
    }
    return BM_OK;
}
