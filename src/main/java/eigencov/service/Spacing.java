package eigencov.service;

import java.time.LocalDate;
import java.time.YearMonth;
import java.time.temporal.IsoFields;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

/**
 * How far apart the dates of a range backfill or an evaluation are (docs/design.md section 6): every
 * trading date ({@code day}), or the last trading date within the range of each ISO week
 * ({@code week}) or calendar month ({@code month}).
 */
public enum Spacing {
    DAY, WEEK, MONTH;

    /** The API name. */
    public String apiName() {
        return name().toLowerCase(Locale.ROOT);
    }

    /** The spacing named {@code every}; a 400 on field {@code every} otherwise. */
    public static Spacing parse(String every) {
        if (every == null) throw InvalidInputException.field("every", "is required: day, week or month");
        for (Spacing s : values()) {
            if (s.apiName().equals(every)) return s;
        }
        throw InvalidInputException.field("every", "must be day, week or month, was '" + every + "'");
    }

    /** The dates of {@code trading} (ascending, already within the range) this spacing keeps. */
    public List<LocalDate> select(List<LocalDate> trading) {
        if (this == DAY) return List.copyOf(trading);
        List<LocalDate> out = new ArrayList<>();
        for (int i = 0; i < trading.size(); i++) {
            if (i == trading.size() - 1 || !samePeriod(trading.get(i), trading.get(i + 1))) out.add(trading.get(i));
        }
        return out;
    }

    private boolean samePeriod(LocalDate a, LocalDate b) {
        if (this == MONTH) return YearMonth.from(a).equals(YearMonth.from(b));
        return a.get(IsoFields.WEEK_BASED_YEAR) == b.get(IsoFields.WEEK_BASED_YEAR)
                && a.get(IsoFields.WEEK_OF_WEEK_BASED_YEAR) == b.get(IsoFields.WEEK_OF_WEEK_BASED_YEAR);
    }
}
