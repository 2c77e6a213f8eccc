/* plot-command.h: the CLI's plots: --plot FILE of an operation and the
 * "plot" subcommand for batch results (plugin/plot draws them; without
 * cairo at build time both are refused with a message). */
#pragma once

#include <json-glib/json-glib.h>

#include "registry.h"

/* TRUE when op can take --plot. */
gboolean bm_cli_plot_supported(const BmOperation *op);

/* Checks --plot path before the operation runs: op has a figure, the
 * extension names a format, the folder exists (BM_ERROR_INVALID_INPUT or
 * BM_ERROR_IO naming the path). */
gboolean bm_cli_plot_check(const BmOperation *op, const char *path, GError **error);

/* Draws op's response into path (written as --output writes a file). */
gboolean bm_cli_plot_response(const BmOperation *op, JsonObject *response, const char *path,
                              GError **error);

/* bandmass plot RESULTS.jsonl --x FIELD --y FIELD... [--log-x] [--log-y]
 * --output FILE: the exit status. */
int bm_cli_plot_command(int argc, char **argv);

/* The usage lines of the plot subcommand, for the main help. */
extern const char bm_cli_plot_usage[];
