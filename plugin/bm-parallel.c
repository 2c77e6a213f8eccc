/* bm-parallel.c: work items over joined threads (bm-parallel.h). */
#include "bm-parallel.h"

typedef struct {
    gsize n;
    gint next;          /* the next item, taken atomically */
    void (*fn)(gsize i, gpointer data);
    gpointer data;
} Items;

static gpointer take_items(gpointer p)
{
    Items *it = p;
    for (;;) {
        gint i = g_atomic_int_add(&it->next, 1);
        if (i < 0 || (gsize)i >= it->n)
            return NULL;
        it->fn((gsize)i, it->data);
    }
}

void bm_parallel_for(gsize n, guint threads, void (*fn)(gsize i, gpointer data), gpointer data)
{
    g_return_if_fail(n <= G_MAXINT);
    if (n == 0)
        return;   /* (no threads: MIN(threads, n) - 1 would wrap) */
    Items it = { n, 0, fn, data };
    guint extra = threads > 1 ? MIN(threads, (guint)MIN(n, 64)) - 1 : 0;
    GThread *t[64];
    guint started = 0;
    for (guint k = 0; k < extra; k++) {
        /* a thread that cannot start leaves its share to the others */
        t[started] = g_thread_try_new("bandmass", take_items, &it, NULL);
        if (t[started])
            started++;
    }
    take_items(&it);
    for (guint k = 0; k < started; k++)
        g_thread_join(t[k]);
}
