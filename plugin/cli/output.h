/* output.h: the CLI's --output FILE, written by a rule per kind of file. */
#pragma once

#include <glib.h>
#include <sys/stat.h>

/* The prefix of a partial file: ".NAME" + this + "PID-XXXXXX", beside NAME. */
#define BM_CLI_PARTIAL_TAG ".bandmass-partial-"

/* Writes len bytes of text to path:
 * - absent, or a regular file with one link: a partial file beside it, then
 *   rename over it; a replaced file keeps its permission bits, owner and group
 *   (refused when its owner cannot be kept; group bits cleared when its group
 *   cannot be kept); the partial file is removed on any failure;
 * - a character device or a FIFO: written through, never replaced or created;
 * - a symbolic link (dangling or not), a regular file with more than one hard
 *   link, a directory or any other kind: refused (BM_ERROR_IO), naming path.
 * Before writing, partial files that a killed run left for the same path (their
 * process no longer exists, owned by the caller) are removed. */
gboolean bm_cli_write_output(const char *path, const char *text, gsize len, GError **error);

/* Writes all of text to fd (retrying interrupted and short writes, at most
 * 1 GiB a call); FALSE with errno in *err on failure. */
gboolean bm_cli_write_all(int fd, const char *text, gsize len, int *err);

/* The same for the file of another option (its messages name that option:
 * "cannot write --plot PATH: ..."). */
gboolean bm_cli_write_file(const char *option, const char *path, const char *text, gsize len,
                           GError **error);

/* What is at an --output path, by the rules above. */
typedef enum {
    BM_CLI_OUTPUT_ABSENT,    /* nothing: a file may be created */
    BM_CLI_OUTPUT_REGULAR,   /* a regular file with one link */
    BM_CLI_OUTPUT_THROUGH    /* a character device or a FIFO: written through */
} BmCliOutputKind;

/* Looks at path (lstat, into *st) and sets *kind; any other kind of file (a
 * symbolic link, a regular file with more than one hard link, a directory,
 * ...) is refused (BM_ERROR_IO, naming --output, path and what to do).
 * Writers that append (bandmass batch) follow the same rules as
 * bm_cli_write_output. */
gboolean bm_cli_output_kind(const char *path, struct stat *st, BmCliOutputKind *kind,
                            GError **error);
