/* batch-mpi.c: bandmass-mpi, the batch run of a manifest spread over MPI
 * ranks. Rank 0 reads the manifest and hands its text to every rank, opens
 * the output (resuming it as bandmass batch does), then hands out item
 * indexes one at a time to whichever rank asks (dynamic load balancing) and
 * writes the lines it gets back in manifest order. Items run and lines are
 * written by the same code as bandmass batch (batch.c), so the two outputs
 * are the same but for the header's started_utc and its workers key
 * ("ranks" here, "threads" there). With one rank, rank 0 runs every item. */
#include <mpi.h>
#include <stdio.h>
#include <string.h>

#include "registry.h"
#include "bm-error.h"
#include "batch.h"

#define EXIT_USAGE 2

enum { TAG_RESULT = 1, TAG_WORK = 2 };

static void usage(void)
{
    fprintf(stderr, "Usage: mpirun -np N bandmass-mpi MANIFEST [--output FILE] [--quiet]\n"
            "  runs the manifest as 'bandmass batch' does, one item at a time per rank\n"
            "  (rank 0 hands out items and writes the output in manifest order)\n");
}

/* A worker: asks for work with an empty result (index -1), runs each index
 * it is sent, returns the line; stops at index -1. */
static void worker(const BmBatch *batch)
{
    GByteArray *msg = g_byte_array_new();
    gint64 index = -1;
    guint8 failed = 0;
    for (;;) {
        g_byte_array_set_size(msg, 0);
        g_byte_array_append(msg, (const guint8 *)&index, sizeof index);
        g_byte_array_append(msg, &failed, 1);
        if (index >= 0) {
            gboolean f = FALSE;
            g_autofree char *line = bm_batch_run(batch, (gsize)index, &f);
            msg->data[sizeof index] = f ? 1 : 0;
            g_byte_array_append(msg, (const guint8 *)line, (guint)strlen(line));
        }
        MPI_Send(msg->data, (int)msg->len, MPI_BYTE, 0, TAG_RESULT, MPI_COMM_WORLD);
        MPI_Recv(&index, 1, MPI_INT64_T, 0, TAG_WORK, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
        if (index < 0)
            break;
    }
    g_byte_array_unref(msg);
}

/* Rank 0 with others: hands out items from first on, writes what comes back;
 * writer NULL (the output could not be opened) only stops the workers. */
static void master(const BmBatch *batch, BmBatchWriter *writer, gsize first, int ranks)
{
    gsize next = first, n = bm_batch_length(batch);
    int active = ranks - 1;
    while (active > 0) {
        MPI_Status st;
        MPI_Probe(MPI_ANY_SOURCE, TAG_RESULT, MPI_COMM_WORLD, &st);
        int count = 0;
        MPI_Get_count(&st, MPI_BYTE, &count);
        guint8 *buf = g_malloc((gsize)count + 1);
        MPI_Recv(buf, count, MPI_BYTE, st.MPI_SOURCE, TAG_RESULT, MPI_COMM_WORLD,
                 MPI_STATUS_IGNORE);
        gint64 index;
        memcpy(&index, buf, sizeof index);
        if (index >= 0 && writer) {
            gsize len = (gsize)count - sizeof index - 1;
            char *line = g_strndup((const char *)buf + sizeof index + 1, len);
            bm_batch_writer_put(writer, (gsize)index, line, buf[sizeof index] != 0);
        }
        g_free(buf);
        gint64 give = -1;
        if (writer && next < n && bm_batch_writer_ok(writer))
            give = (gint64)next++;
        MPI_Send(&give, 1, MPI_INT64_T, st.MPI_SOURCE, TAG_WORK, MPI_COMM_WORLD);
        if (give < 0)
            active--;
    }
}

int main(int argc, char **argv)
{
    MPI_Init(&argc, &argv);
    int rank = 0, ranks = 1;
    MPI_Comm_rank(MPI_COMM_WORLD, &rank);
    MPI_Comm_size(MPI_COMM_WORLD, &ranks);
    bm_registry_init();

    const char *manifest = NULL, *output = NULL;
    gboolean quiet = FALSE, bad = FALSE;
    for (int i = 1; i < argc && !bad; i++) {
        if (!strcmp(argv[i], "--output") && i + 1 < argc)
            output = argv[++i];
        else if (!strcmp(argv[i], "--quiet"))
            quiet = TRUE;
        else if (argv[i][0] == '-' || manifest)
            bad = TRUE;
        else
            manifest = argv[i];
    }
    if (bad || !manifest) {
        if (rank == 0)
            usage();
        MPI_Finalize();
        return EXIT_USAGE;
    }

    /* the manifest's text, read once on rank 0 and sent to every rank */
    g_autoptr(GError) error = NULL;
    g_autofree char *text = NULL;
    gsize len = 0;
    long long size = -1;
    if (rank == 0) {
        if (bm_error_read_file(manifest, "manifest", &text, &len, &error))
            size = (long long)len;
        else
            fprintf(stderr, "bandmass-mpi: error: %s\n", error->message);
    }
    MPI_Bcast(&size, 1, MPI_LONG_LONG, 0, MPI_COMM_WORLD);
    if (size < 0) {
        MPI_Finalize();
        return EXIT_USAGE;
    }
    if (rank != 0)
        text = g_malloc((gsize)size + 1);
    MPI_Bcast(text, (int)size, MPI_BYTE, 0, MPI_COMM_WORLD);
    g_autoptr(BmBatch) batch = bm_batch_new(manifest, text, (gsize)size);

    int status = 0;
    if (rank != 0) {
        worker(batch);
    } else {
        g_autofree char *header = bm_batch_header(batch, "ranks", (guint)ranks);
        BmBatchWriter *writer = bm_batch_writer_open(batch, output, header, !quiet, &error);
        if (!writer) {
            fprintf(stderr, "bandmass-mpi: error: %s\n", error->message);
            status = EXIT_USAGE;
        }
        gsize first = writer ? bm_batch_writer_done(writer) : 0;
        if (ranks > 1) {
            master(batch, writer, first, ranks);
        } else {
            for (gsize i = first; writer && i < bm_batch_length(batch); i++) {
                gboolean failed = FALSE;
                char *line = bm_batch_run(batch, i, &failed);
                if (!bm_batch_writer_put(writer, i, line, failed))
                    break;
            }
        }
        if (writer && !bm_batch_writer_close(writer, &error)) {
            fprintf(stderr, "bandmass-mpi: error: %s\n", error->message);
            status = 1;
        }
    }
    MPI_Finalize();
    return status;
}
