/* figures.c: one figure per operation, drawn from the numbers of its JSON
 * response as they are (an axis may show 1000/T or a projection of k onto
 * the orbit's plane; nothing of the physics is computed here), and the
 * figure of a batch-results file. */
#include <math.h>
#include <stdarg.h>
#include <string.h>

#include "figures.h"
#include "bm-error.h"
#include "bm-error-private.h"

#define WIDE_W 1280
#define WIDE_H 560
#define ONE_W 820
#define ONE_H 560

/* ---- reading the response ---- */

static double num(JsonObject *o, const char *key)
{
    JsonNode *n = o ? json_object_get_member(o, key) : NULL;
    if (!n || !JSON_NODE_HOLDS_VALUE(n))
        return NAN;
    GType t = json_node_get_value_type(n);
    return t == G_TYPE_DOUBLE || t == G_TYPE_INT64 ? json_node_get_double(n) : NAN;
}

static JsonArray *arr(JsonObject *o, const char *key)
{
    JsonNode *n = o ? json_object_get_member(o, key) : NULL;
    return n && JSON_NODE_HOLDS_ARRAY(n) ? json_node_get_array(n) : NULL;
}

static JsonObject *obj_at(JsonArray *a, guint i)
{
    JsonNode *n = a && i < json_array_get_length(a) ? json_array_get_element(a, i) : NULL;
    return n && JSON_NODE_HOLDS_OBJECT(n) ? json_node_get_object(n) : NULL;
}

static double num_at(JsonArray *a, guint i)
{
    JsonNode *n = a && i < json_array_get_length(a) ? json_array_get_element(a, i) : NULL;
    if (!n || !JSON_NODE_HOLDS_VALUE(n))
        return NAN;
    GType t = json_node_get_value_type(n);
    return t == G_TYPE_DOUBLE || t == G_TYPE_INT64 ? json_node_get_double(n) : NAN;
}

static const char *str(JsonObject *o, const char *key)
{
    JsonNode *n = o ? json_object_get_member(o, key) : NULL;
    return n && JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING
        ? json_node_get_string(n) : NULL;
}

static guint len(JsonArray *a)
{
    return a ? json_array_get_length(a) : 0;
}

static gpointer refuse(GError **error, const char *fmt, ...) G_GNUC_PRINTF(2, 3);
static gpointer refuse(GError **error, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error_literal(error, BM_ERROR, BM_ERROR_INVALID_INPUT, msg);
    return NULL;
}

/* Distinct finite values of key over the points (relative tolerance 1e-12). */
static guint distinct(JsonArray *pts, const char *key, GArray *values)
{
    for (guint i = 0; i < len(pts); i++) {
        double v = num(obj_at(pts, i), key);
        if (!isfinite(v))
            continue;
        gboolean seen = FALSE;
        for (guint j = 0; j < values->len && !seen; j++) {
            double w = g_array_index(values, double, j);
            seen = fabs(v - w) <= 1e-12 * MAX(fabs(v), fabs(w));
        }
        if (!seen)
            g_array_append_val(values, v);
    }
    return values->len;
}

static gboolean same(double a, double b)
{
    return a == b || fabs(a - b) <= 1e-12 * MAX(fabs(a), fabs(b));
}

/* "[0 0 1]" of a direction (three numbers, %.3g). */
static char *direction_text(JsonArray *d)
{
    if (len(d) != 3)
        return g_strdup("?");
    double v[3];
    for (int i = 0; i < 3; i++) {
        v[i] = num_at(d, (guint)i);
        if (fabs(v[i]) < 1e-9)
            v[i] = 0;
    }
    return g_strdup_printf("[%.3g %.3g %.3g]", v[0], v[1], v[2]);
}

/* "1e16", "2.5e19": a density for a title. */
static char *density_text(double v)
{
    char buf[G_ASCII_DTOSTR_BUF_SIZE];
    g_ascii_formatd(buf, sizeof buf, "%.3g", v);
    GString *s = g_string_new(NULL);
    for (const char *c = buf; *c; c++) {
        if (*c == '+')
            continue;
        if (*c == '0' && c > buf && (c[-1] == 'e' || c[-1] == '+' || c[-1] == '-')
            && c[1])
            continue;
        g_string_append_c(s, *c);
    }
    return g_string_free(s, FALSE);
}

/* Densities below this are off the bottom of a density axis: less than
 * one carrier in a cubic centimetre. */
#define DENSITY_FLOOR_CM3 1.0

/* ---- carrier-statistics ---- */

/* The Fermi-level panel: E_F of the points against x, with the band edges
 * the response states (E_v the zero, E_c the effective gap). */
static void fermi_series(BmPlotPanel *panel, JsonArray *pts, const char *x_key, GArray *temps,
                         const char *group_key)
{
    guint groups = MAX(temps->len, 1);
    for (guint g = 0; g < groups; g++) {
        double t = temps->len ? g_array_index(temps, double, g) : NAN;
        g_autofree char *name = groups > 1 ? g_strdup_printf("E_F, %g K", t)
                                           : g_strdup("Fermi level E_F");
        BmPlotSeries *s = bm_plot_series_add(panel, name, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < len(pts); i++) {
            JsonObject *p = obj_at(pts, i);
            if (groups > 1 && !same(num(p, group_key), t))
                continue;
            bm_plot_series_point(s, num(p, x_key), num(p, "fermi_level_ev"));
        }
    }
    g_autofree char *edges = temps->len > 1
        ? g_strdup_printf("band edges E_c, E_v at %g K", g_array_index(temps, double, 0))
        : g_strdup("band edges E_c, E_v");
    BmPlotSeries *ec = bm_plot_series_add(panel, edges, BM_SERIES_REFERENCE);
    BmPlotSeries *ev = bm_plot_series_add(panel, NULL, BM_SERIES_REFERENCE);
    for (guint i = 0; i < len(pts); i++) {
        JsonObject *p = obj_at(pts, i);
        if (temps->len > 1 && !same(num(p, group_key), g_array_index(temps, double, 0)))
            continue;
        double x = num(p, x_key);
        bm_plot_series_point(ec, x, num(p, "effective_band_gap_ev"));
        bm_plot_series_point(ev, x, 0.0);
    }
}

static char *doping_text(JsonObject *p)
{
    double nd = num(p, "donor_density_cm3"), na = num(p, "acceptor_density_cm3");
    g_autofree char *d = density_text(nd), *a = density_text(na);
    if (nd > 0 && na > 0)
        return g_strdup_printf("N_D = %s, N_A = %s cm⁻³", d, a);
    if (nd > 0)
        return g_strdup_printf("N_D = %s cm⁻³", d);
    if (na > 0)
        return g_strdup_printf("N_A = %s cm⁻³", a);
    return g_strdup("undoped");
}

static BmPlotFigure *fig_carriers(JsonObject *r, GError **error)
{
    JsonArray *pts = arr(r, "points");
    g_autoptr(GArray) temps = g_array_new(FALSE, FALSE, sizeof(double));
    g_autoptr(GArray) nds = g_array_new(FALSE, FALSE, sizeof(double));
    g_autoptr(GArray) nas = g_array_new(FALSE, FALSE, sizeof(double));
    distinct(pts, "temperature_k", temps);
    distinct(pts, "donor_density_cm3", nds);
    distinct(pts, "acceptor_density_cm3", nas);
    const char *mat = str(r, "material") ? str(r, "material") : "material";
    if (nds->len > 1 && nas->len > 1)
        return refuse(error, "carrier-statistics --plot: this doping sweep varies both donors "
                      "and acceptors, which no one axis shows: sweep one kind");
    if (nds->len > 1 || nas->len > 1) {
        gboolean donors = nds->len > 1;
        const char *key = donors ? "donor_density_cm3" : "acceptor_density_cm3";
        const char *what = donors ? "donor density" : "acceptor density";
        if (temps->len > 6)
            return refuse(error, "carrier-statistics --plot: a doping sweep at %u temperatures "
                          "(at most 6 are drawn as curves)", temps->len);
        g_autofree char *at = temps->len == 1
            ? g_strdup_printf(" at %g K", g_array_index(temps, double, 0)) : g_strdup("");
        g_autofree char *title = g_strdup_printf("%s: carriers against %s%s", mat, what, at);
        BmPlotFigure *fig = bm_plot_figure_new(title, WIDE_W, WIDE_H);
        g_autofree char *xl = g_strdup_printf("%s (cm⁻³)", what);
        BmPlotPanel *a = bm_plot_panel_add(fig, "carrier densities", xl, "density (cm⁻³)");
        bm_plot_panel_set_log(a, TRUE, TRUE);
        bm_plot_panel_set_y_floor(a, DENSITY_FLOOR_CM3);
        for (guint g = 0; g < temps->len; g++) {
            double t = g_array_index(temps, double, g);
            static const struct { const char *key, *name; } species[] = {
                { "n_cm3", "electrons n" }, { "p_cm3", "holes p" },
            };
            for (guint k = 0; k < G_N_ELEMENTS(species); k++) {
                g_autofree char *name = temps->len > 1
                    ? g_strdup_printf("%s, %g K", species[k].name, t) : g_strdup(species[k].name);
                BmPlotSeries *s = bm_plot_series_add(a, name, BM_SERIES_LINE_MARKERS);
                for (guint i = 0; i < len(pts); i++) {
                    JsonObject *p = obj_at(pts, i);
                    if (same(num(p, "temperature_k"), t))
                        bm_plot_series_point(s, num(p, key), num(p, species[k].key));
                }
            }
        }
        BmPlotSeries *ref = bm_plot_series_add(a, donors ? "N_D (density = doping)"
                                                         : "N_A (density = doping)",
                                               BM_SERIES_REFERENCE);
        GArray *doping = donors ? nds : nas;
        for (guint i = 0; i < doping->len; i++)
            bm_plot_series_point(ref, g_array_index(doping, double, i),
                                 g_array_index(doping, double, i));
        BmPlotPanel *b = bm_plot_panel_add(fig, "Fermi level", xl, "energy above E_v (eV)");
        bm_plot_panel_set_log(b, TRUE, FALSE);
        fermi_series(b, pts, key, temps, "temperature_k");
        return fig;
    }
    if (temps->len < 2)
        return refuse(error, "carrier-statistics --plot: the response holds one point; plot a "
                      "sweep: several temperatures_k (100:600:20) or donor_densities_cm3 / "
                      "acceptor_densities_cm3");
    g_autofree char *doping = doping_text(obj_at(pts, 0));
    g_autofree char *title = g_strdup_printf("%s, %s: carriers against temperature", mat, doping);
    BmPlotFigure *fig = bm_plot_figure_new(title, WIDE_W, WIDE_H);
    BmPlotPanel *a = bm_plot_panel_add(fig, "carrier densities (Arrhenius)", "1000 / T (1/K)",
                                       "density (cm⁻³)");
    bm_plot_panel_set_log(a, FALSE, TRUE);
    bm_plot_panel_set_y_floor(a, DENSITY_FLOOR_CM3);
    static const struct { const char *key, *name; } species[] = {
        { "n_cm3", "electrons n" }, { "p_cm3", "holes p" }, { "ni_cm3", "intrinsic n_i" },
    };
    for (guint k = 0; k < G_N_ELEMENTS(species); k++) {
        BmPlotSeries *s = bm_plot_series_add(a, species[k].name, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < len(pts); i++) {
            JsonObject *p = obj_at(pts, i);
            bm_plot_series_point(s, 1000.0 / num(p, "temperature_k"), num(p, species[k].key));
        }
    }
    BmPlotPanel *b = bm_plot_panel_add(fig, "Fermi level", "temperature (K)",
                                       "energy above E_v (eV)");
    g_autoptr(GArray) none = g_array_new(FALSE, FALSE, sizeof(double));
    fermi_series(b, pts, "temperature_k", none, NULL);
    return fig;
}

/* ---- thermal-mass ---- */

/* The three principal values of key at every point, as one curve when they
 * agree at every point (an isotropic tensor), else one curve each. */
static void principal_series(BmPlotPanel *panel, JsonArray *pts, const char *key,
                             const char *one_name, const char *axis_name)
{
    gboolean isotropic = TRUE;
    for (guint i = 0; i < len(pts) && isotropic; i++) {
        JsonArray *v = arr(obj_at(pts, i), key);
        for (guint j = 1; j < len(v); j++)
            isotropic = isotropic && fabs(num_at(v, j) - num_at(v, 0))
                <= 1e-6 * fabs(num_at(v, 0));
    }
    guint n = isotropic ? 1 : 3;
    for (guint j = 0; j < n; j++) {
        g_autofree char *name = isotropic ? g_strdup(one_name)
                                          : g_strdup_printf("%s %u", axis_name, j + 1);
        BmPlotSeries *s = bm_plot_series_add(panel, name, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < len(pts); i++) {
            JsonObject *p = obj_at(pts, i);
            bm_plot_series_point(s, num(p, "temperature_k"), num_at(arr(p, key), j));
        }
    }
}

static BmPlotFigure *fig_thermal(JsonObject *r, GError **error)
{
    JsonArray *pts = arr(r, "points");
    if (len(pts) < 2)
        return refuse(error, "thermal-mass --plot: the response holds %u temperature%s; plot "
                      "several (temperatures_k 50:600:25)", len(pts), len(pts) == 1 ? "" : "s");
    JsonArray *bands = arr(r, "bands");
    GString *names = g_string_new(NULL);
    for (guint i = 0; i < len(bands); i++) {
        JsonNode *n = json_array_get_element(bands, i);
        if (JSON_NODE_HOLDS_VALUE(n) && json_node_get_value_type(n) == G_TYPE_STRING)
            g_string_append_printf(names, "%s%s", i ? ", " : "", json_node_get_string(n));
    }
    g_autofree char *band_names = g_string_free(names, FALSE);
    const char *carriers = str(r, "carriers") ? str(r, "carriers") : "carriers";
    g_autofree char *title = g_strdup_printf("thermal masses of the %s (bands %s)", carriers,
                                             band_names);
    BmPlotFigure *fig = bm_plot_figure_new(title, WIDE_W, WIDE_H);
    BmPlotPanel *a = bm_plot_panel_add(fig, "masses", "temperature (K)", "mass (m_e)");
    BmPlotSeries *dos = bm_plot_series_add(a, "density-of-states mass", BM_SERIES_LINE_MARKERS);
    for (guint i = 0; i < len(pts); i++) {
        JsonObject *p = obj_at(pts, i);
        bm_plot_series_point(dos, num(p, "temperature_k"), num(p, "dos_mass_me"));
    }
    principal_series(a, pts, "conductivity_principal_masses_me", "conductivity mass",
                     "conductivity mass, axis");
    BmPlotPanel *b = bm_plot_panel_add(fig, "Seebeck coefficient", "temperature (K)",
                                       "Seebeck coefficient (µV/K)");
    principal_series(b, pts, "seebeck_uv_per_k", "Seebeck coefficient", "principal value");
    return fig;
}

static gboolean vec3(JsonArray *a, double v[3]);

/* ---- cyclotron-ellipsoid ---- */

/* x of a point of a field sweep: its angle, or its place in a list. */
static double sweep_x(JsonObject *p, guint i, gboolean angles)
{
    return angles ? num(p, "angle_deg") : i + 1;
}

static gboolean all_have(JsonArray *pts, const char *key)
{
    for (guint i = 0; i < len(pts); i++)
        if (!isfinite(num(obj_at(pts, i), key)))
            return FALSE;
    return len(pts) > 0;
}

static char *sweep_title(const char *what, JsonArray *pts)
{
    g_autofree char *from = direction_text(arr(obj_at(pts, 0), "field_direction"));
    g_autofree char *to = direction_text(arr(obj_at(pts, len(pts) - 1), "field_direction"));
    return g_strdup_printf("%s: field from %s to %s", what, from, to);
}

static BmPlotFigure *fig_ellipsoid(JsonObject *r, GError **error)
{
    JsonArray *pts = arr(r, "points"), *valleys = arr(r, "valleys");
    if (len(pts) < 2)
        return refuse(error, "cyclotron-ellipsoid --plot: plot a field sweep "
                      "(field_directions {\"from\": [0,0,1], \"to\": [1,1,0], \"steps\": 91})");
    gboolean angles = all_have(pts, "angle_deg");
    guint nv = len(valleys);
    /* each valley's line at each direction; valleys on the same line at every
     * direction are one curve */
    g_autofree int *line_of = g_new0(int, (gsize)nv * len(pts));
    for (guint i = 0; i < len(pts); i++) {
        JsonArray *lines = arr(obj_at(pts, i), "lines");
        for (guint v = 0; v < nv; v++)
            line_of[(gsize)v * len(pts) + i] = -1;
        for (guint l = 0; l < len(lines); l++) {
            JsonArray *members = arr(obj_at(lines, l), "valleys");
            for (guint m = 0; m < len(members); m++) {
                double v = num_at(members, m);
                if (v >= 0 && v < nv)
                    line_of[(gsize)v * len(pts) + i] = (int)l;
            }
        }
    }
    const char *what = str(r, "material") ? str(r, "material") : str(r, "carrier");
    g_autofree char *t0 = sweep_title(what ? what : "valleys", pts);
    g_autofree char *title = g_strdup_printf("%s (cyclotron resonance)", t0);
    BmPlotFigure *fig = bm_plot_figure_new(title, ONE_W, ONE_H);
    BmPlotPanel *a = bm_plot_panel_add(fig, NULL, angles ? "field angle (degrees)"
                                                         : "field direction (place in the list)",
                                       "cyclotron mass (m_e)");
    g_autofree gboolean *done = g_new0(gboolean, nv);
    for (guint v = 0; v < nv; v++) {
        if (done[v])
            continue;
        GString *name = g_string_new(NULL);
        guint members = 0;
        for (guint w = v; w < nv; w++) {
            if (done[w] || memcmp(line_of + (gsize)w * len(pts), line_of + (gsize)v * len(pts),
                                  len(pts) * sizeof(int)))
                continue;
            done[w] = TRUE;
            g_string_append_printf(name, "%s%u", members++ ? ", " : "", w + 1);
        }
        g_string_prepend(name, members > 1 ? "valleys " : "valley ");
        /* their directions, each once up to its sign */
        g_autoptr(GPtrArray) dirs = g_ptr_array_new_with_free_func(g_free);
        for (guint w = v; w < nv; w++) {
            if (memcmp(line_of + (gsize)w * len(pts), line_of + (gsize)v * len(pts),
                       len(pts) * sizeof(int)))
                continue;
            double d[3];
            if (!vec3(arr(obj_at(valleys, w), "direction"), d))
                continue;
            int lead = fabs(d[0]) > 1e-9 ? 0 : fabs(d[1]) > 1e-9 ? 1 : 2;
            double sign = d[lead] < 0 ? -1 : 1;
            for (int k = 0; k < 3; k++)
                d[k] = fabs(d[k]) < 1e-9 ? 0 : sign * d[k];
            g_autofree char *t = g_strdup_printf("[%.3g %.3g %.3g]", d[0], d[1], d[2]);
            gboolean seen = FALSE;
            for (guint k = 0; k < dirs->len && !seen; k++)
                seen = !strcmp(g_ptr_array_index(dirs, k), t);
            if (!seen)
                g_ptr_array_add(dirs, g_steal_pointer(&t));
        }
        for (guint k = 0; k < dirs->len && k < 3; k++)
            g_string_append_printf(name, "%s±%s", k ? ", " : ": ",
                                   (char *)g_ptr_array_index(dirs, k));
        if (dirs->len > 3)
            g_string_append(name, ", ...");
        g_autofree char *label = g_string_free(name, FALSE);
        BmPlotSeries *s = bm_plot_series_add(a, label, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < len(pts); i++) {
            int l = line_of[(gsize)v * len(pts) + i];
            JsonObject *line = l >= 0 ? obj_at(arr(obj_at(pts, i), "lines"), (guint)l) : NULL;
            bm_plot_series_point(s, sweep_x(obj_at(pts, i), i, angles),
                                 line ? num(line, "cyclotron_mass_me") : NAN);
        }
    }
    return fig;
}

/* ---- cyclotron-orbit ---- */

static void cross(const double a[3], const double b[3], double c[3])
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

static gboolean normalise(double v[3])
{
    double n = sqrt(v[0] * v[0] + v[1] * v[1] + v[2] * v[2]);
    if (!(n > 0) || !isfinite(n))
        return FALSE;
    for (int i = 0; i < 3; i++)
        v[i] /= n;
    return TRUE;
}

static gboolean vec3(JsonArray *a, double v[3])
{
    if (len(a) != 3)
        return FALSE;
    for (guint i = 0; i < 3; i++)
        v[i] = num_at(a, i);
    return isfinite(v[0]) && isfinite(v[1]) && isfinite(v[2]);
}

static gboolean has_contours(JsonArray *orbits)
{
    for (guint j = 0; j < len(orbits); j++)
        if (len(arr(obj_at(orbits, j), "contour")) > 2)
            return TRUE;
    return FALSE;
}

/* The contours of orbits drawn in the plane perpendicular to the field b
 * (NULL: the normal of the first contour), as coordinates along two unit
 * vectors u, v of that plane from the point the orbits circle. */
static void contour_panel(BmPlotFigure *fig, JsonObject *r, JsonArray *orbits, JsonArray *field)
{
    double c[3] = { 0, 0, 0 }, b[3] = { 0, 0, 0 }, u[3], v[3];
    vec3(arr(r, "k_centre_inv_angstrom"), c);
    if (!vec3(field, b) || !normalise(b)) {
        JsonArray *pts = NULL;
        for (guint j = 0; j < len(orbits) && !pts; j++)
            if (len(arr(obj_at(orbits, j), "contour")) > 2)
                pts = arr(obj_at(orbits, j), "contour");
        double p0[3], p1[3], m[3] = { 0, 0, 0 };
        for (guint i = 0; i < len(pts); i++) {
            vec3(json_array_get_array_element(pts, i), p0);
            vec3(json_array_get_array_element(pts, (i + 1) % len(pts)), p1);
            for (int k = 0; k < 3; k++) {
                p0[k] -= c[k];
                p1[k] -= c[k];
            }
            double x[3];
            cross(p0, p1, x);
            for (int k = 0; k < 3; k++)
                m[k] += x[k];
        }
        memcpy(b, m, sizeof b);
        if (!normalise(b))
            b[2] = 1;
    }
    /* u: the Cartesian axis least along b, made perpendicular to it */
    int least = 0;
    for (int k = 1; k < 3; k++)
        if (fabs(b[k]) < fabs(b[least]))
            least = k;
    double e[3] = { 0, 0, 0 };
    e[least] = 1;
    double dot = b[least];
    for (int k = 0; k < 3; k++)
        u[k] = e[k] - dot * b[k];
    normalise(u);
    cross(b, u, v);
    g_autofree char *bt = g_strdup_printf("[%.3g %.3g %.3g]", b[0], b[1], b[2]);
    g_autofree char *ut = g_strdup_printf("k along u = [%.3g %.3g %.3g] (1/Å)",
                                          fabs(u[0]) < 1e-9 ? 0 : u[0],
                                          fabs(u[1]) < 1e-9 ? 0 : u[1],
                                          fabs(u[2]) < 1e-9 ? 0 : u[2]);
    g_autofree char *vt = g_strdup_printf("k along v = [%.3g %.3g %.3g] (1/Å)",
                                          fabs(v[0]) < 1e-9 ? 0 : v[0],
                                          fabs(v[1]) < 1e-9 ? 0 : v[1],
                                          fabs(v[2]) < 1e-9 ? 0 : v[2]);
    g_autofree char *pt = g_strdup_printf("orbits, field along %s", bt);
    BmPlotPanel *p = bm_plot_panel_add(fig, pt, ut, vt);
    bm_plot_panel_set_equal_aspect(p, TRUE);
    for (guint j = 0; j < len(orbits); j++) {
        JsonObject *o = obj_at(orbits, j);
        JsonArray *pts = arr(o, "contour");
        if (len(pts) < 3)
            continue;
        const char *kind = str(o, "extremum");
        g_autofree char *name = g_strdup_printf("orbit %u (%s), m_c = %.4g m_e", j + 1,
                                                kind ? kind : "?", num(o, "cyclotron_mass_me"));
        BmPlotSeries *s = bm_plot_series_add(p, name, BM_SERIES_LINE);
        for (guint i = 0; i <= len(pts); i++) {
            double k[3];
            if (!vec3(json_array_get_array_element(pts, i % len(pts)), k))
                continue;
            double d[3] = { k[0] - c[0], k[1] - c[1], k[2] - c[2] };
            bm_plot_series_point(s, d[0] * u[0] + d[1] * u[1] + d[2] * u[2],
                                 d[0] * v[0] + d[1] * v[1] + d[2] * v[2]);
        }
    }
    BmPlotSeries *centre = bm_plot_series_add(p, "centre of the orbits", BM_SERIES_MARKERS);
    bm_plot_series_point(centre, 0, 0);
}

static BmPlotFigure *fig_orbit(JsonObject *r, GError **error)
{
    JsonArray *pts = arr(r, "points");
    if (!pts) {
        JsonArray *orbits = arr(r, "orbits");
        if (!has_contours(orbits))
            return refuse(error, "cyclotron-orbit --plot: plot a field sweep (field_directions) "
                          "or the contours of one direction (contour true)");
        BmPlotFigure *fig = bm_plot_figure_new("cyclotron orbits (constant-energy contours)",
                                               ONE_W, ONE_H);
        contour_panel(fig, r, orbits, NULL);
        return fig;
    }
    if (len(pts) < 2)
        return refuse(error, "cyclotron-orbit --plot: the sweep holds one direction");
    gboolean angles = all_have(pts, "angle_deg");
    guint most = 0;
    for (guint i = 0; i < len(pts); i++)
        most = MAX(most, len(arr(obj_at(pts, i), "orbits")));
    if (most == 0)
        return refuse(error, "cyclotron-orbit --plot: no direction of the sweep has a closed "
                      "orbit");
    JsonArray *first = arr(obj_at(pts, 0), "orbits");
    gboolean contours = has_contours(first);
    g_autofree char *title = sweep_title("cyclotron masses", pts);
    BmPlotFigure *fig = bm_plot_figure_new(title, contours ? WIDE_W : ONE_W,
                                           contours ? WIDE_H : ONE_H);
    BmPlotPanel *a = bm_plot_panel_add(fig, contours ? "rotation diagram" : NULL,
                                       angles ? "field angle (degrees)"
                                              : "field direction (place in the list)",
                                       "cyclotron mass (m_e)");
    for (guint j = 0; j < most; j++) {
        const char *kind = NULL;
        for (guint i = 0; i < len(pts) && !kind; i++)
            kind = str(obj_at(arr(obj_at(pts, i), "orbits"), j), "extremum");
        g_autofree char *name = most > 1 || kind
            ? g_strdup_printf("orbit %u (%s area)", j + 1, kind ? kind : "?")
            : g_strdup("orbit");
        BmPlotSeries *s = bm_plot_series_add(a, name, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < len(pts); i++) {
            JsonObject *p = obj_at(pts, i);
            bm_plot_series_point(s, sweep_x(p, i, angles),
                                 num(obj_at(arr(p, "orbits"), j), "cyclotron_mass_me"));
        }
    }
    if (contours)
        contour_panel(fig, r, first, arr(obj_at(pts, 0), "field_direction"));
    return fig;
}

/* ---- mass-tensor and kane-fit: band cuts ---- */

/* A series of the numbers of arrays xs and ys (equal lengths) of cut c. */
static void cut_series(BmPlotPanel *panel, JsonObject *c, const char *xs, const char *ys,
                       const char *name, BmSeriesStyle style)
{
    JsonArray *x = arr(c, xs), *y = arr(c, ys);
    if (len(x) == 0 || len(y) == 0)
        return;   /* no samples near this line: no legend entry either */
    BmPlotSeries *s = bm_plot_series_add(panel, name, style);
    for (guint i = 0; i < len(x) && i < len(y); i++)
        bm_plot_series_point(s, num_at(x, i), num_at(y, i));
}

static char *axis_label(JsonObject *c)
{
    g_autofree char *dir = direction_text(arr(c, "axis"));
    return g_strdup_printf("k − k₀ along %s (1/Å)", dir);
}

static BmPlotFigure *fig_mass_tensor(JsonObject *r, GError **error)
{
    if (arr(r, "bands"))
        return refuse(error, "mass-tensor --plot: draws one band: name it with band (not "
                      "\"all\")");
    JsonArray *ext = arr(r, "extrema");
    JsonObject *e = NULL;
    guint which = 0;
    for (guint i = 0; i < len(ext) && !e; i++)
        if (len(arr(obj_at(ext, i), "band_cuts")) > 0) {
            e = obj_at(ext, i);
            which = i;
        }
    if (!e)
        return refuse(error, "mass-tensor --plot: the response holds no band cuts: ask for "
                      "them with cuts true (an extremum with a finite mass)");
    JsonArray *cuts = arr(e, "band_cuts");
    JsonObject *band = json_object_get_member(r, "band")
        && JSON_NODE_HOLDS_OBJECT(json_object_get_member(r, "band"))
        ? json_object_get_object_member(r, "band") : NULL;
    const char *bname = str(band, "name");
    g_autofree char *bt = bname ? g_strdup_printf("band %s", bname)
                                : g_strdup_printf("band %g", num(band, "index"));
    g_autofree char *more = len(ext) > 1
        ? g_strdup_printf(" (extremum %u of %u: extremum minimum or maximum picks one)",
                          which + 1, len(ext))
        : g_strdup("");
    g_autofree char *title = g_strdup_printf("%s: cuts through its %s at %.4g eV%s", bt,
                                             str(e, "kind") ? str(e, "kind") : "extremum",
                                             num(e, "energy_ev"), more);
    BmPlotFigure *fig = bm_plot_figure_new(title, len(cuts) > 1 ? WIDE_W : ONE_W,
                                           len(cuts) > 1 ? WIDE_H : ONE_H);
    for (guint d = 0; d < len(cuts); d++) {
        JsonObject *c = obj_at(cuts, d);
        g_autofree char *xl = axis_label(c);
        g_autofree char *pt = g_strdup_printf("principal axis %u", d + 1);
        BmPlotPanel *p = bm_plot_panel_add(fig, pt, xl, "energy (eV)");
        g_autofree char *fit = g_strdup_printf("quadric fit, m = %.4g m_e", num(c, "mass_me"));
        cut_series(p, c, "offset_inv_angstrom", "band_energy_ev", "interpolated band",
                   BM_SERIES_LINE);
        cut_series(p, c, "offset_inv_angstrom", "fit_energy_ev", fit, BM_SERIES_FIT);
        cut_series(p, c, "data_offset_inv_angstrom", "data_energy_ev",
                   arr(c, "band_energy_ev") ? "mesh points near the line" : "samples",
                   BM_SERIES_MARKERS);
    }
    return fig;
}

static BmPlotFigure *fig_kane(JsonObject *r, GError **error)
{
    JsonArray *cuts = arr(r, "cuts");
    if (len(cuts) == 0)
        return refuse(error, "kane-fit --plot: the response holds no band cuts: ask for them "
                      "with cuts true");
    JsonObject *kane = json_object_get_member(r, "kane")
        && JSON_NODE_HOLDS_OBJECT(json_object_get_member(r, "kane"))
        ? json_object_get_object_member(r, "kane") : NULL;
    JsonObject *par = json_object_get_member(r, "parabolic")
        && JSON_NODE_HOLDS_OBJECT(json_object_get_member(r, "parabolic"))
        ? json_object_get_object_member(r, "parabolic") : NULL;
    g_autofree char *title = g_strdup_printf("Kane and parabolic fits at the %s (%s preferred)",
                                             str(r, "kind") ? str(r, "kind") : "extremum",
                                             str(r, "preferred") ? str(r, "preferred") : "?");
    BmPlotFigure *fig = bm_plot_figure_new(title, len(cuts) > 1 ? WIDE_W : ONE_W,
                                           len(cuts) > 1 ? WIDE_H : ONE_H);
    for (guint d = 0; d < len(cuts); d++) {
        JsonObject *c = obj_at(cuts, d);
        g_autofree char *xl = axis_label(c);
        g_autofree char *pt = g_strdup_printf("principal direction %u", d + 1);
        BmPlotPanel *p = bm_plot_panel_add(fig, pt, xl, "energy (eV)");
        g_autofree char *pn = g_strdup_printf("parabolic, m = %.4g m_e",
                                              num_at(arr(par, "principal_masses_me"), d));
        g_autofree char *kn = g_strdup_printf("Kane, m = %.4g m_e, α = %.3g /eV",
                                              num_at(arr(kane, "principal_masses_me"), d),
                                              num(kane, "alpha_per_ev"));
        cut_series(p, c, "offset_inv_angstrom", "parabolic_energy_ev", pn, BM_SERIES_LINE);
        if (kane)
            cut_series(p, c, "offset_inv_angstrom", "kane_energy_ev", kn, BM_SERIES_FIT);
        cut_series(p, c, "data_offset_inv_angstrom", "data_energy_ev", "points of the fits",
                   BM_SERIES_MARKERS);
    }
    return fig;
}

/* ---- the table ---- */

typedef BmPlotFigure *(*FigureFunc)(JsonObject *response, GError **error);

static const struct { const char *op; FigureFunc figure; } figures[] = {
    { "carrier-statistics", fig_carriers },
    { "thermal-mass", fig_thermal },
    { "mass-tensor", fig_mass_tensor },
    { "kane-fit", fig_kane },
    { "cyclotron-orbit", fig_orbit },
    { "cyclotron-ellipsoid", fig_ellipsoid },
};

gboolean bm_plot_has_figure(const char *op_name)
{
    for (guint i = 0; i < G_N_ELEMENTS(figures); i++)
        if (!strcmp(figures[i].op, op_name))
            return TRUE;
    return FALSE;
}

char *bm_plot_operations(void)
{
    GString *s = g_string_new(NULL);
    for (guint i = 0; i < G_N_ELEMENTS(figures); i++)
        g_string_append_printf(s, "%s%s", i ? ", " : "", figures[i].op);
    return g_string_free(s, FALSE);
}

BmPlotFigure *bm_plot_figure_for(const char *op_name, JsonObject *response, GError **error)
{
    for (guint i = 0; i < G_N_ELEMENTS(figures); i++)
        if (!strcmp(figures[i].op, op_name))
            return figures[i].figure(response, error);
    g_autofree char *ops = bm_plot_operations();
    return refuse(error, "%s has no plot (plots: %s)", op_name, ops);
}

/* ---- batch results ---- */

/* The number at a dotted path below node (NAN when absent or not a number;
 * a string that is all one decimal number counts). */
static double path_number(JsonNode *node, const char *path)
{
    g_auto(GStrv) parts = g_strsplit(path, ".", -1);
    for (guint i = 0; parts[i] && node; i++) {
        if (JSON_NODE_HOLDS_OBJECT(node)) {
            node = json_object_get_member(json_node_get_object(node), parts[i]);
        } else if (JSON_NODE_HOLDS_ARRAY(node)) {
            char *end;
            guint64 k = g_ascii_strtoull(parts[i], &end, 10);
            JsonArray *a = json_node_get_array(node);
            node = *parts[i] && !*end && k < json_array_get_length(a)
                ? json_array_get_element(a, (guint)k) : NULL;
        } else {
            node = NULL;
        }
    }
    if (!node || !JSON_NODE_HOLDS_VALUE(node))
        return NAN;
    GType t = json_node_get_value_type(node);
    if (t == G_TYPE_DOUBLE || t == G_TYPE_INT64)
        return json_node_get_double(node);
    if (t == G_TYPE_STRING) {
        const char *s = json_node_get_string(node);
        char *end;
        double v = g_ascii_strtod(s, &end);
        return *s && !*end ? v : NAN;
    }
    return NAN;
}

/* The field looked up in the response, else in the whole item ("id", or a
 * request the item carries). */
static double item_number(JsonObject *item, const char *field)
{
    JsonNode *resp = json_object_get_member(item, "response");
    double v = path_number(resp, field);
    if (isfinite(v))
        return v;
    g_autoptr(JsonNode) whole = json_node_new(JSON_NODE_OBJECT);
    json_node_set_object(whole, item);
    return path_number(whole, field);
}

/* "temperature_k (K)": the unit that the key's ending names. */
static char *field_label(const char *field)
{
    static const struct { const char *end, *unit; } units[] = {
        { "_k", "K" }, { "_ev", "eV" }, { "_cm3", "cm⁻³" }, { "_me", "m_e" },
        { "_inv_angstrom", "1/Å" }, { "_t", "T" }, { "_deg", "degrees" },
        { "_uv_per_k", "µV/K" }, { "_per_ev", "1/eV" }, { "_ghz_per_t", "GHz/T" },
    };
    const char *last = strrchr(field, '.');
    last = last ? last + 1 : field;
    /* an index after a key (principal_masses_me.0) takes the key's unit */
    g_autofree char *key = NULL;
    if (g_ascii_isdigit(*last) && last != field) {
        const char *prev = last - 1;
        while (prev > field && prev[-1] != '.')
            prev--;
        key = g_strndup(prev, (gsize)(last - 1 - prev));
    } else {
        key = g_strdup(last);
    }
    size_t n = strlen(key);
    for (guint i = 0; i < G_N_ELEMENTS(units); i++) {
        size_t m = strlen(units[i].end);
        if (n > m && !strcmp(key + n - m, units[i].end))
            return g_strdup_printf("%s (%s)", field, units[i].unit);
    }
    return g_strdup(field);
}

typedef struct { double x, y; } XY;

static int by_x(gconstpointer a, gconstpointer b)
{
    double d = ((const XY *)a)->x - ((const XY *)b)->x;
    return d < 0 ? -1 : d > 0;
}

BmPlotFigure *bm_plot_batch_figure(const char *path, const char *x_field,
                                   const char *const *y_fields, gboolean x_log, gboolean y_log,
                                   guint *used, guint *skipped, GError **error)
{
    g_autofree char *text = NULL;
    gsize length = 0;
    /* a regular file of at most 1 GiB, as every input file */
    if (!bm_error_read_file(path, "the batch results", &text, &length, error))
        return NULL;
    guint ny = g_strv_length((char **)y_fields);
    g_autoptr(GPtrArray) curves = g_ptr_array_new_with_free_func((GDestroyNotify)g_array_unref);
    for (guint k = 0; k < ny; k++)
        g_ptr_array_add(curves, g_array_new(FALSE, FALSE, sizeof(XY)));
    g_auto(GStrv) lines = g_strsplit(text, "\n", -1);
    guint items = 0;
    *used = *skipped = 0;
    for (guint i = 0; lines[i]; i++) {
        g_strstrip(lines[i]);
        if (!*lines[i])
            continue;
        g_autoptr(JsonParser) parser = json_parser_new();
        if (!json_parser_load_from_data(parser, lines[i], -1, NULL))
            continue;   /* not an item */
        JsonNode *root = json_parser_get_root(parser);
        if (!root || !JSON_NODE_HOLDS_OBJECT(root))
            continue;
        JsonObject *item = json_node_get_object(root);
        JsonNode *resp = json_object_get_member(item, "response");
        if (!json_object_has_member(item, "id") || !resp || !JSON_NODE_HOLDS_OBJECT(resp))
            continue;   /* the header, or an item without a response */
        const char *status = str(item, "status");
        items++;
        if (status && strcmp(status, "ok")) {
            (*skipped)++;
            continue;
        }
        double x = item_number(item, x_field);
        gboolean any = FALSE;
        for (guint k = 0; k < ny && isfinite(x); k++) {
            XY p = { x, item_number(item, y_fields[k]) };
            if (isfinite(p.y)) {
                g_array_append_val(g_ptr_array_index(curves, k), p);
                any = TRUE;
            }
        }
        if (any)
            (*used)++;
        else
            (*skipped)++;
    }
    if (items == 0)
        return refuse(error, "the batch results %s hold no item (a JSON object with an id and "
                      "a response object on a line of its own)", path);
    if (*used == 0)
        return refuse(error, "no item of %s has a number at --x %s and at --y %s", path, x_field,
                      y_fields[0]);
    g_autofree char *base = g_path_get_basename(path);
    g_autofree char *title = g_strdup_printf("%s: %u item%s", base, *used, *used == 1 ? "" : "s");
    BmPlotFigure *fig = bm_plot_figure_new(title, ONE_W, ONE_H);
    g_autofree char *xl = field_label(x_field);
    /* several fields: "value", with their unit when they share one */
    g_autofree char *yl = field_label(y_fields[0]);
    if (ny > 1) {
        const char *unit = strrchr(yl, '(');
        for (guint k = 1; k < ny && unit; k++) {
            g_autofree char *other = field_label(y_fields[k]);
            const char *u = strrchr(other, '(');
            if (!u || strcmp(u, unit))
                unit = NULL;
        }
        char *v = unit ? g_strdup_printf("value %s", unit) : g_strdup("value");
        g_free(yl);
        yl = v;
    }
    BmPlotPanel *panel = bm_plot_panel_add(fig, NULL, xl, yl);
    bm_plot_panel_set_log(panel, x_log, y_log);
    for (guint k = 0; k < ny; k++) {
        GArray *pts = g_ptr_array_index(curves, k);
        g_array_sort(pts, by_x);
        g_autofree char *name = field_label(y_fields[k]);
        BmPlotSeries *s = bm_plot_series_add(panel, name, BM_SERIES_LINE_MARKERS);
        for (guint i = 0; i < pts->len; i++)
            bm_plot_series_point(s, g_array_index(pts, XY, i).x, g_array_index(pts, XY, i).y);
    }
    return fig;
}
