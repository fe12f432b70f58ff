package eigencov.service;

import java.time.LocalDate;
import java.util.List;

/** Factor returns of a fit's window between two dates: dates x k row-major. Arrays are copied in and out. */
public record FactorReturnSeries(FitRef fit, int factors, List<LocalDate> dates, double[] values) {
    public FactorReturnSeries {
        dates = List.copyOf(dates);
        if (factors < 1) throw new IllegalArgumentException("factors must be at least 1, was " + factors);
        if (values.length != dates.size() * factors) throw new IllegalArgumentException("values length " + values.length + " != " + dates.size() + " x " + factors);
        values = values.clone();
    }

    @Override
    public double[] values() {
        return values.clone();
    }
}
