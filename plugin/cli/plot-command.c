/* plot-command.c: the CLI side of the plots: checks the --plot path, draws
 * the operation's response (plugin/plot/figures.c) and writes the file; the
 * "plot" subcommand draws batch results. */
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "plot-command.h"
#include "output.h"
#include "bm-error.h"

#ifdef BM_HAVE_PLOT
#include "figures.h"
#endif

const char bm_cli_plot_usage[] =
    "  bandmass plot RESULTS.jsonl --x FIELD --y FIELD [--y FIELD]... [--log-x] [--log-y]\n"
    "                --output FILE        draw batch results (FILE .svg, .png or .pdf)\n";

static int plot_fail(const GError *error)
{
    fprintf(stderr, "bandmass: error: %s\n", error->message);
    return error->domain == BM_ERROR && (error->code == BM_ERROR_INVALID_INPUT
                                         || error->code == BM_ERROR_IO) ? 2 : 1;
}

#ifdef BM_HAVE_PLOT

static int plot_usage(const char *fmt, ...) G_GNUC_PRINTF(1, 2);
static int plot_usage(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    fprintf(stderr, "bandmass: error: plot: %s (see bandmass plot --help)\n", msg);
    return 2;
}

gboolean bm_cli_plot_supported(const BmOperation *op)
{
    return bm_plot_has_figure(op->name);
}

/* The file format, and a folder to write into. */
static gboolean check_path(const char *path, BmPlotFormat *format, GError **error)
{
    if (!bm_plot_format_from_path(path, format, error))
        return FALSE;
    g_autofree char *dir = g_path_get_dirname(path);
    if (!g_file_test(dir, G_FILE_TEST_IS_DIR)) {
        g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot write --plot %s: the folder %s does "
                    "not exist", path, dir);
        return FALSE;
    }
    return TRUE;
}

gboolean bm_cli_plot_check(const BmOperation *op, const char *path, GError **error)
{
    if (!bm_plot_has_figure(op->name)) {
        g_autofree char *ops = bm_plot_operations();
        g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s has no plot (--plot is taken "
                    "by %s)", op->name, ops);
        return FALSE;
    }
    BmPlotFormat format;
    return check_path(path, &format, error);
}

static gboolean write_figure(const BmPlotFigure *fig, const char *option, const char *path,
                             GError **error)
{
    BmPlotFormat format;
    if (!check_path(path, &format, error))
        return FALSE;
    g_autoptr(GBytes) bytes = bm_plot_render(fig, format, error);
    if (!bytes)
        return FALSE;
    gsize n;
    const char *data = g_bytes_get_data(bytes, &n);
    return bm_cli_write_file(option, path, data, n, error);
}

gboolean bm_cli_plot_response(const BmOperation *op, JsonObject *response, const char *path,
                              GError **error)
{
    g_autoptr(BmPlotFigure) fig = bm_plot_figure_for(op->name, response, error);
    return fig && write_figure(fig, "--plot", path, error);
}

int bm_cli_plot_command(int argc, char **argv)
{
    const char *input = NULL, *x = NULL, *output = NULL;
    g_autoptr(GPtrArray) ys = g_ptr_array_new();
    gboolean x_log = FALSE, y_log = FALSE;
    for (int i = 0; i < argc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "--help") || !strcmp(a, "-h")) {
            printf("bandmass plot: draw batch results (JSON lines: items {\"id\", \"status\", "
                   "\"response\"})\n\nUsage:\n%s\n"
                   "Each --y is one curve of the items' numbers against --x. A FIELD is a "
                   "dotted path\ninto an item's response (fermi_level_ev, points.0.n_cm3, "
                   "extrema.0.principal_masses_me.2),\nelse into the item itself (id). Lines "
                   "without a response object (the header) are\nskipped, and so are items "
                   "whose status is not \"ok\" or that lack the numbers.\n",
                   bm_cli_plot_usage);
            return 0;
        }
        if (!strcmp(a, "--log-x")) { x_log = TRUE; continue; }
        if (!strcmp(a, "--log-y")) { y_log = TRUE; continue; }
        if (!strcmp(a, "--x") || !strcmp(a, "--y") || !strcmp(a, "--output")) {
            if (i + 1 >= argc)
                return plot_usage("%s needs a value", a);
            const char *v = argv[++i];
            if (!strcmp(a, "--y"))
                g_ptr_array_add(ys, (gpointer)v);
            else if (!strcmp(a, "--x") ? x != NULL : output != NULL)
                return plot_usage("%s is given twice", a);
            else if (!strcmp(a, "--x"))
                x = v;
            else
                output = v;
            continue;
        }
        if (a[0] == '-' && a[1])
            return plot_usage("unknown option %s", a);
        if (input)
            return plot_usage("unexpected argument %s (one results file)", a);
        input = a;
    }
    if (!input)
        return plot_usage("name a results file (JSON lines)");
    if (!x || ys->len == 0)
        return plot_usage("give --x FIELD and at least one --y FIELD");
    if (!output)
        return plot_usage("give --output FILE (.svg, .png or .pdf)");
    g_autoptr(GError) error = NULL;
    BmPlotFormat format;
    if (!check_path(output, &format, &error))
        return plot_fail(error);
    g_ptr_array_add(ys, NULL);
    guint used = 0, skipped = 0;
    g_autoptr(BmPlotFigure) fig = bm_plot_batch_figure(input, x, (const char *const *)ys->pdata,
                                                       x_log, y_log, &used, &skipped, &error);
    if (!fig || !write_figure(fig, "--output", output, &error))
        return plot_fail(error);
    if (skipped)
        fprintf(stderr, "bandmass: plot: %u item%s drawn, %u skipped (not ok, or without the "
                "numbers)\n", used, used == 1 ? "" : "s", skipped);
    return 0;
}

#else

static gboolean not_built(GError **error)
{
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "this bandmass was built without "
                "plots (cairo was not found when it was built)");
    return FALSE;
}

gboolean bm_cli_plot_supported(G_GNUC_UNUSED const BmOperation *op)
{
    return FALSE;
}

gboolean bm_cli_plot_check(G_GNUC_UNUSED const BmOperation *op, G_GNUC_UNUSED const char *path,
                           GError **error)
{
    return not_built(error);
}

gboolean bm_cli_plot_response(G_GNUC_UNUSED const BmOperation *op,
                              G_GNUC_UNUSED JsonObject *response,
                              G_GNUC_UNUSED const char *path, GError **error)
{
    return not_built(error);
}

int bm_cli_plot_command(G_GNUC_UNUSED int argc, G_GNUC_UNUSED char **argv)
{
    g_autoptr(GError) error = NULL;
    not_built(&error);
    return plot_fail(error);
}

#endif
