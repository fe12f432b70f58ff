package eigencov.service;

import java.util.List;

/**
 * The horizon variances are stated over: daily (the fit's own unit), annual (252 trading days,
 * common practice) or a horizon of {@code days} days. Variances are multiplied by {@code days},
 * volatilities by its square root (docs/design.md section 3, "Scale").
 *
 * @param name "daily", "annual" or "horizon"
 * @param days variance multiplier, at least 1
 */
public record Scale(String name, int days) {
    /** Trading days per year (common practice). */
    public static final int TRADING_DAYS_PER_YEAR = 252;
    /** Longest accepted horizon (about 40 years of trading days). */
    public static final int MAX_HORIZON_DAYS = 10_000;

    private static final Scale DAILY = new Scale("daily", 1);
    private static final Scale ANNUAL = new Scale("annual", TRADING_DAYS_PER_YEAR);

    public Scale {
        if (!List.of("daily", "annual", "horizon").contains(name)) throw new IllegalArgumentException("unknown scale " + name);
        if (days < 1 || days > MAX_HORIZON_DAYS) {
            throw InvalidInputException.field("horizonDays", "must be between 1 and " + MAX_HORIZON_DAYS + ", was " + days);
        }
    }

    public static Scale daily() {
        return DAILY;
    }

    public static Scale annual() {
        return ANNUAL;
    }

    public static Scale horizon(int days) {
        return new Scale("horizon", days);
    }

    /** Multiplier applied to variances. */
    public double varianceMultiplier() {
        return days;
    }
}
