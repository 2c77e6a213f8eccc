/* bm-materials.h: the compiled-in parameter sets of common semiconductors
 * (gap, valleys, masses, Luttinger parameters, dopants), each value with its source. */
#ifndef BM_MATERIALS_H
#define BM_MATERIALS_H

#include <stddef.h>
#include "bm-bandgap.h"
#include "bm-carriers.h"
#include "bm-status.h"
#include "bm-valleys.h"

/* bm_valley_site (gamma, interior, face) comes from bm-valleys.h. */
const char *bm_valley_site_name(bm_valley_site s);  /* "gamma", "interior", "face" */
/* The site of one of those names (exact); BM_EINVAL naming it otherwise. */
bm_status bm_valley_site_parse(const char *name, bm_valley_site *out, bm_errbuf *err);

/* How bm_valley_info.direction is written. */
typedef enum {
    BM_DIRECTION_CARTESIAN,   /* Cartesian, in the frame of bm-symmetry.h for the
                                 material's point group (cube axes for cubic groups) */
    BM_DIRECTION_HEXAGONAL    /* components along the reciprocal vectors (a1*, a2*, c*)
                                 of the hexagonal lattice a1 = a (1, 0, 0),
                                 a2 = a (-1/2, sqrt 3/2, 0), c along z: a1 along x, the
                                 mirror normal / secondary two-fold axis of bm-symmetry.h
                                 (the standard setting of 6mm and 622) */
} bm_direction_basis;

/* Lowest conduction-band valley.  direction: a representative valley
 * direction in the given basis (Cartesian for the cubic crystals, (a1*, a2*, c*)
 * for the hexagonal ones: 4H-SiC's M point lies along a1*); at Gamma the
 * longitudinal axis (zero: z).  Masses in m_e, principal values of the valley
 * whose axes are, as rows,
 *   e1 = d (the Cartesian unit direction): m_longitudinal,
 *   e2 = z x d normalised (y x d when d is along z): m_transverse,
 *   e3 = d x e2: m_transverse2 (equal to m_transverse for a valley with axial
 *        symmetry, which is then a spheroid about d);
 * all three equal for an isotropic valley.  For a valley on the zone face of a
 * hexagonal crystal at M (d along Gamma-M in the basal plane), e2 lies along
 * M-K and e3 along c.  star_size and valleys are 0 and NAN in a material read
 * from a file (the star built from the point group gives them). */
typedef struct {
    const char *label;            /* "Delta", "L", "X", "Gamma", "M" */
    bm_valley_site site;
    double direction[3];
    bm_direction_basis basis;
    int star_size;                /* distinct positions in the star */
    double valleys;               /* equivalent full valleys (face members count 1/2) */
    double m_longitudinal, m_transverse, m_transverse2;
    const char *source;
} bm_valley_info;

typedef enum { BM_DOPANT_DONOR, BM_DOPANT_ACCEPTOR } bm_dopant_kind;

typedef struct {
    const char *element;          /* "P", "B", "N (hexagonal site)" */
    bm_dopant_kind kind;
    double ionisation_ev;         /* Ec - E_D or E_A - Ev */
    double degeneracy;            /* 2 donors, 4 acceptors (common practice, no source) */
    const char *source;
} bm_material_dopant;

#define BM_MATERIAL_MAX_DOPANTS 8

/* A number and where it comes from (NAN when not published in the sources
 * used; the source string then says so). */
typedef struct {
    double value;
    const char *source;
} bm_sourced;

/* The whole material model.  "derived" in a source string means computed
 * here from the other listed values by the formula given.  A material read
 * from a file has NULL for the strings it does not give, direct_gap -1 when
 * not given, NAN values for the numbers it does not give, kind NONE for the
 * models it does not give and electron.label NULL without a conduction valley.
 *
 * Two hole DOS masses, never mixed:
 *   statistics_hole_dos_mass  m_dh(T), the mass that gives Nv = 2 (2 pi m_dh
 *                             k T / h^2)^(3/2) in carrier statistics: a fit,
 *                             a table or a value derived from a published Nv;
 *   the band-edge k.p DOS mass of the warped heavy and light bands, computed
 *                             from luttinger[] by bm_band_edge_hole_dos_mass
 *                             (bm-holes.h), not stored. */
typedef struct {
    const char *name;             /* "Si", "GaAs", "4H-SiC" */
    const char *long_name;        /* "silicon" */
    const char *structure;        /* "diamond", "zincblende", "wurtzite", "4H polytype" */
    const char *point_group;      /* Schoenflies symbol of the crystal class */
    int direct_gap;               /* 1 direct, 0 indirect, -1 not given */
    bm_gap_model gap;             /* with its source */
    bm_valley_info electron;
    bm_dos_mass_model electron_dos_mass;          /* all valleys, m_e */
    bm_dos_mass_model statistics_hole_dos_mass;   /* m_dh(T), m_e */
    bm_sourced heavy_hole_mass, light_hole_mass;  /* parabolic, m_e */
    bm_sourced split_off_mass;                    /* m_e */
    bm_sourced split_off_ev;                      /* spin-orbit splitting Delta_so, eV */
    double luttinger[3];          /* gamma1, gamma2, gamma3 (NAN if not cubic) */
    const char *luttinger_source;
    size_t ndopants;
    bm_material_dopant dopants[BM_MATERIAL_MAX_DOPANTS];
    /* heavy doping (NAN / kind NONE where the sources used give none) */
    bm_sourced relative_permittivity;      /* static eps_r, for the hydrogenic
                                              binding energy and the Mott density */
    bm_sourced donor_ionisation_alpha;     /* Pearson-Bardeen alpha, eV cm:
                                              E_ion(N) = E0 - alpha N^(1/3) */
    bm_sourced acceptor_ionisation_alpha;
    bm_bgn_model band_gap_narrowing;       /* with its source */
} bm_material;

size_t bm_material_count(void);
const bm_material *bm_material_at(size_t i);   /* NULL past the end */

/* Case-insensitive lookup by name or long name ("si", "Silicon", "4h-sic");
 * NULL and BM_EINVAL naming the material (and listing the known ones) if absent. */
const bm_material *bm_material_find(const char *name, bm_errbuf *err);

/* The dopant of that element and kind in m's table (element matched
 * case-insensitively, "p" finds "P").  NULL and BM_EINVAL naming the element and
 * listing the material's dopants of that kind (or saying the element is of the
 * other kind) when absent. */
const bm_material_dopant *bm_material_find_dopant(const bm_material *m, const char *element,
                                                  bm_dopant_kind kind, bm_errbuf *err);

/* The hydrogenic impurity of a material (bm_hydrogenic_impurity).  The mass:
 * donors (m_l m_t m_t2)^(1/3) of the conduction valley (one valley's
 * DOS mass: the isotropic average that the effective-mass donor uses), else a
 * fixed electron DOS mass (one valley assumed); acceptors the parabolic
 * combination (m_hh^(3/2) + m_lh^(3/2))^(2/3), else a fixed statistics hole DOS
 * mass.  A hydrogenic acceptor ignores the degenerate valence band: treat its
 * numbers as rough.  Values are NAN and mass_source says why when the material
 * lacks the mass or the permittivity; BM_EINVAL only for missing arguments. */
typedef struct {
    double mass;                   /* m_e */
    const char *mass_source;       /* how the mass was chosen (static text) */
    double binding_ev, bohr_radius_angstrom, mott_density_cm3;
} bm_hydrogenic_info;

bm_status bm_material_hydrogenic(const bm_material *m, bm_dopant_kind kind,
                                 bm_hydrogenic_info *out, bm_errbuf *err);

/* The ionisation model of one dopant kind: `requested` is a bm_ionisation_kind,
 * or -1 for the material's default: Pearson-Bardeen where the material has an
 * alpha for the kind, else the Mott threshold where the hydrogenic Mott density
 * is known, else the single level.  A requested model whose parameter the
 * material lacks is BM_EINVAL naming it.  The Mott density (0 when unknown) is
 * always filled in, so that a single-level solve can warn above it. */
bm_status bm_material_ionisation_model(const bm_material *m, bm_dopant_kind kind,
                                       int requested, bm_ionisation_model *out,
                                       bm_errbuf *err);

/* The gap of the material's model at t_k (bm_gap_at). */
bm_status bm_material_band_gap(const bm_material *m, double t_k, double *eg_ev,
                               bm_warnings *w, bm_errbuf *err);

/* m_dh(t_k) of the material's statistics hole DOS mass model (bm_dos_mass_at). */
bm_status bm_material_statistics_hole_dos_mass(const bm_material *m, double t_k,
                                               double *mass, bm_errbuf *err);

/* The Cartesian unit direction of v (frame of bm-symmetry.h); zero when v
 * sits at Gamma with no axis given.  BM_EINVAL for a non-finite or zero
 * direction off Gamma, and for a hexagonal direction mixing in-plane and c*
 * components (converting it needs c/a, which the table does not hold). */
bm_status bm_valley_info_direction(const bm_valley_info *v, double out[3], bm_errbuf *err);

/* The valley shape of v by the axis convention above (a spheroid when
 * m_transverse == m_transverse2) and its Cartesian position direction dir
 * (zero at Gamma), ready for bm_valley_star_build.  BM_EINVAL for
 * non-positive masses or a bad direction. */
bm_status bm_valley_info_shape(const bm_valley_info *v, bm_valley_shape *shape,
                               double dir[3], bm_errbuf *err);

#endif
