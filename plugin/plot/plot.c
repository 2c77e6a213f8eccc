/* plot.c: the plotting layer of plot.h: layout (axes, ticks, legend), and a
 * canvas that draws either through cairo (PNG, PDF) or as SVG text (curves
 * as named groups, labels as text; its text is measured with cairo too, so
 * the three formats share one layout). */
#include <math.h>
#include <string.h>

#include <cairo.h>
#include <cairo-pdf.h>

#include "plot.h"
#include "bm-error.h"

/* ---- the look ---- */

#define FONT "DejaVu Sans"
#define FONT_SVG "DejaVu Sans, Verdana, Arial, sans-serif"
#define SIZE_TITLE 17.0
#define SIZE_PANEL_TITLE 14.0
#define SIZE_LABEL 14.0
#define SIZE_TICK 12.0
#define SIZE_LEGEND 12.0
#define PAD 16.0
#define PANEL_GAP 28.0
#define TICK_LEN 5.0
#define MINOR_LEN 3.0

typedef struct { double r, g, b; } Rgb;

static Rgb rgb_hex(unsigned v)
{
    return (Rgb){ ((v >> 16) & 0xff) / 255.0, ((v >> 8) & 0xff) / 255.0, (v & 0xff) / 255.0 };
}

/* Okabe & Ito, "Color Universal Design" (2008): the eight colours, in an
 * order that keeps neighbours apart on white (the yellow last, the weakest
 * on white). */
static const unsigned palette[] = {
    0x0072B2, /* blue */
    0xD55E00, /* vermillion */
    0x009E73, /* bluish green */
    0xCC79A7, /* reddish purple */
    0xE69F00, /* orange */
    0x56B4E9, /* sky blue */
    0x000000, /* black */
    0xF0E442, /* yellow */
};
#define N_PALETTE G_N_ELEMENTS(palette)
#define INK 0x333333
#define GRID_INK 0xE4E4E4
#define REFERENCE_INK 0x777777

enum { MARK_CIRCLE, MARK_SQUARE, MARK_TRIANGLE, MARK_DIAMOND, MARK_TRIANGLE_DOWN, N_MARKS };

/* ---- the model ---- */

typedef struct { double x, y; } Pt;

struct BmPlotSeries {
    char *name;
    BmSeriesStyle style;
    GArray *pts;   /* Pt; a point with NAN x and y breaks the line */
    guint colour, mark;
};

struct BmPlotPanel {
    char *title, *x_label, *y_label;
    gboolean x_log, y_log, equal;
    double y_floor;   /* the lowest y shown (NAN: the data's) */
    GPtrArray *series;
    guint n_styled;   /* series given a colour so far */
};

struct BmPlotFigure {
    char *title;
    int width, height;
    GPtrArray *panels;
};

static void series_free(gpointer p)
{
    BmPlotSeries *s = p;
    g_free(s->name);
    g_array_unref(s->pts);
    g_free(s);
}

static void panel_free(gpointer p)
{
    BmPlotPanel *panel = p;
    g_free(panel->title);
    g_free(panel->x_label);
    g_free(panel->y_label);
    g_ptr_array_unref(panel->series);
    g_free(panel);
}

BmPlotFigure *bm_plot_figure_new(const char *title, int width, int height)
{
    BmPlotFigure *fig = g_new0(BmPlotFigure, 1);
    fig->title = g_strdup(title);
    fig->width = width;
    fig->height = height;
    fig->panels = g_ptr_array_new_with_free_func(panel_free);
    return fig;
}

void bm_plot_figure_free(BmPlotFigure *fig)
{
    if (!fig)
        return;
    g_free(fig->title);
    g_ptr_array_unref(fig->panels);
    g_free(fig);
}

BmPlotPanel *bm_plot_panel_add(BmPlotFigure *fig, const char *title, const char *x_label,
                               const char *y_label)
{
    BmPlotPanel *p = g_new0(BmPlotPanel, 1);
    p->title = g_strdup(title);
    p->x_label = g_strdup(x_label);
    p->y_label = g_strdup(y_label);
    p->series = g_ptr_array_new_with_free_func(series_free);
    p->y_floor = NAN;
    g_ptr_array_add(fig->panels, p);
    return p;
}

void bm_plot_panel_set_log(BmPlotPanel *panel, gboolean x_log, gboolean y_log)
{
    panel->x_log = x_log;
    panel->y_log = y_log;
}

void bm_plot_panel_set_y_floor(BmPlotPanel *panel, double y_floor)
{
    panel->y_floor = y_floor;
}

void bm_plot_panel_set_equal_aspect(BmPlotPanel *panel, gboolean equal)
{
    panel->equal = equal;
}

guint bm_plot_panel_series_count(const BmPlotPanel *panel)
{
    return panel->series->len;
}

BmPlotSeries *bm_plot_series_add(BmPlotPanel *panel, const char *name, BmSeriesStyle style)
{
    BmPlotSeries *s = g_new0(BmPlotSeries, 1);
    s->name = g_strdup(name);
    s->style = style;
    s->pts = g_array_new(FALSE, FALSE, sizeof(Pt));
    if (style != BM_SERIES_REFERENCE) {
        s->colour = panel->n_styled % N_PALETTE;
        s->mark = panel->n_styled % N_MARKS;
        panel->n_styled++;
    }
    g_ptr_array_add(panel->series, s);
    return s;
}

void bm_plot_series_point(BmPlotSeries *s, double x, double y)
{
    Pt p = { x, y };
    g_array_append_val(s->pts, p);
}

void bm_plot_series_break(BmPlotSeries *s)
{
    bm_plot_series_point(s, NAN, NAN);
}

guint bm_plot_series_length(const BmPlotSeries *s)
{
    guint n = 0;
    for (guint i = 0; i < s->pts->len; i++)
        n += isfinite(g_array_index(s->pts, Pt, i).x);
    return n;
}

gboolean bm_plot_format_from_path(const char *path, BmPlotFormat *format, GError **error)
{
    static const struct { const char *ext; BmPlotFormat format; } exts[] = {
        { ".svg", BM_PLOT_SVG }, { ".png", BM_PLOT_PNG }, { ".pdf", BM_PLOT_PDF },
    };
    size_t len = strlen(path);
    for (guint i = 0; i < G_N_ELEMENTS(exts); i++)
        if (len > 4 && !g_ascii_strcasecmp(path + len - 4, exts[i].ext)) {
            g_autofree char *base = g_path_get_basename(path);
            if (strlen(base) > 4) {
                *format = exts[i].format;
                return TRUE;
            }
        }
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "plot file \"%s\": the name must end "
                "in .svg, .png or .pdf (the extension chooses the format)", path);
    return FALSE;
}

/* ---- the canvas: cairo, or SVG text measured with cairo ---- */

typedef struct {
    cairo_t *cr;    /* draws (PNG, PDF), or only measures text (SVG) */
    GString *svg;   /* NULL unless SVG */
} Canvas;

static void set_rgb(Canvas *c, Rgb col)
{
    cairo_set_source_rgb(c->cr, col.r, col.g, col.b);
}

static void svg_rgb(GString *s, Rgb col)
{
    g_string_append_printf(s, "#%02x%02x%02x", (int)lround(col.r * 255),
                           (int)lround(col.g * 255), (int)lround(col.b * 255));
}

static void set_font(Canvas *c, double size, gboolean bold)
{
    cairo_select_font_face(c->cr, FONT, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(c->cr, size);
}

static double text_width(Canvas *c, const char *text, double size, gboolean bold)
{
    cairo_text_extents_t e;
    set_font(c, size, bold);
    cairo_text_extents(c->cr, text, &e);
    return e.x_advance;
}

/* The largest size up to size (down to 70 % of it) at which text fits in
 * width; text wider even then is drawn at that smallest size. */
static double fit_size(Canvas *c, const char *text, double size, gboolean bold, double width)
{
    double w = text_width(c, text, size, bold);
    return w <= width ? size : MAX(0.7 * size, size * width / w);
}

/* The text's baseline is put so that the line of capitals is centred on
 * (or, by va 0 / 1, hangs from / stands on) y; ha 0, 0.5, 1: x is the
 * text's left edge, middle or right edge. rotated: read bottom to top. */
static void draw_text(Canvas *c, double x, double y, const char *text, double size,
                      gboolean bold, double ha, double va, gboolean rotated, const char *cls,
                      Rgb col)
{
    double w = text_width(c, text, size, bold);
    double cap = 0.72 * size;   /* DejaVu's capital height, near enough */
    double dx = -ha * w, dy = cap * (1.0 - va);
    if (c->svg) {
        g_autofree char *esc = g_markup_escape_text(text, -1);
        GString *s = c->svg;
        g_string_append_printf(s, "<text class=\"%s\" font-size=\"%g\"%s fill=\"", cls, size,
                               bold ? " font-weight=\"bold\"" : "");
        svg_rgb(s, col);
        if (rotated)
            g_string_append_printf(s, "\" transform=\"translate(%.2f %.2f) rotate(-90)\" "
                                   "x=\"%.2f\" y=\"%.2f\">%s</text>\n", x, y, dx, dy, esc);
        else
            g_string_append_printf(s, "\" x=\"%.2f\" y=\"%.2f\">%s</text>\n", x + dx, y + dy,
                                   esc);
        return;
    }
    cairo_save(c->cr);
    set_rgb(c, col);
    cairo_translate(c->cr, x, y);
    if (rotated)
        cairo_rotate(c->cr, -G_PI / 2);
    cairo_move_to(c->cr, dx, dy);
    cairo_show_text(c->cr, text);
    cairo_restore(c->cr);
}

static void draw_segment(Canvas *c, double x0, double y0, double x1, double y1, Rgb col,
                         double width)
{
    if (c->svg) {
        g_string_append_printf(c->svg, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                               "stroke=\"", x0, y0, x1, y1);
        svg_rgb(c->svg, col);
        g_string_append_printf(c->svg, "\" stroke-width=\"%g\"/>\n", width);
        return;
    }
    cairo_set_line_width(c->cr, width);
    set_rgb(c, col);
    cairo_move_to(c->cr, x0, y0);
    cairo_line_to(c->cr, x1, y1);
    cairo_stroke(c->cr);
}

/* fill and stroke: NULL for none. */
static void draw_rect(Canvas *c, double x, double y, double w, double h, const Rgb *fill,
                      double fill_opacity, const Rgb *stroke, double width)
{
    if (c->svg) {
        g_string_append_printf(c->svg, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" "
                               "height=\"%.2f\" fill=\"", x, y, w, h);
        if (fill)
            svg_rgb(c->svg, *fill);
        else
            g_string_append(c->svg, "none");
        if (fill && fill_opacity < 1)
            g_string_append_printf(c->svg, "\" fill-opacity=\"%g", fill_opacity);
        g_string_append(c->svg, "\" stroke=\"");
        if (stroke)
            svg_rgb(c->svg, *stroke);
        else
            g_string_append(c->svg, "none");
        g_string_append_printf(c->svg, "\" stroke-width=\"%g\"/>\n", width);
        return;
    }
    cairo_rectangle(c->cr, x, y, w, h);
    if (fill) {
        cairo_set_source_rgba(c->cr, fill->r, fill->g, fill->b, fill_opacity);
        cairo_fill_preserve(c->cr);
    }
    if (stroke) {
        cairo_set_line_width(c->cr, width);
        set_rgb(c, *stroke);
        cairo_stroke(c->cr);
    }
    cairo_new_path(c->cr);
}

/* A polyline through xy[0..n-1] (pixel pairs). */
static void draw_polyline(Canvas *c, const double *xy, guint n, Rgb col, double width,
                          gboolean dashed)
{
    if (n < 2)
        return;
    if (c->svg) {
        g_string_append(c->svg, "<polyline fill=\"none\" stroke=\"");
        svg_rgb(c->svg, col);
        g_string_append_printf(c->svg, "\" stroke-width=\"%g\" stroke-linejoin=\"round\"%s "
                               "points=\"", width, dashed ? " stroke-dasharray=\"6 4\"" : "");
        for (guint i = 0; i < n; i++)
            g_string_append_printf(c->svg, "%s%.2f,%.2f", i ? " " : "", xy[2 * i],
                                   xy[2 * i + 1]);
        g_string_append(c->svg, "\"/>\n");
        return;
    }
    static const double dash[] = { 6, 4 };
    cairo_save(c->cr);
    cairo_set_line_width(c->cr, width);
    cairo_set_line_join(c->cr, CAIRO_LINE_JOIN_ROUND);
    if (dashed)
        cairo_set_dash(c->cr, dash, 2, 0);
    set_rgb(c, col);
    cairo_move_to(c->cr, xy[0], xy[1]);
    for (guint i = 1; i < n; i++)
        cairo_line_to(c->cr, xy[2 * i], xy[2 * i + 1]);
    cairo_stroke(c->cr);
    cairo_restore(c->cr);
}

/* A marker of shape mark at (x, y), r its half size; hollow: white inside. */
static void draw_marker(Canvas *c, double x, double y, guint mark, double r, Rgb col,
                        gboolean hollow)
{
    double pts[8];
    guint n = 0;
    switch (mark) {
    case MARK_SQUARE:
        r *= 0.9;
        pts[0] = x - r; pts[1] = y - r; pts[2] = x + r; pts[3] = y - r;
        pts[4] = x + r; pts[5] = y + r; pts[6] = x - r; pts[7] = y + r;
        n = 4;
        break;
    case MARK_TRIANGLE:
    case MARK_TRIANGLE_DOWN: {
        double s = mark == MARK_TRIANGLE ? 1 : -1;
        r *= 1.2;
        pts[0] = x; pts[1] = y - s * r;
        pts[2] = x + 0.87 * r; pts[3] = y + s * 0.5 * r;
        pts[4] = x - 0.87 * r; pts[5] = y + s * 0.5 * r;
        n = 3;
        break;
    }
    case MARK_DIAMOND:
        r *= 1.25;
        pts[0] = x; pts[1] = y - r; pts[2] = x + r; pts[3] = y;
        pts[4] = x; pts[5] = y + r; pts[6] = x - r; pts[7] = y;
        n = 4;
        break;
    default:
        break;
    }
    Rgb white = { 1, 1, 1 };
    Rgb fill = hollow ? white : col;
    if (c->svg) {
        GString *s = c->svg;
        if (n == 0)
            g_string_append_printf(s, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"%.2f\"", x, y, r);
        else {
            g_string_append(s, "<polygon points=\"");
            for (guint i = 0; i < n; i++)
                g_string_append_printf(s, "%s%.2f,%.2f", i ? " " : "", pts[2 * i],
                                       pts[2 * i + 1]);
            g_string_append_c(s, '"');
        }
        g_string_append(s, " fill=\"");
        svg_rgb(s, fill);
        g_string_append(s, "\" stroke=\"");
        svg_rgb(s, hollow ? col : white);
        g_string_append_printf(s, "\" stroke-width=\"%g\"/>\n", hollow ? 1.6 : 0.8);
        return;
    }
    if (n == 0)
        cairo_arc(c->cr, x, y, r, 0, 2 * G_PI);
    else {
        cairo_move_to(c->cr, pts[0], pts[1]);
        for (guint i = 1; i < n; i++)
            cairo_line_to(c->cr, pts[2 * i], pts[2 * i + 1]);
        cairo_close_path(c->cr);
    }
    set_rgb(c, fill);
    cairo_fill_preserve(c->cr);
    cairo_set_line_width(c->cr, hollow ? 1.6 : 0.8);
    set_rgb(c, hollow ? col : white);
    cairo_stroke(c->cr);
}

static void group_begin(Canvas *c, const char *cls, const char *id, const char *name)
{
    if (!c->svg)
        return;
    g_string_append_printf(c->svg, "<g class=\"%s\"", cls);
    if (id)
        g_string_append_printf(c->svg, " id=\"%s\"", id);
    if (name) {
        g_autofree char *esc = g_markup_escape_text(name, -1);
        g_string_append_printf(c->svg, " data-name=\"%s\"", esc);
    }
    g_string_append(c->svg, ">\n");
}

static void group_end(Canvas *c)
{
    if (c->svg)
        g_string_append(c->svg, "</g>\n");
}

static void clip_begin(Canvas *c, const char *id, double x, double y, double w, double h)
{
    if (c->svg) {
        g_string_append_printf(c->svg, "<defs><clipPath id=\"%s\"><rect x=\"%.2f\" y=\"%.2f\" "
                               "width=\"%.2f\" height=\"%.2f\"/></clipPath></defs>\n"
                               "<g clip-path=\"url(#%s)\">\n", id, x, y, w, h, id);
        return;
    }
    cairo_save(c->cr);
    cairo_rectangle(c->cr, x, y, w, h);
    cairo_clip(c->cr);
}

static void clip_end(Canvas *c)
{
    if (c->svg)
        g_string_append(c->svg, "</g>\n");
    else
        cairo_restore(c->cr);
}

/* ---- axes ---- */

typedef struct {
    gboolean log;
    double lo, hi;           /* the range, in data units (log: positive) */
    double px0, px1;         /* pixel positions of lo and hi */
    GArray *major, *minor;   /* tick values */
    GPtrArray *labels;       /* one per major tick */
} Axis;

static double axis_t(const Axis *a, double v)
{
    return a->log ? (log10(v) - log10(a->lo)) / (log10(a->hi) - log10(a->lo))
                  : (v - a->lo) / (a->hi - a->lo);
}

static double axis_px(const Axis *a, double v)
{
    return a->px0 + axis_t(a, v) * (a->px1 - a->px0);
}

static gboolean usable(const Axis *a, double v)
{
    return isfinite(v) && (!a->log || v > 0);
}

/* The data range of one coordinate over the panel's series (FALSE: none). */
static gboolean data_range(const BmPlotPanel *p, gboolean y, gboolean log, double *lo,
                           double *hi)
{
    *lo = INFINITY;
    *hi = -INFINITY;
    for (guint i = 0; i < p->series->len; i++) {
        const BmPlotSeries *s = g_ptr_array_index(p->series, i);
        for (guint j = 0; j < s->pts->len; j++) {
            Pt pt = g_array_index(s->pts, Pt, j);
            double v = y ? pt.y : pt.x, w = y ? pt.x : pt.y;
            gboolean other_log = y ? p->x_log : p->y_log;
            if (!isfinite(v) || !isfinite(w) || (log && v <= 0) || (other_log && w <= 0))
                continue;
            *lo = MIN(*lo, v);
            *hi = MAX(*hi, v);
        }
    }
    return *lo <= *hi;
}

/* Pads the range so that no point sits on the frame. */
static void pad_range(Axis *a)
{
    if (a->log) {
        double l0 = log10(a->lo), l1 = log10(a->hi);
        if (l1 - l0 < 1e-9) {
            l0 -= 0.3;
            l1 += 0.3;
        }
        double pad = 0.05 * (l1 - l0);
        a->lo = pow(10, l0 - pad);
        a->hi = pow(10, l1 + pad);
        return;
    }
    double span = a->hi - a->lo;
    if (span <= 1e-12 * MAX(fabs(a->lo), fabs(a->hi))) {
        double half = a->lo != 0 ? 0.1 * fabs(a->lo) : 1.0;
        a->lo -= half;
        a->hi += half;
        span = a->hi - a->lo;
    }
    a->lo -= 0.05 * span;
    a->hi += 0.05 * span;
}

static double nice_step(double raw)
{
    double p = pow(10, floor(log10(raw)));
    double m = raw / p;
    return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 2.5 ? 2.5 : m <= 5 ? 5 : 10) * p;
}

/* A tick label, with a typographic minus sign. */
static char *linear_label(double v, double step)
{
    if (fabs(v) < 1e-9 * step)
        v = 0;
    double big = MAX(fabs(v), step);
    g_autofree char *text = NULL;
    if (big >= 1e5 || step < 1e-4) {
        text = g_strdup_printf("%.3g", fabs(v));
    } else {
        int decimals = MAX(0, (int)ceil(-log10(step) - 1e-9));
        if (fmod(step * pow(10, decimals), 1.0) > 1e-6)   /* 2.5 */
            decimals++;
        text = g_strdup_printf("%.*f", decimals, fabs(v));
    }
    return g_strconcat(v < 0 ? "−" : "", text, NULL);
}

static const char *const superscript[] = { "⁰", "¹", "²", "³", "⁴", "⁵", "⁶", "⁷", "⁸", "⁹" };

static char *decade_label(int d)
{
    GString *s = g_string_new("10");
    if (d < 0)
        g_string_append(s, "⁻");
    g_autofree char *digits = g_strdup_printf("%d", abs(d));
    for (const char *c = digits; *c; c++)
        g_string_append(s, superscript[*c - '0']);
    return g_string_free(s, FALSE);
}

static void axis_clear_ticks(Axis *a)
{
    g_array_set_size(a->major, 0);
    g_array_set_size(a->minor, 0);
    g_ptr_array_set_size(a->labels, 0);
}

static void add_major(Axis *a, double v, char *label)
{
    g_array_append_val(a->major, v);
    g_ptr_array_add(a->labels, label);
}

/* Ticks for at most max_labels labels. */
static void axis_ticks(Axis *a, int max_labels)
{
    axis_clear_ticks(a);
    max_labels = MAX(max_labels, 2);
    if (!a->log) {
        double step = nice_step((a->hi - a->lo) / max_labels);
        for (double k = ceil(a->lo / step - 1e-9); k * step <= a->hi + 1e-9 * step; k++)
            add_major(a, k * step, linear_label(k * step, step));
        return;
    }
    int d0 = (int)ceil(log10(a->lo) - 1e-9), d1 = (int)floor(log10(a->hi) + 1e-9);
    int decades = d1 - d0 + 1;
    if (decades >= 2) {
        static const int strides[] = { 1, 2, 3, 5, 10, 20, 25, 50, 100 };
        int stride = 100;
        for (guint i = 0; i < G_N_ELEMENTS(strides); i++)
            if ((decades + strides[i] - 1) / strides[i] <= max_labels) {
                stride = strides[i];
                break;
            }
        for (int d = d0; d <= d1; d++) {
            if (d % stride == 0)
                add_major(a, pow(10, d), decade_label(d));
            else {
                double v = pow(10, d);
                g_array_append_val(a->minor, v);
            }
        }
        if (stride == 1 && decades <= 7)
            for (int d = d0 - 1; d <= d1; d++)
                for (int m = 2; m <= 9; m++) {
                    double v = m * pow(10, d);
                    if (v >= a->lo && v <= a->hi)
                        g_array_append_val(a->minor, v);
                }
        return;
    }
    /* less than two decades: 1, 2, 5 (or every digit) times the decades */
    static const int sets[2][9] = { { 1, 2, 5 }, { 1, 2, 3, 4, 5, 6, 7, 8, 9 } };
    static const int sizes[2] = { 3, 9 };
    for (int k = 0; k < 2 && a->major->len < 3; k++) {
        axis_clear_ticks(a);
        for (int d = d0 - 1; d <= d1; d++)
            for (int i = 0; i < sizes[k]; i++) {
                double v = sets[k][i] * pow(10, d);
                if (v >= a->lo && v <= a->hi)
                    add_major(a, v, g_strdup_printf("%g", v));
            }
    }
}

static void axis_init(Axis *a, gboolean log)
{
    memset(a, 0, sizeof *a);
    a->log = log;
    a->major = g_array_new(FALSE, FALSE, sizeof(double));
    a->minor = g_array_new(FALSE, FALSE, sizeof(double));
    a->labels = g_ptr_array_new_with_free_func(g_free);
}

static void axis_clear(Axis *a)
{
    g_array_unref(a->major);
    g_array_unref(a->minor);
    g_ptr_array_unref(a->labels);
}

static double widest_label(Canvas *c, const Axis *a)
{
    double w = 0;
    for (guint i = 0; i < a->labels->len; i++)
        w = MAX(w, text_width(c, g_ptr_array_index(a->labels, i), SIZE_TICK, FALSE));
    return w;
}

/* x ticks: as many labels as fit side by side with a gap of 1.5 em. */
static void x_ticks_fit(Canvas *c, Axis *a)
{
    double len = fabs(a->px1 - a->px0);
    for (int n = (int)(len / 70) + 1; n >= 2; n--) {
        axis_ticks(a, n);
        double need = 0;
        for (guint i = 0; i < a->labels->len; i++)
            need += text_width(c, g_ptr_array_index(a->labels, i), SIZE_TICK, FALSE)
                + 1.5 * SIZE_TICK;
        if (need <= len)
            return;
    }
}

/* ---- legend ---- */

typedef struct { double x, y, w, h; } Box;

static guint legend_entries(const BmPlotPanel *p)
{
    guint n = 0;
    for (guint i = 0; i < p->series->len; i++)
        n += ((BmPlotSeries *)g_ptr_array_index(p->series, i))->name != NULL;
    return n;
}

/* How much of the panel's drawing lies under box (points and line samples). */
static double covered(const BmPlotPanel *p, const Axis *ax, const Axis *ay, Box b)
{
    double hits = 0;
    for (guint i = 0; i < p->series->len; i++) {
        const BmPlotSeries *s = g_ptr_array_index(p->series, i);
        gboolean have = FALSE;
        double px = 0, py = 0;
        for (guint j = 0; j < s->pts->len; j++) {
            Pt pt = g_array_index(s->pts, Pt, j);
            if (!usable(ax, pt.x) || !usable(ay, pt.y)) {
                have = FALSE;
                continue;
            }
            double x = axis_px(ax, pt.x), y = axis_px(ay, pt.y);
            int steps = have && s->style != BM_SERIES_MARKERS ? 8 : 1;
            for (int k = 1; k <= steps; k++) {
                double t = (double)k / steps;
                double sx = have ? px + t * (x - px) : x, sy = have ? py + t * (y - py) : y;
                if (sx > b.x - 4 && sx < b.x + b.w + 4 && sy > b.y - 4 && sy < b.y + b.h + 4)
                    hits += s->style == BM_SERIES_REFERENCE ? 0.5 : 1;
            }
            px = x;
            py = y;
            have = TRUE;
        }
    }
    return hits;
}

/* The legend's box where it covers least of the drawing (the corners, top
 * right first, then the middles of the sides); how much it covers there. */
static double legend_place(Canvas *c, const BmPlotPanel *p, const Axis *ax, const Axis *ay,
                           Box area, Box *best)
{
    guint n = legend_entries(p);
    memset(best, 0, sizeof *best);
    if (n == 0)
        return 0;
    double row = SIZE_LEGEND * 1.55, sample = 26, w = 0;
    for (guint i = 0; i < p->series->len; i++) {
        const BmPlotSeries *s = g_ptr_array_index(p->series, i);
        if (s->name)
            w = MAX(w, text_width(c, s->name, SIZE_LEGEND, FALSE));
    }
    Box b = { 0, 0, w + sample + 22, n * row + 8 };
    static const double places[][2] = {
        { 1, 0 }, { 0, 0 }, { 1, 1 }, { 0, 1 }, { 1, 0.5 }, { 0, 0.5 }, { 0.5, 0 }, { 0.5, 1 },
    };
    double least = INFINITY;
    for (guint k = 0; k < G_N_ELEMENTS(places); k++) {
        Box t = b;
        t.x = area.x + 10 + places[k][0] * (area.w - b.w - 20);
        t.y = area.y + 10 + places[k][1] * (area.h - b.h - 20);
        double hits = covered(p, ax, ay, t);
        if (hits < least - 0.25) {
            least = hits;
            *best = t;
        }
    }
    return least;
}

static void draw_legend(Canvas *c, const BmPlotPanel *p, Box best)
{
    if (legend_entries(p) == 0)
        return;
    double row = SIZE_LEGEND * 1.55, sample = 26;
    Rgb white = { 1, 1, 1 }, frame = rgb_hex(0xBBBBBB);
    group_begin(c, "legend", NULL, NULL);
    draw_rect(c, best.x, best.y, best.w, best.h, &white, 0.88, &frame, 1);
    double y = best.y + 4 + row / 2;
    for (guint i = 0; i < p->series->len; i++) {
        const BmPlotSeries *s = g_ptr_array_index(p->series, i);
        if (!s->name)
            continue;
        double x0 = best.x + 8, x1 = x0 + sample;
        Rgb col = s->style == BM_SERIES_REFERENCE ? rgb_hex(REFERENCE_INK)
                                                   : rgb_hex(palette[s->colour]);
        if (s->style != BM_SERIES_MARKERS) {
            double xy[4] = { x0, y, x1, y };
            draw_polyline(c, xy, 2, col, s->style == BM_SERIES_REFERENCE ? 1.5 : 2,
                          s->style == BM_SERIES_REFERENCE || s->style == BM_SERIES_FIT);
        }
        if (s->style == BM_SERIES_LINE_MARKERS || s->style == BM_SERIES_MARKERS)
            draw_marker(c, (x0 + x1) / 2, y, s->mark, 4, col, s->style == BM_SERIES_MARKERS);
        draw_text(c, x1 + 8, y, s->name, SIZE_LEGEND, FALSE, 0, 0.5, FALSE, "legend-label",
                  rgb_hex(INK));
        y += row;
    }
    group_end(c);
}

/* ---- series ---- */

static void draw_series(Canvas *c, const BmPlotSeries *s, guint pi, guint si, const Axis *ax,
                        const Axis *ay)
{
    gboolean ref = s->style == BM_SERIES_REFERENCE;
    Rgb col = ref ? rgb_hex(REFERENCE_INK) : rgb_hex(palette[s->colour]);
    g_autofree char *id = g_strdup_printf("%s-%u-%u", ref ? "reference" : "curve", pi, si);
    group_begin(c, ref ? "reference" : "curve", id, s->name);
    g_autoptr(GArray) xy = g_array_new(FALSE, FALSE, sizeof(double));
    guint npts = bm_plot_series_length(s);
    double r = npts > 60 ? 2.6 : 3.8;
    for (guint j = 0; j <= s->pts->len; j++) {
        Pt pt = j < s->pts->len ? g_array_index(s->pts, Pt, j) : (Pt){ NAN, NAN };
        if (usable(ax, pt.x) && usable(ay, pt.y)) {
            double v[2] = { axis_px(ax, pt.x), axis_px(ay, pt.y) };
            g_array_append_vals(xy, v, 2);
            continue;
        }
        if (s->style != BM_SERIES_MARKERS)
            draw_polyline(c, (double *)(void *)xy->data, xy->len / 2, col, ref ? 1.5 : 2.2,
                          ref || s->style == BM_SERIES_FIT);
        if (s->style == BM_SERIES_LINE_MARKERS || s->style == BM_SERIES_MARKERS)
            for (guint k = 0; k < xy->len / 2; k++)
                draw_marker(c, g_array_index(xy, double, 2 * k),
                            g_array_index(xy, double, 2 * k + 1), s->mark, r, col,
                            s->style == BM_SERIES_MARKERS);
        g_array_set_size(xy, 0);
    }
    group_end(c);
}

/* ---- a panel ---- */

/* Places the axes of a panel in box below top (after its title): pixel
 * ends, ticks, the equal scale; lo and hi come padded and may widen. */
static void layout(Canvas *c, const BmPlotPanel *p, Box box, double top, Axis *ax, Axis *ay,
                   double *bottom, double *left)
{
    /* the plot area: y labels measured from the y ticks, which depend on
     * the height alone */
    *bottom = box.y + box.h - (TICK_LEN + 6 + SIZE_TICK + 10 + SIZE_LABEL);
    ay->px0 = *bottom;
    ay->px1 = top + 6;
    axis_ticks(ay, MAX(2, (int)((ay->px0 - ay->px1) / 55)));
    *left = box.x + SIZE_LABEL + 12 + widest_label(c, ay) + TICK_LEN + 6;
    ax->px0 = *left;
    ax->px1 = box.x + box.w - 10;
    /* the last x label is centred on its tick: room for its half */
    x_ticks_fit(c, ax);
    if (ax->labels->len) {
        double half = text_width(c, g_ptr_array_index(ax->labels, ax->labels->len - 1),
                                 SIZE_TICK, FALSE) / 2;
        ax->px1 = box.x + box.w - MAX(10, half + 2);
    }
    if (p->equal) {
        /* one scale for both: widen the range of the finer axis */
        double sx = (ax->px1 - ax->px0) / (ax->hi - ax->lo);
        double sy = (ay->px0 - ay->px1) / (ay->hi - ay->lo);
        Axis *wide = sx > sy ? ax : ay;
        double scale = MIN(sx, sy), span = fabs(wide->px1 - wide->px0) / scale;
        double mid = (wide->lo + wide->hi) / 2;
        wide->lo = mid - span / 2;
        wide->hi = mid + span / 2;
        axis_ticks(ay, MAX(2, (int)((ay->px0 - ay->px1) / 55)));
    }
    x_ticks_fit(c, ax);
}

static gboolean draw_panel(Canvas *c, const BmPlotPanel *p, guint pi, Box box, GError **error)
{
    Axis ax, ay;
    axis_init(&ax, p->x_log);
    axis_init(&ay, p->y_log);
    gboolean ok = data_range(p, FALSE, p->x_log, &ax.lo, &ax.hi)
        && data_range(p, TRUE, p->y_log, &ay.lo, &ay.hi);
    if (ok && isfinite(p->y_floor)) {
        ay.lo = MAX(ay.lo, p->y_floor);
        ok = ay.lo < ay.hi;
    }
    if (!ok) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "plot panel \"%s\": the response "
                    "holds no finite point to draw%s", p->title ? p->title : p->y_label,
                    isfinite(p->y_floor) ? " above the bottom of its axis"
                    : p->x_log || p->y_log ? " (a logarithmic axis takes positive values only)"
                                           : "");
        axis_clear(&ax);
        axis_clear(&ay);
        return FALSE;
    }
    pad_range(&ax);
    pad_range(&ay);
    double range[4] = { ax.lo, ax.hi, ay.lo, ay.hi };

    Rgb ink = rgb_hex(INK), grid = rgb_hex(GRID_INK);
    g_autofree char *pid = g_strdup_printf("panel-%u", pi);
    group_begin(c, "panel", pid, p->title);
    double top = box.y;
    if (p->title) {
        draw_text(c, box.x + box.w / 2, top + SIZE_PANEL_TITLE * 0.5, p->title,
                  fit_size(c, p->title, SIZE_PANEL_TITLE, TRUE, box.w), TRUE, 0.5, 0.5, FALSE,
                  "panel-title", ink);
        top += SIZE_PANEL_TITLE * 2.0;
    }
    double bottom, left;
    layout(c, p, box, top, &ax, &ay, &bottom, &left);
    Box area = { ax.px0, ay.px1, ax.px1 - ax.px0, ay.px0 - ay.px1 };
    /* the legend inside where it covers nothing, else above the plot */
    Box legend;
    if (legend_place(c, p, &ax, &ay, area, &legend) > 0) {
        ax.lo = range[0], ax.hi = range[1], ay.lo = range[2], ay.hi = range[3];
        layout(c, p, box, top + legend.h + 4, &ax, &ay, &bottom, &left);
        area = (Box){ ax.px0, ay.px1, ax.px1 - ax.px0, ay.px0 - ay.px1 };
        legend.x = area.x + area.w - legend.w;
        legend.y = area.y - legend.h - 6;
    }

    group_begin(c, "grid", NULL, NULL);
    for (guint i = 0; i < ax.major->len; i++) {
        double x = axis_px(&ax, g_array_index(ax.major, double, i));
        draw_segment(c, x, area.y, x, area.y + area.h, grid, 1);
    }
    for (guint i = 0; i < ay.major->len; i++) {
        double y = axis_px(&ay, g_array_index(ay.major, double, i));
        draw_segment(c, area.x, y, area.x + area.w, y, grid, 1);
    }
    group_end(c);

    g_autofree char *clip = g_strdup_printf("clip-%u", pi);
    clip_begin(c, clip, area.x, area.y, area.w, area.h);
    for (guint pass = 0; pass < 2; pass++)   /* reference levels under the curves */
        for (guint i = 0; i < p->series->len; i++) {
            const BmPlotSeries *s = g_ptr_array_index(p->series, i);
            if ((s->style == BM_SERIES_REFERENCE) == (pass == 0))
                draw_series(c, s, pi, i, &ax, &ay);
        }
    clip_end(c);

    draw_rect(c, area.x, area.y, area.w, area.h, NULL, 1, &ink, 1);
    group_begin(c, "axis x-axis", NULL, NULL);
    for (guint i = 0; i < ax.minor->len; i++) {
        double x = axis_px(&ax, g_array_index(ax.minor, double, i));
        draw_segment(c, x, bottom, x, bottom + MINOR_LEN, ink, 1);
    }
    for (guint i = 0; i < ax.major->len; i++) {
        double x = axis_px(&ax, g_array_index(ax.major, double, i));
        draw_segment(c, x, bottom, x, bottom + TICK_LEN, ink, 1);
        draw_text(c, x, bottom + TICK_LEN + 4, g_ptr_array_index(ax.labels, i), SIZE_TICK,
                  FALSE, 0.5, 0, FALSE, "tick-label", ink);
    }
    draw_text(c, area.x + area.w / 2, box.y + box.h - 2, p->x_label,
              fit_size(c, p->x_label, SIZE_LABEL, FALSE, area.w), FALSE, 0.5, 1, FALSE,
              "axis-label x-label", ink);
    group_end(c);
    group_begin(c, "axis y-axis", NULL, NULL);
    for (guint i = 0; i < ay.minor->len; i++) {
        double y = axis_px(&ay, g_array_index(ay.minor, double, i));
        draw_segment(c, left - MINOR_LEN, y, left, y, ink, 1);
    }
    for (guint i = 0; i < ay.major->len; i++) {
        double y = axis_px(&ay, g_array_index(ay.major, double, i));
        draw_segment(c, left - TICK_LEN, y, left, y, ink, 1);
        draw_text(c, left - TICK_LEN - 4, y, g_ptr_array_index(ay.labels, i), SIZE_TICK, FALSE,
                  1, 0.5, FALSE, "tick-label", ink);
    }
    draw_text(c, box.x + 2 + SIZE_LABEL * 0.4, area.y + area.h / 2, p->y_label,
              fit_size(c, p->y_label, SIZE_LABEL, FALSE, area.h), FALSE, 0.5, 0.5, TRUE,
              "axis-label y-label", ink);
    group_end(c);

    draw_legend(c, p, legend);
    group_end(c);
    axis_clear(&ax);
    axis_clear(&ay);
    return TRUE;
}

static gboolean draw_figure(Canvas *c, const BmPlotFigure *fig, GError **error)
{
    Rgb white = { 1, 1, 1 }, ink = rgb_hex(INK);
    draw_rect(c, 0, 0, fig->width, fig->height, &white, 1, NULL, 0);
    double top = PAD * 0.75;
    if (fig->title) {
        draw_text(c, fig->width / 2.0, top + SIZE_TITLE * 0.5, fig->title,
                  fit_size(c, fig->title, SIZE_TITLE, TRUE, fig->width - 2 * PAD), TRUE,
                  0.5, 0.5, FALSE, "title", ink);
        top += SIZE_TITLE * 2.1;
    }
    guint n = fig->panels->len;
    double w = (fig->width - 2 * PAD - (n - 1) * PANEL_GAP) / n;
    for (guint i = 0; i < n; i++) {
        Box b = { PAD + i * (w + PANEL_GAP), top, w, fig->height - top - PAD * 0.75 };
        if (!draw_panel(c, g_ptr_array_index(fig->panels, i), i, b, error))
            return FALSE;
    }
    return TRUE;
}

static cairo_status_t to_bytes(void *closure, const unsigned char *data, unsigned int len)
{
    g_byte_array_append(closure, data, len);
    return CAIRO_STATUS_SUCCESS;
}

static gboolean cairo_failed(cairo_status_t st, GError **error)
{
    if (st == CAIRO_STATUS_SUCCESS)
        return FALSE;
    g_set_error(error, BM_ERROR, BM_ERROR_INTERNAL, "the plot could not be drawn: %s",
                cairo_status_to_string(st));
    return TRUE;
}

GBytes *bm_plot_render(const BmPlotFigure *fig, BmPlotFormat format, GError **error)
{
    if (fig->panels->len == 0) {
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "the plot has no panel");
        return NULL;
    }
    g_autoptr(GByteArray) bytes = g_byte_array_new();
    cairo_surface_t *surface = format == BM_PLOT_PNG
        ? cairo_image_surface_create(CAIRO_FORMAT_RGB24, fig->width, fig->height)
        : format == BM_PLOT_PDF
        ? cairo_pdf_surface_create_for_stream(to_bytes, bytes, fig->width, fig->height)
        : cairo_image_surface_create(CAIRO_FORMAT_RGB24, 4, 4);   /* SVG: text metrics */
    if (format == BM_PLOT_PDF)
        cairo_pdf_surface_set_metadata(surface, CAIRO_PDF_METADATA_CREATOR, "bandmass");
    cairo_t *cr = cairo_create(surface);
    Canvas c = { cr, NULL };
    g_autoptr(GString) svg = NULL;
    if (format == BM_PLOT_SVG) {
        svg = g_string_new(NULL);
        g_string_append_printf(svg, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                               "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%d\" "
                               "height=\"%d\" viewBox=\"0 0 %d %d\" font-family=\"%s\">\n",
                               fig->width, fig->height, fig->width, fig->height, FONT_SVG);
        if (fig->title) {
            g_autofree char *esc = g_markup_escape_text(fig->title, -1);
            g_string_append_printf(svg, "<title>%s</title>\n", esc);
        }
        c.svg = svg;
    }
    gboolean ok = draw_figure(&c, fig, error);
    cairo_status_t st = cairo_status(cr);
    cairo_destroy(cr);
    if (ok && format == BM_PLOT_PNG && st == CAIRO_STATUS_SUCCESS)
        st = cairo_surface_write_to_png_stream(surface, to_bytes, bytes);
    cairo_surface_finish(surface);
    if (st == CAIRO_STATUS_SUCCESS)
        st = cairo_surface_status(surface);
    cairo_surface_destroy(surface);
    if (!ok || cairo_failed(st, error))
        return NULL;
    if (svg) {
        g_string_append(svg, "</svg>\n");
        return g_bytes_new(svg->str, svg->len);
    }
    return g_byte_array_free_to_bytes(g_steal_pointer(&bytes));
}
