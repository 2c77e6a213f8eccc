/* bm-status.c: error buffer and warning list helpers. */
#include "bm-status.h"

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
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

static const char *const warn_code_names[BM_WARN_COUNT] = {
    [BM_WARN_SADDLE_POINT] = "saddle-point",
    [BM_WARN_FLAT_DIRECTION] = "flat-direction",
    [BM_WARN_CONICAL_POINT] = "conical-point",
    [BM_WARN_NON_PARABOLIC] = "non-parabolic",
    [BM_WARN_FIT_UNDETERMINED] = "fit-undetermined",
    [BM_WARN_REFINEMENT_ESCAPED] = "refinement-escaped",
    [BM_WARN_REFINEMENT_NOT_CONVERGED] = "refinement-not-converged",
    [BM_WARN_NOT_STATIONARY] = "not-stationary",
    [BM_WARN_DEGENERATE_BAND] = "degenerate-band",
    [BM_WARN_MASS_OUT_OF_RANGE] = "mass-out-of-range",
    [BM_WARN_MASS_ORDER] = "mass-order",
    [BM_WARN_NOT_A_MAXIMUM] = "not-a-maximum",
    [BM_WARN_OPEN_SURFACE] = "open-surface",
    [BM_WARN_QUADRATURE_INACCURATE] = "quadrature-inaccurate",
    [BM_WARN_GAP_NOT_POSITIVE] = "gap-not-positive",
    [BM_WARN_BOLTZMANN_DEVIATION] = "boltzmann-deviation",
    [BM_WARN_DEGENERATE_STATISTICS] = "degenerate-statistics",
    [BM_WARN_AXES_REORTHONORMALISED] = "axes-reorthonormalised",
    [BM_WARN_VALLEY_SYMMETRISED] = "valley-symmetrised",
    [BM_WARN_NO_EXTREMUM] = "no-extremum",
    [BM_WARN_EXTREMUM_WARNINGS] = "extremum-warnings",
    [BM_WARN_ZERO_DENSITY] = "zero-density",
    [BM_WARN_WARNINGS_LOST] = "warnings-lost",
    [BM_WARN_NOT_CONVERGED] = "not-converged",
    [BM_WARN_KIND_UNCERTAIN] = "kind-uncertain",
    [BM_WARN_NO_ERROR_ESTIMATE] = "no-error-estimate",
    [BM_WARN_DEGENERATE_EXTREMUM] = "degenerate-extremum",
    [BM_WARN_UNIT_SUSPECT] = "unit-suspect",
    [BM_WARN_ABOVE_MOTT_DENSITY] = "above-mott-density",
    [BM_WARN_WINDOW_UNRESOLVED] = "thermal-window-unresolved",
    [BM_WARN_CROSSING_IN_WINDOW] = "band-crossing-in-window",
    [BM_WARN_FERMI_OUTSIDE_BANDS] = "fermi-level-outside-bands",
    [BM_WARN_FIT_POORLY_CONSTRAINED] = "fit-poorly-constrained",
    [BM_WARN_FIT_INCONSISTENT] = "fit-inconsistent",
    [BM_WARN_ORBIT_IRREGULAR] = "orbit-irregular",
    [BM_WARN_EXTREMA_CAPPED] = "extrema-capped",
    [BM_WARN_SCATTERED_DATA] = "scattered-data",
};

const char *bm_warn_code_name(bm_warn_code code)
{
    if ((int)code < 0 || code >= BM_WARN_COUNT || !warn_code_names[code])
        return "unknown";
    return warn_code_names[code];
}

void bm_warn(bm_warnings *w, bm_warn_code code, const char *fmt, ...)
{
    if (!w)
        return;
    va_list ap;
    va_start(ap, fmt);
    int len = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (len < 0) {
        w->lost++;
        return;
    }
    if (w->count == w->capacity) {
        size_t cap = w->capacity ? 2 * w->capacity : 8;
        bm_warning *items = realloc(w->items, cap * sizeof *items);
        if (!items) {
            w->lost++;
            return;
        }
        w->items = items;
        w->capacity = cap;
    }
    char *text = malloc((size_t)len + 1);
    if (!text) {
        w->lost++;
        return;
    }
    va_start(ap, fmt);
    vsnprintf(text, (size_t)len + 1, fmt, ap);
    va_end(ap);
    w->items[w->count].code = code;
    w->items[w->count].text = text;
    w->count++;
}

void bm_warnings_clear(bm_warnings *w)
{
    if (!w)
        return;
    for (size_t i = 0; i < w->count; i++)
        free(w->items[i].text);
    free(w->items);
    w->items = NULL;
    w->count = w->capacity = w->lost = 0;
}

int bm_warnings_has(const bm_warnings *w, bm_warn_code code)
{
    for (size_t i = 0; w && i < w->count; i++)
        if (w->items[i].code == code)
            return 1;
    return 0;
}

void bm_core_init(void)
{
    /* Second line of defence only: the core validates the arguments of every
     * GSL call so that no error is ever reported. GSL's default handler
     * aborts the process, so it is switched off; a handler the host
     * installed is its own business and is put back. */
    gsl_error_handler_t *host = gsl_set_error_handler_off();
    if (host)
        gsl_set_error_handler(host);
}
