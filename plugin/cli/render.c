/* render.c: the command line's readable view of each operation's response.
 * The library answers with JSON objects; this screen layout belongs to the
 * CLI alone. Units come from the operation's response table (BmField) where
 * a renderer prints one. */
#include <math.h>
#include <string.h>

#include "render.h"
#include "bm-json.h"

/* ---- shared ---- */

/* A number member of o, or NAN when o or the member is absent or null. */
static double member(JsonObject *o, const char *key)
{
    JsonNode *n = o ? json_object_get_member(o, key) : NULL;
    return n && JSON_NODE_HOLDS_VALUE(n) ? json_node_get_double(n) : NAN;
}

/* The unit of response field key in op's table ("" when it has none). */
static const char *unit_of(const BmOperation *op, const char *key)
{
    for (const BmField *f = op->response; f && f->name; f++)
        if (!strcmp(f->name, key))
            return f->unit ? f->unit : "";
    g_return_val_if_reached("");
}

typedef void (*RowFunc)(GString *out, JsonObject *row);

/* One row per temperature: each of the response's "points" (a list of
 * temperatures), or the response itself (one temperature). */
static void render_rows(GString *out, JsonObject *response, RowFunc row)
{
    if (!json_object_has_member(response, "points")) {
        row(out, response);
        return;
    }
    JsonArray *pts = json_object_get_array_member(response, "points");
    for (guint i = 0; i < json_array_get_length(pts); i++)
        row(out, json_array_get_object_element(pts, i));
}

/* ---- constants ---- */

static void render_constants(G_GNUC_UNUSED const BmOperation *op,
                             JsonObject *response, GString *out)
{
    JsonObject *all = json_object_get_object_member(response, "constants");
    g_autoptr(GList) keys = json_object_get_members(all);
    g_string_append_printf(out, "%-26s %-14s %s\n", "constant", "value", "meaning");
    for (GList *l = keys; l; l = l->next) {
        JsonObject *c = json_object_get_object_member(all, l->data);
        g_string_append_printf(out, "%-26s %-14.7g %s\n", (const char *)l->data,
                               json_object_get_double_member(c, "value"),
                               json_object_get_string_member(c, "meaning"));
    }
    g_string_append_printf(out, "source: %s\n",
                           json_object_get_string_member(response, "source"));
}

/* ---- materials ---- */

/* A sourced value {value, source} under key of o: its number (NAN when
 * absent) and its source ("-" when absent). */
static JsonObject *sourced(JsonObject *o, const char *key)
{
    return o && json_object_has_member(o, key) ? json_object_get_object_member(o, key) : NULL;
}

static double member_value(JsonObject *o, const char *key)
{
    return member(sourced(o, key), "value");
}

static const char *member_source(JsonObject *o, const char *key)
{
    JsonObject *v = sourced(o, key);
    return v && json_object_has_member(v, "source")
        ? json_object_get_string_member(v, "source") : "-";
}

static void render_materials(G_GNUC_UNUSED const BmOperation *op,
                             JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "points")) {
        JsonArray *a = json_object_get_array_member(response, "points");
        g_string_append_printf(out, "%-8s %-28s %-9s %9s %-6s %8s %8s %8s\n", "name",
                               "long name", "gap", "Eg_eV", "valley", "m_dos_e", "m_dh(T)",
                               "m_kp_h");
        for (guint i = 0; i < json_array_get_length(a); i++) {
            JsonObject *o = json_array_get_object_element(a, i);
            JsonNode *kp = json_object_get_member(o, "band_edge_hole_dos_mass_me");
            g_autofree char *kps = JSON_NODE_HOLDS_NULL(kp) ? g_strdup("-")
                : g_strdup_printf("%.4g", json_node_get_double(kp));
            g_string_append_printf(out, "%-8s %-28s %-9s %9.4f %-6s %8.4g %8.4g %8s\n",
                                   json_object_get_string_member(o, "name"),
                                   json_object_get_string_member(o, "long_name"),
                                   json_object_get_string_member(o, "gap"),
                                   json_object_get_double_member(o, "band_gap_ev"),
                                   json_object_get_string_member(o, "conduction_valley"),
                                   json_object_get_double_member(o, "electron_dos_mass_me"),
                                   json_object_get_double_member(o,
                                       "statistics_hole_dos_mass_me"),
                                   kps);
        }
        g_string_append_printf(out, "at %g K; m_dh(T): statistics hole DOS mass (gives Nv); "
                               "m_kp_h: band-edge k.p hole DOS mass (warped bands); "
                               "bandmass materials --name NAME for one material with "
                               "sources\n",
                               json_object_get_double_member(response, "temperature_k"));
        return;
    }
    JsonObject *m = response;
    JsonObject *d = json_object_get_object_member(m, "derived");
    g_string_append_printf(out, "%s (%s), %s, point group %s, %s gap\n",
                           json_object_get_string_member(m, "name"),
                           json_object_get_string_member(m, "long_name"),
                           json_object_get_string_member(m, "structure"),
                           json_object_get_string_member(m, "point_group"),
                           json_object_get_boolean_member(m, "direct_gap") ? "direct"
                                                                           : "indirect");
    double t = json_object_get_double_member(d, "temperature_k");
    g_string_append_printf(out, "at %g K: gap %.4f eV (%s)\n  source: %s\n", t,
                           member_value(d, "band_gap_ev"), member_source(d, "band_gap_ev"),
                           member_source(m, json_object_has_member(m, "varshni") ? "varshni"
                                         : json_object_has_member(m, "bose_einstein")
                                         ? "bose_einstein" : "band_gap_ev"));
    JsonObject *v = json_object_get_object_member(m, "conduction_valley");
    JsonObject *dv = json_object_get_object_member(d, "conduction_valley");
    g_string_append_printf(out, "conduction valley %s (%s, %g valleys): m_l %.4g, m_t %.4g m_e"
                           "\n  source: %s\n",
                           json_object_get_string_member(v, "label"),
                           json_object_get_string_member(v, "position"),
                           json_object_get_double_member(dv, "valleys"),
                           json_object_get_double_member(v, "longitudinal_mass_me"),
                           json_object_get_double_member(v, "transverse_mass_me"),
                           json_object_get_string_member(v, "source"));
    g_string_append_printf(out, "%-30s %-8.4g source: %s\n", "electron_dos_mass_me",
                           member_value(m, "electron_dos_mass_me"),
                           member_source(m, "electron_dos_mass_me"));
    g_string_append_printf(out, "%-30s %-8.4g at %g K (Nv %.3e cm^-3); source: %s\n",
                           "statistics_hole_dos_mass_me",
                           member_value(d, "statistics_hole_dos_mass_me"), t,
                           member_value(d, "nv_cm3"),
                           member_source(m, "statistics_hole_dos_mass_me"));
    g_string_append_printf(out, "%-30s %-8.4g source: %s\n", "band_edge_hole_dos_mass_me",
                           member_value(d, "band_edge_hole_dos_mass_me"),
                           member_source(d, "band_edge_hole_dos_mass_me"));
    const char *keys[] = { "heavy_hole_mass_me", "light_hole_mass_me", "split_off_mass_me",
                           "split_off_ev" };
    for (size_t i = 0; i < G_N_ELEMENTS(keys); i++)
        g_string_append_printf(out, "%-30s %-8.4g source: %s\n", keys[i],
                               member_value(m, keys[i]), member_source(m, keys[i]));
    JsonArray *dop = json_object_get_array_member(m, "dopants");
    for (guint i = 0; i < json_array_get_length(dop); i++) {
        JsonObject *e = json_array_get_object_element(dop, i);
        g_string_append_printf(out, "%-8s %-8s %.4g eV, g = %g; source: %s\n",
                               json_object_get_string_member(e, "kind"),
                               json_object_get_string_member(e, "species"),
                               json_object_get_double_member(e, "ionization_ev"),
                               json_object_get_double_member(e, "degeneracy"),
                               json_object_get_string_member(e, "source"));
    }
}

/* ---- band-gap ---- */

static void band_gap_row(GString *out, JsonObject *o)
{
    g_string_append_printf(out, "%14g  %12.6f\n", member(o, "temperature_k"),
                           member(o, "band_gap_ev"));
}

static void render_band_gap(G_GNUC_UNUSED const BmOperation *op,
                            JsonObject *response, GString *out)
{
    g_string_append_printf(out, "material   %s (%s form)\nsource     %s\n",
                           json_object_get_string_member(response, "material"),
                           json_object_get_string_member(response, "model"),
                           json_object_get_string_member(response, "source"));
    g_string_append_printf(out, "%14s  %12s\n", "temperature_k", "band_gap_ev");
    render_rows(out, response, band_gap_row);
}

/* ---- carrier-statistics ---- */

/* A doping sweep's rows start with the point's donor and acceptor densities. */
static void carrier_cells(GString *out, JsonObject *o, gboolean doping)
{
    if (doping)
        g_string_append_printf(out, "%10.3e %10.3e ",
                               json_object_get_double_member(o, "donor_density_cm3"),
                               json_object_get_double_member(o, "acceptor_density_cm3"));
    g_string_append_printf(out, "%8g %8.4f %10.3e %10.3e %10.3e %9.4f %10.3e %10.3e %10.3e "
                           "%10.3e  %s\n",
                           json_object_get_double_member(o, "temperature_k"),
                           json_object_get_double_member(o, "band_gap_ev"),
                           json_object_get_double_member(o, "nc_cm3"),
                           json_object_get_double_member(o, "nv_cm3"),
                           json_object_get_double_member(o, "ni_cm3"),
                           json_object_get_double_member(o, "fermi_level_ev"),
                           json_object_get_double_member(o, "n_cm3"),
                           json_object_get_double_member(o, "p_cm3"),
                           json_object_get_double_member(o, "ionized_donors_cm3"),
                           json_object_get_double_member(o, "ionized_acceptors_cm3"),
                           json_object_get_string_member(o, "regime"));
}

static void carrier_row(GString *out, JsonObject *o)
{
    carrier_cells(out, o, FALSE);
}

static void carrier_row_doping(GString *out, JsonObject *o)
{
    carrier_cells(out, o, TRUE);
}

static void render_carrier_statistics(G_GNUC_UNUSED const BmOperation *op,
                                      JsonObject *response, GString *out)
{
    g_string_append_printf(out, "material %s, Fermi level from the %s, %s statistics\n",
                           json_object_get_string_member(response, "material"),
                           json_object_get_string_member(response, "fermi_level_reference"),
                           json_object_get_string_member(response, "statistics"));
    JsonObject *src = json_object_get_object_member(response, "sources");
    g_string_append_printf(out, "gap: %s\nelectron DOS mass: %s\nhole DOS mass (the "
                           "statistics mass m_dh(T), statistics_hole_dos_mass_me): %s\n",
                           json_object_get_string_member(src, "band_gap_ev"),
                           json_object_get_string_member(src, "electron_dos_mass_me"),
                           json_object_get_string_member(src, "statistics_hole_dos_mass_me"));
    /* a doping sweep: each point carries its own dopant lists */
    JsonArray *pts = json_object_has_member(response, "points")
        ? json_object_get_array_member(response, "points") : NULL;
    gboolean doping = pts && json_array_get_length(pts) > 0
        && json_object_has_member(json_array_get_object_element(pts, 0), "donors");
    if (doping)
        g_string_append_printf(out, "%10s %10s ", "N_D_cm3", "N_A_cm3");
    g_string_append_printf(out, "%8s %8s %10s %10s %10s %9s %10s %10s %10s %10s  %s\n", "T_K",
                           "Eg_eV", "Nc_cm3", "Nv_cm3", "ni_cm3", "EF_eV", "n_cm3", "p_cm3",
                           "N_D+_cm3", "N_A-_cm3", "regime");
    render_rows(out, response, doping ? carrier_row_doping : carrier_row);
}

/* ---- drude ---- */

/* "label value unit" for key of r (unit from the operation's response
 * table), "label -" for null, nothing when r has no key. */
static void line(GString *out, const BmOperation *op, JsonObject *r, const char *key,
                 const char *label)
{
    if (!json_object_has_member(r, key))
        return;
    JsonNode *n = json_object_get_member(r, key);
    if (JSON_NODE_HOLDS_NULL(n))
        g_string_append_printf(out, "%-22s -\n", label);
    else
        g_string_append_printf(out, "%-22s %.6g %s\n", label, json_node_get_double(n),
                               unit_of(op, key));
}

static void render_drude(const BmOperation *op,
                         JsonObject *response, GString *out)
{
    line(out, op, response, "mass_me", "mass");
    line(out, op, response, "scattering_time_s", "scattering time");
    line(out, op, response, "mobility_cm2_per_vs", "mobility");
    line(out, op, response, "density_cm3", "density");
    line(out, op, response, "conductivity_s_per_cm", "conductivity");
    line(out, op, response, "resistivity_ohm_cm", "resistivity");
    line(out, op, response, "temperature_k", "temperature");
    line(out, op, response, "thermal_velocity_cm_per_s", "thermal velocity");
    line(out, op, response, "mean_free_path_nm", "mean free path");
}

/* ---- fermi-integral ---- */

/* Element i of an array of numbers, or the number itself; NAN for null. */
static double element(JsonNode *n, guint i)
{
    if (JSON_NODE_HOLDS_ARRAY(n)) {
        JsonNode *e = json_array_get_element(json_node_get_array(n), i);
        return JSON_NODE_HOLDS_NULL(e) ? NAN : json_node_get_double(e);
    }
    return JSON_NODE_HOLDS_NULL(n) ? NAN : json_node_get_double(n);
}

static void render_fermi_integral(G_GNUC_UNUSED const BmOperation *op,
                                  JsonObject *response, GString *out)
{
    double j = json_object_get_double_member(response, "order");
    g_string_append_printf(out, "F_j, j = %g, normalisation %s\n", j,
                           json_object_get_string_member(response, "normalisation"));
    JsonNode *eta = json_object_get_member(response, "eta");
    JsonNode *val = json_object_get_member(response, "values");
    guint n = JSON_NODE_HOLDS_ARRAY(eta) ? json_array_get_length(json_node_get_array(eta)) : 1;
    g_string_append_printf(out, "%22s  %22s\n", "eta", "F_j(eta)");
    for (guint i = 0; i < n; i++)
        g_string_append_printf(out, "%22.15g  %22.15g\n", element(eta, i), element(val, i));
}

/* ---- thermal-mass ---- */

static double element_or_nan(JsonObject *o, const char *key, guint i)
{
    JsonArray *a = json_object_get_array_member(o, key);
    JsonNode *n = a && i < json_array_get_length(a) ? json_array_get_element(a, i) : NULL;
    return n && JSON_NODE_HOLDS_VALUE(n) ? json_node_get_double(n) : NAN;
}

static void thermal_row(GString *out, JsonObject *o)
{
    g_string_append_printf(out, "%8g %9.4f %10.3e %8.4f  %7.4f %7.4f %7.4f  %8.1f %8.1f %8.1f  %6.4f\n",
                           member(o, "temperature_k"), member(o, "fermi_level_ev"),
                           member(o, "density_cm3"), member(o, "dos_mass_me"),
                           element_or_nan(o, "conductivity_principal_masses_me", 0),
                           element_or_nan(o, "conductivity_principal_masses_me", 1),
                           element_or_nan(o, "conductivity_principal_masses_me", 2),
                           element_or_nan(o, "seebeck_uv_per_k", 0),
                           element_or_nan(o, "seebeck_uv_per_k", 1),
                           element_or_nan(o, "seebeck_uv_per_k", 2),
                           element_or_nan(o, "hall_factor", 2));
}

static void render_thermal_mass(G_GNUC_UNUSED const BmOperation *op, JsonObject *response,
                                GString *out)
{
    g_string_append_printf(out, "carriers   %s, band edge %.4f eV\nsource     %s\n",
                           json_object_get_string_member(response, "carriers"),
                           member(response, "edge_ev"),
                           json_object_get_string_member(response, "source"));
    JsonNode *chk = json_object_get_member(response, "edge_check");
    if (chk && JSON_NODE_HOLDS_OBJECT(chk))
        g_string_append_printf(out, "edge check %.1f %% against mass-tensor's fits\n",
                               100.0 * member(json_node_get_object(chk), "relative_difference"));
    g_string_append_printf(out, "%8s %9s %10s %8s  %-23s  %-26s  %6s\n", "T_K", "mu_eV", "n_cm3",
                           "m_dos", "m_c principal (m_e)", "Seebeck principal (uV/K)",
                           "r_H(z)");
    render_rows(out, response, thermal_row);
}

/* ---- hole-mass ---- */

/* A mass column; "-" where there is none (an open surface: see the warnings). */
static void append_mass(GString *out, double v)
{
    if (isfinite(v))
        g_string_append_printf(out, "  %8.4f", v);
    else
        g_string_append(out, "         -");
}

/* The source of key in the response's "sources", or "-". */
static const char *source_of(JsonObject *response, const char *key)
{
    JsonObject *s = json_object_get_object_member(response, "sources");
    return s && json_object_has_member(s, key) ? json_object_get_string_member(s, key) : "-";
}

static void render_hole_mass(const BmOperation *op,
                             JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "material"))
        g_string_append_printf(out, "material %s\n",
                               json_object_get_string_member(response, "material"));
    if (json_object_has_member(response, "parabolic_hole_dos_mass_me")) {
        JsonObject *f = json_object_get_object_member(response, "band_fractions");
        g_string_append_printf(out, "parabolic hole DOS mass        %.4f %s   (population: "
                               "heavy %.3f, light %.3f, split-off %.3g)\n",
                               member(response, "parabolic_hole_dos_mass_me"),
                               unit_of(op, "parabolic_hole_dos_mass_me"),
                               member(f, "heavy"), member(f, "light"),
                               member(f, "split_off"));
    }
    if (json_object_has_member(response, "luttinger")) {
        JsonObject *l = json_object_get_object_member(response, "luttinger");
        JsonObject *hh = json_object_get_object_member(l, "heavy_hole_mass_me");
        JsonObject *lh = json_object_get_object_member(l, "light_hole_mass_me");
        g_string_append(out, "Luttinger masses, m_e     [100]     [110]     [111]   DOS "
                             "(angle average)\n");
        const char *rows[2] = { "heavy hole", "light hole" };
        JsonObject *dirs[2] = { hh, lh };
        const char *dos[2] = { "heavy_hole_dos_mass_me", "light_hole_dos_mass_me" };
        for (int r = 0; r < 2; r++) {
            double v[4] = { member(dirs[r], "100"), member(dirs[r], "110"),
                            member(dirs[r], "111"), member(l, dos[r]) };
            g_string_append_printf(out, "  %-20s", rows[r]);
            for (int c = 0; c < 4; c++)
                append_mass(out, v[c]);
            g_string_append_c(out, '\n');
        }
        g_string_append_printf(out, "  %-50s", "band-edge k.p hole DOS mass (heavy + light)");
        append_mass(out, member(response, "band_edge_hole_dos_mass_me"));
        g_string_append_c(out, '\n');
        if (json_object_has_member(response, "band_edge_hole_dos_mass_with_split_off_me")) {
            g_string_append_printf(out, "  %-50s", "  with the split-off band at temperature");
            append_mass(out, member(response, "band_edge_hole_dos_mass_with_split_off_me"));
            g_string_append_c(out, '\n');
        }
    }
    if (json_object_has_member(response, "statistics_hole_dos_mass_me"))
        g_string_append_printf(out, "statistics hole DOS mass m_dh(%g %s) %.4f %s (gives Nv)\n"
                               "  source: %s\n",
                               member(response, "temperature_k"), unit_of(op, "temperature_k"),
                               member(response, "statistics_hole_dos_mass_me"),
                               unit_of(op, "statistics_hole_dos_mass_me"),
                               source_of(response, "statistics_hole_dos_mass_me"));
}

/* ---- mass-tensor ---- */

/* A column of the extremum table: the number in fmt, a string as it is, "-" for null. */
static void append_value(GString *out, JsonNode *n, const char *fmt)
{
    if (n && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING)
        g_string_append_printf(out, " %10s", json_node_get_string(n));
    else if (n && JSON_NODE_HOLDS_VALUE(n))
        g_string_append_printf(out, fmt, json_node_get_double(n));
    else
        g_string_append_printf(out, " %10s", "-");
}

/* One band's extrema; response holds band and extrema, source is the file. */
static void render_band_extrema(JsonObject *response, const char *source, GString *out)
{
    JsonObject *b = json_object_get_object_member(response, "band");
    const char *name = json_object_get_null_member(b, "name") ? NULL
                     : json_object_get_string_member(b, "name");
    g_string_append_printf(out, "band %" G_GINT64_FORMAT "%s%s%s of %s\n",
                           json_object_get_int_member(b, "index"), name ? " (" : "",
                           name ? name : "", name ? ")" : "", source);
    JsonArray *list = json_object_get_array_member(response, "extrema");
    guint n = json_array_get_length(list);
    /* grids give fractional k; scattered tables only Cartesian k */
    gboolean fractional = n > 0 && JSON_NODE_HOLDS_ARRAY(json_object_get_member(
        json_array_get_object_element(list, 0), "k_fractional"));
    g_string_append_printf(out, "%-3s %-8s %12s  %-28s %10s %10s %10s %10s\n", "#", "kind",
                           "energy_ev", fractional ? "k_fractional" : "k_inv_angstrom",
                           "m1_me", "m2_me", "m3_me", "fit_rms_ev");
    for (guint i = 0; i < n; i++) {
        JsonObject *e = json_array_get_object_element(list, i);
        double energy = json_object_get_double_member(e, "energy_ev");
        if (fabs(energy) < 5e-7)
            energy = 0.0;   /* a rounding error below the printed digits is not "-0" */
        g_string_append_printf(out, "%-3u %-8s %12.6f  ", i,
                               json_object_get_string_member(e, "kind"), energy);
        JsonArray *k = json_object_get_array_member(e, fractional ? "k_fractional"
                                                                  : "k_inv_angstrom");
        g_autofree char *ktext = g_strdup_printf("(%.4f, %.4f, %.4f)",
                                                 json_array_get_double_element(k, 0),
                                                 json_array_get_double_element(k, 1),
                                                 json_array_get_double_element(k, 2));
        g_string_append_printf(out, "%-28s", ktext);
        JsonArray *m = json_object_get_array_member(e, "principal_masses_me");
        for (guint c = 0; c < 3; c++)
            append_value(out, json_array_get_element(m, c), " %10.4f");
        append_value(out, json_object_get_member(e, "fit_rms_ev"), " %10.2e");
        g_string_append_c(out, '\n');
        /* the error estimate beside the masses: what the numbers are worth */
        JsonNode *errn = json_object_get_member(e, "principal_masses_error_me");
        JsonNode *conv = json_object_get_member(e, "converged");
        if (errn && JSON_NODE_HOLDS_ARRAY(errn) && conv && !JSON_NODE_HOLDS_NULL(conv)) {
            g_string_append_printf(out, "    %-8s %12s  %-28s", "", "", "+- (estimated error)");
            JsonArray *ea = json_node_get_array(errn);
            for (guint c = 0; c < 3; c++)
                append_value(out, json_array_get_element(ea, c), " %10.4f");
            JsonNode *partner = json_object_get_member(e, "crossing_partner_band");
            g_autofree char *with = partner && !JSON_NODE_HOLDS_NULL(partner)
                ? g_strdup_printf(" with band %" G_GINT64_FORMAT, json_node_get_int(partner))
                : g_strdup("");
            g_string_append_printf(out, "  %s (%s%s)\n",
                                   json_node_get_boolean(conv) ? "converged" : "NOT converged",
                                   json_object_get_string_member(e, "method"), with);
        }
        if (json_object_has_member(e, "refinement_stencil")) {
            JsonObject *st = json_object_get_object_member(e, "refinement_stencil");
            g_string_append_printf(out, "      refinement stencil: %u k-points, step %g 1/Angstrom "
                                   "(listed with --json)\n",
                                   json_array_get_length(json_object_get_array_member(
                                       st, "k_inv_angstrom")),
                                   json_object_get_double_member(st, "step_inv_angstrom"));
        }
        JsonArray *axes = json_object_get_array_member(e, "principal_axes");
        for (guint r = 0; r < 3; r++) {
            JsonArray *row = json_array_get_array_element(axes, r);
            JsonNode *mr = json_array_get_element(m, r);
            if (JSON_NODE_HOLDS_NULL(mr))
                continue;
            g_string_append_printf(out, "      axis %u: (", r + 1);
            for (guint c = 0; c < 3; c++) {
                JsonNode *v = json_array_get_element(row, c);
                g_string_append_printf(out, c ? ", %.4f" : "%.4f",
                                       JSON_NODE_HOLDS_NULL(v) ? NAN : json_node_get_double(v));
            }
            g_string_append(out, ")\n");
        }
        JsonArray *w = json_object_get_array_member(e, "warnings");
        for (guint c = 0; c < json_array_get_length(w); c++)
            g_string_append_printf(out, "      warning: %s\n",
                                   json_array_get_string_element(w, c));
    }
    if (n == 0)
        g_string_append(out, "(no extrema)\n");
}

static void render_mass_tensor(G_GNUC_UNUSED const BmOperation *op,
                               JsonObject *response, GString *out)
{
    const char *source = json_object_get_string_member(response, "source");
    if (!json_object_has_member(response, "bands")) {
        render_band_extrema(response, source, out);
        return;   /* top-level warnings are printed by the host after the table */
    }
    /* "band": "all": each band with its own warnings (the host prints only
     * the top level's) */
    JsonArray *bands = json_object_get_array_member(response, "bands");
    for (guint i = 0; i < json_array_get_length(bands); i++) {
        JsonObject *one = json_array_get_object_element(bands, i);
        if (i)
            g_string_append_c(out, '\n');
        render_band_extrema(one, source, out);
        JsonNode *w = json_object_get_member(one, "warnings");
        for (guint c = 0; w && JSON_NODE_HOLDS_ARRAY(w) && c < json_array_get_length(
                 json_node_get_array(w)); c++)
            g_string_append_printf(out, "warning: %s\n",
                                   json_array_get_string_element(json_node_get_array(w), c));
    }
}

/* ---- sheet-density ---- */

static void render_sheet_density(const BmOperation *op,
                                 JsonObject *response, GString *out)
{
    const char *given = json_object_get_string_member(response, "given");
    g_string_append_printf(out, "temperature        %g %s\nFermi level        %.6f %s%s\n"
                           "sheet density      %.6e %s%s\n",
                           member(response, "temperature_k"), unit_of(op, "temperature_k"),
                           member(response, "fermi_level_ev"), unit_of(op, "fermi_level_ev"),
                           strcmp(given, "fermi_level_ev") ? "" : " (given)",
                           member(response, "sheet_density_cm2"),
                           unit_of(op, "sheet_density_cm2"),
                           strcmp(given, "sheet_density_cm2") ? "" : " (given)");
    JsonArray *a = json_object_get_array_member(response, "subbands");
    g_string_append_printf(out, "%10s %8s %4s %14s %14s\n", "energy_ev", "mass_me", "g_v",
                           "dos_cm2_per_ev", "density_cm2");
    for (guint i = 0; i < json_array_get_length(a); i++) {
        JsonObject *o = json_array_get_object_element(a, i);
        g_string_append_printf(out, "%10.4f %8.4g %4g %14.5e %14.5e\n",
                               json_object_get_double_member(o, "energy_ev"),
                               json_object_get_double_member(o, "mass_me"),
                               json_object_get_double_member(o, "valley_degeneracy"),
                               json_object_get_double_member(o, "dos_cm2_per_ev"),
                               json_object_get_double_member(o, "sheet_density_cm2"));
    }
}

/* ---- valley-average ---- */

static void render_valley_average(const BmOperation *op,
                                  JsonObject *response, GString *out)
{
    if (json_object_has_member(response, "material"))
        g_string_append_printf(out, "material                %s (%s %s)\n",
                               json_object_get_string_member(response, "material"),
                               json_object_get_string_member(response, "point_group"),
                               json_object_get_string_member(response, "position"));
    if (json_object_has_member(response, "carrier_note"))
        g_string_append_printf(out, "carrier                 hole (%s)\n",
                               json_object_get_string_member(response, "carrier_note"));
    g_string_append_printf(out, "valleys                 %g\n",
                           json_object_get_double_member(response, "valley_count"));
    g_string_append_printf(out, "DOS mass                %.6g %s\n",
                           member(response, "dos_mass_me"), unit_of(op, "dos_mass_me"));
    g_string_append_printf(out, "conductivity mass       %.6g %s%s\n",
                           member(response, "conductivity_mass_me"),
                           unit_of(op, "conductivity_mass_me"),
                           json_object_get_boolean_member(response, "conductivity_isotropic")
                           ? "" : " (harmonic mean)");
    if (json_object_has_member(response, "conductivity_principal_masses_me")) {
        JsonArray *m = json_object_get_array_member(response,
                                                    "conductivity_principal_masses_me");
        JsonArray *ax = json_object_get_array_member(response, "conductivity_principal_axes");
        for (guint i = 0; i < json_array_get_length(m); i++) {
            JsonArray *r = json_array_get_array_element(ax, i);
            g_string_append_printf(out, "  principal %u           %.6g %s along "
                                   "[%.4f %.4f %.4f]\n",
                                   i + 1, json_array_get_double_element(m, i),
                                   unit_of(op, "conductivity_principal_masses_me"),
                                   json_array_get_double_element(r, 0),
                                   json_array_get_double_element(r, 1),
                                   json_array_get_double_element(r, 2));
        }
    }
    JsonArray *va = json_object_get_array_member(response, "valleys");
    g_string_append(out, "direction                      weight  offset_ev  population\n");
    for (guint i = 0; i < json_array_get_length(va); i++) {
        JsonObject *o = json_array_get_object_element(va, i);
        JsonArray *d = json_object_get_array_member(o, "direction");
        g_string_append_printf(out, "[%7.4f %7.4f %7.4f]   %6.3g  %9.4g  %10.4g\n",
                               json_array_get_double_element(d, 0),
                               json_array_get_double_element(d, 1),
                               json_array_get_double_element(d, 2),
                               json_object_get_double_member(o, "weight"),
                               json_object_get_double_member(o, "energy_offset_ev"),
                               json_object_get_double_member(o, "population_fraction"));
    }
}

/* ---- any other operation ---- */

/* Numbers to 6 significant digits, arrays of scalars on one line. */
static void render_scalar(JsonNode *node, GString *out)
{
    if (JSON_NODE_HOLDS_VALUE(node) && json_node_get_value_type(node) == G_TYPE_DOUBLE) {
        g_string_append_printf(out, "%.6g", json_node_get_double(node));
    } else if (JSON_NODE_HOLDS_ARRAY(node)) {
        JsonArray *a = json_node_get_array(node);
        g_string_append_c(out, '[');
        for (guint i = 0; i < json_array_get_length(a); i++) {
            if (i)
                g_string_append(out, ", ");
            render_scalar(json_array_get_element(a, i), out);
        }
        g_string_append_c(out, ']');
    } else {
        g_autofree char *text = bm_json_to_string(node, FALSE);
        g_string_append(out, text);
    }
}

static void render_object(JsonObject *o, GString *out, int indent)
{
    g_autoptr(GList) keys = json_object_get_members(o);
    for (GList *l = keys; l; l = l->next) {
        if (indent == 0 && (strcmp(l->data, "warnings") == 0
                            || strcmp(l->data, "warning_codes") == 0))
            continue;   /* printed after the table */
        JsonNode *child = json_object_get_member(o, l->data);
        g_string_append_printf(out, "%*s%-28s", indent, "", (const char *)l->data);
        if (JSON_NODE_HOLDS_OBJECT(child)) {
            g_string_append_c(out, '\n');
            render_object(json_node_get_object(child), out, indent + 2);
        } else {
            g_string_append_c(out, ' ');
            render_scalar(child, out);
            g_string_append_c(out, '\n');
        }
    }
}

void bm_cli_render_generic(JsonObject *response, GString *out)
{
    render_object(response, out, 0);
}

/* ---- the table ---- */

typedef void (*Renderer)(const BmOperation *op, JsonObject *response, GString *out);

static const struct {
    const char *op;
    Renderer render;
} renderers[] = {
    { "constants", render_constants },
    { "materials", render_materials },
    { "band-gap", render_band_gap },
    { "carrier-statistics", render_carrier_statistics },
    { "drude", render_drude },
    { "fermi-integral", render_fermi_integral },
    { "hole-mass", render_hole_mass },
    { "mass-tensor", render_mass_tensor },
    { "sheet-density", render_sheet_density },
    { "valley-average", render_valley_average },
    { "thermal-mass", render_thermal_mass },
};

void bm_cli_render(const BmOperation *op, JsonObject *response, GString *out)
{
    for (gsize i = 0; i < G_N_ELEMENTS(renderers); i++)
        if (!strcmp(renderers[i].op, op->name)) {
            renderers[i].render(op, response, out);
            return;
        }
    bm_cli_render_generic(response, out);
}
