/* thermal-mass.c: operation "thermal-mass" -- density-of-states and
 * conductivity masses and the Seebeck coefficient of the whole band at each
 * temperature, from a band grid (core/bm-thermal.h).  The zone is sampled
 * once on a GLib thread pool, one work unit per coarse slab, each into its
 * own spectrum; the spectra are merged in unit order, so the answer has the
 * same bits for any thread count. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-error-private.h"
#include "grid-input.h"
#include "bm-parallel.h"
#include "band-select.h"
#include "bm-crystal.h"
#include "bm-thermal.h"
#include "bm-units.h"

static const BmParam params[] = {
    { "grid", BM_VALUE_STRING, FALSE, NULL,
      "band grid document (JSON, format bandmass-grid-1), or a grid handed over in memory",
      .unit = NULL },
    { "bands", BM_VALUE_STRING | BM_VALUE_ARRAY, TRUE, NULL,
      "\"conduction\" or \"valence\" (every band above or below the grid's gap), or a list "
      "of band indices or names that hold the carriers", .unit = NULL },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, NULL, "temperature", .unit = "K",
      .lower = BM_GT(0), .upper = BM_LE(1e5) },
    { "temperatures_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "list of temperatures", .unit = "K", .lower = BM_GT(0), .upper = BM_LE(1e5) },
    { "density_cm3", BM_VALUE_NUMBER, FALSE, NULL,
      "carrier density (electrons for conduction bands, holes for valence bands) matched by "
      "the chemical potential at each temperature; give this or fermi_level_ev",
      .unit = "cm^-3", .lower = BM_GT(0) },
    { "fermi_level_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "chemical potential (the grid's energy zero); give this or density_cm3", .unit = "eV" },
    { "carriers", BM_VALUE_STRING, FALSE, NULL,
      "electrons or holes, for a list of bands (default: electrons when the listed bands "
      "lie above the grid's other bands on average, holes when below)", .unit = NULL },
    { "threads", BM_VALUE_INTEGER, FALSE, "0",
      "threads that sample the zone (0: one per core); the answer is the same for any count",
      .unit = NULL, .lower = BM_GE(0), .upper = BM_LE(256) },
    { "spin_degeneracy", BM_VALUE_INTEGER, FALSE, "2",
      "states per k-point and band: 2, or 1 for the bands of a spin-polarised grid (the DOS "
      "mass is then defined for the spin states the bands given cover: one channel or both)",
      .unit = NULL, .lower = BM_GE(1), .upper = BM_LE(2) },
    BM_PARAM_END
};

static const BmField response[] = {
    { "carriers", NULL, TRUE, "electrons (conduction bands) or holes (valence bands)" },
    { "bands", NULL, TRUE, "the bands summed over (names, or indices as text)" },
    { "edge_ev", "eV", TRUE,
      "the band edge: lowest conduction or highest valence energy of the interpolated bands" },
    { "edge_k_fractional", NULL, TRUE, "where the edge lies, in the grid's reciprocal basis" },
    { "points", NULL, TRUE,
      "one per temperature: temperature_k, fermi_level_ev, density_cm3, edge_density_cm3, "
      "dos_mass_me, conductivity_mass_tensor_me, conductivity_principal_masses_me, "
      "conductivity_principal_axes, seebeck_uv_per_k (principal values), "
      "seebeck_tensor_uv_per_k, hall_factor (r_H = n e |R_H|, the carrier density over "
      "the Hall density 1 / (e |R_H|), for a weak field along x, y, z)" },
    { "sampling", NULL, TRUE,
      "how the zone was sampled: cells (coarse cells in the window), points (fine points), "
      "largest_refinement, window_ev [low, high], bin_ev, symmetry_operations (the "
      "rotations of the lattice the mesh energies of these bands are invariant under, to "
      "0.1 meV: the tensors are averaged over them; 1: none), hall_factor_symmetrized "
      "(the Hall factors too: false where the group mixes the field axes)" },
    { "edge_check", NULL, TRUE,
      "the independent check near the edge: interpolant_masses_me (the interpolated band's "
      "principal masses at the edge, ascending |m|), mass_tensor_masses_me and "
      "mass_tensor_errors_me (the crossing-aware local fits of mass-tensor on the same "
      "band), relative_difference (the larger of the geometric-mean and harmonic-mean "
      "differences: the error the lowest temperatures inherit), or null where the edge is degenerate" },
    { "source", NULL, TRUE, "where the band data came from" },
    BM_FIELD_END
};

/* The grid's gap: the highest b with max(E_b) < min(E_b+1) (several: the one
 * holding 0 eV, else the widest).  Returns the index of the first band above
 * it, or 0 when there is none. */
static size_t find_gap(const bm_grid *g, char *note, size_t cap)
{
    size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2], best = 0, count = 0;
    double best_width = -1.0;
    int best_zero = 0;
    note[0] = '\0';
    size_t nb = g->channel_bands ? g->channel_bands : g->nbands;
    for (size_t b = 0; b + 1 < nb; b++) {
        double top = -INFINITY, bottom = INFINITY;
        for (size_t m = 0; m < npt; m++) {
            top = fmax(top, g->energies[b * npt + m]);
            bottom = fmin(bottom, g->energies[(b + 1) * npt + m]);
        }
        if (!(bottom > top))
            continue;
        count++;
        int zero = top <= 1e-6 && bottom > 1e-6;
        if ((zero && !best_zero) || (zero == best_zero && bottom - top > best_width)) {
            best = b + 1, best_width = bottom - top, best_zero = zero;
        }
    }
    if (count > 1)
        g_snprintf(note, cap, "the grid has %zu gaps between bands; the one above band %zu "
                   "was taken (%s): list the bands to choose another", count, best - 1,
                   best_zero ? "it holds 0 eV" : "the widest");
    return best;
}

typedef struct {
    const bm_thermal_setup *setup;
    bm_thermal_spectrum *parts;
    size_t first;             /* the batch's first unit */
} pool_job;

static void run_unit(gsize i, gpointer data)
{
    pool_job *job = data;
    bm_thermal_accumulate(job->setup, job->first + i, &job->parts[i]);
}

/* Units are sampled a batch at a time, each into its own zeroed spectrum,
 * and merged in unit order: the same bits for any thread count, and memory
 * bounded by the batch, not by the mesh. */
#define UNITS_PER_BATCH 8

/* The edge check's tolerance (relative): the interpolated band's masses at
 * the edge differ from the local fits' by a few per cent on a mesh that
 * resolves the valley (silicon, 24^3 and 32^3: 2.3 % and 2.2 %; 16^3: 7 %). */
#define EDGE_TOLERANCE 0.05

/* Mesh energies that a rotation maps onto each other to within this count
 * as symmetric (DFT codes symmetrise far better; a real splitting is larger) */
#define SYMMETRY_TOL_EV 1e-4

static gboolean sample(const bm_thermal_setup *s, guint want_threads, bm_thermal_spectrum *out,
                       GError **error)
{
    bm_errbuf err = { BM_OK, "" };
    if (bm_thermal_spectrum_init(out, s, &err) != BM_OK) {
        bm_error_from_core(error, &err, "thermal-mass");
        return FALSE;
    }
    size_t nu = bm_thermal_units(s);
    bm_thermal_spectrum parts[UNITS_PER_BATCH];
    memset(parts, 0, sizeof parts);
    gboolean ok = TRUE;
    for (size_t u = 0; ok && u < UNITS_PER_BATCH; u++)
        ok = bm_thermal_spectrum_init(&parts[u], s, &err) == BM_OK;
    pool_job job = { s, parts, 0 };
    guint threads = want_threads ? want_threads : g_get_num_processors();
    threads = MAX(1, MIN(threads, UNITS_PER_BATCH));
    for (size_t first = 0; ok && first < nu; first += UNITS_PER_BATCH) {
        size_t count = MIN(UNITS_PER_BATCH, nu - first);
        job.first = first;
        bm_parallel_for(count, threads, run_unit, &job);
        for (size_t u = 0; u < count; u++) {
            bm_thermal_merge(s, out, &parts[u]);
            bm_thermal_spectrum_reset(&parts[u], s);
        }
    }
    for (size_t u = 0; u < UNITS_PER_BATCH; u++)
        bm_thermal_spectrum_clear(&parts[u]);
    if (!ok) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "thermal-mass: out of memory for energy axes of %zu bins", out->nbins);
        bm_thermal_spectrum_clear(out);
        return FALSE;
    }
    bm_thermal_polish_edge(s, out);
    /* the data's own symmetry restores what the interpolant loses of it
     * between mesh points */
    double rot[BM_CRYSTAL_MAX_ROTATIONS][3][3];
    size_t nrot = 0;
    if (bm_grid_rotations(s->grid, s->bands, s->nbands, SYMMETRY_TOL_EV, rot, &nrot, &err)
        != BM_OK)
        nrot = 0;
    bm_thermal_symmetrize(out, (const double (*)[3][3])rot, nrot);
    return TRUE;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    gboolean one_t = json_object_has_member(request, "temperature_k");
    gboolean list_t = json_object_has_member(request, "temperatures_k");
    if (one_t == list_t) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"temperature_k\" or \"temperatures_k\"");
        return NULL;
    }
    gboolean by_density = json_object_has_member(request, "density_cm3");
    if (by_density == json_object_has_member(request, "fermi_level_ev")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give exactly one of \"density_cm3\" or \"fermi_level_ev\"");
        return NULL;
    }
    gsize nt = 0;
    g_autofree double *temps = bm_json_numbers(request, list_t ? "temperatures_k" : "temperature_k",
                                               NULL, &nt, error);
    if (!temps)
        return NULL;
    double density = 0.0, mu = 0.0, gs = 2.0;
    if (by_density ? !bm_json_number(request, "density_cm3", NULL, &density, error)
                   : !bm_json_number(request, "fermi_level_ev", NULL, &mu, error))
        return NULL;
    guint threads = json_object_has_member(request, "threads")
        ? (guint)json_object_get_int_member(request, "threads") : 0;
    if (json_object_has_member(request, "spin_degeneracy"))
        gs = (double)json_object_get_int_member(request, "spin_degeneracy");

    BmBandGrid *owned = NULL;
    const BmBandGrid *grid = bm_grid_input(request, inputs, &owned, error);
    if (!grid)
        return NULL;
    const bm_grid *g = &grid->grid;
    const char *const *names = (const char *const *)grid->band_names;
    JsonObject *resp = NULL;
    bm_bandinterp *interp = NULL;
    g_autofree size_t *bands = NULL;
    size_t nb = 0;
    bm_carrier carrier = BM_CARRIER_ELECTRONS;
    bm_warnings w = {0};

    /* the bands: a side of the gap, or a list */
    JsonNode *bn = json_object_get_member(request, "bands");
    if (JSON_NODE_HOLDS_VALUE(bn)) {
        const char *side = json_node_get_string(bn);
        gboolean cond = side && !strcmp(side, "conduction"), val = side && !strcmp(side, "valence");
        if (!cond && !val) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"bands\": \"%s\" is not \"conduction\" or \"valence\" "
                        "(or give a list of bands)", side ? side : "");
            goto out;
        }
        char note[256];
        size_t first = find_gap(g, note, sizeof note);
        if (first == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: no gap between bands anywhere on the mesh: list the bands that "
                        "hold the carriers in \"bands\"", grid->source);
            goto out;
        }
        if (note[0])
            bm_warn(&w, BM_WARN_FERMI_OUTSIDE_BANDS, "%s", note);
        size_t chan = g->channel_bands ? g->channel_bands : g->nbands;
        carrier = cond ? BM_CARRIER_ELECTRONS : BM_CARRIER_HOLES;
        /* the same side of the gap in every spin channel (the gap is found in
         * the first; a spin-polarised grid lists its channels one after the other) */
        size_t per = cond ? chan - first : first, channels = g->nbands / chan;
        nb = per * channels;
        bands = g_new(size_t, nb);
        for (size_t c = 0; c < channels; c++)
            for (size_t i = 0; i < per; i++)
                bands[c * per + i] = c * chan + (cond ? first + i : i);
    } else {
        JsonArray *arr = json_node_get_array(bn);
        nb = json_array_get_length(arr);
        if (nb == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"bands\": empty list");
            goto out;
        }
        bands = g_new(size_t, nb);
        for (size_t i = 0; i < nb; i++) {
            if (!bm_band_select_node(json_array_get_element(arr, (guint)i), names, NULL,
                                     g->nbands, grid->source, &bands[i], error))
                goto out;
            for (size_t j = 0; j < i; j++)
                if (bands[j] == bands[i]) {
                    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                                "request: key \"bands\": band %zu listed twice", bands[i]);
                    goto out;
                }
        }
        /* a listed set is conduction-like when it lies above the rest of its channel */
        size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
        double mean_sel = 0.0, mean_all = 0.0;
        for (size_t i = 0; i < nb; i++)
            for (size_t m = 0; m < npt; m++)
                mean_sel += g->energies[bands[i] * npt + m];
        for (size_t m = 0; m < g->nbands * npt; m++)
            mean_all += g->energies[m];
        carrier = mean_sel / (double)nb >= mean_all / (double)g->nbands ? BM_CARRIER_ELECTRONS
                                                                         : BM_CARRIER_HOLES;
        if (nb == g->nbands)
            carrier = BM_CARRIER_ELECTRONS;
        const char *cs = json_object_has_member(request, "carriers")
            ? json_object_get_string_member(request, "carriers") : NULL;
        if (cs && strcmp(cs, "electrons") && strcmp(cs, "holes")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"carriers\": \"%s\" is not \"electrons\" or \"holes\"", cs);
            goto out;
        }
        if (cs)
            carrier = strcmp(cs, "holes") ? BM_CARRIER_ELECTRONS : BM_CARRIER_HOLES;
    }

    /* the spin states the selection covers: the DOS mass is defined for them */
    double spins = gs;
    if (g->channel_bands) {
        int seen[2] = {0, 0};
        for (size_t i = 0; i < nb; i++)
            seen[bands[i] / g->channel_bands ? 1 : 0] = 1;
        spins = gs * (seen[0] + seen[1]);
    }
    size_t band_lo = bands[0], band_hi = bands[0];
    for (size_t i = 1; i < nb; i++)
        band_lo = bands[i] < band_lo ? bands[i] : band_lo, band_hi = bands[i] > band_hi ? bands[i] : band_hi;
    interp = bm_bandinterp_new_bands(g, BM_BANDINTERP_PAIR_GAP_EV, band_lo, band_hi);
    if (!interp) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "thermal-mass: out of memory");
        goto out;
    }
    double tmin = temps[0], tmax = temps[0];
    for (gsize i = 1; i < nt; i++)
        tmin = fmin(tmin, temps[i]), tmax = fmax(tmax, temps[i]);
    /* the mesh extreme of the selected bands anchors the window */
    size_t npt = g->mesh[0] * g->mesh[1] * g->mesh[2];
    double edge_mesh = carrier == BM_CARRIER_ELECTRONS ? INFINITY : -INFINITY;
    for (size_t i = 0; i < nb; i++)
        for (size_t m = 0; m < npt; m++) {
            double e = g->energies[bands[i] * npt + m];
            edge_mesh = carrier == BM_CARRIER_ELECTRONS ? fmin(edge_mesh, e) : fmax(edge_mesh, e);
        }
    double kt_max = BM_KB_EV * tmax, kt_min = BM_KB_EV * tmin;
    double width = 25.0 * kt_max, margin = 0.05 + 3.0 * BM_BANDINTERP_PAIR_GAP_EV;
    if (!by_density && carrier == BM_CARRIER_ELECTRONS)
        width = fmax(width, mu - edge_mesh + 30.0 * kt_max);
    if (!by_density && carrier == BM_CARRIER_HOLES)
        width = fmax(width, edge_mesh - mu + 30.0 * kt_max);

    bm_thermal_spectrum sp = {0};
    bm_thermal_point *pts = g_new0(bm_thermal_point, nt);
    bm_thermal_setup s = { g, interp, bands, nb, carrier, 0, 0, 0, kt_min, kt_max, edge_mesh };
    for (int attempt = 0;; attempt++) {
        s.e_lo = carrier == BM_CARRIER_ELECTRONS ? edge_mesh - margin : edge_mesh - width;
        s.e_hi = carrier == BM_CARRIER_ELECTRONS ? edge_mesh + width : edge_mesh + margin;
        /* kT/40 at the lowest temperature, on an axis of at most BM_THERMAL_MAX_BINS */
        s.bin_ev = fmax(fmin(kt_min / 40.0, (s.e_hi - s.e_lo) / 64.0),
                        (s.e_hi - s.e_lo) / BM_THERMAL_MAX_BINS);
        if (!sample(&s, threads, &sp, error)) {
            g_free(pts);
            goto out;
        }
        gboolean wider = FALSE;
        for (gsize i = 0; i < nt; i++) {
            bm_errbuf err = { BM_OK, "" };
            if (bm_thermal_at(&sp, carrier, temps[i], by_density, density, mu, gs, spins, &pts[i], &err)
                != BM_OK) {
                g_autofree char *where = list_t
                    ? g_strdup_printf("request: element %zu of \"temperatures_k\"", (size_t)i)
                    : g_strdup("request: key \"temperature_k\"");
                bm_error_from_core(error, &err, where);
                bm_thermal_spectrum_clear(&sp);
                g_free(pts);
                goto out;
            }
            double kt = BM_KB_EV * temps[i], depth = carrier == BM_CARRIER_ELECTRONS
                ? s.e_hi - pts[i].fermi_level_ev : pts[i].fermi_level_ev - s.e_lo;
            if (depth < 20.0 * kt)
                wider = TRUE;
        }
        if (!wider || attempt == 3)
            break;
        /* a degenerate density puts the chemical potential deep in the band */
        bm_thermal_spectrum_clear(&sp);
        width *= 2.0;
    }

    resp = json_object_new();
    json_object_set_string_member(resp, "carriers",
                                  carrier == BM_CARRIER_ELECTRONS ? "electrons" : "holes");
    JsonArray *ba = json_array_new();
    for (size_t i = 0; i < nb; i++) {
        if (names)
            json_array_add_string_element(ba, names[bands[i]]);
        else {
            g_autofree char *t = g_strdup_printf("%zu", bands[i]);
            json_array_add_string_element(ba, t);
        }
    }
    json_object_set_array_member(resp, "bands", ba);
    bm_json_set_number(resp, "edge_ev", sp.edge_ev);
    bm_json_set_vec3(resp, "edge_k_fractional", sp.edge_f);
    JsonArray *pa = json_array_new();
    double hi_band = -INFINITY, lo_band = INFINITY;
    for (size_t i = 0; i < nb; i++)
        for (size_t m = 0; m < npt; m++) {
            hi_band = fmax(hi_band, g->energies[bands[i] * npt + m]);
            lo_band = fmin(lo_band, g->energies[bands[i] * npt + m]);
        }
    for (gsize i = 0; i < nt; i++) {
        bm_thermal_point *p = &pts[i];
        JsonObject *o = json_object_new();
        bm_json_set_number(o, "temperature_k", p->temperature_k);
        bm_json_set_number(o, "fermi_level_ev", p->fermi_level_ev);
        bm_json_set_number(o, "density_cm3", p->density_cm3);
        bm_json_set_number(o, "edge_density_cm3", p->edge_density_cm3);
        bm_json_set_number(o, "dos_mass_me", p->dos_mass_me);
        bm_json_set_mat3(o, "conductivity_mass_tensor_me", (const double (*)[3])p->cond_tensor_me);
        JsonArray *cm = json_array_new(), *sa = json_array_new();
        for (int m = 0; m < 3; m++) {
            if (isfinite(p->cond_principal_me[m]))
                json_array_add_double_element(cm, p->cond_principal_me[m]);
            else
                json_array_add_null_element(cm);
            if (isfinite(p->seebeck_principal_uv_k[m]))
                json_array_add_double_element(sa, p->seebeck_principal_uv_k[m]);
            else
                json_array_add_null_element(sa);
        }
        json_object_set_array_member(o, "conductivity_principal_masses_me", cm);
        bm_json_set_mat3(o, "conductivity_principal_axes", (const double (*)[3])p->cond_axes);
        json_object_set_array_member(o, "seebeck_uv_per_k", sa);
        bm_json_set_mat3(o, "seebeck_tensor_uv_per_k", (const double (*)[3])p->seebeck_tensor_uv_k);
        JsonArray *ha = json_array_new();
        for (int m = 0; m < 3; m++) {
            if (isfinite(p->hall_factor[m]))
                json_array_add_double_element(ha, p->hall_factor[m]);
            else
                json_array_add_null_element(ha);
        }
        json_object_set_array_member(o, "hall_factor", ha);
        json_array_add_object_element(pa, o);
        double kt = BM_KB_EV * p->temperature_k;
        if (carrier == BM_CARRIER_ELECTRONS ? p->fermi_level_ev > hi_band - 10.0 * kt
                                            : p->fermi_level_ev < lo_band + 10.0 * kt)
            bm_warn(&w, BM_WARN_FERMI_OUTSIDE_BANDS,
                    "at %g K the chemical potential (%.4f eV) is within 10 kT of the far end "
                    "of the bands given: add the bands beyond them", p->temperature_k,
                    p->fermi_level_ev);
    }
    json_object_set_array_member(resp, "points", pa);
    JsonObject *so = json_object_new();
    bm_json_set_number(so, "cells", (double)sp.cells);
    bm_json_set_number(so, "points", (double)sp.points);
    bm_json_set_number(so, "largest_refinement", BM_THERMAL_MAX_REFINE);
    double win[2] = { s.e_lo, s.e_hi };
    bm_json_set_numbers(so, "window_ev", win, 2);
    bm_json_set_number(so, "bin_ev", s.bin_ev);
    bm_json_set_number(so, "symmetry_operations", (double)sp.symmetry_ops);
    json_object_set_boolean_member(so, "hall_factor_symmetrized", sp.hall_symmetrized);
    json_object_set_object_member(resp, "sampling", so);
    json_object_set_string_member(resp, "source", grid->source);
    {
        bm_thermal_edge_check chk;
        bm_errbuf err = { BM_OK, "" };
        if (bm_thermal_check_edge(&s, &sp, &chk, &err) != BM_OK) {
            bm_error_from_core(error, &err, grid->source);
            json_object_unref(resp);
            resp = NULL;
            bm_thermal_spectrum_clear(&sp);
            g_free(pts);
            goto out;
        }
        if (chk.assessed) {
            JsonObject *co = json_object_new();
            bm_json_set_numbers(co, "interpolant_masses_me", chk.interp_masses_me, (gsize)chk.dims);
            bm_json_set_numbers(co, "mass_tensor_masses_me", chk.fit_masses_me, (gsize)chk.dims);
            bm_json_set_numbers(co, "mass_tensor_errors_me", chk.fit_errors_me, (gsize)chk.dims);
            bm_json_set_number(co, "relative_difference", chk.relative);
            json_object_set_object_member(resp, "edge_check", co);
            if (chk.relative > EDGE_TOLERANCE)
                bm_warn(&w, BM_WARN_NOT_CONVERGED,
                        "near the band edge the interpolated band's masses differ from "
                        "mass-tensor's crossing-aware fits by %.0f %% (geometric or harmonic "
                        "mean): the "
                        "masses at the lowest temperatures carry an error of about that size "
                        "(the highest temperatures less); a finer mesh fixes it (sorted bands "
                        "that cross or touch near the edge need one most)", 100.0 * chk.relative);
        } else {
            json_object_set_null_member(resp, "edge_check");
            /* sorted bands that touch at the edge have a cusp there, which no
             * band-by-band interpolant follows: how far it overshoots the
             * mesh's own extreme shows how far to trust it */
            double over = carrier == BM_CARRIER_HOLES ? sp.edge_ev - edge_mesh
                                                      : edge_mesh - sp.edge_ev;
            if (over > 0.1 * kt_min)
                bm_warn(&w, BM_WARN_NOT_CONVERGED,
                        "bands touch at the band edge and the interpolated bands overshoot "
                        "the mesh's extreme there by %.1f meV: the figures are unreliable "
                        "where kT is below about ten times that (%.0f K), conductivity "
                        "tensors included; for a degenerate band top use mass-tensor's k.p "
                        "fit and hole-mass", 1e3 * over, 10.0 * over / BM_KB_EV);
            else
                bm_warn(&w, BM_WARN_NO_ERROR_ESTIMATE,
                        "the band edge has no single-band mass tensor to check the "
                        "interpolant against (bands touch there): the low-temperature "
                        "figures carry no independent error estimate");
        }
    }
    if (sp.cells_unresolved > 0) {
        double factor = sp.refine_needed / BM_THERMAL_MAX_REFINE;
        bm_warn(&w, BM_WARN_WINDOW_UNRESOLVED,
                "%zu of %zu cells in the window would need %.0f-fold refinement to resolve "
                "kT = %.4f eV (at most %d is used): a mesh about %.1f times finer per axis "
                "(%zu x %zu x %zu) would resolve it", sp.cells_unresolved, sp.cells,
                ceil(sp.refine_needed), kt_min, BM_THERMAL_MAX_REFINE, factor,
                (size_t)ceil(g->mesh[0] * (g->mesh[0] > 1 ? factor : 1.0)),
                (size_t)ceil(g->mesh[1] * (g->mesh[1] > 1 ? factor : 1.0)),
                (size_t)ceil(g->mesh[2] * (g->mesh[2] > 1 ? factor : 1.0)));
    }
    if (sp.min_gap_outside < 3.0 * BM_BANDINTERP_PAIR_GAP_EV) {
        const char *nm = names ? names[sp.gap_band] : NULL;
        g_autofree char *idx = g_strdup_printf("%zu", sp.gap_band);
        bm_warn(&w, BM_WARN_CROSSING_IN_WINDOW,
                "band %s (not in \"bands\") comes within %.3f eV of the bands given inside the "
                "thermal window: its states are not counted; list it in \"bands\" if it holds "
                "carriers", nm ? nm : idx, sp.min_gap_outside);
    }
    for (size_t i = 0; i < grid->warnings.count; i++)
        bm_warn(&w, grid->warnings.items[i].code, "%s: %s", grid->source,
                grid->warnings.items[i].text);
    bm_json_warn_all(resp, &w);
    bm_thermal_spectrum_clear(&sp);
    g_free(pts);
out:
    bm_warnings_clear(&w);
    bm_bandinterp_free(interp);
    if (owned)
        bm_band_grid_free(owned);
    return resp;
}

const BmOperation bm_op_thermal_mass = {
    .name = "thermal-mass",
    .summary = "Full-band density-of-states and conductivity masses and Seebeck coefficient "
               "against temperature, from a band grid",
    .params = params,
    .run = run,
    .response = response,
};
