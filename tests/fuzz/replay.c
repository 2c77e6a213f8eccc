/* replay.c: runs a fuzz target's entry point on saved inputs (files, or
 * every file of a folder), without libFuzzer: the regression test of every
 * input a fuzzer once stopped on. Exit 0 when every input passed the
 * target's checks (a failed check aborts). */
#include "fuzz-common.h"

#include <stdio.h>
#include <string.h>

static int by_name(gconstpointer a, gconstpointer b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

int main(int argc, char **argv)
{
    /* the names first: the target's set-up changes the working folder */
    g_autoptr(GPtrArray) files = g_ptr_array_new_with_free_func(g_free);
    for (int i = 1; i < argc; i++) {
        g_autofree char *path = g_canonicalize_filename(argv[i], NULL);
        if (g_file_test(path, G_FILE_TEST_IS_DIR)) {
            g_autoptr(GDir) dir = g_dir_open(path, 0, NULL);
            for (const char *name; dir && (name = g_dir_read_name(dir));)
                g_ptr_array_add(files, g_build_filename(path, name, NULL));
        } else {
            g_ptr_array_add(files, g_steal_pointer(&path));
        }
    }
    g_ptr_array_sort(files, by_name);
    int one = 1;
    char *none[] = { argv[0], NULL };
    char **args = none;
    LLVMFuzzerInitialize(&one, &args);
    int unreadable = 0;
    for (guint k = 0; k < files->len; k++) {
        const char *path = g_ptr_array_index(files, k);
        g_autofree char *data = NULL;
        gsize len = 0;
        g_autoptr(GError) e = NULL;
        if (!g_file_get_contents(path, &data, &len, &e)) {
            fprintf(stderr, "%s\n", e->message);
            unreadable++;
            continue;
        }
        LLVMFuzzerTestOneInput((const uint8_t *)data, len);
    }
    printf("%u inputs replayed, %d unreadable\n", files->len, unreadable);
    return unreadable ? 1 : 0;
}
