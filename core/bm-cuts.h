/* bm-cuts.h: band cuts through an extremum along a line k0 + q a, for
 * drawing a band beside its fit: the samples of a grid or table that lie
 * near the line, and the energies the fitted quadric (or Kane band, in
 * bm-kane.h) gives on it. */
#ifndef BM_CUTS_H
#define BM_CUTS_H

#include <stddef.h>

#include "bm-bandinterp.h"
#include "bm-bands.h"
#include "bm-extrema.h"
#include "bm-status.h"

/* Samples near a line: q, the signed distance along the line's unit
 * direction from k0 (1/Angstrom), and the band's energy (eV), by
 * increasing q. */
typedef struct {
    size_t n;
    double *q;
    double *e;
} bm_line_samples;

void bm_line_samples_clear(bm_line_samples *s);

/* The mesh points of g (every periodic image) within half the smallest mesh
 * step of the line through k0 along axis (Cartesian, any length) and within
 * reach of k0 along it, with band's energies there. */
bm_status bm_grid_line_samples(const bm_grid *g, size_t band, const double k0[3],
                               const double axis[3], double reach, bm_line_samples *out,
                               bm_errbuf *err);

/* The smallest mesh step of g, |b_i| / n_i over its meshed axes. */
double bm_grid_mesh_step(const bm_grid *g);

/* The points of t within tolerance (1/Angstrom) of the line and within reach
 * of k0 along it. */
bm_status bm_ktable_line_samples(const bm_ktable *t, size_t band, const double k0[3],
                                 const double axis[3], double reach, double tolerance,
                                 bm_line_samples *out, bm_errbuf *err);

/* The interpolated band bi of g (bm-bandinterp.h, the interpolant of
 * thermal-mass and kane-fit, built once by the caller for every cut) at
 * k0 + q[i] axis (unit direction), i < n, into e. */
bm_status bm_grid_line_band(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                            const double k0[3], const double axis[3], const double *q,
                            size_t n, double *e, bm_errbuf *err);

/* The energy of the quadric of t at k0 + dk: E0 + (hbar^2 / 2 m_e) dk . M^-1 . dk
 * (M^-1 t's inverse mass tensor in 1/m_e). */
double bm_mass_tensor_energy(const bm_mass_tensor *t, const double dk[3]);

/* How far along a principal axis of mass m (m_e, either sign) the quadric
 * climbs energy_ev from the extremum: sqrt(2 |m| E m_e) / hbar, 1/Angstrom. */
double bm_quadric_reach(double mass_me, double energy_ev);

/* Samples of a cut drawn as a curve. */
#define BM_CUT_CURVE_POINTS 81

#endif
