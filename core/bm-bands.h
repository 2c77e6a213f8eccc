/* bm-bands.h: the plain structs that carry band data into the core.
 * The caller owns every array; the core never copies or frees them. */
#ifndef BM_BANDS_H
#define BM_BANDS_H

#include <stddef.h>

/* A uniform periodic mesh over the whole reciprocal cell: point (i, j, l)
 * sits at k = ((i + o1)/n1) b1 + ((j + o2)/n2) b2 + ((l + o3)/n3) b3, with the
 * offset o in mesh steps (0: Gamma-centred; 0.5 on an axis of an even
 * Monkhorst-Pack mesh); n3 = 1 for a 2D sheet. */
typedef struct {
    double recip[3][3];       /* rows b1 b2 b3, 1/Angstrom, 2 pi included */
    size_t mesh[3];           /* n1 n2 n3 */
    double offset[3];         /* o1 o2 o3, mesh steps (zero-initialised: Gamma-centred) */
    size_t nbands;
    const double *energies;   /* [band][i][j][l], C order, eV */
} bm_grid;

/* Scattered points: a local mesh, a line cut or measured dispersion. */
typedef struct {
    size_t npoints;
    const double *k;          /* [point][3], Cartesian, 1/Angstrom */
    size_t nbands;
    const double *energies;   /* [band][point], eV */
} bm_ktable;

#endif
