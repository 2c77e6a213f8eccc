/* output.h: the CLI's --output FILE, written by a rule per kind of file. */
#pragma once

#include <glib.h>

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

/* The same for the file of another option (its messages name that option:
 * "cannot write --plot PATH: ..."). */
gboolean bm_cli_write_file(const char *option, const char *path, const char *text, gsize len,
                           GError **error);
