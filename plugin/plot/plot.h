/* plot.h: the command line's small plotting layer (cairo). A figure holds
 * panels side by side; a panel has two axes (linear or logarithmic, with
 * ticks, a label with its unit) and series (lines, markers, or both) with a
 * legend. One look for every figure: white ground, light grid, the Okabe-Ito
 * colours (told apart by colour-blind readers) each with its own marker
 * shape. Written as PNG or PDF through cairo, or as SVG text whose curves are
 * groups of class "curve" (ids "curve-P-S": panel P, series S) and whose
 * labels are text, chosen by the file name's extension.
 *
 * The layer draws numbers it is handed; it computes nothing of the physics. */
#pragma once

#include <glib.h>

typedef enum {
    BM_PLOT_SVG,
    BM_PLOT_PNG,
    BM_PLOT_PDF,
} BmPlotFormat;

typedef enum {
    BM_SERIES_LINE_MARKERS,   /* a computed sweep: line through marked points */
    BM_SERIES_LINE,           /* a curve: line only */
    BM_SERIES_FIT,            /* a fitted curve: dashed line */
    BM_SERIES_MARKERS,        /* data: markers only */
    BM_SERIES_REFERENCE,      /* a reference level (band edge): grey dashed line */
} BmSeriesStyle;

typedef struct BmPlotFigure BmPlotFigure;
typedef struct BmPlotPanel BmPlotPanel;
typedef struct BmPlotSeries BmPlotSeries;

/* A figure of width x height pixels (points in a PDF) with a title. */
BmPlotFigure *bm_plot_figure_new(const char *title, int width, int height);
void bm_plot_figure_free(BmPlotFigure *fig);
G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmPlotFigure, bm_plot_figure_free)

/* A panel, placed to the right of the figure's earlier ones. Axis labels
 * carry their unit ("temperature (K)"). */
BmPlotPanel *bm_plot_panel_add(BmPlotFigure *fig, const char *title, const char *x_label,
                               const char *y_label);
void bm_plot_panel_set_log(BmPlotPanel *panel, gboolean x_log, gboolean y_log);
/* The bottom of the y axis, whatever lies below (a density of 1e-90 cm^-3
 * would squeeze every other decade). */
void bm_plot_panel_set_y_floor(BmPlotPanel *panel, double y_floor);
/* Equal scales on both axes (a contour in the k plane). */
void bm_plot_panel_set_equal_aspect(BmPlotPanel *panel, gboolean equal);
guint bm_plot_panel_series_count(const BmPlotPanel *panel);

/* A series in the panel; its colour and marker follow the order of the
 * panel's non-reference series. A non-finite x or y (a null in the response)
 * leaves a gap. name is the legend text (NULL: no legend entry). */
BmPlotSeries *bm_plot_series_add(BmPlotPanel *panel, const char *name, BmSeriesStyle style);
void bm_plot_series_point(BmPlotSeries *s, double x, double y);
/* Starts a new piece of line without a gap point (a closed contour drawn
 * after another). */
void bm_plot_series_break(BmPlotSeries *s);
guint bm_plot_series_length(const BmPlotSeries *s);

/* The format named by path's extension (.svg, .png, .pdf; any case); FALSE
 * with BM_ERROR_INVALID_INPUT naming the path otherwise. */
gboolean bm_plot_format_from_path(const char *path, BmPlotFormat *format, GError **error);

/* Draws fig in format; the file's bytes. A panel without a finite point is
 * refused (BM_ERROR_INVALID_INPUT, naming the panel). */
GBytes *bm_plot_render(const BmPlotFigure *fig, BmPlotFormat format, GError **error);
