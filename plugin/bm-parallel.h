/* bm-parallel.h: an operation's work items spread over threads. */
#ifndef BM_PARALLEL_H
#define BM_PARALLEL_H

#include <glib.h>

/* Calls fn(i, data) once for each i in [0, n), on up to threads threads
 * (the calling one included), and returns when every call has returned.
 * Items are taken in turn from a shared counter; each writes its own result,
 * so the caller combines them in item order and the answer does not depend
 * on the thread count. The threads are joined, not pooled: joining is what
 * makes their writes visible to the caller, in a form every race detector
 * understands. */
void bm_parallel_for(gsize n, guint threads, void (*fn)(gsize i, gpointer data), gpointer data);

#endif
