/* bm-status.c: error buffer and warning list helpers. */
#include "bm-status.h"

#include <stdarg.h>
#include <stdio.h>
#include <gsl/gsl_errno.h>

bm_status bm_fail(bm_errbuf *err, bm_status status, const char *fmt, ...)
{
    if (err) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err->message, sizeof err->message, fmt, ap);
        va_end(ap);
        err->status = status;
    }
    return status;
}

void bm_warn(bm_warnings *w, const char *fmt, ...)
{
    if (!w || w->count >= BM_MAX_WARNINGS)
        return;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(w->text[w->count], sizeof w->text[0], fmt, ap);
    va_end(ap);
    w->count++;
}

void bm_core_init(void)
{
    gsl_set_error_handler_off();
}
