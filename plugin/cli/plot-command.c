/* plot-command.c: the CLI side of the plots: checks the --plot path, draws
 * the operation's response (plugin/plot/figures.c) and writes the file; the
 * "plot" subcommand draws batch results. */
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "plot-command.h"
#include "output.h"
#include "bm-error.h"
#include "bm-error-private.h"

#ifdef BM_HAVE_PLOT
#include "figures.h"
#endif

const char bm_cli_plot_usage[] =
    "  bandmass plot RESULTS.jsonl --x FIELD --y FIELD [--y FIELD]... [--log-x] [--log-y]\n"
    "                --output FILE        draw batch results (FILE .svg, .png or .pdf)\n"
    "  bandmass plot RESULTS.jsonl --item ID --output FILE\n"
    "                                     one item's own plot, as --plot draws it\n";

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

/* The figure of one item of a batch results file: the operation's own plot
 * of the stored response, as --plot would have drawn it. */
static BmPlotFigure *item_figure(const char *path, const char *item, GError **error)
{
    g_autofree char *text = NULL;
    if (!bm_error_read_file(path, "batch results", &text, NULL, error))
        return NULL;
    g_auto(GStrv) lines = g_strsplit(text, "\n", -1);
    for (guint n = 0; lines[n]; n++) {
        g_autoptr(JsonParser) parser = json_parser_new();
        if (!*lines[n] || !json_parser_load_from_data(parser, lines[n], -1, NULL))
            continue;
        JsonNode *root = json_parser_get_root(parser);
        JsonObject *o = JSON_NODE_HOLDS_OBJECT(root) ? json_node_get_object(root) : NULL;
        JsonNode *id = o ? json_object_get_member(o, "id") : NULL;
        if (!id || !JSON_NODE_HOLDS_VALUE(id))
            continue;
        g_autofree char *id_text = json_node_get_value_type(id) == G_TYPE_STRING
            ? g_strdup(json_node_get_string(id))
            : g_strdup_printf("%" G_GINT64_FORMAT, json_node_get_int(id));
        if (strcmp(id_text, item))
            continue;
        const char *op = json_object_get_string_member_with_default(o, "op", NULL);
        const char *status = json_object_get_string_member_with_default(o, "status", "");
        JsonNode *response = json_object_get_member(o, "response");
        if (strcmp(status, "ok") || !op || !response || !JSON_NODE_HOLDS_OBJECT(response)) {
            g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s line %u: item \"%s\" has "
                        "no answer to draw (status \"%s\")", path, n + 1, item, status);
            return NULL;
        }
        return bm_plot_figure_for(op, json_node_get_object(response), error);
    }
    g_set_error(error, BM_ERROR, BM_ERROR_INVALID_INPUT, "%s: no item with id \"%s\"", path,
                item);
    return NULL;
}

int bm_cli_plot_command(int argc, char **argv)
{
    const char *input = NULL, *x = NULL, *output = NULL, *item = NULL;
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
        if (!strcmp(a, "--item")) {
            if (i + 1 >= argc)
                return plot_usage("--item needs an item id");
            item = argv[++i];
            continue;
        }
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
    if (!output)
        return plot_usage("give --output FILE (.svg, .png or .pdf)");
    g_autoptr(GError) error = NULL;
    BmPlotFormat format;
    if (item) {
        if (x || ys->len)
            return plot_usage("--item draws one item's own plot: no --x or --y with it");
        if (!check_path(output, &format, &error))
            return plot_fail(error);
        g_autoptr(BmPlotFigure) one = item_figure(input, item, &error);
        if (!one || !write_figure(one, "--output", output, &error))
            return plot_fail(error);
        return 0;
    }
    if (!x || ys->len == 0)
        return plot_usage("give --x FIELD and at least one --y FIELD (or --item ID)");
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
