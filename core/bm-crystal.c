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

/* 1 when R maps every reciprocal vector onto an integer combination of them. */
static int maps_lattice(const double r[3][3], const double b[3][3], const double binv[3][3])
{
    for (int i = 0; i < 3; i++) {
        double rb[3] = { 0, 0, 0 };
        for (int a = 0; a < 3; a++)
            for (int c = 0; c < 3; c++)
                rb[a] += r[a][c] * b[i][c];
        for (int j = 0; j < 3; j++) {
            double f = rb[0] * binv[0][j] + rb[1] * binv[1][j] + rb[2] * binv[2][j];
            if (fabs(f - nearbyint(f)) > 1e-6)
                return 0;
        }
    }
    return 1;
}

bm_status bm_lattice_rotations_cartesian(const double recip[3][3],
                                         double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                                         size_t *nrot, bm_errbuf *err)
{
    *nrot = 0;
    double b[3][3], binv[3][3];
    memcpy(b, recip, sizeof b);
    if (bm_inv3(b, binv) != 0)
        return bm_fail(err, BM_EINVAL, "lattice symmetry: singular reciprocal vectors");
    /* candidates: the 48 signed permutations of the axes (cube, and every
     * lattice with its axes along x, y, z) and the 24 operations of the
     * hexagon with c along z (a along x or y); a search, not a list per
     * system, so a lattice keeps exactly the ones that map it onto itself */
    static const int perms[6][3] = { { 0, 1, 2 }, { 1, 2, 0 }, { 2, 0, 1 },
                                     { 1, 0, 2 }, { 0, 2, 1 }, { 2, 1, 0 } };
    double cand[48 + 48][3][3];
    size_t nc = 0;
    for (int p = 0; p < 6; p++)
        for (int sg = 0; sg < 8; sg++) {
            memset(cand[nc], 0, sizeof cand[nc]);
            for (int a = 0; a < 3; a++)
                cand[nc][a][perms[p][a]] = (sg >> a) & 1 ? -1.0 : 1.0;
            nc++;
        }
    for (int n = 0; n < 6; n++)
        for (int m = 0; m < 8; m++) {
            /* R_z(60 n) times: identity, mirror x, mirror y, and each with z -> -z */
            double c = cos(3.14159265358979323846 * n / 3.0), s = sin(3.14159265358979323846 * n / 3.0);
            double rz[3][3] = { { c, -s, 0 }, { s, c, 0 }, { 0, 0, 1 } };
            double mir[3][3] = { { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } };
            if (m & 1)
                mir[0][0] = -1.0;
            if (m & 2)
                mir[1][1] = -1.0;
            if (m & 4)
                mir[2][2] = -1.0;
            bm_matmul3(rz, mir, cand[nc++]);
        }
    for (size_t q = 0; q < nc && *nrot < BM_CRYSTAL_MAX_ROTATIONS; q++) {
        if (!maps_lattice((const double (*)[3])cand[q], (const double (*)[3])b,
                          (const double (*)[3])binv))
            continue;
        int seen = 0;
        for (size_t o = 0; o < *nrot && !seen; o++) {
            double d = 0.0;
            for (int i = 0; i < 3; i++)
                for (int j = 0; j < 3; j++)
                    d = fmax(d, fabs(rot[o][i][j] - cand[q][i][j]));
            seen = d < 1e-9;
        }
        if (!seen)
            memcpy(rot[(*nrot)++], cand[q], sizeof cand[q]);
    }
    return BM_OK;
}

/* The mesh-index map of Cartesian rotation r, i' = i M + t (mod n), or 0
 * when r does not carry the mesh (with its offset) onto itself. */
static int mesh_map(const bm_grid *g, const double r[3][3], double binv[3][3],
                    long m[3][3], long t[3])
{
    /* fractional f (k = f B, rows of B) goes to f' = f B R^T B^-1 */
    double brt[3][3], fm[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            brt[i][j] = 0.0;
            for (int a = 0; a < 3; a++)
                brt[i][j] += g->recip[i][a] * r[j][a];
        }
    bm_matmul3(brt, binv, fm);
    /* index i_b' = f_b' n_b - o_b with f_a = (i_a + o_a) / n_a */
    for (int b = 0; b < 3; b++) {
        double tb = -g->offset[b];
        for (int a = 0; a < 3; a++) {
            double x = fm[a][b] * (double)g->mesh[b] / (double)g->mesh[a];
            if (fabs(x - nearbyint(x)) > 1e-6)
                return 0;
            m[a][b] = lround(x);
            tb += fm[a][b] * g->offset[a] * (double)g->mesh[b] / (double)g->mesh[a];
        }
        if (fabs(tb - nearbyint(tb)) > 1e-6)
            return 0;
        t[b] = lround(tb);
    }
    return 1;
}

bm_status bm_grid_rotations(const bm_grid *g, const size_t *bands, size_t nbands,
                            double tol_ev, double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3],
                            size_t *nrot, bm_errbuf *err)
{
    double lat[BM_CRYSTAL_MAX_ROTATIONS][3][3], b[3][3], binv[3][3];
    size_t nlat = 0;
    *nrot = 0;
    bm_status s = bm_lattice_rotations_cartesian(g->recip, lat, &nlat, err);
    if (s != BM_OK)
        return s;
    memcpy(b, g->recip, sizeof b);
    bm_inv3(b, binv);
    const size_t n0 = g->mesh[0], n1 = g->mesh[1], n2 = g->mesh[2], npt = n0 * n1 * n2;
    size_t stride = npt / 200000 + 1;
    if (stride > 1 && stride % 2 == 0)
        stride++;   /* odd: the sample does not fall on a sublattice of the mesh */
    for (size_t q = 0; q < nlat; q++) {
        long m[3][3], t[3];
        if (!mesh_map(g, (const double (*)[3])lat[q], binv, m, t))
            continue;
        int same = 1;
        for (size_t p = 0; p < npt && same; p += stride) {
            long i[3] = { (long)(p / (n1 * n2)), (long)((p / n2) % n1), (long)(p % n2) };
            size_t w[3];
            for (int c = 0; c < 3; c++) {
                long x = t[c] + i[0] * m[0][c] + i[1] * m[1][c] + i[2] * m[2][c];
                long nn = (long)g->mesh[c];
                w[c] = (size_t)(((x % nn) + nn) % nn);
            }
            size_t p2 = (w[0] * n1 + w[1]) * n2 + w[2];
            for (size_t k = 0; k < nbands && same; k++) {
                const double *e = g->energies + bands[k] * npt;
                same = fabs(e[p] - e[p2]) <= tol_ev;
            }
        }
        if (same)
            memcpy(rot[(*nrot)++], lat[q], sizeof lat[q]);
    }
    return BM_OK;
}
