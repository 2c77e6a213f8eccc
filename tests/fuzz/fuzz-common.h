/* fuzz-common.h: what every fuzz target checks of an answer (the bad-input
 * contract), and the helpers they share. The targets build with clang's
 * libFuzzer (tests/fuzz, -Dfuzz=true) and, through replay.c, with any
 * compiler, to run the saved inputs as regression tests. */
#ifndef BM_FUZZ_COMMON_H
#define BM_FUZZ_COMMON_H

#include <stddef.h>
#include <stdint.h>
#include <glib.h>

/* The entry points libFuzzer calls (replay.c calls them the same way). */
int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The folder the targets run in (tests/data: the files the starting requests
 * name), set up once by fuzz_init. */
void fuzz_init(void);

/* Aborts unless error is a refusal the contract allows: domain BM_ERROR,
 * code invalid input, I/O or unknown operation (no-convergence too when
 * allow_no_convergence), a message that is valid UTF-8, non-empty and at
 * most 16 KiB (quoted user text is cut short, so a message never echoes a
 * whole input). what names the target in the report. */
void fuzz_check_error(const GError *error, gboolean allow_no_convergence, const char *what);

/* Aborts unless text is one valid JSON object (what every response is). */
void fuzz_check_response(const char *text, const char *what);

/* A NUL-terminated copy of data (free it). */
char *fuzz_text(const uint8_t *data, size_t size);

/* A path naming a regular file that holds exactly data (a memory file,
 * rewritten on each call; the same path every time). */
const char *fuzz_file(const uint8_t *data, size_t size);

#endif
