/* hole-mass.c: operation "hole-mass" -- the hole DOS mass from heavy, light
 * and split-off bands, and masses from Luttinger parameters. */
#include <math.h>

#include "ops.h"
#include "bm-json.h"
#include "bm-holes.h"

static const BmParam params[] = {
    { "heavy_hole_mass_me", BM_VALUE_NUMBER, FALSE, NULL, "heavy-hole DOS mass, m_e" },
    { "light_hole_mass_me", BM_VALUE_NUMBER, FALSE, NULL, "light-hole DOS mass, m_e" },
    { "split_off_mass_me", BM_VALUE_NUMBER, FALSE, NULL,
      "split-off band mass, m_e (optional; needs spin_orbit_splitting_ev)" },
    { "spin_orbit_splitting_ev", BM_VALUE_NUMBER, FALSE, NULL,
      "spin-orbit splitting Delta_so, eV" },
    { "temperature_k", BM_VALUE_NUMBER, FALSE, "300",
      "temperature for the split-off population, K" },
    { "luttinger_parameters", BM_VALUE_ARRAY, FALSE, NULL,
      "[gamma1, gamma2, gamma3]: directional and warped-surface DOS masses" },
    { NULL, 0, FALSE, NULL, NULL }
};

static void copy_warnings(JsonObject *resp, const bm_warnings *w)
{
    for (int i = 0; i < w->count; i++)
        bm_json_warn(resp, "%s", w->text[i]);
}

static void set_dirs(JsonObject *o, const char *key, const double m[3])
{
    JsonObject *d = json_object_new();
    bm_json_set_number(d, "100", m[0]);
    bm_json_set_number(d, "110", m[1]);
    bm_json_set_number(d, "111", m[2]);
    json_object_set_object_member(o, key, d);
}

static JsonObject *run(JsonObject *request, const BmCallInputs *inputs, GError **error)
{
    (void)inputs;
    bm_errbuf err = {0};
    gboolean bands = json_object_has_member(request, "heavy_hole_mass_me")
                  || json_object_has_member(request, "light_hole_mass_me");
    gboolean lutt = json_object_has_member(request, "luttinger_parameters");
    if (!bands && !lutt) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                    "request: give heavy_hole_mass_me and light_hole_mass_me, or "
                    "luttinger_parameters [gamma1, gamma2, gamma3], or both");
        return NULL;
    }
    g_autoptr(JsonObject) resp = json_object_new();
    if (bands) {
        bm_hole_bands b = {0};
        bm_hole_dos d;
        if (!bm_json_number(request, "heavy_hole_mass_me", NULL, &b.m_hh, error)
            || !bm_json_number(request, "light_hole_mass_me", NULL, &b.m_lh, error)
            || !bm_json_number(request, "temperature_k", NULL, &b.temperature_k, error))
            return NULL;
        if (json_object_has_member(request, "split_off_mass_me")) {
            if (!bm_json_number(request, "split_off_mass_me", NULL, &b.m_so, error)
                || !bm_json_number(request, "spin_orbit_splitting_ev", NULL, &b.delta_so_ev,
                                   error))
                return NULL;
            if (b.m_so <= 0.0) {
                g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                            "request: key \"split_off_mass_me\" must be greater than zero "
                            "(got %g); leave it out to ignore the band", b.m_so);
                return NULL;
            }
        } else if (json_object_has_member(request, "spin_orbit_splitting_ev")) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: \"spin_orbit_splitting_ev\" needs \"split_off_mass_me\"");
            return NULL;
        }
        if (bm_hole_dos_mass(&b, &d, &err) != BM_OK) {
            bm_error_from_core(error, &err, "hole-mass");
            return NULL;
        }
        bm_json_set_number(resp, "dos_mass_me", d.dos_mass);
        JsonObject *f = json_object_new();
        bm_json_set_number(f, "heavy", d.fraction_hh);
        bm_json_set_number(f, "light", d.fraction_lh);
        bm_json_set_number(f, "split_off", d.fraction_so);
        json_object_set_object_member(resp, "band_fractions", f);
        copy_warnings(resp, &d.warnings);
    }
    if (lutt) {
        gsize n = 0;
        g_autofree double *g = bm_json_numbers(request, "luttinger_parameters", NULL, &n, error);
        if (!g)
            return NULL;
        if (n != 3) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT,
                        "request: key \"luttinger_parameters\" must hold 3 numbers "
                        "[gamma1, gamma2, gamma3] (got %zu)", (size_t)n);
            return NULL;
        }
        bm_luttinger L = {g[0], g[1], g[2]};
        bm_luttinger_masses m;
        if (bm_luttinger_masses_compute(&L, &m, &err) != BM_OK) {
            bm_error_from_core(error, &err, "hole-mass");
            return NULL;
        }
        JsonObject *o = json_object_new();
        set_dirs(o, "heavy_hole_mass_me", m.heavy);
        set_dirs(o, "light_hole_mass_me", m.light);
        /* non-finite values (open heavy-hole surface) become null */
        bm_json_set_number(o, "heavy_hole_dos_mass_me", m.heavy_dos_mass);
        bm_json_set_number(o, "light_hole_dos_mass_me", m.light_dos_mass);
        bm_json_set_number(o, "combined_dos_mass_me", m.combined_dos_mass);
        json_object_set_boolean_member(o, "heavy_hole_convex", m.heavy_convex);
        json_object_set_object_member(resp, "luttinger", o);
        copy_warnings(resp, &m.warnings);
    }
    return g_steal_pointer(&resp);
}

const BmOperation bm_op_hole_mass = {
    .name = "hole-mass",
    .summary = "Hole DOS mass from heavy/light/split-off bands; directional and DOS "
               "masses from Luttinger parameters",
    .params = params,
    .run = run,
    .render = NULL,
};
