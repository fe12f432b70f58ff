package eigencov.service;

import eigencov.math.FitResult;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.concurrent.atomic.AtomicBoolean;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

class ServedFitsTest {
    private static final int PUBLISHED = 2_000;
    private static final int READERS = 4;

    private final FakeClock clock = new FakeClock(Instant.parse("2024-06-03T18:00:00Z"));
    private final ServiceFixture fx = new ServiceFixture("served-" + System.nanoTime(), clock);

    @AfterEach
    void close() {
        fx.close();
    }

    /** Three real, different fits to pair with many references. */
    private List<FitResult> results() {
        List<LocalDate> dates = fx.panel("p", 8, 60, 11);
        fx.models.put("m", ServiceFixture.spec("p", 30, null, false));
        List<FitResult> out = new ArrayList<>();
        for (int end : new int[] {40, 50, 59}) {
            long id = fx.fits.fit("m", dates.get(end), FitService.REQUEST).id();
            out.add(fx.served.resolve("m", null, id).result());
        }
        return out;
    }

    @Test
    void readers_during_concurrent_publishing_always_see_one_whole_fit_and_never_go_back() throws Exception {
        List<FitResult> results = results();
        ServedFits served = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper));
        LocalDate base = LocalDate.of(2030, 1, 1);
        // Fit n is paired with results[n % 3]; its asOf grows with n, so a higher n is newer.
        served.publish(new ServedFit(new FitRef(1_000_000, "m", base, clock.instant()), results.get(1_000_000 % 3)));
        ExecutorService pool = Executors.newFixedThreadPool(READERS + 2);
        CountDownLatch go = new CountDownLatch(1);
        AtomicBoolean done = new AtomicBoolean();
        try {
            List<Future<Integer>> readers = new ArrayList<>();
            for (int r = 0; r < READERS; r++) {
                readers.add(pool.submit(() -> {
                    go.await();
                    long last = -1;
                    int reads = 0;
                    while (!done.get() || reads == 0) {
                        ServedFit f = served.resolve("m", null, null);
                        long id = f.ref().id();
                        assertSame(results.get((int) (id % 3)), f.result(), "reference and result of one fit");
                        assertEquals(base.plusDays(id - 1_000_000), f.ref().asOf());
                        assertTrue(id >= last, "served fit went back from " + last + " to " + id);
                        last = id;
                        reads++;
                    }
                    return reads;
                }));
            }
            List<Future<?>> writers = new ArrayList<>();
            for (int w = 0; w < 2; w++) {
                int offset = w;
                writers.add(pool.submit(() -> {
                    go.await();
                    // Two writers interleave odd and even fits, so publications arrive out of order.
                    for (int n = 1 + offset; n <= PUBLISHED; n += 2) {
                        long id = 1_000_000 + n;
                        served.publish(new ServedFit(new FitRef(id, "m", base.plusDays(n), clock.instant()), results.get((int) (id % 3))));
                    }
                    return null;
                }));
            }
            go.countDown();
            for (Future<?> w : writers) w.get();
            done.set(true);
            for (Future<Integer> r : readers) assertTrue(r.get() > 0);
        } finally {
            pool.shutdownNow();
        }
        assertEquals(1_000_000 + PUBLISHED, served.resolve("m", null, null).ref().id());
    }

    @Test
    void as_of_and_id_selection_pick_the_latest_fit_on_or_before_the_date() {
        List<FitResult> results = results();
        FitRef newest = fx.served.resolve("m", null, null).ref();
        List<FitView> history = fx.fits.list("m");
        assertEquals(3, history.size());
        FitView middle = history.get(1);
        assertEquals(middle.id(), fx.served.resolve("m", middle.asOf(), null).ref().id());
        assertEquals(middle.id(), fx.served.resolve("m", middle.asOf().plusDays(1), null).ref().id());
        assertEquals(newest.id(), fx.served.resolve("m", newest.asOf().plusYears(1), null).ref().id());
        assertEquals(results.get(1).model(), fx.served.resolve("m", null, middle.id()).result().model());
    }

    @Test
    void another_instance_picks_up_new_fits_from_the_store_on_refresh() {
        results();
        ServedFits other = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper));
        long before = other.resolve("m", null, null).ref().id();
        FitView newer = fx.fits.fit("m", LocalDate.of(2030, 1, 1), FitService.REQUEST);
        assertEquals(before, other.resolve("m", null, null).ref().id(), "no refresh yet: the snapshot stays");
        other.refresh();
        assertEquals(newer.id(), other.resolve("m", null, null).ref().id());
        fx.models.delete("m");
        other.refresh();
        NotFoundException gone = org.junit.jupiter.api.Assertions.assertThrows(NotFoundException.class, () -> other.resolve("m", null, null));
        assertEquals("model", gone.what());
    }
}
