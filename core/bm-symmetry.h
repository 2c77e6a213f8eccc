/* bm-symmetry.h: crystallographic point groups as lists of 3x3 orthogonal
 * Cartesian matrices, generated from generators and closed under products. */
#ifndef BM_SYMMETRY_H
#define BM_SYMMETRY_H

#include "bm-status.h"

#define BM_POINT_GROUP_MAX_ORDER 48

/* Orientation conventions (Cartesian axes x, y, z):
 * - cubic groups (T, Th, Td, O, Oh): the cube axes are x, y, z;
 * - tetragonal, hexagonal and trigonal groups: the principal axis is z;
 *   the secondary two-fold axis (D groups) or the mirror normal (C_nv groups,
 *   a mirror plane x = 0) lies along x;
 * - C2 and C2h: the two-fold axis is z; Cs: the mirror plane is z = 0;
 *   C2v: the two-fold axis is z, a mirror plane x = 0. */
typedef struct {
    char name[8];        /* Schoenflies symbol, e.g. "Oh" */
    char laue[8];        /* its Laue class (international symbol: the group with
                            inversion, which time reversal adds to a valley star);
                            empty for a group made from generators */
    int order;           /* number of operations */
    int has_inversion;   /* 1 when -1 is an element */
    double ops[BM_POINT_GROUP_MAX_ORDER][3][3];
} bm_point_group;

/* Fills *out with the group named by a Schoenflies symbol ("Oh", "Td",
 * "D6h", "C6v", "D4h", ...) or an international (Hermann-Mauguin) short
 * symbol ("m-3m", "-43m", "6/mmm", "6mm", "4/mmm", ...). Case-sensitive.
 * BM_EINVAL with the list of supported names for anything else. */
bm_status bm_point_group_get(const char *name, bm_point_group *out, bm_errbuf *err);

/* Closes the set of generators (n_gens orthogonal 3x3 matrices, 9 doubles
 * each, row-major, checked to 1e-9) under products. BM_EINVAL for a non-orthogonal generator or when the
 * closure exceeds BM_POINT_GROUP_MAX_ORDER elements (not a finite
 * crystallographic point group). name may be NULL. */
bm_status bm_point_group_generate(const double *gens, int n_gens,
                                  const char *name, bm_point_group *out,
                                  bm_errbuf *err);

/* Index of the operation equal to r (9 doubles, row-major; for an array
 * double r[3][3] pass (const double *)r) to within tol, or -1. */
int bm_point_group_find(const bm_point_group *g, const double *r, double tol);

/* Comma-separated list of the supported Schoenflies symbols (static text). */
const char *bm_point_group_names(void);

#endif
