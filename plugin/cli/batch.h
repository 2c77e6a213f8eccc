/* batch.h: many requests in one run (bandmass batch, bandmass-mpi). A
 * manifest of JSON lines becomes a list of items; each item runs through the
 * registry (bm_registry_invoke) on whatever thread or rank takes it, and its
 * result becomes one line of JSON; a writer appends those lines in manifest
 * order, whole lines only, so that a run that was stopped resumes from its
 * output. Both drivers share everything here: they differ only in how items
 * reach the workers (threads or MPI ranks). */
#ifndef BM_CLI_BATCH_H
#define BM_CLI_BATCH_H

#include <glib.h>

G_BEGIN_DECLS

/* The first key of the header line of every batch output. */
#define BM_BATCH_FORMAT "bandmass-batch-1"

/* The keys a manifest line may have. */
#define BM_BATCH_KEYS "op, request, id, each"

typedef struct _BmBatch BmBatch;

/* Reads the manifest at path (BM_ERROR_IO naming it when it cannot be read;
 * that is the only failure: a bad line becomes a failed item). */
BmBatch *bm_batch_load(const char *path, GError **error);

/* The same from manifest text held in memory (len bytes; copied); name is
 * how the header and messages call it. Never fails. */
BmBatch *bm_batch_new(const char *name, const char *text, gsize len);

void bm_batch_free(BmBatch *batch);
G_DEFINE_AUTOPTR_CLEANUP_FUNC(BmBatch, bm_batch_free)

/* The number of items (a template line counts one per value of "each"). */
gsize bm_batch_length(const BmBatch *batch);

/* The SHA-256 of the manifest's bytes (hex). */
const char *bm_batch_sha256(const BmBatch *batch);

/* The header line (ending in "\n"): format, bandmass_version, manifest,
 * manifest_sha256, items, started_utc, and workers_key (e.g. "threads" or
 * "ranks") = workers. Free it. */
char *bm_batch_header(const BmBatch *batch, const char *workers_key, guint workers);

/* Runs item i and returns its line (ending in "\n"; free it); *failed tells
 * whether it failed. Safe to call from several threads at once. */
char *bm_batch_run(const BmBatch *batch, gsize i, gboolean *failed);

/* ---- the ordered writer ---- */

typedef struct _BmBatchWriter BmBatchWriter;

/* Opens the output: standard output when path is NULL; otherwise path by the
 * rules of the CLI's --output (output.h): a new file is created, a regular
 * file is resumed (its header must be that of this manifest; a torn last
 * line is cut off; the complete item lines are the items already done), a
 * FIFO or character device is written through. header is written when the
 * output starts empty. progress: print progress on standard error (a bar
 * on a terminal, a line every few seconds otherwise) and the summary at
 * close. NULL with error set (BM_ERROR_IO or BM_ERROR_INVALID_INPUT, naming
 * the path) when the output cannot be used; nothing is then written. */
BmBatchWriter *bm_batch_writer_open(const BmBatch *batch, const char *path,
                                    const char *header, gboolean progress, GError **error);

/* The items already in the output (items 0 .. done-1 are skipped). */
gsize bm_batch_writer_done(const BmBatchWriter *writer);

/* Hands over item i's line (taken). Lines are written as soon as every item
 * before them is written; safe to call from several threads. FALSE once a
 * write has failed (the caller should stop handing out items). */
gboolean bm_batch_writer_put(BmBatchWriter *writer, gsize i, char *line, gboolean failed);

/* TRUE while no write has failed. */
gboolean bm_batch_writer_ok(BmBatchWriter *writer);

/* Writes what is left, syncs and closes; prints the summary (ok, failed,
 * skipped, wall time) unless progress was off. Returns FALSE with error set
 * when a write failed or an item never arrived. Frees the writer. */
gboolean bm_batch_writer_close(BmBatchWriter *writer, GError **error);

/* ---- batch-table ---- */

/* The CSV of batch outputs: a header row "id,status,FIELD,...", then one row
 * per item line of each file in order. fields is a comma-separated list of
 * response paths: keys joined by '.', each optionally followed by list
 * indexes [N] (points[0].fermi_level_ev; points.0.fermi_level_ev, as bandmass
 * plot spells it, is the same). A field an item lacks is an empty
 * cell; an object or list is its compact JSON. FALSE with error set
 * (BM_ERROR_INVALID_INPUT) for a malformed path or a file that is not a batch
 * output, naming the path or the file and line. */
gboolean bm_batch_table(const char *const *results, const char *fields, GString *out,
                        GError **error);

G_END_DECLS

#endif
