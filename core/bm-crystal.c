/* bm-crystal.c: crystal symmetry through spglib (rotations only: a band energy
 * is invariant under the point-group part of every space-group operation). */
#include "bm-crystal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <spglib.h>

#include "bm-linalg.h"

bm_status bm_crystal_rotations(double lattice[3][3], const double (*positions)[3],
                               const int *types, size_t natoms, double symprec,
                               int rotations[BM_CRYSTAL_MAX_ROTATIONS][3][3], size_t *nrot,
                               bm_errbuf *err)
{
    *nrot = 0;
    if (natoms == 0 || natoms > 100000)
        return bm_fail(err, BM_EINVAL, "crystal: %zu atoms (expected 1 to 100000)", natoms);
    /* spglib takes the lattice vectors as columns */
    double lat[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            lat[i][j] = lattice[j][i];
    /* a cell of n atoms has at most 48 n operations (pure translations included) */
    size_t max = 48 * natoms;
    int (*rot)[3][3] = malloc(max * sizeof *rot);
    double (*trans)[3] = malloc(max * sizeof *trans);
    double (*pos)[3] = malloc(natoms * sizeof *pos);
    if (!rot || !trans || !pos) {
        free(rot);
        free(trans);
        free(pos);
        return bm_fail(err, BM_ENOMEM, "crystal: out of memory for %zu atoms", natoms);
    }
    memcpy(pos, positions, natoms * sizeof *pos);
    int n = spg_get_symmetry(rot, trans, (int)max, lat, pos, types, (int)natoms, symprec);
    bm_status st = BM_OK;
    if (n <= 0) {
        st = bm_fail(err, BM_EINVAL, "crystal: no symmetry found for the lattice and %zu atoms "
                     "(overlapping atoms, a singular lattice, or positions not fractional?)",
                     natoms);
    } else {
        for (int o = 0; o < n; o++) {
            int seen = 0;
            for (size_t q = 0; q < *nrot && !seen; q++)
                seen = memcmp(rotations[q], rot[o], sizeof rot[o]) == 0;
            if (!seen && *nrot < BM_CRYSTAL_MAX_ROTATIONS)
                memcpy(rotations[(*nrot)++], rot[o], sizeof rot[o]);
        }
    }
    free(rot);
    free(trans);
    free(pos);
    return st;
}

double bm_crystal_nearest_neighbour(double lattice[3][3], const double (*positions)[3],
                                    size_t natoms)
{
    double best = INFINITY;
    for (size_t i = 0; i < natoms; i++)
        for (size_t j = 0; j < natoms; j++)
            for (int n0 = -1; n0 <= 1; n0++)
                for (int n1 = -1; n1 <= 1; n1++)
                    for (int n2 = -1; n2 <= 1; n2++) {
                        if (i == j && !n0 && !n1 && !n2)
                            continue;
                        double d[3] = { positions[j][0] - positions[i][0] + n0,
                                        positions[j][1] - positions[i][1] + n1,
                                        positions[j][2] - positions[i][2] + n2 }, c[3];
                        for (int a = 0; a < 3; a++)
                            c[a] = d[0] * lattice[0][a] + d[1] * lattice[1][a]
                                 + d[2] * lattice[2][a];
                        best = fmin(best, sqrt(c[0] * c[0] + c[1] * c[1] + c[2] * c[2]));
                    }
    return best;
}

bm_status bm_lattice_rotations_cartesian(const double recip[3][3],
                                         double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                                         size_t *nrot, bm_errbuf *err)
{
    *nrot = 0;
    double b[3][3], a[3][3], at[3][3], ainvt[3][3];
    memcpy(b, recip, sizeof b);
    /* the direct lattice: A = 2 pi B^-T, the same map as B from A */
    if (bm_reciprocal3(b, a) != 0)
        return bm_fail(err, BM_EINVAL, "lattice symmetry: singular reciprocal vectors");
    /* one atom at the origin: the space group of the lattice itself */
    double origin[1][3] = { { 0, 0, 0 } };
    int types[1] = { 1 }, w[BM_CRYSTAL_MAX_ROTATIONS][3][3];
    double scale = fmax(bm_norm3(a[0]), fmax(bm_norm3(a[1]), bm_norm3(a[2])));
    size_t n;
    bm_status st = bm_crystal_rotations(a, (const double (*)[3])origin, types, 1,
                                        1e-5 * scale, w, &n, err);
    if (st != BM_OK)
        return st;
    /* x = A^T x_f, x_f' = W x_f: R = A^T W A^-T on Cartesian vectors */
    bm_transpose3(a, at);
    if (bm_inv3(at, ainvt) != 0)
        return bm_fail(err, BM_EINVAL, "lattice symmetry: singular lattice");
    for (size_t o = 0; o < n; o++) {
        double wd[3][3], t1[3][3];
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 3; j++)
                wd[i][j] = w[o][i][j];
        bm_matmul3(at, wd, t1);
        bm_matmul3(t1, ainvt, rot[o]);
    }
    *nrot = n;
    return BM_OK;
}
