/* csv.h: the command line's CSV view of a response (--csv): one row per
 * point, extremum, valley, subband or hole band; one row for a single point. */
#ifndef BM_CLI_CSV_H
#define BM_CLI_CSV_H

#include "registry.h"

G_BEGIN_DECLS

/* Appends op's response as CSV: a header row, then one row per entry of the
 * operation's table (a response without one is a single row). Columns carry
 * their unit at the end of the name (principal_masses_1_me); per-species
 * values are named by species (ionized_donors_P_cm3); response keys that
 * hold no row (material, source, ...) repeat in every row. FALSE with error
 * set when the response has nothing to tabulate. */
gboolean bm_cli_csv(const BmOperation *op, JsonObject *response, GString *out,
                    GError **error);

/* A CSV cell: s as it is, or in double quotes (inner quotes doubled) when it
 * holds a comma, a quote or a line break. Free it. */
char *bm_cli_csv_quoted(const char *s);

/* The cell of a scalar node (a number in the fewest digits that read back,
 * true/false, a quoted string; empty for null or no node), or NULL for an
 * object or a list. Free it. */
char *bm_cli_csv_cell(JsonNode *n);

G_END_DECLS

#endif
