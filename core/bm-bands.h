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
    size_t channel_bands;     /* bands per spin channel (spin-polarised grids: channel c
                                 holds bands c * channel_bands ...); 0: one channel */
} bm_grid;

/* 1 when bands a and b belong to the same spin channel of g: only those can
 * cross or touch each other (up and down bands of a collinear calculation are
 * independent, and equal in a non-magnetic one). */
static inline int bm_grid_same_channel(const bm_grid *g, size_t a, size_t b)
{
    return g->channel_bands == 0 || a / g->channel_bands == b / g->channel_bands;
}

/* Scattered points: a local mesh, a line cut or measured dispersion. */
typedef struct {
    size_t npoints;
    const double *k;          /* [point][3], Cartesian, 1/Angstrom */
    size_t nbands;
    const double *energies;   /* [band][point], eV */
} bm_ktable;

#endif
