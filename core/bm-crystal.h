/* bm-crystal.h: the symmetry of a crystal from its lattice and atoms (spglib's
 * C library): the rotations that unfold an irreducible wedge of k-points. */
#ifndef BM_CRYSTAL_H
#define BM_CRYSTAL_H

#include <stddef.h>

#include "bm-bands.h"
#include "bm-status.h"

#define BM_CRYSTAL_MAX_ROTATIONS 48

/* The distinct rotations W of the crystal's space group, integer matrices
 * acting on fractional coordinates of the direct lattice (x' = W x).
 * lattice: rows a1, a2, a3 in Angstrom; positions: fractional; types: one
 * integer per atom (equal for equal species); symprec in Angstrom. BM_EINVAL
 * naming the input when spglib finds no symmetry (overlapping atoms, a
 * singular lattice). */
bm_status bm_crystal_rotations(double lattice[3][3], const double (*positions)[3],
                               const int *types, size_t natoms, double symprec,
                               int rotations[BM_CRYSTAL_MAX_ROTATIONS][3][3], size_t *nrot,
                               bm_errbuf *err);

/* The shortest distance between two atoms of the crystal (periodic images
 * included), Angstrom: a sanity check of the length unit. */
double bm_crystal_nearest_neighbour(double lattice[3][3], const double (*positions)[3],
                                    size_t natoms);

/* Rotations of the lattice whose reciprocal vectors are the rows of recip,
 * as Cartesian orthogonal matrices (k' = R k): those among the signed axis
 * permutations and the hexagon's operations about z that map the lattice
 * onto itself. That is the whole holohedry of a lattice in its usual
 * orientation (cubic, tetragonal, orthorhombic axes along x, y, z; hexagonal
 * and trigonal with c along z); in another orientation fewer are found,
 * which only ever means less snapping. Microseconds, no spglib. */
bm_status bm_lattice_rotations_cartesian(const double recip[3][3],
                                         double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                                         size_t *nrot, bm_errbuf *err);

/* The rotations of the lattice (as bm_lattice_rotations_cartesian finds
 * them) that map g's mesh onto itself and leave the mesh energies of the
 * given bands unchanged to within tol_ev: the symmetry the data have, which
 * is the crystal's (or less, where the crystal has less than its lattice,
 * or a spin-polarised channel lacks inversion). The identity is always
 * among them; a strided sample of at most about 2e5 mesh points per
 * rotation is compared (a broken symmetry shows everywhere). */
bm_status bm_grid_rotations(const bm_grid *g, const size_t *bands, size_t nbands,
                            double tol_ev, double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                            size_t *nrot, bm_errbuf *err);

#endif
