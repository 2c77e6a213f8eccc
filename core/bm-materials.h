/* bm-materials.h: the compiled-in parameter sets of common semiconductors
 * (gap, valleys, masses, Luttinger parameters, dopants), each value with its source. */
#ifndef BM_MATERIALS_H
#define BM_MATERIALS_H

#include <stddef.h>
#include "bm-bandgap.h"
#include "bm-status.h"

typedef enum {
    BM_SITE_GAMMA,      /* at the zone centre: one valley */
    BM_SITE_INTERIOR,   /* on a symmetry line inside the zone: each star member counts 1 */
    BM_SITE_FACE        /* on the zone face: each member shared with its partner, counts 1/2 */
} bm_valley_site;

const char *bm_valley_site_name(bm_valley_site s);  /* "gamma", "interior", "face" */

/* Lowest conduction-band valley.  direction: a representative valley
 * direction, Cartesian cubic axes for the cubic crystals, (a*, a*, c*) for the
 * hexagonal ones (4H-SiC's M point lies along a*).  Masses in m_e:
 * m_longitudinal along the direction, m_transverse (and m_transverse2 for
 * valleys without axial symmetry, else equal to m_transverse) across it;
 * all three equal for an isotropic valley. */
typedef struct {
    const char *label;            /* "Delta", "L", "X", "Gamma", "M" */
    bm_valley_site site;
    double direction[3];
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

/* Values not published in the sources used are NAN (and their source string
 * says so).  "derived" in a source string means computed here from the other
 * listed values by the formula given. */
typedef struct {
    const char *name;             /* "Si", "GaAs", "4H-SiC" */
    const char *long_name;        /* "silicon" */
    const char *structure;        /* "diamond", "zincblende", "wurtzite", "4H polytype" */
    const char *point_group;      /* Schoenflies symbol of the crystal class */
    int direct_gap;
    bm_varshni gap;               /* Eg0 (eV), alpha (eV/K), beta (K) */
    const char *gap_source;
    bm_valley_info electron;
    double m_dos_electron;        /* all valleys, m_e */
    const char *m_dos_electron_source;
    double m_dos_hole;
    const char *m_dos_hole_source;
    double m_heavy_hole, m_light_hole;
    const char *hole_masses_source;
    double m_split_off;
    double split_off_ev;
    const char *split_off_source;
    double luttinger[3];          /* gamma1, gamma2, gamma3 (NAN if not cubic) */
    const char *luttinger_source;
    size_t ndopants;
    bm_material_dopant dopants[BM_MATERIAL_MAX_DOPANTS];
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

/* Varshni gap of the material at t_k. */
bm_status bm_material_band_gap(const bm_material *m, double t_k, double *eg_ev,
                               bm_warnings *w, bm_errbuf *err);

#endif
