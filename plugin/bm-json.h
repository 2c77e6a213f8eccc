/* bm-json.h: typed getters and setters between JSON objects and the plain
 * numbers and 3x3 arrays of the core, with errors that name the key. */
#ifndef BM_JSON_H
#define BM_JSON_H

#include <json-glib/json-glib.h>
#include "bm-error-private.h"
#include "bm-status.h"

G_BEGIN_DECLS

/* `where` names the enclosing object in messages ("request", "valley 2", ...);
 * NULL means "request". Each getter fails with BM_ERROR_INVALID_INPUT when the
 * key is missing, has the wrong type or holds a non-finite value. */
gboolean bm_json_number(JsonObject *o, const char *key, const char *where,
                        double *out, GError **error);
/* The same, and the value must be > 0. */
gboolean bm_json_positive(JsonObject *o, const char *key, const char *where,
                          double *out, GError **error);
/* Optional variants: absent or null leaves *out untouched and returns TRUE. */
gboolean bm_json_number_opt(JsonObject *o, const char *key, const char *where,
                            double *out, GError **error);
gboolean bm_json_vec3(JsonObject *o, const char *key, const char *where,
                      double out[3], GError **error);
gboolean bm_json_mat3(JsonObject *o, const char *key, const char *where,
                      double out[3][3], GError **error);
/* A number or an array of numbers; returns a new array of *n values. */
double *bm_json_numbers(JsonObject *o, const char *key, const char *where,
                        gsize *n, GError **error);

/* Fails unless every key of o is in allowed (NULL-terminated); the message
 * names the key and lists the allowed ones. */
gboolean bm_json_only_keys(JsonObject *o, const char *const *allowed, const char *where,
                           GError **error);
/* Element i of a, which must be an object holding only allowed keys; `where`
 * names the element ("donors[2]") in messages. NULL with error otherwise. */
JsonObject *bm_json_element_object(JsonArray *a, guint i, const char *const *allowed,
                                   const char *where, GError **error);

/* Setters. Non-finite values are written as null (JSON has no NaN). */
void bm_json_set_number(JsonObject *o, const char *key, double v);
void bm_json_set_vec3(JsonObject *o, const char *key, const double v[3]);
void bm_json_set_mat3(JsonObject *o, const char *key, const double m[3][3]);
void bm_json_set_numbers(JsonObject *o, const char *key, const double *v, gsize n);

/* The one JSON writer: every host and every response that becomes text goes
 * through it (json-glib's generator is not used). Numbers are always valid
 * JSON: integers (int64 nodes) as integers; real numbers in the fewest
 * digits that read back to the same double, with ".0" when they would
 * otherwise look like an integer (300.0, -0.0) and a plain exponent where
 * %g gives one (1e17, 5e-324); NaN and Inf as null. Strings escape '"',
 * '\\' and control characters; other UTF-8 passes through. Pretty output
 * indents by two spaces and writes `"key" : value`. */
void bm_json_write(GString *out, JsonNode *node, gboolean pretty);
/* For the host adapters (Octave, R): the common length of rows that are all
 * non-empty arrays of numbers or nulls (a matrix), or -1 where a is none. */
gssize bm_json_matrix_columns(JsonArray *a);

char *bm_json_to_string(JsonNode *node, gboolean pretty);
char *bm_json_object_to_string(JsonObject *o, gboolean pretty);
/* Appends one double as the writer spells it. */
void bm_json_write_double(GString *out, double v);

/* Warnings in JSON: "warnings" is the array of messages, "warning_codes" the
 * parallel array of their stable codes (bm_warn_code_name), same length and
 * order. Write them only through these functions so the two stay aligned. */

/* Creates both arrays (empty) where missing. */
void bm_json_warnings_ensure(JsonObject *o);

/* Appends every warning of a core result to o's arrays, creating them
 * (empty if there are none) so the keys are always present. */
void bm_json_warn_all(JsonObject *o, const bm_warnings *w);

/* Appends one warning with its code (arrays created on demand). */
void bm_json_warn(JsonObject *o, bm_warn_code code, const char *fmt, ...) G_GNUC_PRINTF(3, 4);

/* JSON text nested deeper than this is refused before parsing: json-glib's
 * parser recurses once per level, and 10,000 levels overflow a thread's stack
 * inside the host. No document of the project needs more than a handful. */
#define BM_JSON_MAX_DEPTH 64

/* The one check of JSON text, before json-glib sees it (json-glib is lenient
 * and would hide mistakes). FALSE, with BM_ERROR_INVALID_INPUT naming `what`
 * ("request for mass-tensor", a file name), the line, column, byte and the
 * key path (donors[0]."density_cm3"), unless text (length bytes, or up to its
 * NUL when length < 0) is exactly one JSON value by RFC 8259 with only
 * whitespace around it, and also:
 * - nested no deeper than BM_JSON_MAX_DEPTH;
 * - no comments, single-quoted strings, NaN/Infinity, leading zeros,
 *   trailing commas, NUL bytes (also not \u0000), lone surrogates, bytes that
 *   are not UTF-8, or a byte-order mark;
 * - no key twice in one object (json-glib would keep the last silently);
 * - integers within gint64 (json-glib would wrap them: 2^64 read as 0), real
 *   numbers within the range of doubles.
 * Quoted user text in its messages is cut to BM_MESSAGE_TEXT_CHARS. */
gboolean bm_json_check_text(const char *text, gssize length, const char *what, GError **error);
/* The same check (its older name, kept for callers that use it). */
gboolean bm_json_check_depth(const char *text, gssize length, const char *what, GError **error);

/* Checks text as bm_json_check_text does, then parses it: the root node
 * (free with json_node_unref), or NULL with the error set. */
JsonNode *bm_json_parse(const char *text, gssize length, const char *what, GError **error);

/* User text quoted for an error message: in double quotes, at most
 * BM_MESSAGE_TEXT_CHARS characters then '..." (N bytes in all)', control
 * characters and bytes that are not UTF-8 written as \xNN. Free it. */
#define BM_MESSAGE_TEXT_CHARS 80
char *bm_text_for_message(const char *text, gssize length);

G_END_DECLS

#endif
