/* batch.c: manifests, items and the ordered writer of batch runs (batch.h). */
#include "batch.h"

#include <errno.h>
#include <fcntl.h>
#include <pthread.h>
#include <signal.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "registry.h"
#include "bm-json.h"
#include "bm-error.h"
#include "bm-materials.h"
#include "output.h"

/* ---- the manifest ---- */

typedef struct {
    guint line;          /* 1-based line of the manifest */
    gsize offset, len;   /* its text in the manifest */
    gint64 each;         /* index into the template's "each" list, or -1 */
    char *id_json;       /* the id as compact JSON */
    char *op;            /* the operation's name, or NULL when the line has none */
    char *error;         /* the line's own fault, or NULL */
    int code;            /* its BmError code */
} Item;

struct _BmBatch {
    char *name;
    char *text;
    gsize len;
    char sha256[65];
    GArray *items;       /* Item */
    /* checksums of input files already read in this run, by path and file
     * identity (device, inode, size, modification and change times): a file
     * that many items name is read once, a file changed meanwhile again */
    pthread_mutex_t sums_lock;
    GHashTable *sums;
};

static void item_clear(gpointer p)
{
    Item *it = p;
    g_free(it->id_json);
    g_free(it->op);
    g_free(it->error);
}

static char *sha256_hex(const guchar *data, gsize len)
{
    return g_compute_checksum_for_data(G_CHECKSUM_SHA256, data, len);
}

/* Records one item of line; error (may be NULL) is the line's fault. */
static void add_item(BmBatch *b, guint line, gsize offset, gsize len, gint64 each,
                     char *id_json, const char *op, char *error, int code)
{
    Item it = { line, offset, len, each, id_json, g_strdup(op), error, code };
    g_array_append_val(b->items, it);
}

static char *line_fault(guint line, const char *fmt, ...) G_GNUC_PRINTF(2, 3);
static char *line_fault(guint line, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *msg = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    return g_strdup_printf("manifest line %u: %s", line, msg);
}

/* The items of one non-blank line. */
static void parse_line(BmBatch *b, guint line, gsize offset, gsize len, GHashTable *ids)
{
    g_autofree char *what = g_strdup_printf("manifest line %u", line);
    g_autoptr(GError) error = NULL;
    g_autofree char *default_id = g_strdup_printf("%u", line);
    g_autoptr(JsonNode) root = bm_json_parse(b->text + offset, (gssize)len, what, &error);
    if (!root) {
        add_item(b, line, offset, len, -1, g_steal_pointer(&default_id), NULL,
                 g_strdup(error->message), BM_ERROR_INVALID_INPUT);
        return;
    }
    if (!JSON_NODE_HOLDS_OBJECT(root)) {
        add_item(b, line, offset, len, -1, g_steal_pointer(&default_id), NULL,
                 line_fault(line, "not a JSON object {\"op\": ..., \"request\": {...}}"),
                 BM_ERROR_INVALID_INPUT);
        return;
    }
    JsonObject *o = json_node_get_object(root);
    char *fault = NULL;
    int code = BM_ERROR_INVALID_INPUT;

    /* the id first, so that even a faulty line is reported under its own id */
    char *id_json = g_steal_pointer(&default_id);
    JsonNode *id = json_object_get_member(o, "id");
    gboolean id_string = FALSE;
    if (id) {
        GType t = JSON_NODE_HOLDS_VALUE(id) ? json_node_get_value_type(id) : G_TYPE_INVALID;
        if (t == G_TYPE_STRING || t == G_TYPE_INT64) {
            g_free(id_json);
            id_json = bm_json_to_string(id, FALSE);
            id_string = t == G_TYPE_STRING;
        } else {
            fault = line_fault(line, "key \"id\" must be a string or an integer");
        }
    }

    const char *op_name = NULL;
    JsonNode *op = json_object_get_member(o, "op");
    JsonNode *request = json_object_get_member(o, "request");
    JsonNode *each = json_object_get_member(o, "each");
    g_autoptr(GList) keys = json_object_get_members(o);
    for (GList *k = keys; k && !fault; k = k->next)
        if (strcmp(k->data, "op") && strcmp(k->data, "request") && strcmp(k->data, "id")
            && strcmp(k->data, "each")) {
            g_autofree char *shown = bm_text_for_message(k->data, -1);
            fault = line_fault(line, "unknown key %s (a line has %s)", shown, BM_BATCH_KEYS);
        }
    if (!fault && !op)
        fault = line_fault(line, "missing key \"op\" (the operation's name; bandmass ops "
                           "lists them)");
    else if (!fault && (!JSON_NODE_HOLDS_VALUE(op) || json_node_get_value_type(op) != G_TYPE_STRING))
        fault = line_fault(line, "key \"op\" must be a string (an operation's name)");
    if (!fault) {
        op_name = json_node_get_string(op);
        if (!bm_registry_lookup(op_name)) {
            g_autofree char *shown = bm_text_for_message(op_name, -1);
            fault = line_fault(line, "unknown operation %s (bandmass ops lists them)", shown);
            code = BM_ERROR_UNKNOWN_OPERATION;
        }
    }
    if (!fault && request && !JSON_NODE_HOLDS_OBJECT(request))
        fault = line_fault(line, "key \"request\" must be an object");

    /* a template: "each": {"KEY": [v1, v2, ...]} gives one item per value */
    JsonArray *values = NULL;
    const char *each_key = NULL;
    if (!fault && each) {
        JsonObject *e = JSON_NODE_HOLDS_OBJECT(each) ? json_node_get_object(each) : NULL;
        g_autoptr(GList) ek = e ? json_object_get_members(e) : NULL;
        if (!e || g_list_length(ek) != 1) {
            fault = line_fault(line, "key \"each\" must be an object with one request key "
                               "and its list of values, e.g. {\"grid\": [\"a.json\", \"b.json\"]}");
        } else {
            each_key = ek->data;
            JsonNode *v = json_object_get_member(e, each_key);
            values = JSON_NODE_HOLDS_ARRAY(v) ? json_node_get_array(v) : NULL;
            g_autofree char *shown = bm_text_for_message(each_key, -1);
            if (!values || json_array_get_length(values) == 0)
                fault = line_fault(line, "\"each\": %s must be a non-empty list of values", shown);
            else if (request && json_object_has_member(json_node_get_object(request), each_key))
                fault = line_fault(line, "\"each\": %s is also in \"request\": give it in one "
                                   "place", shown);
        }
    }

    if (fault || !values) {
        if (!fault && g_hash_table_contains(ids, id_json))
            fault = line_fault(line, "id %s is already used on manifest line %u", id_json,
                               GPOINTER_TO_UINT(g_hash_table_lookup(ids, id_json)));
        else if (!fault)
            g_hash_table_insert(ids, g_strdup(id_json), GUINT_TO_POINTER(line));
        add_item(b, line, offset, len, -1, id_json, op_name, fault, code);
        return;
    }
    /* template items: id "BASE#k", k from 1 */
    g_autofree char *base = NULL;
    if (id_string) {
        base = g_strdup(json_node_get_string(id));
    } else {
        base = g_strdup(id_json);
    }
    g_free(id_json);
    guint n = json_array_get_length(values);
    for (guint k = 0; k < n; k++) {
        g_autofree char *idtext = g_strdup_printf("%s#%u", base, k + 1);
        g_autoptr(JsonNode) idnode = json_node_new(JSON_NODE_VALUE);
        json_node_set_string(idnode, idtext);
        char *kid = bm_json_to_string(idnode, FALSE);
        char *dup = NULL;
        if (g_hash_table_contains(ids, kid))
            dup = line_fault(line, "id %s is already used on manifest line %u", kid,
                             GPOINTER_TO_UINT(g_hash_table_lookup(ids, kid)));
        else
            g_hash_table_insert(ids, g_strdup(kid), GUINT_TO_POINTER(line));
        add_item(b, line, offset, len, k, kid, op_name, dup, BM_ERROR_INVALID_INPUT);
    }
}

BmBatch *bm_batch_new(const char *name, const char *text, gsize len)
{
    BmBatch *b = g_new0(BmBatch, 1);
    b->name = g_strdup(name);
    b->text = g_malloc(len + 1);
    memcpy(b->text, text, len);
    b->text[len] = '\0';
    b->len = len;
    g_autofree char *hex = sha256_hex((const guchar *)text, len);
    g_strlcpy(b->sha256, hex, sizeof b->sha256);
    b->items = g_array_new(FALSE, FALSE, sizeof(Item));
    pthread_mutex_init(&b->sums_lock, NULL);
    b->sums = g_hash_table_new_full(g_str_hash, g_str_equal, g_free, g_free);
    g_array_set_clear_func(b->items, item_clear);

    g_autoptr(GHashTable) ids = g_hash_table_new_full(g_str_hash, g_str_equal, g_free, NULL);
    guint line = 0;
    for (gsize at = 0; at < len;) {
        const char *nl = memchr(b->text + at, '\n', len - at);
        gsize end = nl ? (gsize)(nl - b->text) : len;
        line++;
        gsize l = end - at;
        if (l > 0 && b->text[at + l - 1] == '\r')
            l--;
        gboolean blank = TRUE;
        for (gsize i = 0; i < l && blank; i++)
            blank = g_ascii_isspace(b->text[at + i]);
        if (!blank)
            parse_line(b, line, at, l, ids);
        at = end + 1;
    }
    return b;
}

BmBatch *bm_batch_load(const char *path, GError **error)
{
    g_autofree char *text = NULL;
    gsize len = 0;
    if (!bm_error_read_file(path, "manifest", &text, &len, error))
        return NULL;
    return bm_batch_new(path, text, len);
}

void bm_batch_free(BmBatch *b)
{
    if (!b)
        return;
    g_array_unref(b->items);
    g_hash_table_unref(b->sums);
    pthread_mutex_destroy(&b->sums_lock);
    g_free(b->text);
    g_free(b->name);
    g_free(b);
}

gsize bm_batch_length(const BmBatch *b)
{
    return b->items->len;
}

const char *bm_batch_sha256(const BmBatch *b)
{
    return b->sha256;
}

char *bm_batch_header(const BmBatch *b, const char *workers_key, guint workers)
{
    g_autoptr(JsonObject) h = json_object_new();
    json_object_set_string_member(h, "format", BM_BATCH_FORMAT);
    json_object_set_string_member(h, "bandmass_version", PACKAGE_VERSION);
    json_object_set_string_member(h, "manifest", b->name);
    json_object_set_string_member(h, "manifest_sha256", b->sha256);
    json_object_set_int_member(h, "items", (gint64)b->items->len);
    g_autoptr(GDateTime) now = g_date_time_new_now_utc();
    g_autofree char *when = g_date_time_format(now, "%Y-%m-%dT%H:%M:%SZ");
    json_object_set_string_member(h, "started_utc", when);
    json_object_set_int_member(h, workers_key, workers);
    g_autofree char *text = bm_json_object_to_string(h, FALSE);
    return g_strconcat(text, "\n", NULL);
}

/* ---- one item ---- */

/* The SHA-256 of a file's bytes, or NULL when it cannot be read. */
static char *file_sha256(BmBatch *b, const char *path)
{
    int fd = open(path, O_RDONLY | O_CLOEXEC | O_NONBLOCK);
    if (fd < 0)
        return NULL;
    struct stat st;
    if (fstat(fd, &st) != 0 || !S_ISREG(st.st_mode)) {
        close(fd);
        return NULL;
    }
    char *key = g_strdup_printf("%s\n%ju:%ju:%jd:%jd.%09ld:%jd.%09ld", path, (uintmax_t)st.st_dev,
                                (uintmax_t)st.st_ino, (intmax_t)st.st_size,
                                (intmax_t)st.st_mtim.tv_sec, (long)st.st_mtim.tv_nsec,
                                (intmax_t)st.st_ctim.tv_sec, (long)st.st_ctim.tv_nsec);
    pthread_mutex_lock(&b->sums_lock);
    char *known = g_strdup(g_hash_table_lookup(b->sums, key));
    pthread_mutex_unlock(&b->sums_lock);
    if (known) {
        close(fd);
        g_free(key);
        return known;
    }
    g_autoptr(GChecksum) sum = g_checksum_new(G_CHECKSUM_SHA256);
    guchar buf[65536];
    for (;;) {
        gssize got = read(fd, buf, sizeof buf);
        if (got < 0 && errno == EINTR)
            continue;
        if (got < 0) {
            close(fd);
            g_free(key);
            return NULL;
        }
        if (got == 0)
            break;
        g_checksum_update(sum, buf, got);
    }
    close(fd);
    char *hex = g_strdup(g_checksum_get_string(sum));
    pthread_mutex_lock(&b->sums_lock);
    g_hash_table_replace(b->sums, key, g_strdup(hex));
    pthread_mutex_unlock(&b->sums_lock);
    return hex;
}

static void add_input(BmBatch *b, JsonArray *inputs, const char *key, const char *path)
{
    JsonObject *o = json_object_new();
    json_object_set_string_member(o, "key", key);
    json_object_set_string_member(o, "path", path);
    g_autofree char *sum = file_sha256(b, path);
    if (sum)
        json_object_set_string_member(o, "sha256", sum);
    else
        json_object_set_null_member(o, "sha256");
    json_array_add_object_element(inputs, o);
}

/* A band grid document small enough to hold a path rather than the energies
 * names its .npy file under "energies_ev" / "energies_hartree", relative to the
 * document's folder: that file is an input too. */
#define GRID_DOCUMENT_LOOK_BYTES (1 << 20)

static void add_grid_inputs(BmBatch *b, JsonArray *inputs, const char *path)
{
    add_input(b, inputs, "grid", path);
    struct stat st;
    if (stat(path, &st) != 0 || !S_ISREG(st.st_mode) || st.st_size > GRID_DOCUMENT_LOOK_BYTES)
        return;
    g_autofree char *text = NULL;
    gsize len = 0;
    if (!g_file_get_contents(path, &text, &len, NULL))
        return;
    g_autoptr(JsonNode) root = bm_json_parse(text, (gssize)len, path, NULL);
    if (!root || !JSON_NODE_HOLDS_OBJECT(root))
        return;
    static const char *const keys[] = { "energies_ev", "energies_hartree" };
    for (guint k = 0; k < G_N_ELEMENTS(keys); k++) {
        JsonNode *n = json_object_get_member(json_node_get_object(root), keys[k]);
        if (!n || !JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_STRING)
            continue;
        const char *ref = json_node_get_string(n);
        g_autofree char *dir = g_path_get_dirname(path);
        g_autofree char *full = g_path_is_absolute(ref) || !strcmp(dir, ".")
            ? g_strdup(ref) : g_build_filename(dir, ref, NULL);
        g_autofree char *key = g_strdup_printf("grid.%s", keys[k]);
        add_input(b, inputs, key, full);
    }
}

/* The files the request names: "grid" (and the .npy its document names),
 * "table", and a "material" that is not a built-in name. */
static JsonArray *request_inputs(BmBatch *b, JsonObject *request)
{
    JsonArray *inputs = json_array_new();
    static const char *const keys[] = { "grid", "table", "material" };
    for (guint k = 0; k < G_N_ELEMENTS(keys); k++) {
        JsonNode *n = json_object_get_member(request, keys[k]);
        if (!n || !JSON_NODE_HOLDS_VALUE(n) || json_node_get_value_type(n) != G_TYPE_STRING)
            continue;
        const char *path = json_node_get_string(n);
        if (k == 0) {
            add_grid_inputs(b, inputs, path);
        } else if (k == 1) {
            add_input(b, inputs, keys[k], path);
        } else {
            bm_errbuf err = {0};
            if (!bm_material_find(path, &err) && g_file_test(path, G_FILE_TEST_IS_REGULAR))
                add_input(b, inputs, keys[k], path);
        }
    }
    return inputs;
}

static const char *error_code_name(const GError *error)
{
    if (error->domain != BM_ERROR)
        return "internal";
    GEnumClass *cls = g_type_class_ref(BM_TYPE_ERROR);
    GEnumValue *v = g_enum_get_value(cls, error->code);
    const char *name = v ? v->value_nick : "internal";
    g_type_class_unref(cls);
    return name;
}

char *bm_batch_run(const BmBatch *b, gsize i, gboolean *failed)
{
    const Item *it = &g_array_index(b->items, Item, i);
    g_autoptr(JsonObject) out = json_object_new();
    g_autoptr(JsonNode) id = bm_json_parse(it->id_json, -1, "id", NULL);
    json_object_set_member(out, "id", g_steal_pointer(&id));
    json_object_set_int_member(out, "line", it->line);
    if (it->op)
        json_object_set_string_member(out, "op", it->op);
    else
        json_object_set_null_member(out, "op");

    g_autoptr(GError) error = NULL;
    if (it->error)
        g_set_error_literal(&error, BM_ERROR, it->code, it->error);

    JsonObject *response = NULL;
    JsonArray *inputs = NULL;
    g_autoptr(JsonNode) root = NULL;
    if (!error) {
        /* the line is parsed again here, on this thread: nothing of the
         * manifest's parsed nodes is shared between threads */
        root = bm_json_parse(b->text + it->offset, (gssize)it->len,
                                                 "manifest line", &error);
    }
    if (!error) {
        JsonObject *o = json_node_get_object(root);
        JsonNode *rq = json_object_get_member(o, "request");
        JsonObject *request = rq ? json_object_ref(json_node_get_object(rq)) : json_object_new();
        if (it->each >= 0) {
            JsonObject *each = json_object_get_object_member(o, "each");
            g_autoptr(GList) keys = json_object_get_members(each);
            const char *key = keys->data;
            JsonNode *v = json_array_get_element(json_object_get_array_member(each, key),
                                                 (guint)it->each);
            json_object_set_member(request, key, json_node_copy(v));
        }
        /* the checksum cache is the one thing of the batch that items
         * change, under its own lock */
        inputs = request_inputs((BmBatch *)b, request);
        response = bm_registry_invoke(bm_registry_lookup(it->op), request, NULL, &error);
        if (!response)
            g_prefix_error(&error, "manifest line %u: ", it->line);
        json_object_unref(request);
    }
    json_object_set_string_member(out, "status", response ? "ok" : "failed");
    json_object_set_array_member(out, "inputs", inputs ? inputs : json_array_new());
    if (response) {
        json_object_set_object_member(out, "response", response);
    } else {
        JsonObject *e = json_object_new();
        json_object_set_string_member(e, "message", error->message);
        json_object_set_string_member(e, "code", error_code_name(error));
        json_object_set_object_member(out, "error", e);
    }
    *failed = response == NULL;
    g_autofree char *text = bm_json_object_to_string(out, FALSE);
    return g_strconcat(text, "\n", NULL);
}

/* ---- the ordered writer ---- */

/* Output is synced at most this often, and at the end. */
#define SYNC_INTERVAL_US (2 * G_USEC_PER_SEC)
/* Progress: a bar at most this often on a terminal, a line this often otherwise. */
#define BAR_INTERVAL_US (G_USEC_PER_SEC / 5)
#define LINE_INTERVAL_US (10 * G_USEC_PER_SEC)

/* The lock is a pthread mutex, not a GMutex: GLib's futex-based locks are
 * invisible to ThreadSanitizer (tests/run.sh --threads runs batch under it). */
struct _BmBatchWriter {
    pthread_mutex_t lock;
    int fd;
    gboolean regular;    /* a regular file: synced */
    char *path;          /* as given, for messages ("standard output" when NULL) */
    gsize n, done, next;
    char **pending;      /* finished lines waiting for their turn, by item */
    gsize ok, failed;
    GError *error;       /* the first write failure */
    gint64 started, last_sync, last_progress;
    gboolean progress, tty, bar_drawn;
};

static gboolean refuse(GError **error, int code, const char *path, const char *fmt, ...)
    G_GNUC_PRINTF(4, 5);
static gboolean refuse(GError **error, int code, const char *path, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *why = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error(error, BM_ERROR, code, "cannot use --output %s: %s", path, why);
    return FALSE;
}

/* Reads what a stopped run left in fd: the header must be this manifest's,
 * every complete line after it one item; a torn last line (no newline) is
 * cut off. Sets *done to the number of items present, *empty when there is
 * no complete header line. */
static gboolean read_existing(const BmBatch *b, const char *path, int fd, gsize *done,
                              gboolean *empty, GError **error)
{
    int copy = dup(fd);
    FILE *f = copy >= 0 ? fdopen(copy, "r") : NULL;
    if (!f) {
        if (copy >= 0)
            close(copy);
        return refuse(error, BM_ERROR_IO, path, "%s", g_strerror(errno));
    }
    char *line = NULL;
    size_t cap = 0;
    ssize_t got;
    off_t complete = 0;     /* bytes in whole lines */
    gsize lines = 0;
    gboolean ok = TRUE;
    while (ok && (got = getline(&line, &cap, f)) > 0) {
        if (line[got - 1] != '\n') {
            /* torn: redone; but text without any line end is cut off only
             * when it is the start of a header (a stopped run's first write),
             * never someone's file */
            static const char start[] = "{\"format\":\"" BM_BATCH_FORMAT "\"";
            if (lines == 0 && strncmp(line, start, MIN((gsize)got, sizeof start - 1)) != 0)
                ok = refuse(error, BM_ERROR_INVALID_INPUT, path, "it is not the output of a "
                            "batch run (it holds no %s header); nothing was written: pass "
                            "another file name", BM_BATCH_FORMAT);
            break;
        }
        lines++;
        g_autofree char *what = g_strdup_printf("%s line %zu", path, lines);
        g_autoptr(GError) bad = NULL;
        g_autoptr(JsonNode) node = bm_json_parse(line, got, what, &bad);
        JsonObject *o = node && JSON_NODE_HOLDS_OBJECT(node) ? json_node_get_object(node) : NULL;
        if (lines == 1) {
            const char *format = o && json_object_has_member(o, "format")
                ? json_object_get_string_member_with_default(o, "format", NULL) : NULL;
            const char *sum = o ? json_object_get_string_member_with_default(o, "manifest_sha256",
                                                                              NULL) : NULL;
            if (!format || strcmp(format, BM_BATCH_FORMAT) != 0)
                ok = refuse(error, BM_ERROR_INVALID_INPUT, path, "it is not the output of a "
                            "batch run (its first line is not a %s header); nothing was "
                            "written: pass another file name", BM_BATCH_FORMAT);
            else if (!sum || strcmp(sum, b->sha256) != 0)
                ok = refuse(error, BM_ERROR_INVALID_INPUT, path, "it holds the results of "
                            "another manifest (SHA-256 %s; %s has %s), so it cannot be "
                            "resumed; nothing was written: pass another --output, or remove "
                            "it to start again", sum ? sum : "none", b->name, b->sha256);
        } else if (!o || !json_object_has_member(o, "id")
                   || !json_object_has_member(o, "status")) {
            ok = refuse(error, BM_ERROR_INVALID_INPUT, path, "line %zu is not an item of a "
                        "batch run (only a torn last line is redone); nothing was written",
                        lines);
        } else if (lines - 1 > b->items->len) {
            ok = refuse(error, BM_ERROR_INVALID_INPUT, path, "it holds more items than the "
                        "manifest's %u; nothing was written", b->items->len);
        }
        if (ok)
            complete += got;
    }
    gboolean read_failed = ferror(f);
    free(line);
    fclose(f);
    if (!ok)
        return FALSE;
    if (read_failed)
        return refuse(error, BM_ERROR_IO, path, "it could not be read back to resume");
    struct stat st;
    if (fstat(fd, &st) == 0 && st.st_size != complete && ftruncate(fd, complete) != 0)
        return refuse(error, BM_ERROR_IO, path, "its torn last line could not be cut off: %s",
                      g_strerror(errno));
    *empty = lines == 0;
    *done = lines > 0 ? lines - 1 : 0;
    return TRUE;
}

BmBatchWriter *bm_batch_writer_open(const BmBatch *b, const char *path, const char *header,
                                    gboolean progress, GError **error)
{
    /* a full disk or a size limit is a failed write, not a killed process;
     * a reader of a FIFO that went away is EPIPE, not a silent death */
    signal(SIGXFSZ, SIG_IGN);
    signal(SIGPIPE, SIG_IGN);
    int fd = -1;
    gboolean regular = FALSE, empty = TRUE;
    gsize done = 0;
    if (!path) {
        fd = dup(STDOUT_FILENO);
        if (fd < 0) {
            g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot write to standard output: %s",
                        g_strerror(errno));
            return NULL;
        }
    } else {
        struct stat st;
        BmCliOutputKind kind;
        if (!bm_cli_output_kind(path, &st, &kind, error))
            return NULL;
        if (kind == BM_CLI_OUTPUT_ABSENT) {
            do
                fd = open(path, O_WRONLY | O_APPEND | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC,
                          0666);
            while (fd < 0 && errno == EINTR);
        } else {
            int flags = kind == BM_CLI_OUTPUT_REGULAR ? O_RDWR | O_APPEND : O_WRONLY;
            do
                fd = open(path, flags | O_NOCTTY | O_NOFOLLOW | O_CLOEXEC);
            while (fd < 0 && errno == EINTR);
        }
        if (fd < 0) {
            refuse(error, BM_ERROR_IO, path, "%s", g_strerror(errno));
            return NULL;
        }
        struct stat now;
        if (fstat(fd, &now) != 0
            || (kind != BM_CLI_OUTPUT_ABSENT
                && (now.st_dev != st.st_dev || now.st_ino != st.st_ino))) {
            close(fd);
            refuse(error, BM_ERROR_IO, path, "it was replaced while being opened");
            return NULL;
        }
        regular = S_ISREG(now.st_mode);
        if (kind == BM_CLI_OUTPUT_REGULAR && !read_existing(b, path, fd, &done, &empty, error)) {
            close(fd);
            return NULL;
        }
    }
    int err = 0;
    if (empty && !bm_cli_write_all(fd, header, strlen(header), &err)) {
        close(fd);
        refuse(error, BM_ERROR_IO, path ? path : "-", "%s", g_strerror(err));
        return NULL;
    }
    BmBatchWriter *w = g_new0(BmBatchWriter, 1);
    pthread_mutex_init(&w->lock, NULL);
    w->fd = fd;
    w->regular = regular;
    w->path = g_strdup(path ? path : "standard output");
    w->n = b->items->len;
    w->done = w->next = done;
    w->pending = g_new0(char *, w->n + 1);
    w->started = w->last_sync = w->last_progress = g_get_monotonic_time();
    w->progress = progress;
    w->tty = isatty(STDERR_FILENO);
    return w;
}

gsize bm_batch_writer_done(const BmBatchWriter *w)
{
    return w->done;
}

static void format_duration(char *buf, gsize size, double s)
{
    if (s < 0 || s > 1e7)
        g_snprintf(buf, size, "?");
    else if (s >= 3600)
        g_snprintf(buf, size, "%d:%02d:%02d", (int)(s / 3600), (int)(s / 60) % 60, (int)s % 60);
    else
        g_snprintf(buf, size, "%d:%02d", (int)(s / 60), (int)s % 60);
}

/* Progress on standard error (lock held). */
static void show_progress(BmBatchWriter *w, gint64 now, gboolean final)
{
    if (!w->progress || (!final && now - w->last_progress < (w->tty ? BAR_INTERVAL_US
                                                                      : LINE_INTERVAL_US)))
        return;
    w->last_progress = now;
    gsize ran = w->ok + w->failed, total = w->n - w->done;
    double secs = (now - w->started) / 1e6;
    double rate = secs > 0 ? ran / secs : 0;
    char left[32];
    format_duration(left, sizeof left, rate > 0 ? (total - ran) / rate : -1);
    if (w->tty) {
        /* one line of at most 79 columns, padded so that a shorter one
         * covers the last */
        enum { WIDTH = 20 };
        char bar[WIDTH + 1];
        gsize fill = total ? ran * WIDTH / total : WIDTH;
        for (gsize k = 0; k < WIDTH; k++)
            bar[k] = k < fill ? '#' : '.';
        bar[WIDTH] = '\0';
        g_autofree char *text = g_strdup_printf("batch [%s] %zu/%zu, %zu failed, %.0f/s, %s left",
                                                bar, ran, total, w->failed, rate, left);
        fprintf(stderr, "\r%-79.79s", text);
        w->bar_drawn = TRUE;
    } else if (!final) {
        fprintf(stderr, "bandmass batch: %zu of %zu items (%zu failed), %.0f items/s, about %s "
                "left\n", ran, total, w->failed, rate, left);
    }
    fflush(stderr);
}

/* Writes the contiguous run of finished lines (lock held). */
static void flush_ready(BmBatchWriter *w)
{
    while (w->next < w->n && w->pending[w->next]) {
        char *line = w->pending[w->next];
        w->pending[w->next] = NULL;
        int err = 0;
        if (!w->error && !bm_cli_write_all(w->fd, line, strlen(line), &err))
            g_set_error(&w->error, BM_ERROR, BM_ERROR_IO, "cannot write --output %s: %s",
                        w->path, g_strerror(err));
        g_free(line);
        w->next++;
    }
    gint64 now = g_get_monotonic_time();
    if (w->regular && !w->error && now - w->last_sync >= SYNC_INTERVAL_US) {
        fdatasync(w->fd);
        w->last_sync = now;
    }
    show_progress(w, now, FALSE);
}

gboolean bm_batch_writer_put(BmBatchWriter *w, gsize i, char *line, gboolean failed)
{
    pthread_mutex_lock(&w->lock);
    if (i < w->next || i >= w->n || w->pending[i]) {
        g_free(line);   /* already written or out of range: a caller's slip */
    } else {
        w->pending[i] = line;
        if (failed)
            w->failed++;
        else
            w->ok++;
        flush_ready(w);
    }
    gboolean ok = w->error == NULL;
    pthread_mutex_unlock(&w->lock);
    return ok;
}

gboolean bm_batch_writer_ok(BmBatchWriter *w)
{
    pthread_mutex_lock(&w->lock);
    gboolean ok = w->error == NULL;
    pthread_mutex_unlock(&w->lock);
    return ok;
}

gboolean bm_batch_writer_close(BmBatchWriter *w, GError **error)
{
    pthread_mutex_lock(&w->lock);
    flush_ready(w);
    if (w->regular && !w->error && fsync(w->fd) != 0 && errno != EINVAL)
        g_set_error(&w->error, BM_ERROR, BM_ERROR_IO, "cannot write --output %s: %s", w->path,
                    g_strerror(errno));
    if (close(w->fd) != 0 && !w->error && errno != EINTR)
        g_set_error(&w->error, BM_ERROR, BM_ERROR_IO, "cannot write --output %s: %s", w->path,
                    g_strerror(errno));
    if (!w->error && w->next < w->n)
        g_set_error(&w->error, BM_ERROR, BM_ERROR_INTERNAL, "--output %s: %zu items never "
                    "finished", w->path, w->n - w->next);
    gint64 now = g_get_monotonic_time();
    if (w->progress) {
        if (w->tty) {
            show_progress(w, now, TRUE);
            fputc('\n', stderr);
        }
        g_autofree char *where = w->done ? g_strdup_printf(" (already in %s)", w->path)
                                         : g_strdup("");
        fprintf(stderr, "bandmass batch: %zu done (%zu ok, %zu failed), %zu skipped%s, %.2f s "
                "wall time\n", w->ok + w->failed, w->ok, w->failed, w->done, where,
                (now - w->started) / 1e6);
    }
    for (gsize i = 0; i < w->n; i++)
        g_free(w->pending[i]);
    g_free(w->pending);
    g_free(w->path);
    gboolean ok = w->error == NULL;
    if (!ok)
        g_propagate_error(error, w->error);
    pthread_mutex_unlock(&w->lock);
    pthread_mutex_destroy(&w->lock);
    g_free(w);
    return ok;
}
