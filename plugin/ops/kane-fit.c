/* kane-fit.c: operation "kane-fit" -- the non-parabolic (Kane) dispersion
 * E (1 + alpha E) = sum hbar^2 q_i^2 / (2 m_i) along the principal directions
 * of an extremum (found by mass-tensor's search), fitted beside the parabolic
 * band, and the thermal masses of the fitted band (core/bm-kane.h).  A grid is
 * sampled along the principal axes through the band interpolant; a k-table
 * gives its own points. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-enums.h"
#include "bm-error-private.h"
#include "bm-bandinterp.h"
#include "bm-kane.h"
#include "bm-cuts.h"
#include "bm-linalg.h"
#include "bm-units.h"
#include "mass-tensor.h"

static const BmParam params[] = {
    { "grid", BM_VALUE_STRING, FALSE, NULL,
      "band grid document (JSON, format bandmass-grid-1); give this or table", .unit = NULL },
    { "table", BM_VALUE_STRING, FALSE, NULL,
      "k-table (CSV or TSV: kx/ky/kz_inv_angstrom and NAME_ev columns); give this or grid",
      .unit = NULL },
    { "band", BM_VALUE_INTEGER | BM_VALUE_STRING, TRUE, NULL,
      "band: 0-based index or name", .unit = NULL },
    { "extremum", BM_VALUE_STRING, FALSE, "\"minimum\"",
      "the lowest minimum or the highest maximum of the band", .choices = &bm_enum_extremum_search },
    { "energy_window_ev", BM_VALUE_NUMBER, FALSE, "0.2",
      "fit the points up to this far from the edge into the band", .unit = "eV",
      .lower = BM_GT(0), .upper = BM_LE(10) },
    { "temperatures_k", BM_VALUE_NUMBER | BM_VALUE_ARRAY, FALSE, NULL,
      "temperatures for the thermal masses of the fitted Kane band (non-degenerate)",
      .unit = "K", .lower = BM_GT(0), .upper = BM_LE(1e5) },
    { "fit_radius_inv_angstrom", BM_VALUE_NUMBER, FALSE, "0",
      "radius of mass-tensor's local fit that locates the extremum (0: automatic)",
      .unit = "1/Angstrom", .lower = BM_GE(0) },
    { "degeneracy_tolerance_ev", BM_VALUE_NUMBER, FALSE, "0.001",
      "energy within which another band counts as degenerate", .unit = "eV",
      .lower = BM_GT(0) },
    { "convergence_tolerance", BM_VALUE_NUMBER, FALSE, "0.02",
      "relative error a converged mass of the search may have", .lower = BM_GT(0),
      .upper = BM_LE(1) },
    { "cuts", BM_VALUE_BOOLEAN, FALSE, "false",
      "give the band cuts: the points along each principal direction and both fitted curves "
      "there (for plotting)", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "kind", NULL, TRUE, "minimum or maximum" },
    { "k_inv_angstrom", "1/Angstrom", TRUE, "the extremum (from mass-tensor's search)" },
    { "edge_ev", "eV", TRUE, "the extremum's energy, as the preferred fit places it" },
    { "principal_axes", NULL, TRUE, "rows: the principal directions fitted" },
    { "kane", NULL, TRUE,
      "the Kane fit: principal_masses_me (signed: negative at a maximum), "
      "principal_masses_stderr_me, alpha_per_ev, alpha_stderr_per_ev, offset_ev, "
      "rms_residual_ev, aic; null when it does not converge to positive masses" },
    { "parabolic", NULL, TRUE, "the parabolic fit: the same keys without alpha" },
    { "preferred", NULL, TRUE,
      "kane or parabolic: the smaller Akaike information criterion (n ln(RSS/n) + 2p)" },
    { "points_used", NULL, TRUE, "how many points the fits used" },
    { "points", NULL, FALSE,
      "one per temperature: temperature_k, dos_mass_me, conductivity_principal_masses_me, "
      "conductivity_mass_me (the harmonic mean)" },
    { "cuts", NULL, TRUE,
      "with \"cuts\": one per principal direction: axis, data_offset_inv_angstrom and "
      "data_energy_ev (the points of the fits on that line through the extremum: a grid's "
      "samples along it, a table's points within half the sample spacing of it; offsets "
      "signed along axis), offset_inv_angstrom with parabolic_energy_ev and kane_energy_ev "
      "(the fitted curves there; null without a Kane fit, or past the turning point of a "
      "negative alpha); energies in the data's zero" },
    { "source", NULL, TRUE, "where the band data came from" },
    BM_FIELD_END
};

#define GRID_SAMPLES 24   /* per direction and side */

static JsonObject *fit_object(const bm_kane_fit *f, double sign, gboolean kane)
{
    JsonObject *o = json_object_new();
    double m[3], s[3];
    for (int d = 0; d < f->dims; d++)
        m[d] = sign * f->masses_me[d], s[d] = f->masses_stderr_me[d];
    bm_json_set_numbers(o, "principal_masses_me", m, (gsize)f->dims);
    bm_json_set_numbers(o, "principal_masses_stderr_me", s, (gsize)f->dims);
    if (kane) {
        bm_json_set_number(o, "alpha_per_ev", f->alpha_per_ev);
        bm_json_set_number(o, "alpha_stderr_per_ev", f->alpha_stderr_per_ev);
    }
    bm_json_set_number(o, "offset_ev", f->offset_ev);
    bm_json_set_number(o, "rms_residual_ev", f->rms_residual_ev);
    bm_json_set_number(o, "aic", f->aic);
    return o;
}

/* The band cuts: along each principal direction d, the fit points on that
 * line (a table's within half its sample spacing of it) and both fits there,
 * in the data's energies (e0 + sign * energy into the band). */
static JsonArray *cut_array(const double (*q)[3], const double *e, size_t n, int dims,
                            const bm_mass_tensor *t, double sign, const bm_kane_fit *pf,
                            const bm_kane_fit *kf, gboolean table)
{
    double tol = table && isfinite(t->sample_spacing) ? 0.5 * t->sample_spacing : 1e-12;
    JsonArray *cuts = json_array_new();
    for (int d = 0; d < dims; d++) {
        GArray *dq = g_array_new(FALSE, FALSE, sizeof(double));
        GArray *de = g_array_new(FALSE, FALSE, sizeof(double));
        double reach = 0.0;
        for (size_t i = 0; i < n; i++) {
            double off = 0.0;
            for (int o = 0; o < dims; o++)
                if (o != d)
                    off += q[i][o] * q[i][o];
            reach = fmax(reach, fabs(q[i][d]));
            if (sqrt(off) > tol)
                continue;
            double ev = t->energy_ev + sign * e[i];
            g_array_append_val(dq, q[i][d]);
            g_array_append_val(de, ev);
        }
        JsonObject *c = json_object_new();
        bm_json_set_vec3(c, "axis", t->axes[d]);
        bm_json_set_numbers(c, "data_offset_inv_angstrom", (const double *)(void *)dq->data,
                            dq->len);
        bm_json_set_numbers(c, "data_energy_ev", (const double *)(void *)de->data, de->len);
        g_array_unref(dq);
        g_array_unref(de);
        double cq[BM_CUT_CURVE_POINTS], ep[BM_CUT_CURVE_POINTS], ek[BM_CUT_CURVE_POINTS];
        for (int i = 0; i < BM_CUT_CURVE_POINTS; i++) {
            double h = reach * (2.0 * i / (BM_CUT_CURVE_POINTS - 1) - 1.0), v[3] = { 0, 0, 0 };
            v[d] = h;
            cq[i] = h;
            ep[i] = t->energy_ev + sign * bm_kane_fit_energy(pf, v);
            ek[i] = kf ? t->energy_ev + sign * bm_kane_fit_energy(kf, v) : NAN;
        }
        bm_json_set_numbers(c, "offset_inv_angstrom", cq, BM_CUT_CURVE_POINTS);
        bm_json_set_numbers(c, "parabolic_energy_ev", ep, BM_CUT_CURVE_POINTS);
        if (kf)
            bm_json_set_numbers(c, "kane_energy_ev", ek, BM_CUT_CURVE_POINTS);
        else
            json_object_set_null_member(c, "kane_energy_ev");
        json_array_add_object_element(cuts, c);
    }
    return cuts;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    bm_search which = (bm_search)bm_enum_value(request, "extremum", &bm_enum_extremum_search);
    if (which == BM_SEARCH_ALL) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"extremum\": kane-fit fits one extremum: \"minimum\" or "
                    "\"maximum\"");
        return NULL;
    }
    double window;
    if (!bm_json_positive(request, "energy_window_ev", NULL, &window, error))
        return NULL;
    gsize nt = 0;
    g_autofree double *temps = NULL;
    if (json_object_has_member(request, "temperatures_k")) {
        temps = bm_json_numbers(request, "temperatures_k", NULL, &nt, error);
        if (!temps)
            return NULL;
    }
    g_autoptr(BmMassTensorSearch) s = bm_mass_tensor_search(request, inputs, error);
    if (!s)
        return NULL;
    if (s->n_tensors == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: band %zu has no %s to fit", s->source, s->band,
                    which == BM_SEARCH_MINIMUM ? "minimum" : "maximum");
        return NULL;
    }
    const bm_mass_tensor *t = &s->tensors[0];
    if (t->degenerate || t->dims < 1) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "%s: bands touch at the %s of band %zu: one Kane band does not describe "
                    "it (use mass-tensor's k.p fit)", s->source,
                    which == BM_SEARCH_MINIMUM ? "minimum" : "maximum", s->band);
        return NULL;
    }
    int dims = t->dims;
    double sign = which == BM_SEARCH_MINIMUM ? 1.0 : -1.0;
    double e0 = t->energy_ev;

    /* the points: (q along the principal axes, energy into the band) */
    GArray *qa = g_array_new(FALSE, FALSE, sizeof(double[3]));
    GArray *ea = g_array_new(FALSE, FALSE, sizeof(double));
    const BmBandGrid *grid = s->grid;
    int crossing_stops = 0;
    if (!grid && s->fractional)
        grid = bm_call_inputs_lookup(inputs, "grid", BM_INPUT_BAND_GRID, NULL);
    if (s->fractional && grid) {
        bm_bandinterp *bi = bm_bandinterp_new_bands(&grid->grid, BM_BANDINTERP_PAIR_GAP_EV,
                                                    s->band, s->band);
        double rc[3][3], binv[3][3];
        memcpy(rc, grid->grid.recip, sizeof rc);
        if (!bi || bm_inv3(rc, binv) != 0) {
            bm_bandinterp_free(bi);
            g_array_unref(qa), g_array_unref(ea);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "kane-fit: out of memory");
            return NULL;
        }
        /* a ray stops where a neighbouring band has closed half its gap at the
         * extremum: past that a crossing bends the sorted band */
        size_t nb = grid->grid.nbands, b = s->band;
        double f0[3];
        for (int a = 0; a < 3; a++)
            f0[a] = t->k[0] * binv[0][a] + t->k[1] * binv[1][a] + t->k[2] * binv[2][a];
        double gap0 = INFINITY, eb;
        bm_bandinterp_eval(bi, b, f0, &eb, NULL, NULL);
        for (int side = -1; side <= 1; side += 2) {
            if ((side < 0 && b == 0) || (side > 0 && b + 1 >= nb)
                || !bm_grid_same_channel(&grid->grid, b, (size_t)((long)b + side)))
                continue;
            double eo;
            bm_bandinterp_eval(bi, (size_t)((long)b + side), f0, &eo, NULL, NULL);
            gap0 = fmin(gap0, fabs(eo - eb));
        }
        for (int d = 0; d < dims; d++) {
            /* reach: the parabolic estimate of where the window ends, 1.5 times */
            double m = fabs(t->masses[d]);
            double reach = 1.5 * sqrt(2.0 * (isfinite(m) && m > 0 ? m : 1.0) * window
                                      / BM_HBAR2_OVER_ME_EV_A2);
            for (int side = -1; side <= 1; side += 2)
                for (int i = 1; i <= GRID_SAMPLES; i++) {
                    double h = side * reach * i / GRID_SAMPLES, k[3], f[3], e;
                    for (int c = 0; c < 3; c++)
                        k[c] = t->k[c] + h * t->axes[d][c];
                    for (int a = 0; a < 3; a++)
                        f[a] = k[0] * binv[0][a] + k[1] * binv[1][a] + k[2] * binv[2][a];
                    bm_bandinterp_eval(bi, s->band, f, &e, NULL, NULL);
                    double gap = INFINITY;
                    for (int o = -1; o <= 1 && isfinite(gap0); o += 2) {
                        if ((o < 0 && b == 0) || (o > 0 && b + 1 >= nb)
                            || !bm_grid_same_channel(&grid->grid, b, (size_t)((long)b + o)))
                            continue;
                        double eo;
                        bm_bandinterp_eval(bi, (size_t)((long)b + o), f, &eo, NULL, NULL);
                        gap = fmin(gap, fabs(eo - e));
                    }
                    if (gap < 0.5 * gap0) {
                        crossing_stops++;
                        break;
                    }
                    double er = sign * (e - e0);
                    if (er > window)
                        break;
                    double q[3] = {0, 0, 0};
                    q[d] = h;
                    g_array_append_val(qa, q);
                    g_array_append_val(ea, er);
                }
        }
        bm_bandinterp_free(bi);
    } else if (s->table) {
        const bm_ktable *tb = &s->table->table;
        for (size_t i = 0; i < tb->npoints; i++) {
            double er = sign * (tb->energies[s->band * tb->npoints + i] - e0);
            if (er > window)
                continue;
            double q[3] = {0, 0, 0};
            for (int d = 0; d < dims; d++)
                for (int c = 0; c < 3; c++)
                    q[d] += (tb->k[3 * i + c] - t->k[c]) * t->axes[d][c];
            g_array_append_val(qa, q);
            g_array_append_val(ea, er);
        }
    }
    bm_kane_fit kf, pf;
    bm_errbuf err = { BM_OK, "" };
    size_t n = ea->len;
    if (bm_kane_fit_points((const double (*)[3])(void *)qa->data, (const double *)ea->data, n,
                           dims, 1, &kf, &err) != BM_OK
        || bm_kane_fit_points((const double (*)[3])(void *)qa->data, (const double *)ea->data, n,
                              dims, 0, &pf, &err) != BM_OK) {
        g_array_unref(qa), g_array_unref(ea);
        bm_error_from_core(error, &err, s->source);
        return NULL;
    }
    gboolean kane_ok = isfinite(kf.aic) && isfinite(kf.alpha_per_ev) && isfinite(kf.masses_me[0])
                       && kf.masses_me[0] > 0.0;
    for (int d = 1; d < dims; d++)
        kane_ok = kane_ok && isfinite(kf.masses_me[d]) && kf.masses_me[d] > 0.0;
    JsonArray *cuts = json_object_get_boolean_member(request, "cuts")
        ? cut_array((const double (*)[3])(void *)qa->data, (const double *)ea->data, n, dims,
                    t, sign, &pf, kane_ok ? &kf : NULL, s->table != NULL)
        : NULL;
    g_array_unref(qa), g_array_unref(ea);

    JsonObject *resp = json_object_new();
    bm_warnings w = {0};
    if (crossing_stops)
        bm_warn(&w, BM_WARN_DEGENERATE_BAND,
                "%d of the %d sampling rays stopped where a neighbouring band closed half its "
                "gap at the extremum (a crossing ahead): the fits see less of the band there",
                crossing_stops, 2 * dims);
    if (!kane_ok)
        bm_warn(&w, BM_WARN_FIT_UNDETERMINED,
                "the Kane fit did not converge to positive masses on these points: the "
                "parabolic fit is the answer");
    json_object_set_string_member(resp, "kind", which == BM_SEARCH_MINIMUM ? "minimum" : "maximum");
    bm_json_set_vec3(resp, "k_inv_angstrom", t->k);
    /* the edge as the preferred fit places it (the search's energy plus its offset) */
    bm_json_set_number(resp, "edge_ev", e0 + sign * (kane_ok && kf.aic < pf.aic ? kf.offset_ev
                                                                                : pf.offset_ev));
    bm_json_set_mat3(resp, "principal_axes", (const double (*)[3])t->axes);
    if (kane_ok)
        json_object_set_object_member(resp, "kane", fit_object(&kf, sign, TRUE));
    else
        json_object_set_null_member(resp, "kane");
    json_object_set_object_member(resp, "parabolic", fit_object(&pf, sign, FALSE));
    gboolean kane_better = kane_ok && kf.aic < pf.aic;
    json_object_set_string_member(resp, "preferred", kane_better ? "kane" : "parabolic");
    bm_json_set_number(resp, "points_used", (double)n);
    if (kf.alpha_per_ev < 0.0 && kane_better)
        bm_warn(&w, BM_WARN_NON_PARABOLIC,
                "the fitted alpha is negative (%.3g per eV): the band bends the other way from a "
                "Kane band; the thermal masses need alpha >= 0 and are not given",
                kf.alpha_per_ev);
    if (temps) {
        JsonArray *pa = json_array_new();
        double alpha = kane_better ? fmax(kf.alpha_per_ev, 0.0) : 0.0;
        const bm_kane_fit *use = kane_better ? &kf : &pf;
        for (gsize i = 0; i < nt; i++) {
            double md, mc[3];
            if (bm_kane_thermal(use->masses_me, dims, alpha, temps[i], &md, mc, &err) != BM_OK) {
                json_array_unref(pa);
                json_object_unref(resp);
                bm_warnings_clear(&w);
                bm_error_from_core(error, &err, "request: key \"temperatures_k\"");
                return NULL;
            }
            JsonObject *o = json_object_new();
            double harm = 0.0, sm[3];
            for (int d = 0; d < dims; d++)
                harm += 1.0 / mc[d], sm[d] = sign * mc[d];
            bm_json_set_number(o, "temperature_k", temps[i]);
            bm_json_set_number(o, "dos_mass_me", sign * md);
            bm_json_set_numbers(o, "conductivity_principal_masses_me", sm, (gsize)dims);
            bm_json_set_number(o, "conductivity_mass_me", sign * dims / harm);
            json_array_add_object_element(pa, o);
        }
        json_object_set_array_member(resp, "points", pa);
    }
    if (cuts)
        json_object_set_array_member(resp, "cuts", cuts);
    json_object_set_string_member(resp, "source", s->source);
    for (size_t i = 0; i < t->warnings.count; i++)
        bm_warn(&w, t->warnings.items[i].code, "the search that located the extremum (its "
                "local parabolic masses, not these fits): %s", t->warnings.items[i].text);
    bm_json_warn_all(resp, &w);
    bm_warnings_clear(&w);
    return resp;
}

const BmOperation bm_op_kane_fit = {
    .name = "kane-fit",
    .summary = "Non-parabolic (Kane) fit E(1 + alpha E) = hbar^2 k^2 / 2m at a band extremum, "
               "beside the parabolic fit, and the thermal masses of the fitted band",
    .params = params,
    .run = run,
    .response = response,
};
