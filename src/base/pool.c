/*
 * pool.c - parallel-for over POSIX threads (see pool.h).
 */
#define _GNU_SOURCE /* sched_getaffinity, CPU_COUNT */
#include "lampwick/pool.h"

#include <pthread.h>
#include <signal.h>
#include <stdbool.h>
#include <sched.h>
#include <stdatomic.h>
#include <unistd.h>

typedef struct job {
    size_t n;
    atomic_size_t next;
    size_t done;
    lw_pool_task_fn fn;
    lw_pool_worker_fn wfn;
    void *ctx;
    lw_pool_progress_fn progress;
    void *progress_ctx;
    pthread_mutex_t lock;
} job;

int lw_pool_cpus(void)
{
    cpu_set_t set;
    CPU_ZERO(&set);
    if (sched_getaffinity(0, sizeof set, &set) == 0) {
        int n = CPU_COUNT(&set);
        if (n > 0)
            return n;
    }
    long n = sysconf(_SC_NPROCESSORS_ONLN);
    return n > 0 && n <= CPU_SETSIZE ? (int)n : 1;
}

typedef struct seat {
    job *j;
    int worker;
} seat;

static void *worker(void *arg)
{
    seat *s = arg;
    job *j = s->j;
    for (;;) {
        size_t i = atomic_fetch_add(&j->next, 1);
        if (i >= j->n)
            break;
        if (j->wfn)
            j->wfn(i, s->worker, j->ctx);
        else
            j->fn(i, j->ctx);
        if (j->progress) {
            pthread_mutex_lock(&j->lock);
            j->done++;
            j->progress(j->done, j->n, j->progress_ctx);
            pthread_mutex_unlock(&j->lock);
        }
    }
    return NULL;
}

int lw_pool_threads(size_t n, int threads)
{
    if (threads <= 0)
        threads = lw_pool_cpus();
    if ((size_t)threads > n)
        threads = n > 0 ? (int)n : 1;
    if (threads > LW_POOL_THREADS_MAX)
        threads = LW_POOL_THREADS_MAX;
    return threads;
}

static void run_job(job *j, int threads)
{
    atomic_init(&j->next, 0);
    pthread_mutex_init(&j->lock, NULL);
    pthread_t tid[LW_POOL_THREADS_MAX];
    seat seats[LW_POOL_THREADS_MAX];
    int started = 0;
    /* workers are made with every signal blocked (they inherit the mask), so
     * that a signal is taken by the calling thread, whose handler may
     * remove temporary files while no worker is half way through anything */
    sigset_t all, old;
    sigfillset(&all);
    bool masked = threads > 1 && pthread_sigmask(SIG_SETMASK, &all, &old) == 0;
    for (int t = 1; t < threads; t++) {
        seats[started + 1] = (seat){j, started + 1};
        if (pthread_create(&tid[started], NULL, worker, &seats[started + 1]) != 0)
            break;
        started++;
    }
    if (masked)
        pthread_sigmask(SIG_SETMASK, &old, NULL);
    seats[0] = (seat){j, 0};
    worker(&seats[0]);
    for (int t = 0; t < started; t++)
        pthread_join(tid[t], NULL);
    pthread_mutex_destroy(&j->lock);
}

void lw_pool_for(size_t n, int threads, lw_pool_task_fn fn, void *ctx, lw_pool_progress_fn progress,
                 void *progress_ctx)
{
    job j = {.n = n, .fn = fn, .ctx = ctx, .progress = progress, .progress_ctx = progress_ctx};
    run_job(&j, lw_pool_threads(n, threads));
}

void lw_pool_for_workers(size_t n, int threads, lw_pool_worker_fn fn, void *ctx,
                         lw_pool_progress_fn progress, void *progress_ctx)
{
    job j = {.n = n, .wfn = fn, .ctx = ctx, .progress = progress, .progress_ctx = progress_ctx};
    run_job(&j, lw_pool_threads(n, threads));
}
