/*
 * test_pool.c - the parallel-for (pool.h): every index runs exactly once on
 * any thread count, progress is serialized and counts up to the total, two
 * threads really run side by side, and lw_pool_cpus follows the process's
 * CPU affinity (sched_setaffinity(2), what `taskset` sets).
 */
#define _GNU_SOURCE
#include "testutil.h"
#include <pthread.h>
#include <sched.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <time.h>
#include <lampwick/lampwick.h>

#define N_MAX 2000

typedef struct tally {
    atomic_int runs[N_MAX];
    atomic_int in_progress;   /* progress callbacks inside at once */
    atomic_int overlap;       /* set when two were ever inside at once */
    size_t calls, last_done, total;
    atomic_int distinct;      /* threads seen (up to 8 recorded) */
    pthread_t seen[8];
    pthread_mutex_t lock;
    int sleep_us;
} tally;

static void task(size_t i, void *ctx)
{
    tally *t = ctx;
    atomic_fetch_add(&t->runs[i], 1);
    pthread_t self = pthread_self();
    pthread_mutex_lock(&t->lock);
    int n = atomic_load(&t->distinct), k = 0;
    while (k < n && !pthread_equal(t->seen[k], self))
        k++;
    if (k == n && n < 8) {
        t->seen[n] = self;
        atomic_store(&t->distinct, n + 1);
    }
    pthread_mutex_unlock(&t->lock);
    if (t->sleep_us) {
        struct timespec ts = {0, 1000L * t->sleep_us};
        nanosleep(&ts, NULL);
    }
}

static void progress(size_t done, size_t total, void *ctx)
{
    tally *t = ctx;
    if (atomic_fetch_add(&t->in_progress, 1) != 0)
        atomic_store(&t->overlap, 1);
    if (done != t->last_done + 1)
        t->last_done = (size_t)-1; /* marks a skipped or repeated count */
    else
        t->last_done = done;
    t->total = total;
    t->calls++;
    atomic_fetch_sub(&t->in_progress, 1);
}

static tally *tally_new(void)
{
    tally *t = calloc(1, sizeof *t);
    assert_non_null(t);
    pthread_mutex_init(&t->lock, NULL);
    return t;
}

static void every_index_once_on_any_thread_count(void **state)
{
    (void)state;
    const size_t sizes[] = {0, 1, 2, 7, 63, 1000, N_MAX};
    const int threads[] = {1, 2, 3, 8, 0, -1, LW_POOL_THREADS_MAX, LW_POOL_THREADS_MAX + 50};
    for (size_t a = 0; a < sizeof sizes / sizeof *sizes; a++)
        for (size_t b = 0; b < sizeof threads / sizeof *threads; b++) {
            tally *t = tally_new();
            lw_pool_for(sizes[a], threads[b], task, t, progress, t);
            for (size_t i = 0; i < sizes[a]; i++)
                if (atomic_load(&t->runs[i]) != 1)
                    fail_msg("n %zu, threads %d: index %zu ran %d times", sizes[a], threads[b],
                             i, atomic_load(&t->runs[i]));
            for (size_t i = sizes[a]; i < N_MAX; i++)
                assert_int_equal(atomic_load(&t->runs[i]), 0);
            /* progress: once per index, serialized, counting 1, 2, ... n */
            assert_int_equal(t->calls, sizes[a]);
            assert_int_equal(atomic_load(&t->overlap), 0);
            if (sizes[a]) {
                assert_int_equal(t->last_done, sizes[a]);
                assert_int_equal(t->total, sizes[a]);
            }
            pthread_mutex_destroy(&t->lock);
            free(t);
        }
}

/* With two threads asked for and tasks that take a while, a second thread
 * takes some of them (else the pool silently ran serially). */
static void two_threads_share_the_work(void **state)
{
    (void)state;
    tally *t = tally_new();
    t->sleep_us = 2000;
    lw_pool_for(40, 2, task, t, NULL, NULL);
    assert_int_equal(atomic_load(&t->distinct), 2);
    pthread_mutex_destroy(&t->lock);
    free(t);
    /* and one thread asked for: only the caller's */
    t = tally_new();
    lw_pool_for(40, 1, task, t, NULL, NULL);
    assert_int_equal(atomic_load(&t->distinct), 1);
    assert_true(pthread_equal(t->seen[0], pthread_self()));
    pthread_mutex_destroy(&t->lock);
    free(t);
}

/* lw_pool_cpus is the number of CPUs in the affinity mask: pinned to one
 * CPU it is 1, restored it is the mask's count again. */
static void cpus_follow_the_affinity_mask(void **state)
{
    (void)state;
    cpu_set_t all, one;
    CPU_ZERO(&all);
    assert_int_equal(sched_getaffinity(0, sizeof all, &all), 0);
    assert_int_equal(lw_pool_cpus(), CPU_COUNT(&all));
    int first = 0;
    while (!CPU_ISSET(first, &all))
        first++;
    CPU_ZERO(&one);
    CPU_SET(first, &one);
    assert_int_equal(sched_setaffinity(0, sizeof one, &one), 0);
    assert_int_equal(lw_pool_cpus(), 1);
    /* threads <= 0 then means one thread: the caller's */
    tally *t = tally_new();
    t->sleep_us = 500;
    lw_pool_for(20, 0, task, t, NULL, NULL);
    assert_int_equal(atomic_load(&t->distinct), 1);
    pthread_mutex_destroy(&t->lock);
    free(t);
    assert_int_equal(sched_setaffinity(0, sizeof all, &all), 0);
    assert_int_equal(lw_pool_cpus(), CPU_COUNT(&all));
}

/* lw_pool_for_workers names the worker of each index: every index once,
 * each worker number below lw_pool_threads(n, threads), and one worker's
 * indices never overlap in time (its scratch space is its own). */
typedef struct workers {
    atomic_int runs[N_MAX];
    atomic_int busy[LW_POOL_THREADS_MAX];
    atomic_int clash, out_of_range;
    int limit;
} workers;

static void worker_task(size_t i, int worker, void *ctx)
{
    workers *w = ctx;
    atomic_fetch_add(&w->runs[i], 1);
    if (worker < 0 || worker >= w->limit) {
        atomic_store(&w->out_of_range, 1);
        return;
    }
    if (atomic_fetch_add(&w->busy[worker], 1) != 0)
        atomic_store(&w->clash, 1);
    struct timespec ts = {0, 20000};
    nanosleep(&ts, NULL);
    atomic_fetch_sub(&w->busy[worker], 1);
}

static void workers_are_named_and_own_their_scratch(void **state)
{
    (void)state;
    const size_t sizes[] = {1, 3, 200};
    const int threads[] = {1, 2, 4, 0};
    for (size_t a = 0; a < sizeof sizes / sizeof *sizes; a++)
        for (size_t b = 0; b < sizeof threads / sizeof *threads; b++) {
            workers *w = calloc(1, sizeof *w);
            assert_non_null(w);
            w->limit = lw_pool_threads(sizes[a], threads[b]);
            assert_true(w->limit >= 1 && (size_t)w->limit <= sizes[a]);
            if (threads[b] > 0)
                assert_true(w->limit <= threads[b]);
            lw_pool_for_workers(sizes[a], threads[b], worker_task, w, NULL, NULL);
            for (size_t i = 0; i < sizes[a]; i++)
                assert_int_equal(atomic_load(&w->runs[i]), 1);
            assert_int_equal(atomic_load(&w->out_of_range), 0);
            assert_int_equal(atomic_load(&w->clash), 0);
            free(w);
        }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(every_index_once_on_any_thread_count),
        cmocka_unit_test(two_threads_share_the_work),
        cmocka_unit_test(cpus_follow_the_affinity_mask),
        cmocka_unit_test(workers_are_named_and_own_their_scratch),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
