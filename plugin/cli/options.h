/* options.h: the command line's option values as the user types them
 * (numbers, lists, ranges, booleans) turned into JSON values of a key's kinds. */
#ifndef BM_CLI_OPTIONS_H
#define BM_CLI_OPTIONS_H

#include "registry.h"

G_BEGIN_DECLS

/* Most values one range (START:STOP:STEP or START:STOP:xFACTOR) may expand to. */
#define BM_CLI_MAX_RANGE_VALUES 100000

/* The JSON value of option text for parameter p. option is the option as the
 * user typed it ("--temperature-k"), named in every message. Numbers are
 * finite decimal numbers (no unit, no hex, inf or nan); integers beyond 64
 * bits and reals beyond the range of a double are refused; lists are comma
 * separated and each item may be a range. NULL with BM_ERROR_INVALID_INPUT
 * on bad text. */
JsonNode *bm_cli_option_value(const BmParam *p, const char *option, const char *text,
                              GError **error);

/* TRUE when text is a boolean word ("true" or "false"), with its value. */
gboolean bm_cli_boolean_word(const char *text, gboolean *value);

/* The expansion of one range item ("100:500:50", "1e14:1e20:x10") into a new
 * array of *n values, or NULL with error set (option named). */
double *bm_cli_expand_range(const char *item, const char *option, gsize *n, GError **error);

G_END_DECLS

#endif
