package eigencov.store;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class JobRepositoryTest {
    private final Database db = TestStores.open("job-repo-" + System.nanoTime());
    private final JobRepository jobs = new JobRepository(db.dataSource());
    private final Instant t0 = Instant.parse("2026-01-05T10:00:00Z");

    @AfterEach
    void close() {
        db.close();
    }

    @Test
    void a_job_goes_queued_running_done_and_every_change_is_a_compare_and_set_on_its_state() {
        JobRow j = jobs.insert("backfill", "{\"r\":1}", "{\"plan\":[]}", 3, t0);
        assertEquals(JobRow.QUEUED, j.state());
        assertEquals(List.of(j.id()), jobs.unfinished());
        assertFalse(jobs.progress(j.id(), 1, null, null), "a queued job takes no progress");
        assertTrue(jobs.start(j.id(), t0.plusSeconds(1)));
        assertTrue(jobs.progress(j.id(), 1, null, null), "no estimate yet: eta NULL");
        assertNull(jobs.find(j.id()).orElseThrow().etaAt());
        assertTrue(jobs.progress(j.id(), 2, "{\"plan\":[1]}", t0.plusSeconds(30)));
        JobRow mid = jobs.find(j.id()).orElseThrow();
        assertEquals(2, mid.done());
        assertEquals(t0.plusSeconds(30), mid.etaAt());
        assertEquals("{\"plan\":[1]}", mid.resultJson());
        // a second start (a resume) keeps the first start time and drops the old estimate
        assertTrue(jobs.start(j.id(), t0.plusSeconds(60)));
        assertEquals(t0.plusSeconds(1), jobs.find(j.id()).orElseThrow().startedAt());
        assertNull(jobs.find(j.id()).orElseThrow().etaAt());
        assertTrue(jobs.finish(j.id(), JobRow.DONE, "{\"done\":true}", null, t0.plusSeconds(90)));
        JobRow done = jobs.find(j.id()).orElseThrow();
        assertEquals(JobRow.DONE, done.state());
        assertEquals(3, done.done(), "done means all steps");
        assertEquals(t0.plusSeconds(90), done.finishedAt());
        assertTrue(done.finished());
        assertFalse(jobs.start(j.id(), t0), "a finished job does not start again");
        assertEquals(JobRepository.Cancel.FINISHED, jobs.cancel(j.id(), t0));
        assertEquals(JobRepository.Cancel.NOT_FOUND, jobs.cancel(j.id() + 99, t0));
        assertEquals(List.of(), jobs.unfinished());
        assertThrows(IllegalArgumentException.class, () -> jobs.finish(j.id(), JobRow.CANCELLED, null, null, t0));
    }

    @Test
    void a_cancelled_job_refuses_progress_and_its_end_and_lists_and_counts_see_it() {
        JobRow a = jobs.insert("backfill", "{}", "{}", 5, t0);
        JobRow b = jobs.insert("evaluation", "{}", "{}", 5, t0);
        assertTrue(jobs.start(a.id(), t0));
        assertEquals(JobRepository.Cancel.CANCELLED, jobs.cancel(a.id(), t0.plusSeconds(5)));
        assertFalse(jobs.progress(a.id(), 2, null, null), "the runner learns of the cancel from its next progress write");
        assertFalse(jobs.finish(a.id(), JobRow.DONE, "{}", null, t0), "a cancelled job does not end as done");
        assertEquals(JobRow.CANCELLED, jobs.state(a.id()).orElseThrow());
        assertEquals(List.of(b.id(), a.id()), jobs.list(null, 10).stream().map(JobRow::id).toList(), "newest first");
        assertEquals(List.of(b.id()), jobs.list("evaluation", 10).stream().map(JobRow::id).toList());
        assertNull(jobs.list(null, 10).get(0).resultJson(), "lists do not read results");
        assertEquals(List.of(new JobRepository.Count(JobRow.CANCELLED, "backfill", 1), new JobRepository.Count(JobRow.QUEUED, "evaluation", 1)),
                jobs.counts().stream().sorted(java.util.Comparator.comparing(JobRepository.Count::state)).toList());
        assertTrue(jobs.state(b.id() + 99).isEmpty());
        assertFalse(jobs.finish(b.id(), JobRow.FAILED, null, "x".repeat(3000), t0), "a queued job is not ended by its runner");
        assertTrue(jobs.start(b.id(), t0));
        assertTrue(jobs.finish(b.id(), JobRow.FAILED, null, "x".repeat(3000), t0));
        assertEquals(2000, jobs.find(b.id()).orElseThrow().error().length(), "the error is cut to its column");
    }
}
