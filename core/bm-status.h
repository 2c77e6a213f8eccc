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
 * a result so hosts can print them beside the numbers. Each carries a stable
 * code (program logic branches on the code, never on the text) and a message.
 * The codes and their strings are part of the JSON interface: never renumber
 * or rename one, add new codes before BM_WARN_COUNT (DEVELOPERS.md). */
typedef enum {
    BM_WARN_SADDLE_POINT,            /* curvature changes sign: not an extremum */
    BM_WARN_FLAT_DIRECTION,          /* near-zero curvature: mass infinite there */
    BM_WARN_CONICAL_POINT,           /* E linear in |k - k0|: no finite mass */
    BM_WARN_NON_PARABOLIC,           /* quadratic fit residual large */
    BM_WARN_FIT_UNDETERMINED,        /* too few points for the quadratic fit */
    BM_WARN_REFINEMENT_ESCAPED,      /* refinement left its region: reported at the sample */
    BM_WARN_REFINEMENT_NOT_CONVERGED,/* Newton refinement did not converge */
    BM_WARN_NOT_STATIONARY,          /* |dE/dk| not small at the given point */
    BM_WARN_DEGENERATE_BAND,         /* another band within the degeneracy tolerance */
    BM_WARN_MASS_OUT_OF_RANGE,       /* a mass outside the usual 0.01..10 m_e */
    BM_WARN_MASS_ORDER,              /* light-hole mass above heavy-hole mass */
    BM_WARN_NOT_A_MAXIMUM,           /* heavy-hole band curves upward along a direction */
    BM_WARN_OPEN_SURFACE,            /* heavy-hole surface open: no finite DOS mass */
    BM_WARN_QUADRATURE_INACCURATE,   /* warped-surface quadrature not converged */
    BM_WARN_GAP_NOT_POSITIVE,        /* band gap <= 0: bands overlap */
    BM_WARN_BOLTZMANN_DEVIATION,     /* Boltzmann statistics off by more than 5 % */
    BM_WARN_DEGENERATE_STATISTICS,   /* Fermi level near a valley edge */
    BM_WARN_AXES_REORTHONORMALISED,  /* given principal axes corrected */
    BM_WARN_VALLEY_SYMMETRISED,      /* valley tensor breaks its site symmetry */
    BM_WARN_NO_EXTREMUM,             /* no extremum found in the band */
    BM_WARN_EXTREMUM_WARNINGS,       /* an extremum carries warnings of its own */
    BM_WARN_ZERO_DENSITY,            /* zero carrier density: infinite resistivity */
    BM_WARN_WARNINGS_LOST,           /* warnings not recorded for lack of memory */
    BM_WARN_NOT_CONVERGED,           /* estimated mass error above the tolerance */
    BM_WARN_KIND_UNCERTAIN,          /* independent estimates disagree on the kind */
    BM_WARN_NO_ERROR_ESTIMATE,       /* no independent estimate: error unknown */
    BM_WARN_DEGENERATE_EXTREMUM,     /* bands touch at the extremum: no single-band tensor */
    BM_WARN_UNIT_SUSPECT,            /* input numbers look like another unit than their key says */
    BM_WARN_ABOVE_MOTT_DENSITY,      /* single-level dopants above the Mott density */
    BM_WARN_WINDOW_UNRESOLVED,       /* the mesh does not resolve the thermal window */
    BM_WARN_CROSSING_IN_WINDOW,      /* a band outside the selection crosses inside the window */
    BM_WARN_FERMI_OUTSIDE_BANDS,     /* the chemical potential leaves the bands given */
    BM_WARN_FIT_POORLY_CONSTRAINED,  /* a fitted parameter's standard error is large */
    BM_WARN_FIT_INCONSISTENT,        /* residuals far beyond the stated uncertainties */
    BM_WARN_ORBIT_IRREGULAR,         /* a cross-section not star-shaped about its centre */
    BM_WARN_EXTREMA_CAPPED,          /* more extrema than are reported: the nearest in energy kept */
    BM_WARN_SCATTERED_DATA,          /* a fit residual that is scatter, not non-parabolicity */
    BM_WARN_COUNT                    /* not a code: the number of codes */
} bm_warn_code;

/* The stable kebab-case name of a code ("saddle-point"); "unknown" outside
 * the enum. */
const char *bm_warn_code_name(bm_warn_code code);

typedef struct {
    bm_warn_code code;
    char *text;                      /* malloc'd, owned by the list */
} bm_warning;

/* A growable list, owned by the caller: start it zeroed ({0}) and free it
 * with bm_warnings_clear (result structs that embed one say how they are
 * freed). A core function that fills a result starts its list empty, so the
 * caller clears a reused result first. On out-of-memory a warning is not
 * stored and `lost` counts it. */
typedef struct {
    size_t count;
    size_t capacity;
    bm_warning *items;
    size_t lost;
} bm_warnings;

void bm_warn(bm_warnings *w, bm_warn_code code, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Frees every message and leaves w empty (and reusable). w may be NULL. */
void bm_warnings_clear(bm_warnings *w);

/* 1 when w holds a warning with that code. */
int bm_warnings_has(const bm_warnings *w, bm_warn_code code);

/* Switches GSL's default abort-on-error handler off, leaving a handler the
 * host installed in place. Called once before use (the registry does so on
 * first use). It is a second line of defence: core functions validate the
 * arguments of every GSL call so that no GSL error is reported on any input,
 * and check every GSL status. */
void bm_core_init(void);

#endif
