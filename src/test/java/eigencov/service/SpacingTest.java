package eigencov.service;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

import java.time.LocalDate;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

class SpacingTest {
    private static final List<LocalDate> DATES = List.of(LocalDate.of(2024, 12, 23), LocalDate.of(2024, 12, 27), LocalDate.of(2024, 12, 30),
            LocalDate.of(2024, 12, 31), LocalDate.of(2025, 1, 2), LocalDate.of(2025, 1, 3), LocalDate.of(2025, 1, 6));

    @Test
    void week_keeps_the_last_trading_date_of_each_iso_week_across_the_year_end() {
        // ISO 8601 week numbering: 2024-12-30 (a Monday) opens week 1 of 2025, so it shares its week with 2025-01-03
        assertEquals(List.of(LocalDate.of(2024, 12, 27), LocalDate.of(2025, 1, 3), LocalDate.of(2025, 1, 6)), Spacing.WEEK.select(DATES));
    }

    @Test
    void month_keeps_the_last_trading_date_of_each_calendar_month_and_day_keeps_all() {
        assertEquals(List.of(LocalDate.of(2024, 12, 31), LocalDate.of(2025, 1, 6)), Spacing.MONTH.select(DATES));
        assertEquals(DATES, Spacing.DAY.select(DATES));
        assertEquals(List.of(), Spacing.WEEK.select(List.of()));
    }

    @ParameterizedTest
    @ValueSource(strings = {"weekly", "Day", "", "year"})
    void an_unknown_spacing_is_a_400_on_every(String every) {
        InvalidInputException e = assertThrows(InvalidInputException.class, () -> Spacing.parse(every));
        assertEquals("every", e.issues().get(0).field());
    }
}
