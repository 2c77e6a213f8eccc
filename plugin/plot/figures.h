/* figures.h: the command line's figures, each drawn from an operation's JSON
 * response (the numbers as the operation gave them: the figures compute no
 * physics), and from a file of batch results. */
#pragma once

#include <json-glib/json-glib.h>

#include "plot.h"

/* TRUE when op_name has a figure (bandmass OP --plot FILE). */
gboolean bm_plot_has_figure(const char *op_name);
/* The operations that have one, comma-separated (free it). */
char *bm_plot_operations(void);

/* The figure of op_name's response; BM_ERROR_INVALID_INPUT when this
 * response holds nothing to plot (the message says which request would). */
BmPlotFigure *bm_plot_figure_for(const char *op_name, JsonObject *response, GError **error);

/* A figure of batch results: a JSON-lines file whose items are objects with
 * "id" and "response" (a header line and other lines without a response
 * object are skipped, as are items whose status is not "ok"). Each y field
 * is one curve over the x field; fields are dotted paths into the response
 * ("fermi_level_ev", "points.0.n_cm3", "extrema.0.principal_masses_me.2").
 * *skipped: items that lacked a number at x or at every y. */
BmPlotFigure *bm_plot_batch_figure(const char *path, const char *x_field,
                                   const char *const *y_fields, gboolean x_log, gboolean y_log,
                                   guint *used, guint *skipped, GError **error);
