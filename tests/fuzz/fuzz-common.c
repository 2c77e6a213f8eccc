/* fuzz-common.c: the checks and helpers of the fuzz targets (fuzz-common.h). */
#define _GNU_SOURCE 1   /* memfd_create */
#include "fuzz-common.h"
#include "bm-error.h"
#include "registry.h"

#include <json-glib/json-glib.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <unistd.h>

#ifndef BANDMASS_TEST_DATA
#error "BANDMASS_TEST_DATA must name tests/data"
#endif

#define FUZZ_MAX_MESSAGE (16 * 1024)

void fuzz_init(void)
{
    if (chdir(BANDMASS_TEST_DATA) != 0) {
        perror(BANDMASS_TEST_DATA);
        abort();
    }
    /* GLib's critical warnings are bugs here: make them fatal */
    g_log_set_always_fatal(G_LOG_LEVEL_CRITICAL | G_LOG_LEVEL_WARNING);
    bm_registry_init();
}

static void fail(const char *what, const char *fmt, const char *detail)
{
    fprintf(stderr, "%s: ", what);
    fprintf(stderr, fmt, detail);
    fputc('\n', stderr);
    abort();
}

void fuzz_check_error(const GError *error, gboolean allow_no_convergence, const char *what)
{
    if (!error)
        fail(what, "%s", "failed without an error");
    if (error->domain != BM_ERROR)
        fail(what, "error outside the bandmass domain: %s", error->message);
    switch (error->code) {
    case BM_ERROR_INVALID_INPUT:
    case BM_ERROR_IO:
    case BM_ERROR_UNKNOWN_OPERATION:
        break;
    case BM_ERROR_NO_CONVERGENCE:
        if (allow_no_convergence)
            break;
        fail(what, "no convergence on fuzzed input: %s", error->message);
        break;
    default:
        fail(what, "internal error: %s", error->message);
    }
    size_t len = strlen(error->message);
    if (len == 0)
        fail(what, "%s", "empty error message");
    if (len > FUZZ_MAX_MESSAGE)
        fail(what, "error message longer than 16 KiB: %.200s", error->message);
    if (!g_utf8_validate(error->message, -1, NULL))
        fail(what, "error message is not UTF-8: %.200s", error->message);
}

void fuzz_check_response(const char *text, const char *what)
{
    if (!text)
        fail(what, "%s", "no response and no error");
    g_autoptr(GError) e = NULL;
    g_autoptr(JsonNode) root = json_from_string(text, &e);
    if (!root || !JSON_NODE_HOLDS_OBJECT(root))
        fail(what, "response is not a JSON object: %.300s", text);
    if (!g_utf8_validate(text, -1, NULL))
        fail(what, "response is not UTF-8: %.300s", text);
}

char *fuzz_text(const uint8_t *data, size_t size)
{
    char *s = g_malloc(size + 1);
    if (size)
        memcpy(s, data, size);
    s[size] = '\0';
    return s;
}

const char *fuzz_file(const uint8_t *data, size_t size)
{
    static int fd = -1;
    static char path[64];
    if (fd < 0) {
        fd = memfd_create("bandmass-fuzz", MFD_CLOEXEC);
        if (fd < 0) {
            perror("memfd_create");
            abort();
        }
        snprintf(path, sizeof path, "/proc/self/fd/%d", fd);
    }
    if (ftruncate(fd, 0) != 0 || (size && pwrite(fd, data, size, 0) != (ssize_t)size)) {
        perror("fuzz memory file");
        abort();
    }
    return path;
}
