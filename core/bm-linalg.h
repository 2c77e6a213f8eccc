/* bm-linalg.h: small dense helpers for 3x3 matrices (determinant, inverse,
 * products, symmetric eigen-decomposition through GSL) and orthonormal bases. */
#ifndef BM_LINALG_H
#define BM_LINALG_H

/* Determinant of a. */
double bm_det3(double a[3][3]);

/* out = a^-1; returns 0, or -1 when a is singular (|det| below 1e-14 times the
 * product of its row norms). out may alias a. */
int bm_inv3(double a[3][3], double out[3][3]);

/* Reciprocal vectors of a cell with lattice vectors in the rows of a:
 * rows b_i = 2 pi (a_j x a_k) / (a1 . a2 x a3), i.e. B = 2 pi A^-T, so that
 * a_i . b_j = 2 pi delta_ij. Returns 0, or -1 when the cell is singular or
 * nearly so (|det| below 1e-10 times the product of its row norms). */
int bm_reciprocal3(double a[3][3], double b[3][3]);

/* out = a b (out may alias a or b). */
void bm_matmul3(double a[3][3], double b[3][3], double out[3][3]);

/* out = a^T (out may alias a). */
void bm_transpose3(double a[3][3], double out[3][3]);

/* out = a x b. */
void bm_cross3(const double a[3], const double b[3], double out[3]);

double bm_dot3(const double a[3], const double b[3]);
double bm_norm3(const double a[3]);

/* Eigen-decomposition of the symmetric leading n x n block of a (n = 1..3):
 * eigenvalues ascending in evals[0..n-1], unit eigenvectors in the rows of
 * evecs (evecs[m][0..n-1]). Returns 0, or -1 on a GSL failure. */
int bm_symeig(double a[3][3], int n, double evals[3], double evecs[3][3]);

/* Completes the first `given` rows of basis (unit, mutually orthogonal) to a
 * right-handed orthonormal basis of R^3. given = 0..3. */
void bm_complete_basis(double basis[3][3], int given);

#endif
