/* bm-status.h: status codes, the caller-owned error buffer and warning list
 * that every core function reports through. No global state. */
#ifndef BM_STATUS_H
#define BM_STATUS_H

#include <stddef.h>

typedef enum {
    BM_OK = 0,
    BM_EINVAL,      /* bad input: the message names what and where */
    BM_ENOCONV,     /* an iteration did not converge */
    BM_ENOMEM,
    BM_EINTERNAL
} bm_status;

/* Filled by a failing core function; the message names the input at fault. */
typedef struct {
    bm_status status;
    char message[512];
} bm_errbuf;

/* Records status and a printf-style message in err (may be NULL); returns status. */
bm_status bm_fail(bm_errbuf *err, bm_status status, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Non-fatal findings (saddle, degeneracy, mass out of range...) travel with
 * a result so hosts can print them beside the numbers. */
#define BM_MAX_WARNINGS 8
typedef struct {
    int count;
    char text[BM_MAX_WARNINGS][256];
} bm_warnings;

void bm_warn(bm_warnings *w, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

/* Switches GSL's abort-on-error handler off. Hosts call it once before use
 * (the plugin does so on load); core functions check every GSL status. */
void bm_core_init(void);

#endif
