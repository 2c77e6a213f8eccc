/* cyclotron-orbit.c: operation "cyclotron-orbit" -- cyclotron orbits on the
 * interpolated band of a grid (core/bm-orbit.h): for each field direction the
 * extremal sections of the constant-energy surface about a band extremum,
 * their areas, Onsager frequencies and cyclotron masses. */
#include <math.h>
#include <string.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-enums.h"
#include "bm-error-private.h"
#include "grid-input.h"
#include "bm-parallel.h"
#include "band-select.h"
#include "bm-bandinterp.h"
#include "bm-extrema.h"
#include "bm-orbit.h"
#include "bm-units.h"
#include "field-input.h"

static const BmParam params[] = {
    { "grid", BM_VALUE_STRING, FALSE, NULL,
      "band grid document (JSON, format bandmass-grid-1), or a grid handed over in memory",
      .unit = NULL },
    { "band", BM_VALUE_INTEGER | BM_VALUE_STRING, TRUE, NULL, "band: 0-based index or name",
      .unit = NULL },
    { "energy_ev", BM_VALUE_NUMBER, TRUE, NULL,
      "the energy of the orbits (the Fermi energy; the grid's energy zero)", .unit = "eV" },
    BM_FIELD_INPUT_PARAMS,
    { "extremum", BM_VALUE_STRING, FALSE, "\"minimum\"",
      "the orbits circle the band's lowest minimum (electrons) or highest maximum (holes)",
      .choices = &bm_enum_extremum_search },
    { "k_centre_inv_angstrom", BM_VALUE_ARRAY, FALSE, NULL,
      "instead: the Cartesian point the orbits circle", .unit = "1/Angstrom" },
    { "contour", BM_VALUE_BOOLEAN, FALSE, "false",
      "give each orbit's contour (64 Cartesian points) for plotting", .unit = NULL },
    BM_PARAM_END
};

static const BmField response[] = {
    { "k_centre_inv_angstrom", "1/Angstrom", TRUE, "the point the orbits circle" },
    { "orbits", NULL, TRUE,
      "one field direction: the extremal orbits, each cyclotron_mass_me (negative for a hole "
      "orbit), cyclotron_mass_error_me, energy_step_ev, area_inv_angstrom2, frequency_t, "
      "k_parallel_inv_angstrom, extremum (maximum, minimum or sheet), contour (on request)" },
    { "open", NULL, TRUE,
      "one field direction: true when the sections do not close within half a reciprocal "
      "vector of the centre (an open or very large orbit: no mass is given)" },
    { "points", NULL, TRUE, "several field directions: {field_direction, angle_deg, orbits, open}" },
    { "source", NULL, TRUE, "where the band data came from" },
    BM_FIELD_END
};

static JsonObject *orbit_object(const bm_grid *g, const bm_bandinterp *bi, size_t band,
                                const double c[3], const double dir[3], double e,
                                const bm_orbit *o, gboolean contour, bm_warnings *w)
{
    JsonObject *ob = json_object_new();
    if (isfinite(o->mass_me))
        bm_json_set_number(ob, "cyclotron_mass_me", o->mass_me);
    else
        json_object_set_null_member(ob, "cyclotron_mass_me");
    bm_json_set_number(ob, "cyclotron_mass_error_me", o->mass_error_me);
    bm_json_set_number(ob, "energy_step_ev", o->energy_step_ev);
    bm_json_set_number(ob, "area_inv_angstrom2", o->area);
    bm_json_set_number(ob, "frequency_t", BM_ONSAGER_T_A2 * o->area);
    bm_json_set_number(ob, "k_parallel_inv_angstrom", o->k_parallel);
    json_object_set_string_member(ob, "extremum", o->extremum > 0 ? "maximum"
                                                  : o->extremum < 0 ? "minimum" : "sheet");
    if (o->irregular)
        bm_warn(w, BM_WARN_ORBIT_IRREGULAR,
                "an orbit at k_parallel %.4f 1/A is not star-shaped about the centre: its area "
                "counts only the part each ray from the centre reaches first", o->k_parallel);
    if (isfinite(o->mass_me) && o->mass_error_me > 0.01 * fabs(o->mass_me))
        bm_warn(w, BM_WARN_NOT_CONVERGED,
                "the cyclotron mass at k_parallel %.4f 1/A changes by %.1f %% between energy "
                "steps %.2g and %.2g eV: the area is not smooth in energy there (a nearby "
                "extremal change or a crossing)", o->k_parallel,
                100.0 * o->mass_error_me / fabs(o->mass_me), o->energy_step_ev,
                2.0 * o->energy_step_ev);
    if (contour) {
        double pts[64][3];
        bm_errbuf err = { BM_OK, "" };
        if (bm_orbit_contour(g, bi, band, c, dir, e, o->k_parallel, pts, 64, &err) == BM_OK) {
            JsonArray *a = json_array_new();
            for (int i = 0; i < 64; i++) {
                JsonArray *p = json_array_new();
                for (int j = 0; j < 3; j++)
                    json_array_add_double_element(p, pts[i][j]);
                json_array_add_array_element(a, p);
            }
            json_object_set_array_member(ob, "contour", a);
        }
    }
    return ob;
}

/* Field directions are independent: they run on a thread pool, each into its
 * own slot, and the response is built in order afterwards. */
typedef struct {
    const bm_grid *g;
    const bm_bandinterp *bi;
    size_t band;
    const double *c;
    const BmFieldDirections *fd;
    double e;
    int sense;
    bm_orbit_set *sets;
    bm_status *status;
    bm_errbuf *errs;
} orbit_job;

static void run_direction(gsize i, gpointer data)
{
    orbit_job *j = data;
    j->status[i] = bm_orbits_find(j->g, j->bi, j->band, j->c, j->fd->dirs[i], j->e, j->sense,
                                  &j->sets[i], &j->errs[i]);
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    double e;
    if (!bm_json_number(request, "energy_ev", NULL, &e, error))
        return NULL;
    bm_search which = (bm_search)bm_enum_value(request, "extremum", &bm_enum_extremum_search);
    if (which == BM_SEARCH_ALL) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: key \"extremum\": the orbits circle one extremum: \"minimum\" or "
                    "\"maximum\"");
        return NULL;
    }
    gboolean contour = json_object_has_member(request, "contour")
                       && json_object_get_boolean_member(request, "contour");
    BmFieldDirections fd;
    if (!bm_field_directions_read(request, &fd, error))
        return NULL;
    BmBandGrid *owned = NULL;
    const BmBandGrid *grid = NULL;
    JsonObject *resp = NULL;
    bm_bandinterp *bi = NULL;
    bm_warnings w = {0};
    bm_orbit_set *sets = NULL;
    bm_status *status = NULL;
    bm_errbuf *errs = NULL;
    grid = bm_grid_input(request, inputs, &owned, error);
    if (!grid)
        goto out;
    size_t band;
    if (!bm_band_select_node(json_object_get_member(request, "band"),
                             (const char *const *)grid->band_names, NULL, grid->grid.nbands,
                             grid->source, &band, error))
        goto out;
    double c[3];
    int sense = which == BM_SEARCH_MINIMUM ? 1 : -1;
    if (json_object_has_member(request, "k_centre_inv_angstrom")) {
        sense = 0;   /* a given centre: the side of the energy decides */
        if (!bm_json_vec3(request, "k_centre_inv_angstrom", NULL, c, error))
            goto out;
    } else {
        bm_mass_tensor *t = NULL;
        size_t nt = 0;
        bm_fit_options opt = { 0.0, 0.0, 0.0 };
        bm_errbuf err = { BM_OK, "" };
        if (bm_grid_mass_tensors(&grid->grid, band, which, NULL, &opt, &t, &nt, &err) != BM_OK) {
            bm_error_from_core(error, &err, grid->source);
            goto out;
        }
        if (nt == 0) {
            bm_mass_tensors_free(t, nt);
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "%s: band %zu has no %s for the orbits to circle: give "
                        "\"k_centre_inv_angstrom\"", grid->source, band,
                        which == BM_SEARCH_MINIMUM ? "minimum" : "maximum");
            goto out;
        }
        memcpy(c, t[0].k, sizeof c);
        bm_mass_tensors_free(t, nt);
    }
    bi = bm_bandinterp_new_bands(&grid->grid, BM_BANDINTERP_PAIR_GAP_EV, band, band);
    if (!bi) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "cyclotron-orbit: out of memory");
        goto out;
    }
    resp = json_object_new();
    bm_json_set_vec3(resp, "k_centre_inv_angstrom", c);
    JsonArray *pts = json_array_new();
    sets = g_new0(bm_orbit_set, fd.n);
    status = g_new0(bm_status, fd.n);
    errs = g_new0(bm_errbuf, fd.n);
    orbit_job job = { &grid->grid, bi, band, c, &fd, e, sense, sets, status, errs };
    bm_parallel_for(fd.n, MIN(g_get_num_processors(), 64), run_direction, &job);
    for (gsize i = 0; i < fd.n; i++) {
        bm_orbit_set set = sets[i];
        if (status[i] != BM_OK) {
            json_array_unref(pts);
            json_object_unref(resp);
            resp = NULL;
            bm_error_from_core(error, &errs[i], "request");
            goto out;
        }
        JsonObject *p = fd.single ? resp : bm_field_point_new(&fd, i);
        JsonArray *oa = json_array_new();
        for (size_t m = 0; m < set.count; m++)
            json_array_add_object_element(oa, orbit_object(&grid->grid, bi, band, c, fd.dirs[i], e,
                                                           &set.orbits[m], contour, &w));
        json_object_set_array_member(p, "orbits", oa);
        json_object_set_boolean_member(p, "open", set.open);
        if (set.open)
            bm_warn(&w, BM_WARN_OPEN_SURFACE,
                    "field [%.3g, %.3g, %.3g]: the sections do not close within %.3f 1/A of the "
                    "centre: an open orbit (no cyclotron mass), or one larger than half the zone",
                    fd.dirs[i][0], fd.dirs[i][1], fd.dirs[i][2], set.reach);
        if (set.missed)
            bm_warn(&w, BM_WARN_NO_EXTREMUM,
                    "the energy %.4f eV is on the wrong side of the band at the centre: no orbit "
                    "circles it (electrons need an energy above a minimum, holes below a "
                    "maximum)", e);
        if (!fd.single)
            json_array_add_object_element(pts, p);
    }
    if (fd.single)
        json_array_unref(pts);
    else
        json_object_set_array_member(resp, "points", pts);
    json_object_set_string_member(resp, "source", grid->source);
    bm_json_warn_all(resp, &w);
out:
    g_free(sets);
    g_free(status);
    g_free(errs);
    bm_warnings_clear(&w);
    bm_bandinterp_free(bi);
    bm_field_directions_clear(&fd);
    if (owned)
        bm_band_grid_free(owned);
    return resp;
}

const BmOperation bm_op_cyclotron_orbit = {
    .name = "cyclotron-orbit",
    .summary = "Cyclotron orbits on the interpolated band of a grid: extremal areas, "
               "Onsager frequencies and cyclotron masses for one or many field directions",
    .params = params,
    .run = run,
    .response = response,
};
