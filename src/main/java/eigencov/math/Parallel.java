package eigencov.math;

import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.FutureTask;

/**
 * Splits index ranges over an optional executor. The calling thread always runs one part
 * itself and then runs any part the pool has not started yet, so a fit called from inside
 * the same (possibly saturated) pool cannot deadlock.
 */
final class Parallel {

    /** Work on the index range [from, to). */
    @FunctionalInterface
    interface RangeTask {
        void run(int part, int from, int to);
    }

    private final ExecutorService pool;
    private final int parts;

    Parallel(ExecutorService pool) {
        this.pool = pool;
        this.parts = pool == null ? 1 : Math.max(1, Runtime.getRuntime().availableProcessors());
    }

    int parts() {
        return parts;
    }

    /** Runs {@code task} on {@code parts()} equal slices of [0, n). */
    void forEqual(int n, RangeTask task) {
        forRange(0, n, task);
    }

    /** Runs {@code task} on {@code parts()} equal slices of [from, to). */
    void forRange(int from, int to, RangeTask task) {
        int n = to - from;
        int p = Math.max(1, Math.min(parts, n));
        int[] bounds = new int[p + 1];
        for (int i = 0; i <= p; i++) {
            bounds[i] = from + (int) ((long) n * i / p);
        }
        run(bounds, task);
    }

    /**
     * Runs {@code task} on slices of [0, n) of equal triangular work, where row r costs about r + 1
     * (lower-triangle kernels).
     */
    void forTriangle(int n, RangeTask task) {
        int p = Math.max(1, Math.min(parts, n));
        int[] bounds = new int[p + 1];
        for (int i = 0; i <= p; i++) {
            bounds[i] = (int) Math.round(n * Math.sqrt((double) i / p));
        }
        bounds[p] = n;
        run(bounds, task);
    }

    /**
     * Runs {@code task} on slices of [from, to) of equal work where the row at from + x costs about
     * (to - from) - x (upper-triangle kernels).
     */
    void forDecreasing(int from, int to, RangeTask task) {
        int n = to - from;
        int p = Math.max(1, Math.min(parts, n));
        int[] bounds = new int[p + 1];
        for (int i = 0; i <= p; i++) {
            bounds[i] = to - (int) Math.round(n * Math.sqrt((double) (p - i) / p));
        }
        bounds[0] = from;
        bounds[p] = to;
        run(bounds, task);
    }

    private void run(int[] bounds, RangeTask task) {
        int p = bounds.length - 1;
        if (p == 1 || pool == null) {
            for (int i = 0; i < p; i++) {
                task.run(i, bounds[i], bounds[i + 1]);
            }
            return;
        }
        @SuppressWarnings("unchecked")
        FutureTask<Void>[] futures = new FutureTask[p];
        for (int i = 1; i < p; i++) {
            final int part = i;
            futures[i] = new FutureTask<>(() -> task.run(part, bounds[part], bounds[part + 1]), null);
            pool.execute(futures[i]);
        }
        task.run(0, bounds[0], bounds[1]);
        try {
            for (int i = 1; i < p; i++) {
                futures[i].run(); // no-op when a pool thread already ran or is running it
                futures[i].get();
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while computing", e);
        } catch (ExecutionException e) {
            Throwable c = e.getCause();
            if (c instanceof RuntimeException re) {
                throw re;
            }
            if (c instanceof Error err) {
                throw err;
            }
            throw new IllegalStateException(c);
        }
    }
}
