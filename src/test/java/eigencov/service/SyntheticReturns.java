package eigencov.service;

import java.time.DayOfWeek;
import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;

/** Seeded returns with a planted factor structure (a market factor and one more), for service and HTTP tests. */
public final class SyntheticReturns {
    private SyntheticReturns() {
    }

    /** One simple return. */
    public record Row(LocalDate date, String ticker, double value) {
    }

    /** The rows as an upload body: CSV with the header date,ticker,value. */
    public static String csv(List<Row> rows) {
        StringBuilder sb = new StringBuilder("date,ticker,value\n");
        for (Row r : rows) sb.append(r.date()).append(',').append(r.ticker()).append(',').append(r.value()).append('\n');
        return sb.toString();
    }

    /** {@code count} weekdays starting at {@code first} (or the next weekday). */
    public static List<LocalDate> weekdays(LocalDate first, int count) {
        List<LocalDate> out = new ArrayList<>();
        LocalDate d = first;
        while (out.size() < count) {
            if (d.getDayOfWeek() != DayOfWeek.SATURDAY && d.getDayOfWeek() != DayOfWeek.SUNDAY) out.add(d);
            d = d.plusDays(1);
        }
        return out;
    }

    /** Tickers T00, T01, ... */
    public static List<String> tickers(int count) {
        List<String> out = new ArrayList<>();
        for (int i = 0; i < count; i++) out.add(String.format("T%02d", i));
        return out;
    }

    /**
     * r_ti = b_i1 m_t + b_i2 s_t + e_ti with market and second factor of daily sd 1 % and 0.5 %,
     * specific sd 1 %, loadings drawn once per ticker from the seed.
     */
    public static List<Row> rows(long seed, List<String> tickers, List<LocalDate> dates) {
        Random rnd = new Random(seed);
        int k = tickers.size();
        double[] b1 = new double[k];
        double[] b2 = new double[k];
        for (int i = 0; i < k; i++) {
            b1[i] = 0.7 + 0.6 * rnd.nextDouble();
            b2[i] = i % 2 == 0 ? 1 : -1;
        }
        List<Row> out = new ArrayList<>();
        for (LocalDate d : dates) {
            double m = 0.01 * rnd.nextGaussian();
            double s = 0.005 * rnd.nextGaussian();
            for (int i = 0; i < k; i++) {
                out.add(new Row(d, tickers.get(i), b1[i] * m + b2[i] * s + 0.01 * rnd.nextGaussian()));
            }
        }
        return out;
    }
}
