/* bm-thermal.c: the binned spectrum of a band grid and the thermal averages
 * over it (bm-thermal.h). */
#include "bm-thermal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "bm-extrema.h"
#include "bm-linalg.h"
#include "bm-units.h"

bm_status bm_thermal_spectrum_init(bm_thermal_spectrum *sp, const bm_thermal_setup *s,
                                   bm_errbuf *err)
{
    memset(sp, 0, sizeof *sp);
    sp->e0 = s->e_lo;
    sp->de = s->bin_ev;
    sp->nbins = (size_t)ceil((s->e_hi - s->e_lo) / s->bin_ev) + 2;
    sp->dos = calloc(sp->nbins, sizeof *sp->dos);
    sp->trans = calloc(sp->nbins * 6, sizeof *sp->trans);
    sp->hall = calloc(sp->nbins * 3, sizeof *sp->hall);
    sp->edge_ev = s->carrier == BM_CARRIER_ELECTRONS ? INFINITY : -INFINITY;
    sp->min_gap_outside = INFINITY;
    if (!sp->dos || !sp->trans || !sp->hall) {
        bm_thermal_spectrum_clear(sp);
        return bm_fail(err, BM_ENOMEM, "out of memory for an energy axis of %zu bins", sp->nbins);
    }
    return BM_OK;
}

void bm_thermal_spectrum_clear(bm_thermal_spectrum *sp)
{
    free(sp->dos);
    free(sp->trans);
    free(sp->hall);
    sp->dos = sp->trans = sp->hall = NULL;
}

void bm_thermal_spectrum_reset(bm_thermal_spectrum *sp, const bm_thermal_setup *s)
{
    double *dos = sp->dos, *trans = sp->trans, *hall = sp->hall;
    size_t nb = sp->nbins;
    memset(dos, 0, nb * sizeof *dos);
    memset(trans, 0, 6 * nb * sizeof *trans);
    memset(hall, 0, 3 * nb * sizeof *hall);
    memset(sp, 0, sizeof *sp);
    sp->dos = dos, sp->trans = trans, sp->hall = hall, sp->nbins = nb;
    sp->e0 = s->e_lo;
    sp->de = s->bin_ev;
    sp->edge_ev = s->carrier == BM_CARRIER_ELECTRONS ? INFINITY : -INFINITY;
    sp->min_gap_outside = INFINITY;
}

size_t bm_thermal_units(const bm_thermal_setup *s)
{
    return s->grid->mesh[0];
}

static int selected(const bm_thermal_setup *s, size_t b)
{
    for (size_t i = 0; i < s->nbands; i++)
        if (s->bands[i] == b)
            return 1;
    return 0;
}

/* The refinement one cell needs: each fine step along an axis changes the
 * energy by less than kT/16 through its curvature, and the slope by less than
 * kT/2 per step (at the cell centre). */
static double refine_needed(const bm_thermal_setup *s, double e, const double g[3], double h[3][3],
                            double *depth)
{
    /* states d above the edge weigh exp(-d / kT): resolve them for the
     * temperatures that hold them within 8 kT of the edge (never below the
     * smallest kT).  Colder temperatures see them under-resolved, but weighted
     * by less than exp(-8) = 3e-4: on cosine bands the masses move by 1e-4
     * against 8 times finer sampling, where resolving to 15 kT moved them by
     * 4e-5 at 3.5 times the points (50 temperatures, 50 to 600 K). */
    double reach = 0.0;
    for (int a = 0; a < 3; a++)
        reach += 0.5 * fabs(g[a]) / (double)s->grid->mesh[a];
    double d = fabs(e - s->edge_hint_ev) - reach;   /* the cell's nearest approach */
    *depth = d;
    if (d > 20.0 * s->kt_max_ev)
        return 1.0;   /* weight below exp(-20) at every temperature: not worth refining */
    double kt = fmax(s->kt_min_ev, d / 8.0);
    double need = 1.0, q = kt / 32.0;
    for (int a = 0; a < 3; a++) {
        if (s->grid->mesh[a] == 1)
            continue;
        double step = 1.0 / (double)s->grid->mesh[a];
        /* the midpoint rule integrates the linear part exactly: the slope
         * only matters through the exponential's curvature, (g step / kT)^2 */
        need = fmax(need, 2.0 * fabs(g[a]) * step / kt);
        need = fmax(need, sqrt(0.5 * fabs(h[a][a]) * step * step / q));
    }
    return need;
}

static void bin(bm_thermal_spectrum *sp, double e, double w, const double v[3], double h[3][3])
{
    double x = (e - sp->e0) / sp->de;
    if (!(x >= 0.0) || x >= (double)(sp->nbins - 1))
        return;
    size_t i = (size_t)x;
    double t = x - (double)i, wt[2] = {w * (1.0 - t), w * t};
    double vv[6] = {v[0] * v[0], v[1] * v[1], v[2] * v[2], v[0] * v[1], v[0] * v[2], v[1] * v[2]};
    for (int m = 0; m < 2; m++) {
        sp->dos[i + m] += wt[m];
        double *tr = sp->trans + (i + m) * 6;
        for (int c = 0; c < 6; c++)
            tr[c] += wt[m] * vv[c];
        double *hl = sp->hall + (i + m) * 3;
        for (int g = 0; g < 3; g++) {
            int a = (g + 1) % 3, b = (g + 2) % 3;   /* (a, b, g) cyclic */
            hl[g] += wt[m] * (v[a] * v[b] * h[b][a] - v[a] * v[a] * h[b][b]);
        }
    }
}

void bm_thermal_accumulate(const bm_thermal_setup *s, size_t u, bm_thermal_spectrum *sp)
{
    const bm_grid *g = s->grid;
    const size_t *n = g->mesh;
    double binv[3][3];
    double rc[3][3];
    memcpy(rc, g->recip, sizeof rc);
    bm_inv3(rc, binv);
    double vol = fabs(bm_det3(rc));   /* zone volume, 1/A^3 */
    /* states per spin per A^3 carried by one coarse cell: 1 / (N_k V_cell) */
    double cell_weight = vol / (8.0 * M_PI * M_PI * M_PI) / (double)(n[0] * n[1] * n[2]);
    int electrons = s->carrier == BM_CARRIER_ELECTRONS;
    for (size_t j = 0; j < n[1]; j++)
        for (size_t l = 0; l < n[2]; l++) {
            size_t cell[3] = {u, j, l};
            for (size_t ib = 0; ib < s->nbands; ib++) {
                size_t b = s->bands[ib];
                double lo, hi;
                bm_bandinterp_cell_bounds(s->interp, b, cell, &lo, &hi);
                if (hi < s->e_lo || lo > s->e_hi)
                    continue;
                double fc[3], e, gr[3], hs[3][3];
                for (int a = 0; a < 3; a++)
                    fc[a] = ((double)cell[a] + 0.5 + g->offset[a]) / (double)n[a];
                bm_bandinterp_eval(s->interp, b, fc, &e, gr, hs);
                double depth, need = refine_needed(s, e, gr, hs, &depth);
                sp->cells++;
                int fine = (int)fmin(ceil(need), (double)BM_THERMAL_MAX_REFINE);
                /* unresolved where it counts: among the states that carry the
                 * lowest temperature's figures */
                if (need > BM_THERMAL_MAX_REFINE && depth < 5.0 * s->kt_min_ev) {
                    sp->cells_unresolved++;
                    if (need > sp->refine_needed)
                        sp->refine_needed = need;
                }
                int fa[3];
                for (int a = 0; a < 3; a++)
                    fa[a] = n[a] == 1 ? 1 : fine;
                double w = cell_weight / (double)(fa[0] * fa[1] * fa[2]);
                for (int p = 0; p < fa[0]; p++)
                    for (int q = 0; q < fa[1]; q++)
                        for (int r = 0; r < fa[2]; r++) {
                            int idx[3] = {p, q, r};
                            double f[3], ef, gf[3], v[3], hf[3][3], hb[3][3], hk[3][3];
                            for (int a = 0; a < 3; a++)
                                f[a] = ((double)cell[a] + ((double)idx[a] + 0.5) / fa[a]
                                        + g->offset[a]) / (double)n[a];
                            bm_bandinterp_eval(s->interp, b, f, &ef, gf, hf);
                            /* hbar v = dE/dk = B^-1 dE/df (f = k B^-1); the
                             * Hessian likewise, B^-1 H_f B^-T */
                            for (int c = 0; c < 3; c++)
                                v[c] = binv[c][0] * gf[0] + binv[c][1] * gf[1]
                                       + binv[c][2] * gf[2];
                            for (int c = 0; c < 3; c++)
                                for (int d = 0; d < 3; d++)
                                    hb[c][d] = binv[c][0] * hf[0][d] + binv[c][1] * hf[1][d]
                                               + binv[c][2] * hf[2][d];
                            for (int c = 0; c < 3; c++)
                                for (int d = 0; d < 3; d++)
                                    hk[c][d] = hb[c][0] * binv[d][0] + hb[c][1] * binv[d][1]
                                               + hb[c][2] * binv[d][2];
                            bin(sp, ef, w, v, hk);
                            sp->points++;
                            if (electrons ? ef < sp->edge_ev : ef > sp->edge_ev) {
                                sp->edge_ev = ef;
                                memcpy(sp->edge_f, f, sizeof f);
                                sp->edge_band = b;
                            }
                        }
                /* a band outside the selection coming close inside the window */
                for (int side = -1; side <= 1; side += 2) {
                    if ((side < 0 && b == 0) || (side > 0 && b + 1 >= g->nbands))
                        continue;
                    size_t o = (size_t)((long)b + side);
                    if (selected(s, o) || !bm_grid_same_channel(g, b, o))
                        continue;
                    double eo;
                    bm_bandinterp_eval(s->interp, o, fc, &eo, NULL, NULL);
                    if (fabs(eo - e) < sp->min_gap_outside) {
                        sp->min_gap_outside = fabs(eo - e);
                        sp->gap_band = o;
                    }
                }
            }
        }
}

void bm_thermal_merge(const bm_thermal_setup *s, bm_thermal_spectrum *into,
                      const bm_thermal_spectrum *part)
{
    for (size_t i = 0; i < into->nbins; i++)
        into->dos[i] += part->dos[i];
    for (size_t i = 0; i < 6 * into->nbins; i++)
        into->trans[i] += part->trans[i];
    for (size_t i = 0; i < 3 * into->nbins; i++)
        into->hall[i] += part->hall[i];
    /* electrons keep the lowest sample, holes the highest */
    int better = s->carrier == BM_CARRIER_ELECTRONS ? part->edge_ev < into->edge_ev
                                                    : part->edge_ev > into->edge_ev;
    if (better) {
        into->edge_ev = part->edge_ev;
        memcpy(into->edge_f, part->edge_f, sizeof into->edge_f);
        into->edge_band = part->edge_band;
    }
    into->cells += part->cells;
    into->cells_unresolved += part->cells_unresolved;
    into->points += part->points;
    into->refine_needed = fmax(into->refine_needed, part->refine_needed);
    if (part->min_gap_outside < into->min_gap_outside) {
        into->min_gap_outside = part->min_gap_outside;
        into->gap_band = part->gap_band;
    }
}

static void sym_from6(const double t[6], double m[3][3])
{
    m[0][0] = t[0], m[1][1] = t[1], m[2][2] = t[2];
    m[0][1] = m[1][0] = t[3];
    m[0][2] = m[2][0] = t[4];
    m[1][2] = m[2][1] = t[5];
}

int bm_thermal_symmetrize(bm_thermal_spectrum *sp, const double (*rot)[3][3], size_t nrot)
{
    sp->symmetry_ops = nrot ? nrot : 1;
    sp->hall_symmetrized = 1;
    if (nrot < 2)
        return 1;
    /* the Hall sums for a field along g mix only when some mean of
     * R_ga R_gb (a != b) survives */
    double w[3][3] = { { 0 } };   /* w[g][a]: mean of R_ga^2 */
    int hall_ok = 1;
    for (int g = 0; g < 3; g++)
        for (int a = 0; a < 3; a++) {
            for (int b = a + 1; b < 3; b++) {
                double cross = 0.0;
                for (size_t r = 0; r < nrot; r++)
                    cross += rot[r][g][a] * rot[r][g][b];
                hall_ok &= fabs(cross) < 1e-9 * (double)nrot;
            }
            for (size_t r = 0; r < nrot; r++)
                w[g][a] += rot[r][g][a] * rot[r][g][a] / (double)nrot;
        }
    for (size_t i = 0; i < sp->nbins; i++) {
        double *tr = sp->trans + i * 6, t[3][3], avg[3][3] = { { 0 } };
        if (sp->dos[i] == 0.0)
            continue;
        sym_from6(tr, t);
        for (size_t r = 0; r < nrot; r++)
            for (int a = 0; a < 3; a++)
                for (int b = a; b < 3; b++) {
                    double v = 0.0;
                    for (int c = 0; c < 3; c++)
                        for (int d = 0; d < 3; d++)
                            v += rot[r][a][c] * t[c][d] * rot[r][b][d];
                    avg[a][b] += v / (double)nrot;
                }
        tr[0] = avg[0][0], tr[1] = avg[1][1], tr[2] = avg[2][2];
        tr[3] = avg[0][1], tr[4] = avg[0][2], tr[5] = avg[1][2];
        if (hall_ok) {
            double *hl = sp->hall + i * 3, h[3];
            for (int g = 0; g < 3; g++)
                h[g] = w[g][0] * hl[0] + w[g][1] * hl[1] + w[g][2] * hl[2];
            memcpy(hl, h, sizeof h);
        }
    }
    sp->hall_symmetrized = hall_ok;
    return hall_ok;
}

void bm_thermal_polish_edge(const bm_thermal_setup *s, bm_thermal_spectrum *sp)
{
    if (!isfinite(sp->edge_ev))
        return;
    double f[3], e, g[3], h[3][3];
    memcpy(f, sp->edge_f, sizeof f);
    int dims[3], nd = 0;
    for (int a = 0; a < 3; a++)
        if (s->grid->mesh[a] > 1)
            dims[nd++] = a;
    for (int it = 0; it < 30; it++) {
        bm_bandinterp_eval(s->interp, sp->edge_band, f, &e, g, h);
        if (s->carrier == BM_CARRIER_ELECTRONS ? e <= sp->edge_ev : e >= sp->edge_ev) {
            sp->edge_ev = e;
            memcpy(sp->edge_f, f, sizeof f);
        }
        double hh[3][3] = {{0}}, inv[3][3];
        for (int i = 0; i < 3; i++)
            hh[i][i] = 1.0;
        for (int i = 0; i < nd; i++)
            for (int j = 0; j < nd; j++)
                hh[i][j] = h[dims[i]][dims[j]];
        if (bm_inv3(hh, inv) != 0)
            break;
        double step[3] = {0}, big = 0.0;
        for (int i = 0; i < nd; i++) {
            for (int j = 0; j < nd; j++)
                step[i] -= inv[i][j] * g[dims[j]];
            big = fmax(big, fabs(step[i]) * (double)s->grid->mesh[dims[i]]);
        }
        if (big > 1.0)   /* Newton left the cell: the sample stays the edge */
            break;
        for (int i = 0; i < nd; i++)
            f[dims[i]] += step[i];
        if (big < 1e-10)
            break;
    }
    bm_bandinterp_eval(s->interp, sp->edge_band, f, &e, NULL, NULL);
    if (s->carrier == BM_CARRIER_ELECTRONS ? e <= sp->edge_ev : e >= sp->edge_ev) {
        sp->edge_ev = e;
        memcpy(sp->edge_f, f, sizeof f);
    }
    /* reported as its image with coordinates in [-1/2, 1/2) */
    for (int a = 0; a < 3; a++) {
        sp->edge_f[a] -= floor(sp->edge_f[a] + 0.5);
        if (fabs(sp->edge_f[a]) < 1e-12)
            sp->edge_f[a] = 0.0;
    }
}

/* Occupation of a carrier state at energy e: electrons f, holes 1 - f; and
 * -df/dE (the same for both). */
static double occupation(bm_carrier c, double e, double mu, double kt)
{
    double x = (e - mu) / kt;
    return c == BM_CARRIER_ELECTRONS ? 1.0 / (1.0 + exp(x)) : 1.0 / (1.0 + exp(-x));
}

static double minus_dfde(double e, double mu, double kt)
{
    double x = fabs(e - mu) / kt, ex = exp(-x);
    return ex / ((1.0 + ex) * (1.0 + ex) * kt);
}

/* Beyond this many kT from the chemical potential (or the edge) a state's
 * weight is below exp(-45) = 3e-20: the sums skip it, or count it as fully
 * occupied, with no effect a double can show on any result. */
#define THERMAL_REACH_KT 45.0

/* The bins [*lo, *hi) within reach kT of energy e (clamped to the axis). */
static void bins_near(const bm_thermal_spectrum *sp, double e, double reach, size_t *lo,
                      size_t *hi)
{
    double a = floor((e - reach - sp->e0) / sp->de), b = ceil((e + reach - sp->e0) / sp->de) + 1.0;
    double n = (double)sp->nbins;
    *lo = (size_t)fmin(fmax(a, 0.0), n);
    *hi = (size_t)fmin(fmax(b, 0.0), n);
}

/* Carriers per A^3 at chemical potential mu (spin included); below[i]: the
 * states of bins 0..i-1, so that fully occupied bins cost nothing. */
static double carriers(const bm_thermal_spectrum *sp, const double *below, bm_carrier c,
                       double mu, double kt, double gs)
{
    size_t lo, hi;
    bins_near(sp, mu, THERMAL_REACH_KT * kt, &lo, &hi);
    /* electrons fill the states below the reach, holes those above */
    double n = c == BM_CARRIER_ELECTRONS ? below[lo] : below[sp->nbins] - below[hi];
    for (size_t i = lo; i < hi; i++)
        if (sp->dos[i] != 0.0)
            n += sp->dos[i] * occupation(c, sp->e0 + (double)i * sp->de, mu, kt);
    return gs * n;
}

bm_status bm_thermal_at(const bm_thermal_spectrum *sp, bm_carrier carrier, double temperature_k,
                        int mode_density, double density_cm3, double fermi_level_ev,
                        double gs, double spins, bm_thermal_point *out, bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    out->temperature_k = temperature_k;
    double kt = BM_KB_EV * temperature_k;
    if (!(kt > 0.0))
        return bm_fail(err, BM_EINVAL, "temperature %g K: must be above 0 K", temperature_k);
    double *below = malloc((sp->nbins + 1) * sizeof *below);
    if (!below)
        return bm_fail(err, BM_ENOMEM, "thermal sums: out of memory");
    below[0] = 0.0;
    for (size_t i = 0; i < sp->nbins; i++)
        below[i + 1] = below[i] + sp->dos[i];
    double mu = fermi_level_ev;
    if (mode_density) {
        /* bisection on the chemical potential: the carrier count is monotonic */
        double target = density_cm3 * 1e-24, lo = sp->e0 - 60.0 * kt,
               hi = sp->e0 + (double)(sp->nbins - 1) * sp->de + 60.0 * kt;
        int up = carrier == BM_CARRIER_ELECTRONS;   /* count grows with mu */
        double nlo = carriers(sp, below, carrier, up ? lo : hi, kt, gs);
        double nhi = carriers(sp, below, carrier, up ? hi : lo, kt, gs);
        if (!(target > nlo) || !(target < nhi)) {
            free(below);
            return bm_fail(err, BM_EINVAL,
                           "density %g cm^-3 at %g K: outside what the bands given can hold "
                           "(%.3g to %.3g cm^-3 with the chemical potential inside the window)",
                           density_cm3, temperature_k, nlo * 1e24, nhi * 1e24);
        }
        for (int it = 0; it < 200 && hi - lo > 1e-12; it++) {
            double mid = 0.5 * (lo + hi), nm = carriers(sp, below, carrier, mid, kt, gs);
            if ((nm < target) == up)
                lo = mid;
            else
                hi = mid;
        }
        mu = 0.5 * (lo + hi);
    }
    out->fermi_level_ev = mu;
    double n = carriers(sp, below, carrier, mu, kt, gs);
    free(below);
    out->density_cm3 = n * 1e24;

    /* N_c (N_v): states weighted by exp(-|E - edge| / kT); m from
     * N = g_s (2 pi m kT / h^2)^(3/2) */
    double nc = 0.0, k0[6] = {0}, k1[6] = {0}, kh[3] = {0};
    size_t elo, ehi, mlo, mhi;
    bins_near(sp, sp->edge_ev, THERMAL_REACH_KT * kt, &elo, &ehi);
    bins_near(sp, mu, THERMAL_REACH_KT * kt, &mlo, &mhi);
    for (size_t i = elo; i < ehi; i++)
        if (sp->dos[i] != 0.0)
            nc += sp->dos[i] * exp(-fabs(sp->e0 + (double)i * sp->de - sp->edge_ev) / kt);
    for (size_t i = mlo; i < mhi; i++) {
        if (sp->dos[i] == 0.0)
            continue;
        double e = sp->e0 + (double)i * sp->de;
        double w = minus_dfde(e, mu, kt);
        for (int c = 0; c < 6; c++) {
            k0[c] += sp->trans[i * 6 + c] * w;
            k1[c] += sp->trans[i * 6 + c] * w * (e - mu);
        }
        for (int c = 0; c < 3; c++)
            kh[c] += sp->hall[i * 3 + c] * w;
    }
    nc *= gs;
    out->edge_density_cm3 = nc * 1e24;
    /* (N / spins)^(2/3) = 2 pi m kT / h^2 = m kT / (2 pi hbar^2) */
    out->dos_mass_me = pow(nc / spins, 2.0 / 3.0) * 2.0 * M_PI * BM_HBAR2_OVER_ME_EV_A2 / kt;

    /* sigma / tau = g_s e^2 / hbar^2 K0;  m_c = e^2 n tau sigma^-1 = hbar^2 n (g_s K0)^-1 */
    double m0[3][3], m1[3][3], inv[3][3];
    sym_from6(k0, m0);
    sym_from6(k1, m1);
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            m0[i][j] *= gs, m1[i][j] *= gs;
    /* a 2D sheet has no velocity along its normal: invert in the plane only */
    int dims = m0[2][2] > 1e-12 * (m0[0][0] + m0[1][1]) ? 3 : 2;
    double ev[3], evec[3][3];
    if (bm_symeig(m0, dims, ev, evec) != 0 || !(ev[0] > 0.0))
        return bm_fail(err, BM_EINVAL,
                       "no carrier velocity at %g K: the window holds no dispersive states",
                       temperature_k);
    memset(inv, 0, sizeof inv);
    for (int i = 0; i < dims; i++)
        for (int j = 0; j < dims; j++)
            for (int m = 0; m < dims; m++)
                inv[i][j] += evec[m][i] * evec[m][j] / ev[m];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            out->cond_tensor_me[i][j] = BM_HBAR2_OVER_ME_EV_A2 * n * inv[i][j];
    for (int m = 0; m < 3; m++) {
        out->cond_principal_me[m] = m < dims ? BM_HBAR2_OVER_ME_EV_A2 * n / ev[m] : INFINITY;
        for (int i = 0; i < 3; i++)
            out->cond_axes[m][i] = m < dims ? evec[m][i] : (i == 2);
    }
    /* Seebeck S = -(1 / eT) K0^-1 K1: with energies in eV, -(K0^-1 K1) / T in V/K */
    double s[3][3] = {{0}};
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            for (int m = 0; m < 3; m++)
                s[i][j] -= inv[i][m] * m1[m][j] / temperature_k * 1e6;
    memcpy(out->seebeck_tensor_uv_k, s, sizeof s);
    /* Hall factor, weak field along g: R_H = sigma_abg / (sigma_aa sigma_bb)
     * = K_H / (e K0_aa K0_bb) (the g_s and tau cancel), r_H = -/+ R_H n e */
    double sign = carrier == BM_CARRIER_ELECTRONS ? -1.0 : 1.0;
    for (int g = 0; g < 3; g++) {
        int a = (g + 1) % 3, b = (g + 2) % 3;
        double den = k0[a] * k0[b];
        out->hall_factor[g] = den > 1e-300 && !(dims == 2 && g != 2)
                                  ? sign * n * kh[g] / (gs * den) : NAN;   /* sums per spin */
    }
    double ss[3][3];
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            ss[i][j] = 0.5 * (s[i][j] + s[j][i]);
    double sev[3], svec[3][3];
    if (bm_symeig(ss, dims, sev, svec) == 0)
        for (int m = 0; m < 3; m++)
            out->seebeck_principal_uv_k[m] = m < dims ? sev[m] : NAN;
    return BM_OK;
}

static void sort3(double *v, int n)
{
    for (int i = 0; i < n; i++)
        for (int j = i + 1; j < n; j++)
            if (v[j] < v[i]) {
                double t = v[i];
                v[i] = v[j], v[j] = t;
            }
}

bm_status bm_thermal_check_edge(const bm_thermal_setup *s, const bm_thermal_spectrum *sp,
                                bm_thermal_edge_check *out, bm_errbuf *err)
{
    memset(out, 0, sizeof *out);
    const bm_grid *g = s->grid;
    int dims = 0;
    for (int a = 0; a < 3; a++)
        dims += g->mesh[a] > 1;
    out->dims = dims;
    if (!isfinite(sp->edge_ev) || dims < 2)
        return BM_OK;
    /* the interpolant's Hessian, Cartesian: H_k = B^-1 H_f B^-T */
    double e, gr[3], hf[3][3], rc[3][3], binv[3][3], hk[3][3] = {{0}};
    bm_bandinterp_eval(s->interp, sp->edge_band, sp->edge_f, &e, gr, hf);
    memcpy(rc, g->recip, sizeof rc);
    if (bm_inv3(rc, binv) != 0)
        return BM_OK;
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++)
            for (int a = 0; a < 3; a++)
                for (int b = 0; b < 3; b++)
                    hk[i][j] += binv[i][a] * hf[a][b] * binv[j][b];
    if (dims == 2) {   /* a sheet: the plane of b1 and b2 (b3 is its normal) */
        double p[3][3], hp[3][3] = {{0}};
        memcpy(p[0], g->recip[0], sizeof p[0]);
        double n0 = bm_norm3(p[0]);
        for (int i = 0; i < 3; i++)
            p[0][i] /= n0;
        memcpy(p[2], g->recip[2], sizeof p[2]);
        double n2 = bm_norm3(p[2]);
        for (int i = 0; i < 3; i++)
            p[2][i] /= n2;
        bm_cross3(p[2], p[0], p[1]);
        for (int i = 0; i < 2; i++)
            for (int j = 0; j < 2; j++)
                for (int a = 0; a < 3; a++)
                    for (int b = 0; b < 3; b++)
                        hp[i][j] += p[i][a] * hk[a][b] * p[j][b];
        memcpy(hk, hp, sizeof hk);
    }
    double ev[3], evec[3][3];
    if (bm_symeig(hk, dims, ev, evec) != 0)
        return BM_OK;
    for (int m = 0; m < dims; m++)
        out->interp_masses_me[m] = fabs(BM_HBAR2_OVER_ME_EV_A2 / ev[m]);
    sort3(out->interp_masses_me, dims);

    bm_mass_tensor *t = NULL;
    size_t nt = 0;
    bm_fit_options opt = { 0.0, 0.0, 0.0 };
    bm_status st = bm_grid_mass_tensors(g, sp->edge_band,
                                        s->carrier == BM_CARRIER_ELECTRONS ? BM_SEARCH_MINIMUM
                                                                           : BM_SEARCH_MAXIMUM,
                                        NULL, &opt, &t, &nt, err);
    if (st != BM_OK)
        return st;
    if (nt > 0 && !t[0].degenerate && t[0].dims == dims) {
        int fine = 1;
        for (int m = 0; m < dims; m++) {
            out->fit_masses_me[m] = fabs(t[0].masses[m]);
            out->fit_errors_me[m] = t[0].mass_errors[m];
            fine = fine && isfinite(t[0].masses[m]) && t[0].masses[m] != 0.0;
        }
        sort3(out->fit_masses_me, dims);
        /* the errors follow their masses loosely: keep the largest */
        double worst = 0.0;
        for (int m = 0; m < dims; m++)
            worst = fmax(worst, isfinite(out->fit_errors_me[m]) ? out->fit_errors_me[m] : 0.0);
        for (int m = 0; m < dims; m++)
            out->fit_errors_me[m] = worst;
        if (fine) {
            /* the geometric mean carries the DOS mass, the harmonic mean the
             * conductivity mass: the worse of the two */
            double pi = 1.0, pf = 1.0, hi = 0.0, hf2 = 0.0;
            for (int m = 0; m < dims; m++) {
                pi *= out->interp_masses_me[m], pf *= out->fit_masses_me[m];
                hi += 1.0 / out->interp_masses_me[m], hf2 += 1.0 / out->fit_masses_me[m];
            }
            out->relative = fmax(fabs(pow(pi / pf, 1.0 / dims) - 1.0), fabs(hf2 / hi - 1.0));
            out->assessed = 1;
        }
    }
    bm_mass_tensors_free(t, nt);
    return BM_OK;
}
