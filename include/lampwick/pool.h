/*
 * pool.h - a portable parallel-for over POSIX threads.
 *
 * Owns: lw_pool_for, which runs fn(i) for i in [0, n) on up to
 * `threads` threads (the caller's included).  Work is handed out one index
 * at a time from an atomic counter; each call writes only its own result
 * slot, so results are identical to a single-threaded run and in the same
 * order.  An optional progress callback is called, serialized, after each
 * completed index.
 */
#ifndef LW_POOL_H
#define LW_POOL_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stddef.h>

/* At most this many threads run one parallel-for (a bound on the stack
 * array of thread handles; far above the cores of any machine lampwick
 * targets). */
#define LW_POOL_THREADS_MAX 64

typedef void (*lw_pool_task_fn)(size_t i, void *ctx);
/* The same with the worker running it, 0 .. lw_pool_threads() - 1 (for
 * scratch space of its own). */
typedef void (*lw_pool_worker_fn)(size_t i, int worker, void *ctx);
typedef void (*lw_pool_progress_fn)(size_t done, size_t total, void *ctx);

/* Number of processors this process may run on (its CPU affinity, as
 * `taskset` sets it; at least 1). */
int lw_pool_cpus(void);

/* Run fn(0..n-1, ctx).  threads <= 0 means lw_pool_cpus().  Falls back to
 * the calling thread alone if threads cannot be started. */
void lw_pool_for(size_t n, int threads, lw_pool_task_fn fn, void *ctx, lw_pool_progress_fn progress,
                     void *progress_ctx);

/* The number of workers lw_pool_for_workers(n, threads, ...) starts at most
 * (threads <= 0: lw_pool_cpus(); never more than n or LW_POOL_THREADS_MAX). */
int lw_pool_threads(size_t n, int threads);

/* lw_pool_for, telling fn which worker runs each index. */
void lw_pool_for_workers(size_t n, int threads, lw_pool_worker_fn fn, void *ctx,
                         lw_pool_progress_fn progress, void *progress_ctx);

#endif
