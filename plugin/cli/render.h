/* render.h: the command line's readable view of a response (its default
 * output; --json and --csv are the others). */
#ifndef BM_CLI_RENDER_H
#define BM_CLI_RENDER_H

#include "registry.h"

G_BEGIN_DECLS

/* Appends the readable table of op's response: the operation's own layout
 * (plugin/cli/render.c), or the generic key/value view when it has none.
 * Top-level warnings are not included; the CLI prints them after the table. */
void bm_cli_render(const BmOperation *op, JsonObject *response, GString *out);

/* The generic view: one "key value" line per member, nested objects indented. */
void bm_cli_render_generic(JsonObject *response, GString *out);

G_END_DECLS

#endif
