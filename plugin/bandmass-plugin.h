/* bandmass-plugin.h: the generic C entry point of libbandmass. One exported
 * function hands any host (dlopen, ctypes, FFI) a versioned table of calls.
 *
 * Use:
 *     void *lib = dlopen("libbandmass-1.0.so.0", RTLD_NOW);
 *     bandmass_plugin_get_api_func get = (bandmass_plugin_get_api_func)
 *         dlsym(lib, BANDMASS_PLUGIN_ENTRY);
 *     const bandmass_plugin_api *api = get(BANDMASS_PLUGIN_ABI_MAJOR);
 *     if (!api) ...                             // this major is not served
 *     char *response, *message;
 *     if (api->call("constants", "{}", &response, &message) == BANDMASS_PLUGIN_OK) {
 *         ... use response (JSON text) ...
 *         api->free_string(response);
 *     } else {
 *         ... report message ...
 *         api->free_string(message);
 *     }
 *
 * Nothing of GLib crosses this boundary: plain C types, strings are UTF-8
 * and NUL-terminated, JSON is text.
 *
 * Ownership:
 * - The table and every string and array it points to belong to the
 *   library; they are immutable and valid until the library is unloaded.
 *   Never free or modify them.
 * - Strings that call() returns through response_json and error_message
 *   belong to the caller, who releases each with free_string() (not with
 *   free(): the allocators may differ).
 * - Arguments are borrowed for the duration of the call only.
 *
 * Threads: bandmass_plugin_get_api() and every function of the table may be
 * called from any number of threads at once; the library keeps no mutable
 * state between calls.
 *
 * ABI version rules:
 * - A minor version (abi_minor + 1) may only append fields at the end of
 *   bandmass_plugin_api and add status codes. `size` is then larger. A host
 *   built against minor m reads a field added in minor m only when
 *   api->abi_minor >= m and api->size reaches past that field's end
 *   (offsetof(bandmass_plugin_api, field) + sizeof field <= api->size).
 *   Operations may be added in any release; they show up in the table.
 * - Anything else needs a major bump (abi_major + 1): removing, reordering
 *   or retyping a field, changing a signature, the meaning of a status code,
 *   the ownership of a string, or the entry point's name or signature.
 *   bandmass_plugin_get_api(major) returns NULL for a major the library does
 *   not serve, so a host asks for the major it was built against.
 * - The JSON of requests and responses is versioned by its operations, not
 *   by this ABI: new response keys may appear at any time; hosts ignore
 *   keys they do not know.
 */
#ifndef BANDMASS_PLUGIN_H
#define BANDMASS_PLUGIN_H

#include <stddef.h>
#include <stdint.h>
#include "bandmass-export.h"

#ifdef __cplusplus
extern "C" {
#endif

#define BANDMASS_PLUGIN_ABI_MAJOR 1
#define BANDMASS_PLUGIN_ABI_MINOR 0

/* The name of the one exported symbol, for dlsym(). */
#define BANDMASS_PLUGIN_ENTRY "bandmass_plugin_get_api"

/* Status codes returned by call(). 1..5 mirror the GError codes of the
 * GObject API (BmError + 1). */
enum {
    BANDMASS_PLUGIN_OK = 0,
    BANDMASS_PLUGIN_INVALID_INPUT = 1,      /* bad request: the message names the key */
    BANDMASS_PLUGIN_IO = 2,                 /* a file could not be read */
    BANDMASS_PLUGIN_UNKNOWN_OPERATION = 3,  /* no operation of that name */
    BANDMASS_PLUGIN_NO_CONVERGENCE = 4,     /* an iteration did not converge */
    BANDMASS_PLUGIN_INTERNAL = 5,           /* a bug: please report the message */
    BANDMASS_PLUGIN_BAD_ARGUMENT = 6        /* op or response_json was NULL */
};

typedef struct bandmass_plugin_api {
    /* sizeof(bandmass_plugin_api) as the library was built: fields whose
     * end lies beyond it are absent (see the version rules above). */
    uint32_t size;
    uint16_t abi_major;
    uint16_t abi_minor;
    const char *library_version;              /* e.g. "0.1.0" */

    size_t n_operations;
    const char *const *operation_names;       /* n_operations names, e.g. "mass-tensor" */
    const char *const *operation_summaries;   /* n_operations one-line summaries */
    /* n_operations JSON arrays, one object a request key:
     * {"name", "kinds" ("number or array"), "required", "default" (JSON or
     * null), "summary" (meaning), "kind_names" (["number", "array"]),
     * "unit" (or null), "minimum" and "maximum" ({"value", "inclusive"} or
     * null), "choices" ([{"name", "description"}] or null)}; hosts ignore
     * members they do not know */
    const char *const *operation_params_json;
    /* every operation as a JSON array of {"name", "summary", "params",
     * "response" ([{"name", "unit", "optional", "meaning"}])}, the same text
     * as `bandmass ops --json` (compact) */
    const char *operations_json;

    /* Runs operation op on request_json (a JSON object as text; NULL means
     * "{}"). On BANDMASS_PLUGIN_OK, *response_json is the response (a JSON
     * object with "warnings" and "warning_codes" arrays) and *error_message, if asked for, is
     * NULL. Otherwise *response_json is NULL and *error_message (when
     * error_message is not NULL) says what was wrong and where. Both
     * strings are the caller's to release with free_string(). */
    int (*call)(const char *op, const char *request_json,
                char **response_json, char **error_message);

    /* Releases a string returned by call(); NULL is ignored. */
    void (*free_string)(char *s);
} bandmass_plugin_api;

typedef const bandmass_plugin_api *(*bandmass_plugin_get_api_func)(unsigned abi_major);

/* The table for ABI major version abi_major, or NULL if this library does
 * not serve that major version. */
BM_PUBLIC const bandmass_plugin_api *bandmass_plugin_get_api(unsigned abi_major);

#ifdef __cplusplus
}
#endif

#endif
