package eigencov.service;

import eigencov.math.AlignmentReport;
import eigencov.math.FitResult;
import eigencov.math.ReturnPanel;
import eigencov.store.FitRow;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import java.time.Instant;
import java.time.LocalDate;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class FitServiceTest {
    private final FakeClock clock = new FakeClock(Instant.parse("2024-06-03T18:00:00Z"));
    private final ServiceFixture fx = new ServiceFixture("fit-service-" + System.nanoTime(), clock);

    @AfterEach
    void close() {
        fx.close();
    }

    @Test
    void fit_as_of_a_date_reads_only_returns_on_or_before_it() {
        List<LocalDate> dates = fx.panel("p", 12, 80, 1);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        LocalDate asOf = dates.get(59).plusDays(1); // a day without returns between two dates
        FitView v = fx.fits.fit("m", asOf, FitService.REQUEST);
        assertEquals(dates.get(59), v.window().to());
        assertEquals(dates.get(20), v.window().from());
        assertEquals(40, v.dates());
        ServedFit served = fx.served.resolve("m", null, null);
        assertEquals(v.id(), served.ref().id());
        assertEquals(dates.subList(20, 60), served.result().dates());
    }

    @Test
    void later_ingest_and_corrections_leave_stored_fits_and_as_of_answers_unchanged_while_a_new_fit_sees_them() {
        List<LocalDate> dates = fx.panel("p", 12, 80, 2);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        LocalDate asOf = dates.get(59);
        FitView first = fx.fits.fit("m", asOf, FitService.REQUEST);
        FitResult before = fx.served.resolve("m", asOf, null).result();

        // Ingest after the fit's date, and correct an old return inside its window.
        fx.ingest("p", List.of(new SyntheticReturns.Row(dates.get(50), "T03", 0.25),
                new SyntheticReturns.Row(dates.get(79).plusDays(3), "T03", 0.01)));

        ServedFits fresh = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper)); // reads the store, no cache
        FitResult stored = fresh.resolve("m", asOf, null).result();
        assertEquals(first.id(), fresh.resolve("m", asOf, null).ref().id());
        assertArrayEquals(before.model().specificVariances(), stored.model().specificVariances());
        assertArrayEquals(before.model().exposures(), stored.model().exposures());
        assertArrayEquals(before.factorReturns(), stored.factorReturns());

        FitView refit = fx.fits.fit("m", asOf, FitService.REQUEST);
        FitResult after = fx.served.resolve("m", null, refit.id()).result();
        int i = after.model().indexOf("T03");
        assertTrue(modelVariance(after, i) > 3 * modelVariance(before, i), "the corrected 25 % return raises T03's variance");
        FitView later = fx.fits.fit("m", null, FitService.REQUEST);
        assertEquals(dates.get(79).plusDays(3), later.window().to());
    }

    @Test
    void a_rotated_refit_is_stored_with_its_rotation_and_its_non_diagonal_factor_covariance() {
        List<LocalDate> dates = fx.panel("p", 12, 80, 3);
        ModelSpec plain = ServiceFixture.spec("p", 40, null, false);
        fx.models.put("m", new ModelSpec(plain.panel(), plain.windowDays(), plain.factors(), null, plain.minCoverage(), plain.basis(),
                null, null, false, "rotate"));
        FitView first = fx.fits.fit("m", dates.get(59), FitService.REQUEST);
        FitView second = fx.fits.fit("m", dates.get(69), FitService.REQUEST);
        FitResult served = fx.served.resolve("m", null, second.id()).result();
        assertEquals("first fit", fx.served.resolve("m", null, first.id()).result().alignment().rotation().reason());
        var rotation = served.alignment().rotation();
        assertTrue(rotation.applied(), rotation.reason());
        assertEquals(4, rotation.matrix().length);

        ServedFits fresh = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper)); // reads the store, no cache
        FitResult stored = fresh.resolve("m", null, second.id()).result();
        assertEquals(rotation.reason(), stored.alignment().rotation().reason());
        assertArrayEquals(rotation.matrix(), stored.alignment().rotation().matrix());
        assertArrayEquals(served.model().factorCovariance(), stored.model().factorCovariance());
        assertArrayEquals(served.model().exposures(), stored.model().exposures());
        assertEquals(served.model().diagonalFactorCovariance(), stored.model().diagonalFactorCovariance());
    }

    /** C_ii = sum_j B_ij^2 F_jj + d_i (docs/design.md section 3). */
    private static double modelVariance(FitResult r, int i) {
        double v = r.model().specificVariance(i);
        for (int j = 0; j < r.model().factors(); j++) v += r.model().exposure(i, j) * r.model().exposure(i, j) * r.model().factorCov(j, j);
        return v;
    }

    @Test
    void a_failed_refit_is_recorded_with_its_reason_and_the_served_fit_stays() {
        fx.panel("p", 10, 50, 3);
        fx.models.put("m", ServiceFixture.spec("p", 30, null, false));
        FitView ok = fx.fits.fit("m", null, FitService.REQUEST);
        ServedFit servedBefore = fx.served.resolve("m", null, null);

        fx.models.put("m", ServiceFixture.spec("p", 60, null, false)); // longer than the panel
        FitFailedException e = assertThrows(FitFailedException.class, () -> fx.fits.fit("m", null, FitService.REQUEST));
        assertTrue(e.getMessage().contains("needs 60"), e.getMessage());

        assertSame(servedBefore, fx.served.resolve("m", null, null));
        List<FitView> history = fx.fits.list("m");
        assertEquals(List.of(e.fitId(), ok.id()), history.stream().map(FitView::id).toList());
        assertEquals(FitRow.FAILED, history.get(0).status());
        assertTrue(history.get(0).reason().contains("50 dates"), history.get(0).reason());
        assertNull(history.get(0).diagnostics());
        assertThrows(NotFoundException.class, () -> fx.served.resolve("m", null, e.fitId()), "a failed attempt is never served");
    }

    @Test
    void each_fit_records_the_spec_version_it_used() {
        fx.panel("p", 10, 50, 4);
        fx.models.put("m", ServiceFixture.spec("p", 30, null, false));
        FitView v1 = fx.fits.fit("m", null, FitService.REQUEST);
        fx.models.put("m", ServiceFixture.spec("p", 40, null, false));
        FitView v2 = fx.fits.fit("m", null, FitService.REQUEST);
        assertEquals(1, v1.diagnostics().specVersion());
        assertEquals(2, v2.diagnostics().specVersion());
        assertTrue(fx.fits.get("m", v1.id()).diagnostics().spec().contains("\"windowDays\":30"));
        assertEquals(40, v2.dates());
    }

    @Test
    void backfill_cuts_the_same_windows_the_store_reads_as_of_each_date() {
        List<LocalDate> dates = fx.panel("p", 8, 70, 5);
        // A ticker that starts late and one that stops early: the cut must drop them where the store would.
        fx.ingest("p", List.of(new SyntheticReturns.Row(dates.get(65), "LATE", 0.01), new SyntheticReturns.Row(dates.get(2), "EARLY", 0.02)));
        ReturnPanel all = fx.windows.loadWindow("p", dates.get(69), Integer.MAX_VALUE);
        for (int end : new int[] {29, 40, 69}) {
            ReturnPanel cut = Windows.cut(all, dates.get(end), 30);
            ReturnPanel read = fx.windows.loadWindow("p", dates.get(end), 30);
            assertEquals(read.dates(), cut.dates());
            assertEquals(read.tickers(), cut.tickers());
            assertArrayEquals(read.values(), cut.values());
        }
        fx.models.put("m", ServiceFixture.spec("p", 30, null, false));
        List<FitView> made = fx.fits.backfill("m", List.of(dates.get(69), dates.get(10), dates.get(40)));
        assertEquals(List.of(FitRow.FAILED, FitRow.OK, FitRow.OK), made.stream().map(FitView::status).toList());
        assertEquals(dates.get(40), fx.served.resolve("m", dates.get(50), null).ref().asOf());
        assertEquals(dates.get(69), fx.served.resolve("m", null, null).ref().asOf());
    }

    @Test
    void later_fits_are_aligned_to_the_previous_fit_of_the_model() {
        List<LocalDate> dates = fx.panel("p", 10, 60, 6);
        fx.models.put("m", ServiceFixture.spec("p", 30, null, false));
        fx.fits.fit("m", dates.get(40), FitService.REQUEST);
        fx.fits.fit("m", dates.get(50), FitService.REQUEST);
        FitResult first = fx.served.resolve("m", dates.get(40), null).result();
        FitResult second = fx.served.resolve("m", dates.get(50), null).result();
        assertEquals(AlignmentReport.FIRST_FIT, first.alignment().mode());
        assertEquals(AlignmentReport.PREVIOUS_FIT, second.alignment().mode());
        for (int j = 0; j < 2; j++) {
            double dot = 0;
            for (int i = 0; i < 10; i++) dot += first.model().exposure(i, j) * second.model().exposure(i, j);
            assertTrue(dot > 0, "factor " + j + " keeps its orientation");
        }
    }

    @Test
    void stored_fits_read_back_identical_to_what_was_computed() throws Exception {
        fx.panel("p", 9, 45, 7);
        fx.models.put("m", new ModelSpec("p", 30, new ModelSpec.Factors("variance-share", null, 0.5, null), 20.0, 0.9, "correlation",
                0.1, null, null));
        FitView v = fx.fits.fit("m", null, FitService.REQUEST);
        FitResult computed = fx.served.resolve("m", null, null).result();
        FitResult read = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper)).resolve("m", null, v.id()).result();
        assertEquals(computed.model(), read.model());
        assertEquals(computed.dates(), read.dates());
        assertArrayEquals(computed.eigenvalues(), read.eigenvalues());
        assertArrayEquals(computed.varianceShare(), read.varianceShare());
        assertArrayEquals(computed.means(), read.means());
        assertArrayEquals(computed.factorReturns(), read.factorReturns());
        assertArrayEquals(computed.variances(), read.variances());
        // The reports hold arrays (record equals compares them by reference): compare their JSON.
        assertEquals(fx.mapper.writeValueAsString(FitCodec.reports(computed)), fx.mapper.writeValueAsString(FitCodec.reports(read)));
        assertNotEquals(0, read.eigenvalues().length);
    }

    @Test
    void unknown_models_and_fits_are_not_found() {
        fx.panel("p", 6, 30, 8);
        assertThrows(NotFoundException.class, () -> fx.fits.fit("nope", null, FitService.REQUEST));
        assertThrows(NotFoundException.class, () -> fx.served.resolve("nope", null, null));
        fx.models.put("m", ServiceFixture.spec("p", 20, null, false));
        NotFoundException none = assertThrows(NotFoundException.class, () -> fx.served.resolve("m", null, null));
        assertEquals("fit", none.what());
        fx.fits.fit("m", null, FitService.REQUEST);
        assertThrows(NotFoundException.class, () -> fx.served.resolve("m", LocalDate.of(2000, 1, 1), null));
        assertThrows(NotFoundException.class, () -> fx.served.resolve("m", null, 999L));
    }

    @Test
    void short_history_names_are_stored_with_the_fit_and_read_back_identical() {
        List<LocalDate> dates = SyntheticReturns.weekdays(LocalDate.of(2024, 1, 1), 60);
        List<String> tickers = new java.util.ArrayList<>(SyntheticReturns.tickers(8));
        tickers.add("LATE");
        fx.ingest("p", SyntheticReturns.rows(12, tickers, dates).stream()
                .filter(r -> !r.ticker().equals("LATE") || !r.date().isBefore(dates.get(25))).toList());
        fx.models.put("m", new ModelSpec("p", 50, new ModelSpec.Factors("fixed", 2, null, null), null, 0.9, "covariance", null, null,
                null, null, new ModelSpec.ShortHistory(20)));
        FitView v = fx.fits.fit("m", null, FitService.REQUEST);
        assertEquals(List.of(new FitView.ShortHistoryName("LATE", 35)), v.shortHistory());
        FitResult computed = fx.served.resolve("m", null, null).result();
        ServedFit read = new ServedFits(fx.fitRepo, fx.modelRepo, new FitCodec(fx.mapper)).resolve("m", null, v.id());
        assertEquals(List.of("LATE"), read.result().shortHistory().tickers());
        assertArrayEquals(computed.shortHistory().observations(), read.result().shortHistory().observations());
        assertArrayEquals(computed.shortHistory().exposures(), read.result().shortHistory().exposures());
        assertArrayEquals(computed.shortHistory().specificVariances(), read.result().shortHistory().specificVariances());
        assertEquals(computed.servedModel(), read.model());
        assertEquals(8, read.universeSize());
        assertEquals(8, read.model().indexOf("LATE"));
    }
}
