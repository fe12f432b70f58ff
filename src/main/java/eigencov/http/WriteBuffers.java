package eigencov.http;

import java.util.concurrent.ArrayBlockingQueue;

/**
 * A few spare 256 KB write buffers shared by the large answers (JSON and {@code .npy}). Allocating
 * one per answer was a quarter of the garbage of the risk benchmark (a 3,000-name answer
 * allocated about 1 MB in all), and every young collection pauses the answers in flight.
 * Buffers are taken for the writing of one answer and given back after it; when all spares are
 * out, a fresh one is allocated and, if no spare slot is free on return, left to the collector.
 */
final class WriteBuffers {
    /**
     * Each write to the socket wakes the client to read it (on one machine the client then preempts
     * the writer: a perf record of the risk benchmark found most of the server's context switches
     * right after its writes), so large answers go out in few large writes. Kept below half a G1
     * region (512 KB at the smallest) so that it is no humongous object.
     */
    static final int BYTES = 256 * 1024;
    /** About the number of large answers written at once on a small machine (two per core). */
    static final int SPARES = 4;
    private static final ArrayBlockingQueue<byte[]> SPARE = new ArrayBlockingQueue<>(SPARES);

    private WriteBuffers() {
    }

    /** A buffer of {@link #BYTES} (contents undefined). */
    static byte[] take() {
        byte[] b = SPARE.poll();
        return b != null ? b : new byte[BYTES];
    }

    /** Returns {@code b} for reuse; the caller must not touch it afterwards. */
    static void giveBack(byte[] b) {
        if (b != null && b.length == BYTES) SPARE.offer(b);
    }
}
