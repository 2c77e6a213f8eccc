/* mass-tensor.c: operation "mass-tensor" -- band extrema of one band of a
 * band grid document or a k-table, with their inertial mass tensors.
 *
 * Request: "grid" (band grid document path, or a BmBandGrid the host hands
 * over in its place as an in-memory input, BM_INPUT_BAND_GRID) or "table"
 * (k-table path); "band" (0-based index or name);
 * "extremum": "minimum" (the lowest), "maximum" (the highest) or "all" (every
 * local extremum of a grid; the lowest minimum and highest maximum of a
 * table); optional "k_inv_angstrom" (evaluate the tensor at that Cartesian
 * point instead of searching), "fit_radius_inv_angstrom" (0: automatic) and
 * "degeneracy_tolerance_ev".
 *
 * Response: "band" {index, name}, "source", "extrema" (objects below), and
 * "warnings". Each extremum: "kind" (minimum, maximum, saddle), "dims",
 * "energy_ev", "k_inv_angstrom", "k_fractional" (null for a table),
 * "principal_masses_me" (signed, m_e, ordered by increasing |m|; a direction
 * with no finite inertial mass -- vanishing curvature or a conical point --
 * is the string "divergent"; a direction the data do not sample, such as the
 * normal of a 2D sheet, is null), "principal_axes" (rows, Cartesian unit
 * vectors in the order of the masses), "inverse_mass_tensor_per_me" (null
 * entries at a conical point), "fit_rms_ev", "divergent" (boolean) and
 * "warnings". */
#include "ops.h"
#include "bm-enums.h"
#include "bm-linalg.h"
#include "bm-stencil.h"
#include "bm-cuts.h"
#include "bm-bandinterp.h"
#include "bm-error-private.h"
#include "mass-tensor.h"
#include "bm-json.h"
#include "band-select.h"
#include "grid-input.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static const BmParam params[] = {
    { "grid", BM_VALUE_STRING, FALSE, NULL,
      "band grid document (JSON, format bandmass-grid-1); give this or table", .unit = NULL },
    { "table", BM_VALUE_STRING, FALSE, NULL,
      "k-table (CSV or TSV: kx/ky/kz_inv_angstrom and NAME_ev columns); give this or grid",
      .unit = NULL },
    { "cut_direction", BM_VALUE_ARRAY, FALSE, NULL,
      "the Cartesian direction [x, y, z] of a two-column cut (a table with one "
      "k_inv_angstrom column, the signed distance along the line): needed for one, refused "
      "otherwise", .unit = NULL },
    { "band", BM_VALUE_INTEGER | BM_VALUE_STRING, FALSE, NULL,
      "band: 0-based index or name (may be left out when the data hold one band), or "
      "\"all\" for every band in turn",
      .unit = NULL },
    { "extremum", BM_VALUE_STRING, FALSE, "\"all\"", "which extrema to report",
      .choices = &bm_enum_extremum_search },
    { "k_inv_angstrom", BM_VALUE_ARRAY, FALSE, NULL,
      "evaluate the tensor at this Cartesian k [kx, ky, kz] instead of searching",
      .unit = "1/Angstrom" },
    { "fit_radius_inv_angstrom", BM_VALUE_NUMBER, FALSE, "0",
      "radius of the local quadratic fit (0: automatic)", .unit = "1/Angstrom",
      .lower = BM_GE(0) },
    { "degeneracy_tolerance_ev", BM_VALUE_NUMBER, FALSE, "0.001",
      "energy within which another band counts as degenerate", .unit = "eV",
      .lower = BM_GT(0) },
    { "convergence_tolerance", BM_VALUE_NUMBER, FALSE, "0.02",
      "relative error a converged mass may have (errors are estimated from independent "
      "local fits)", .lower = BM_GT(0), .upper = BM_LE(1) },
    { "stencil", BM_VALUE_BOOLEAN, FALSE, "false",
      "give each extremum a refinement stencil: k-points to compute with the band-structure "
      "code and fit back as a k-table (the refinement loop)", .unit = NULL },
    { "cuts", BM_VALUE_BOOLEAN, FALSE, "false",
      "give each extremum its band cuts: the samples along each principal axis through it "
      "and the fitted quadric there (for plotting)", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "band", NULL, TRUE, "the band: {index (0-based), name (null when unnamed)}; with "
      "\"band\": \"all\", in each element of bands" },
    { "source", NULL, FALSE, "where the band data came from (file, or \"in-memory grid\")" },
    { "bands", NULL, TRUE, "with \"band\": \"all\": one object per band, in order, each "
      "with band, extrema, beyond_data and warnings as a one-band request gives them" },
    { "extrema", NULL, TRUE,
      "one object per extremum: kind (minimum, maximum, saddle), dims, energy_ev, "
      "k_inv_angstrom, k_fractional (null for a table), principal_masses_me (signed, m_e, "
      "by increasing |m|; \"divergent\" or null where there is no finite mass), "
      "principal_axes, inverse_mass_tensor_per_me, fit_rms_ev, divergent, method "
      "(interpolant, crossing-aware local fit, table fit), crossing_partner_band (null "
      "when none), principal_masses_error_me (estimated error of each mass, m_e: the "
      "spread of independent local fits, never below the standard error; null where not "
      "assessed), principal_masses_stderr_me (a table fit: the statistical part of each "
      "mass's error, from the scatter of the energies about the fit through its covariance; "
      "null elsewhere), fit_window (a table fit: points, radius_inv_angstrom, chosen_by "
      "(request: the radius given; default: three points per parameter, where the data show "
      "terms beyond quadratic already or cannot tell; grown: widened while the F test of a "
      "quartic, or a cubic where points are few, found nothing beyond quadratic at 1 %), "
      "beyond_quadratic_degree, beyond_quadratic_p_value, scatter_ev), k_error_inv_angstrom, "
      "converged (errors within convergence_tolerance; null where not assessed), "
      "refinement_stencil (with \"stencil\": {kind (principal-axes, or directional at a "
      "degenerate extremum), step_inv_angstrom, k_inv_angstrom, k_fractional (null for a "
      "table)}), directional_masses (a degenerate extremum of a table: [{direction, "
      "mass_me, error_me}] along the lines of samples through it), symmetry_snap (a grid "
      "extremum within its k error of a point that rotations of the lattice fix: moved "
      "there, its tensor averaged over those rotations: {k_shift_inv_angstrom, "
      "site_rotations}), line_fit (an extremum that symmetry has fixed onto a line of "
      "mesh points along one of its principal axes: its position along the line and its "
      "mass along it come from interpolating the mesh energies along that line with its "
      "crossing partner, 5 to 7 points; {direction, k_shift_inv_angstrom, mesh_points}), "
      "degenerate_kp_fit (a "
      "degenerate extremum of three or four touching bands of a cubic crystal: model "
      "(threefold-no-spin-orbit: L, M, N; fourfold-luttinger; sixfold-spin-orbit where a "
      "Kramers pair lies within 1 eV beyond four touching bands: L, M, N and "
      "split_off_gap_ev with split_off_gap_error_ev, masses of the split-off pair, light "
      "and heavy bands), bands, energy_ev, "
      "fit_rms_ev, points, radius_inv_angstrom, quartic_terms, lmn_hbar2_over_2me "
      "{L, M, N} and lmn_error, luttinger_parameters {gamma1, gamma2, gamma3} (the J = 3/2 "
      "projection) and luttinger_parameters_error, directional_masses_me {100, 110, 111: "
      "one signed mass per distinct band, lowest band first} and "
      "directional_masses_error_me, dos_masses_me and dos_masses_error_me (null for an "
      "open surface), luttinger_band_edge_hole_dos_mass_me (hole-mass's warped heavy and "
      "light bands of these gamma), largest_relative_error), band_cuts (with \"cuts\", "
      "one per principal axis with a finite mass: {axis, mass_me, data_offset_inv_angstrom "
      "and data_energy_ev (the samples within half a mesh step of the line through the "
      "extremum, or half the sample spacing for a table; offsets signed along axis), "
      "offset_inv_angstrom and fit_energy_ev (the fitted quadric on that line), "
      "band_energy_ev (a grid: the interpolated band there, the interpolant of "
      "thermal-mass)}), warnings" },
    { "beyond_data", NULL, TRUE,
      "a table only, when present: where the lowest (highest) sample lies on the boundary "
      "and the fit's stationary point is outside the points given, its estimate (objects "
      "as in extrema, never converged; with \"stencil\", the stencil to compute around "
      "it): an extrapolation to sample, not an extremum" },
    BM_FIELD_END
};

const char *bm_mass_tensor_kind_text(bm_extremum_kind k)
{
    return bm_enum_name(&bm_enum_extremum_kind, (int)k);
}

/* The k.p fit of a degenerate extremum (core/bm-kp.h). */
static JsonObject *kp_fit_object(const bm_kp_fit *f)
{
    static const char *dir_names[3] = { "100", "110", "111" };
    JsonObject *o = json_object_new();
    json_object_set_string_member(o, "model", f->model == BM_KP_THREEFOLD
                                  ? "threefold-no-spin-orbit"
                                  : f->model == BM_KP_FOURFOLD ? "fourfold-luttinger"
                                  : "sixfold-spin-orbit");
    JsonArray *bands = json_array_new();
    for (size_t q = 0; q < f->nbands; q++)
        json_array_add_int_element(bands, (gint64)f->band_index[q]);
    json_object_set_array_member(o, "bands", bands);
    bm_json_set_number(o, "energy_ev", f->e0_ev);
    bm_json_set_number(o, "fit_rms_ev", f->rms_ev);
    json_object_set_int_member(o, "points", (gint64)f->npoints);
    bm_json_set_number(o, "radius_inv_angstrom", f->radius);
    json_object_set_boolean_member(o, "quartic_terms", f->quartic);
    if (f->model == BM_KP_SIXFOLD) {
        bm_json_set_number(o, "split_off_gap_ev", f->split_off_ev);
        bm_json_set_number(o, "split_off_gap_error_ev", f->split_off_error_ev);
    }
    static const char *lmn_names[3] = { "L", "M", "N" };
    static const char *g_names[3] = { "gamma1", "gamma2", "gamma3" };
    JsonObject *lmn = json_object_new(), *lmn_e = json_object_new();
    JsonObject *g = json_object_new(), *g_e = json_object_new();
    for (int i = 0; i < 3; i++) {
        bm_json_set_number(lmn, lmn_names[i], f->lmn[i]);
        bm_json_set_number(lmn_e, lmn_names[i], f->lmn_error[i]);
        bm_json_set_number(g, g_names[i], f->gamma[i]);
        bm_json_set_number(g_e, g_names[i], f->gamma_error[i]);
    }
    json_object_set_object_member(o, "lmn_hbar2_over_2me", lmn);
    json_object_set_object_member(o, "lmn_error", lmn_e);
    json_object_set_object_member(o, "luttinger_parameters", g);
    json_object_set_object_member(o, "luttinger_parameters_error", g_e);
    JsonObject *dm = json_object_new(), *de = json_object_new();
    for (int d = 0; d < 3; d++) {
        bm_json_set_numbers(dm, dir_names[d], f->directional[d], f->ndistinct);
        bm_json_set_numbers(de, dir_names[d], f->directional_error[d], f->ndistinct);
    }
    json_object_set_object_member(o, "directional_masses_me", dm);
    json_object_set_object_member(o, "directional_masses_error_me", de);
    bm_json_set_numbers(o, "dos_masses_me", f->dos_mass, f->ndistinct);
    bm_json_set_numbers(o, "dos_masses_error_me", f->dos_mass_error, f->ndistinct);
    bm_json_set_number(o, "luttinger_band_edge_hole_dos_mass_me", f->luttinger_dos_mass);
    bm_json_set_number(o, "largest_relative_error", f->rel_error);
    return o;
}

BmMassState bm_mass_tensor_mass_state(const bm_mass_tensor *t, int m)
{
    double v = t->masses[m];
    if (t->degenerate && m < t->dims)
        return BM_MASS_DEGENERATE;
    if (isfinite(v))
        return BM_MASS_FINITE;
    if (isinf(v) || (t->divergent && m < t->dims))
        return BM_MASS_DIVERGENT;
    return BM_MASS_UNSAMPLED;
}

/* The signed masses: finite numbers, "divergent" where the curvature
 * vanishes (or the point is conical), "degenerate" where other bands touch
 * this one, null where the data do not sample. */
static JsonArray *masses_array(const bm_mass_tensor *t)
{
    JsonArray *a = json_array_new();
    for (int m = 0; m < 3; m++) {
        switch (bm_mass_tensor_mass_state(t, m)) {
        case BM_MASS_FINITE:    json_array_add_double_element(a, t->masses[m]); break;
        case BM_MASS_DIVERGENT: json_array_add_string_element(a, "divergent"); break;
        case BM_MASS_UNSAMPLED: json_array_add_null_element(a); break;
        case BM_MASS_DEGENERATE: json_array_add_string_element(a, "degenerate"); break;
        }
    }
    return a;
}

/* One value per principal mass: null beyond dims and where not assessed. */
static JsonArray *per_mass_array(const double v[3], int dims)
{
    JsonArray *a = json_array_new();
    for (int m = 0; m < 3; m++)
        if (m < dims && isfinite(v[m]))
            json_array_add_double_element(a, v[m]);
        else
            json_array_add_null_element(a);
    return a;
}

static const char *method_text(bm_tensor_method m)
{
    switch (m) {
    case BM_METHOD_INTERPOLANT:   return "interpolant";
    case BM_METHOD_CROSSING_FIT:  return "crossing-aware local fit";
    case BM_METHOD_TABLE_FIT:     return "table fit";
    }
    return "unknown";
}

JsonObject *bm_mass_tensor_object(const bm_mass_tensor *t, gboolean fractional)
{
    JsonObject *o = json_object_new();
    json_object_set_string_member(o, "kind", bm_mass_tensor_kind_text(t->kind));
    json_object_set_int_member(o, "dims", t->dims);
    bm_json_set_number(o, "energy_ev", t->energy_ev);
    bm_json_set_vec3(o, "k_inv_angstrom", t->k);
    if (fractional)
        bm_json_set_vec3(o, "k_fractional", t->k_frac);
    else
        json_object_set_null_member(o, "k_fractional");
    json_object_set_array_member(o, "principal_masses_me", masses_array(t));
    bm_json_set_mat3(o, "principal_axes", t->axes);
    bm_json_set_mat3(o, "inverse_mass_tensor_per_me", t->inv_mass);
    bm_json_set_number(o, "fit_rms_ev", t->fit_rms_ev);
    json_object_set_boolean_member(o, "divergent", t->divergent != 0);
    json_object_set_string_member(o, "method", method_text(t->method));
    if (t->partner_band >= 0)
        json_object_set_int_member(o, "crossing_partner_band", t->partner_band);
    else
        json_object_set_null_member(o, "crossing_partner_band");
    json_object_set_array_member(o, "principal_masses_error_me",
                                 per_mass_array(t->mass_errors, t->dims));
    json_object_set_array_member(o, "principal_masses_stderr_me",
                                 per_mass_array(t->mass_stderr, t->dims));
    if (t->window.points) {
        JsonObject *w = json_object_new();
        json_object_set_int_member(w, "points", (gint64)t->window.points);
        bm_json_set_number(w, "radius_inv_angstrom", t->window.radius);
        json_object_set_string_member(w, "chosen_by", t->window.chosen == 2 ? "grown"
                                      : t->window.chosen == 1 ? "default" : "request");
        if (t->window.beyond_degree) {
            json_object_set_int_member(w, "beyond_quadratic_degree", t->window.beyond_degree);
            bm_json_set_number(w, "beyond_quadratic_p_value", t->window.beyond_p);
        } else {
            json_object_set_null_member(w, "beyond_quadratic_degree");
            json_object_set_null_member(w, "beyond_quadratic_p_value");
        }
        bm_json_set_number(w, "scatter_ev", t->window.noise_ev);
        json_object_set_object_member(o, "fit_window", w);
    }
    bm_json_set_number(o, "k_error_inv_angstrom", t->k_error);
    if (t->converged < 0)
        json_object_set_null_member(o, "converged");
    else
        json_object_set_boolean_member(o, "converged", t->converged != 0);
    if (t->ndirectional) {
        JsonArray *da = json_array_new();
        for (size_t q = 0; q < t->ndirectional; q++) {
            JsonObject *d = json_object_new();
            bm_json_set_vec3(d, "direction", t->directional[q].direction);
            bm_json_set_number(d, "mass_me", t->directional[q].mass);
            bm_json_set_number(d, "error_me", t->directional[q].error);
            json_array_add_object_element(da, d);
        }
        json_object_set_array_member(o, "directional_masses", da);
    }
    if (t->symmetry_snapped) {
        JsonObject *sn = json_object_new();
        bm_json_set_number(sn, "k_shift_inv_angstrom", t->snap_shift);
        json_object_set_int_member(sn, "site_rotations", t->site_rotations);
        json_object_set_object_member(o, "symmetry_snap", sn);
    }
    if (t->line_fitted) {
        JsonObject *lf = json_object_new();
        bm_json_set_vec3(lf, "direction", t->line_axis);
        bm_json_set_number(lf, "k_shift_inv_angstrom", t->line_shift);
        json_object_set_int_member(lf, "mesh_points", t->line_points);
        json_object_set_object_member(o, "line_fit", lf);
    }
    if (t->kp.model != BM_KP_NONE)
        json_object_set_object_member(o, "degenerate_kp_fit", kp_fit_object(&t->kp));
    bm_json_warn_all(o, &t->warnings);
    return o;
}

void bm_mass_tensor_search_free(BmMassTensorSearch *s)
{
    if (!s)
        return;
    bm_mass_tensors_free(s->tensors, s->n_tensors + s->n_beyond);
    bm_warnings_clear(&s->warnings);
    if (s->grid)
        bm_band_grid_free(s->grid);
    if (s->table)
        bm_ktable_free(s->table);
    g_free(s);
}

BmMassTensorSearch *bm_mass_tensor_search(JsonObject *request, const BmCallInputs *inputs,
                                          GError **error)
{
    GError *lookup_error = NULL;
    const BmBandGrid *given = bm_call_inputs_lookup(inputs, "grid", BM_INPUT_BAND_GRID,
                                                    &lookup_error);
    if (lookup_error) {
        g_propagate_error(error, lookup_error);
        return NULL;
    }
    gboolean have_grid = given || json_object_has_member(request, "grid");
    gboolean have_table = json_object_has_member(request, "table");
    if (have_grid == have_table) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    have_grid ? "request: give either \"grid\" or \"table\", not both"
                              : "request: missing band data: give \"grid\" (a band grid "
                                "document) or \"table\" (a k-table)");
        return NULL;
    }
    if (have_grid && json_object_has_member(request, "cut_direction")) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"cut_direction\" is "
                    "for a two-column cut given as \"table\", not for a grid");
        return NULL;
    }

    /* the choice of "extremum" and the ranges are checked by the registry */
    bm_search which = (bm_search)bm_enum_value(request, "extremum", &bm_enum_extremum_search);
    bm_fit_options opt = { 0.0, 0.0, 0.0 };
    if (!bm_json_number(request, "fit_radius_inv_angstrom", NULL,
                        &opt.fit_radius_inv_angstrom, error) ||
        !bm_json_positive(request, "convergence_tolerance", NULL, &opt.convergence_tol, error) ||
        !bm_json_number(request, "degeneracy_tolerance_ev", NULL, &opt.degeneracy_tol_ev, error))
        return NULL;
    double k_at[3];
    gboolean have_k = json_object_has_member(request, "k_inv_angstrom");
    if (have_k && !bm_json_vec3(request, "k_inv_angstrom", NULL, k_at, error))
        return NULL;

    /* the band data: handed over, a grid document or a k-table */
    g_autoptr(BmMassTensorSearch) s = g_new0(BmMassTensorSearch, 1);
    const BmBandGrid *grid = given;
    const char *const *names, *const *alt_names = NULL;
    size_t nbands;
    if (have_grid && !grid) {
        s->grid = bm_band_grid_load(json_object_get_string_member(request, "grid"), error);
        if (!s->grid)
            return NULL;
        grid = s->grid;
    }
    if (grid) {
        names = (const char *const *)grid->band_names;
        s->source = grid->source;
        nbands = grid->grid.nbands;
    } else {
        s->table = bm_ktable_load(json_object_get_string_member(request, "table"), error);
        if (!s->table)
            return NULL;
        double dir[3];
        gboolean have_dir = json_object_has_member(request, "cut_direction");
        if (have_dir && !bm_json_vec3(request, "cut_direction", NULL, dir, error))
            return NULL;
        if (s->table->cut && !have_dir) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: %s is a cut along one "
                        "line (a k_inv_angstrom column): give its Cartesian direction as "
                        "\"cut_direction\": [x, y, z]", s->table->source);
            return NULL;
        }
        if (!s->table->cut && have_dir) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"cut_direction\" "
                        "is for a two-column cut, but %s gives Cartesian k (kx, ky, "
                        "kz_inv_angstrom columns)", s->table->source);
            return NULL;
        }
        if (s->table->cut && !bm_ktable_orient_cut(s->table, dir, error))
            return NULL;
        names = (const char *const *)s->table->band_names;
        alt_names = (const char *const *)s->table->band_headers;
        s->source = s->table->source;
        nbands = s->table->table.nbands;
    }

    if (!json_object_has_member(request, "band")) {
        if (nbands != 1) {
            /* say what there is to choose from */
            g_autoptr(GString) list = g_string_new(NULL);
            for (size_t b = 0; names && b < nbands && b < 12; b++)
                g_string_append_printf(list, "%s'%s'", b ? ", " : " (", names[b]);
            if (names && nbands > 12)
                g_string_append(list, ", ...");
            if (names)
                g_string_append(list, ")");
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: missing key \"band\": %s holds %zu bands (give a 0-based "
                        "index 0..%zu, a name%s or \"all\")", s->source, nbands, nbands - 1,
                        list->str);
            return NULL;
        }
        s->band = 0;
    } else if (!bm_band_select_node(json_object_get_member(request, "band"), names, alt_names,
                                    nbands, s->source, &s->band, error))
        return NULL;
    s->band_name = names ? names[s->band] : NULL;
    s->fractional = grid != NULL;
    if (grid)
        memcpy(s->recip, grid->grid.recip, sizeof s->recip);

    bm_errbuf err = { BM_OK, "" };
    bm_status st = grid ? bm_grid_mass_tensors(&grid->grid, s->band, which,
                                               have_k ? k_at : NULL, &opt,
                                               &s->tensors, &s->n_tensors, &err)
                        : bm_ktable_mass_tensors(&s->table->table, s->band, which,
                                                 have_k ? k_at : NULL, &opt,
                                                 &s->tensors, &s->n_tensors, &s->warnings,
                                                 &err);
    if (st != BM_OK) {
        bm_error_from_core(error, &err, s->source);
        return NULL;
    }
    /* a mapped .npy rewritten during the search: no answer from mixed data */
    if (!bm_band_grid_unchanged(grid, error))
        return NULL;
    for (size_t i = 0; grid && i < grid->warnings.count; i++)
        bm_warn(&s->warnings, grid->warnings.items[i].code, "%s: %s", s->source,
                grid->warnings.items[i].text);
    /* a capped "all" search says so at the top, not only on its first extremum */
    for (size_t i = 0; s->n_tensors && i < s->tensors[0].warnings.count; i++)
        if (s->tensors[0].warnings.items[i].code == BM_WARN_EXTREMA_CAPPED)
            bm_warn(&s->warnings, BM_WARN_EXTREMA_CAPPED, "%s",
                    s->tensors[0].warnings.items[i].text);
    /* the core lists a table's estimates beyond the data last */
    while (s->n_tensors > 0 && s->tensors[s->n_tensors - 1].outside_data) {
        s->n_tensors--;
        s->n_beyond++;
    }
    if (s->n_tensors == 0 && !bm_warnings_has(&s->warnings, BM_WARN_NO_EXTREMUM))
        bm_warn(&s->warnings, BM_WARN_NO_EXTREMUM, "no extremum found in band %zu of %s",
                s->band, s->source);
    for (size_t i = 0; i < s->n_tensors; i++) {
        const bm_mass_tensor *t = &s->tensors[i];
        if (t->warnings.count)
            bm_warn(&s->warnings, BM_WARN_EXTREMUM_WARNINGS,
                    "extremum %zu (%s at %.6g eV) carries %zu warning%s", i,
                    bm_mass_tensor_kind_text(t->kind), t->energy_ev, t->warnings.count,
                    t->warnings.count == 1 ? "" : "s");
    }
    return g_steal_pointer(&s);
}

/* The refinement stencil of t (where its masses are finite): Cartesian points
 * and, for a grid (recip given), their fractional coordinates k B^-1. */
static void add_stencil(JsonObject *o, const bm_mass_tensor *t, double recip[3][3])
{
    for (int m = 0; m < t->dims; m++)
        if (!isfinite(t->masses[m]) && !t->degenerate)
            return;
    double pts[BM_STENCIL_MAX][3], binv[3][3];
    size_t n;
    double step;
    if (t->degenerate) {
        /* no tensor to take axes from: lines along [100], [110], [111] */
        n = BM_STENCIL_DIRECTIONAL;
        step = 0.01;
        bm_stencil_directional(t->k, step, pts);
    } else {
        n = bm_stencil_size(t->dims);
        step = bm_stencil_step(t->k_error, t->sample_spacing);
        bm_stencil_points(t->k, t->axes, t->dims, step, pts);
    }
    JsonObject *st = json_object_new();
    json_object_set_string_member(st, "kind", t->degenerate ? "directional" : "principal-axes");
    bm_json_set_number(st, "step_inv_angstrom", step);
    JsonArray *kc = json_array_new(), *kf = json_array_new();
    gboolean frac = recip && bm_inv3(recip, binv) == 0;
    for (size_t i = 0; i < n; i++) {
        JsonArray *row = json_array_new(), *frow = json_array_new();
        for (int a = 0; a < 3; a++) {
            json_array_add_double_element(row, pts[i][a]);
            json_array_add_double_element(frow, pts[i][0] * binv[0][a] + pts[i][1] * binv[1][a]
                                                 + pts[i][2] * binv[2][a]);
        }
        json_array_add_array_element(kc, row);
        if (frac)
            json_array_add_array_element(kf, frow);
        else
            json_array_unref(frow);
    }
    json_object_set_array_member(st, "k_inv_angstrom", kc);
    if (frac)
        json_object_set_array_member(st, "k_fractional", kf);
    else {
        json_array_unref(kf);
        json_object_set_null_member(st, "k_fractional");
    }
    json_object_set_object_member(o, "refinement_stencil", st);
}

/* Energy within which a cut reaches along each axis (from the quadric). */
#define CUT_ENERGY_EV 0.25

/* The band cuts of t (bm-cuts.h): along each principal axis with a finite
 * mass, the samples near the line and the quadric on it. */
static gboolean add_cuts(JsonObject *o, const bm_mass_tensor *t, const BmMassTensorSearch *s,
                         const BmCallInputs *inputs, bm_bandinterp **bi, GError **error)
{
    if (t->degenerate)
        return TRUE;
    const BmBandGrid *grid = s->grid;
    if (!grid && !s->table)
        grid = bm_call_inputs_lookup(inputs, "grid", BM_INPUT_BAND_GRID, NULL);
    JsonArray *cuts = json_array_new();
    for (int d = 0; d < t->dims; d++) {
        double m = t->masses[d];
        if (!isfinite(m) || m == 0)
            continue;
        double reach = bm_quadric_reach(m, CUT_ENERGY_EV);
        if (s->table && t->window.radius > 0)
            reach = fmax(reach, 1.2 * t->window.radius);
        if (grid && !s->table)
            reach = fmax(reach, 2.5 * bm_grid_mesh_step(&grid->grid));
        bm_line_samples ls;
        bm_errbuf err = { BM_OK, "" };
        bm_status st = s->table
            ? bm_ktable_line_samples(&s->table->table, s->band, t->k, t->axes[d], reach,
                                     isfinite(t->sample_spacing) ? 0.5 * t->sample_spacing
                                                                 : 1e-9, &ls, &err)
            : grid ? bm_grid_line_samples(&grid->grid, s->band, t->k, t->axes[d], reach, &ls,
                                          &err)
                   : bm_fail(&err, BM_EINVAL, "band cut: no band data");
        if (st != BM_OK) {
            json_array_unref(cuts);
            bm_error_from_core(error, &err, s->source);
            return FALSE;
        }
        JsonObject *c = json_object_new();
        bm_json_set_vec3(c, "axis", t->axes[d]);
        bm_json_set_number(c, "mass_me", m);
        bm_json_set_numbers(c, "data_offset_inv_angstrom", ls.q, ls.n);
        bm_json_set_numbers(c, "data_energy_ev", ls.e, ls.n);
        bm_line_samples_clear(&ls);
        double q[BM_CUT_CURVE_POINTS], e[BM_CUT_CURVE_POINTS];
        for (int i = 0; i < BM_CUT_CURVE_POINTS; i++) {
            q[i] = reach * (2.0 * i / (BM_CUT_CURVE_POINTS - 1) - 1.0);
            double dk[3] = { q[i] * t->axes[d][0], q[i] * t->axes[d][1], q[i] * t->axes[d][2] };
            e[i] = bm_mass_tensor_energy(t, dk);
        }
        bm_json_set_numbers(c, "offset_inv_angstrom", q, BM_CUT_CURVE_POINTS);
        bm_json_set_numbers(c, "fit_energy_ev", e, BM_CUT_CURVE_POINTS);
        if (grid && !s->table) {
            if (!*bi)   /* one interpolant for every cut of the response */
                *bi = bm_bandinterp_new_bands(&grid->grid, BM_BANDINTERP_PAIR_GAP_EV,
                                              s->band, s->band);
            if (!*bi)
                bm_fail(&err, BM_ENOMEM, "band cut: out of memory");
            if (!*bi || bm_grid_line_band(&grid->grid, *bi, s->band, t->k, t->axes[d], q,
                                          BM_CUT_CURVE_POINTS, e, &err) != BM_OK) {
                json_object_unref(c);
                json_array_unref(cuts);
                bm_error_from_core(error, &err, s->source);
                return FALSE;
            }
            bm_json_set_numbers(c, "band_energy_ev", e, BM_CUT_CURVE_POINTS);
        }
        json_array_add_object_element(cuts, c);
    }
    json_object_set_array_member(o, "band_cuts", cuts);
    return TRUE;
}

static JsonObject *run_band(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    g_autoptr(BmMassTensorSearch) s = bm_mass_tensor_search(request, inputs, error);
    if (!s)
        return NULL;
    JsonObject *response = json_object_new();
    JsonObject *b = json_object_new();
    json_object_set_int_member(b, "index", (gint64)s->band);
    if (s->band_name)
        json_object_set_string_member(b, "name", s->band_name);
    else
        json_object_set_null_member(b, "name");
    json_object_set_object_member(response, "band", b);
    json_object_set_string_member(response, "source", s->source);
    JsonArray *list = json_array_new();
    gboolean stencil = json_object_get_boolean_member(request, "stencil");
    gboolean cuts = json_object_get_boolean_member(request, "cuts");
    json_object_set_array_member(response, "extrema", list);
    bm_bandinterp *bi = NULL;
    for (size_t i = 0; i < s->n_tensors; i++) {
        JsonObject *o = bm_mass_tensor_object(&s->tensors[i], s->fractional);
        if (stencil)
            add_stencil(o, &s->tensors[i], s->fractional ? s->recip : NULL);
        json_array_add_object_element(list, o);
        if (cuts && !add_cuts(o, &s->tensors[i], s, inputs, &bi, error)) {
            bm_bandinterp_free(bi);
            json_object_unref(response);
            return NULL;
        }
    }
    bm_bandinterp_free(bi);
    if (s->n_beyond) {
        JsonArray *bl = json_array_new();
        for (size_t i = s->n_tensors; i < s->n_tensors + s->n_beyond; i++) {
            JsonObject *o = bm_mass_tensor_object(&s->tensors[i], s->fractional);
            if (stencil)
                add_stencil(o, &s->tensors[i], s->fractional ? s->recip : NULL);
            json_array_add_object_element(bl, o);
        }
        json_object_set_array_member(response, "beyond_data", bl);
    }
    bm_json_warn_all(response, &s->warnings);
    return response;
}

static gboolean all_bands(JsonObject *request)
{
    JsonNode *n = json_object_get_member(request, "band");
    return n && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING
        && strcmp(json_node_get_string(n), "all") == 0;
}

/* "band": "all": every band in turn, the grid read once; one response per
 * band under "bands", each as a one-band request gives it. */
static JsonObject *run_all(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    gboolean has_grid = json_object_has_member(request, "grid")
                     || bm_call_inputs_lookup(inputs, "grid", BM_INPUT_BAND_GRID, NULL);
    gboolean has_table = json_object_has_member(request, "table");
    if (has_grid == has_table)
        return run_band(request, inputs, error);   /* says what is wrong with the band data */
    /* the request with its own top-level members: "band" and "grid" change */
    g_autoptr(JsonObject) sub = json_object_new();
    g_autoptr(GList) keys = json_object_get_members(request);
    for (GList *k = keys; k; k = k->next)
        json_object_set_member(sub, k->data,
                               json_node_copy(json_object_get_member(request, k->data)));
    g_autoptr(BmBandGrid) loaded = NULL;
    g_autoptr(BmKTable) table = NULL;
    BmInput in = { "grid", BM_INPUT_BAND_GRID, NULL };
    BmCallInputs own = { 1, &in };
    const BmCallInputs *use = inputs;
    size_t nbands;
    char **names;
    if (has_grid) {
        const BmBandGrid *grid = bm_grid_input(request, inputs, &loaded, error);
        if (!grid)
            return NULL;
        if (loaded) {   /* read here once: every band's search gets it handed over */
            json_object_remove_member(sub, "grid");
            in.value = grid;
            use = &own;
        }
        nbands = grid->grid.nbands;
        names = grid->band_names;
    } else {
        table = bm_ktable_load(json_object_get_string_member(request, "table"), error);
        if (!table)
            return NULL;
        nbands = table->table.nbands;
        names = table->band_names;
    }
    for (size_t b = 0; names && b < nbands; b++)
        if (names[b] && strcmp(names[b], "all") == 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "request: \"band\": \"all\" "
                        "is ambiguous: band %zu of the data is named \"all\" (select it by "
                        "index %zu)", b, b);
            return NULL;
        }
    JsonObject *response = json_object_new();
    JsonArray *list = json_array_new();
    json_object_set_array_member(response, "bands", list);
    for (size_t b = 0; b < nbands; b++) {
        json_object_set_int_member(sub, "band", (gint64)b);
        JsonObject *one = run_band(sub, use, error);
        if (!one) {
            g_prefix_error(error, "band %zu: ", b);
            json_object_unref(response);
            return NULL;
        }
        if (!json_object_has_member(response, "source"))
            json_object_set_string_member(response, "source",
                                          json_object_get_string_member(one, "source"));
        json_object_remove_member(one, "source");
        json_array_add_object_element(list, one);
    }
    return response;
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    return all_bands(request) ? run_all(request, inputs, error)
                              : run_band(request, inputs, error);
}

const BmOperation bm_op_mass_tensor = {
    .name = "mass-tensor",
    .summary = "Band extrema of a grid or k-table and their inertial mass tensors",
    .params = params,
    .response = response,
    .run = run,
};
