/* manual.h: the manual page and the bash completion of the command line,
 * generated from the registry's parameter tables (the same tables as
 * --help), so that neither can fall behind the operations. */
#ifndef BM_CLI_MANUAL_H
#define BM_CLI_MANUAL_H

#include "registry.h"

/* bandmass.1 in troff (man macros), for `bandmass ops --man`. */
char *bm_cli_man_page(const char *version);

/* A bash completion script for `bandmass ops --bash-completion`:
 * subcommands, operations, each operation's options and choice names, and
 * file names where a key takes a file; --plot for the operations has_plot
 * accepts (NULL: none). */
char *bm_cli_bash_completion(gboolean (*has_plot)(const BmOperation *op));

#endif
