package eigencov.math;

import java.util.Objects;

/**
 * Options of one fit (docs/design.md section 3).
 *
 * @param rule          factor-count rule
 * @param halfLifeDays  half-life of exponential weights in window positions; null = equal weights
 * @param minCoverage   share of window dates a ticker must have observed to enter the universe, in (0, 1]
 * @param basis         covariance or correlation
 * @param specificFloor floor of specific variance as a share of the ticker's variance, in [0, 1)
 *                      (default {@value #DEFAULT_SPECIFIC_FLOOR}, common practice)
 * @param hold          hysteresis on k across refits ({@link FactorHold#NONE}: k follows the rule)
 * @param rotate        after sign alignment, rotate the factors onto the previous fit's (orthogonal Procrustes,
 *                      {@link ProcrustesAlignment}); false: signs only
 * @param shortHistoryMinObservations null: off; else names below the coverage threshold with at least this many
 *                      observations in the window are served beside the universe ({@link ShortHistoryFit}); at least
 *                      {@value #MIN_SHORT_HISTORY_OBSERVATIONS}, and at least k + 2 for the fit's k (checked there)
 */
public record FitOptions(FactorRule rule, Double halfLifeDays, double minCoverage, Basis basis, double specificFloor,
                         FactorHold hold, boolean rotate, Integer shortHistoryMinObservations) {

    /** Specific-variance floor as a share of S_ii: common practice (docs/methods.md section 4), no canonical source. */
    public static final double DEFAULT_SPECIFIC_FLOOR = 0.05;
    /** k + 2 for the smallest k: an intercept, k exposures and one degree of freedom left for the residual. */
    public static final int MIN_SHORT_HISTORY_OBSERVATIONS = 3;

    public FitOptions {
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(basis, "basis");
        Objects.requireNonNull(hold, "hold");
        if (halfLifeDays != null && !(halfLifeDays > 0 && Double.isFinite(halfLifeDays))) {
            throw new IllegalArgumentException("halfLifeDays must be positive and finite, was " + halfLifeDays);
        }
        if (!(minCoverage > 0 && minCoverage <= 1)) {
            throw new IllegalArgumentException("minCoverage must be in (0, 1], was " + minCoverage);
        }
        if (!(specificFloor >= 0 && specificFloor < 1)) {
            throw new IllegalArgumentException("specificFloor must be in [0, 1), was " + specificFloor);
        }
        if (shortHistoryMinObservations != null && shortHistoryMinObservations < MIN_SHORT_HISTORY_OBSERVATIONS) {
            throw new IllegalArgumentException("shortHistoryMinObservations must be at least " + MIN_SHORT_HISTORY_OBSERVATIONS
                    + ", was " + shortHistoryMinObservations);
        }
    }

    /** Without short-history names. */
    public FitOptions(FactorRule rule, Double halfLifeDays, double minCoverage, Basis basis, double specificFloor,
                      FactorHold hold, boolean rotate) {
        this(rule, halfLifeDays, minCoverage, basis, specificFloor, hold, rotate, null);
    }

    /** These options with short-history names from {@code minObservations} observations on (null: off). */
    public FitOptions withShortHistory(Integer minObservations) {
        return new FitOptions(rule, halfLifeDays, minCoverage, basis, specificFloor, hold, rotate, minObservations);
    }

    /** Without a hold on k, signs-only alignment, no short-history names. */
    public FitOptions(FactorRule rule, Double halfLifeDays, double minCoverage, Basis basis, double specificFloor) {
        this(rule, halfLifeDays, minCoverage, basis, specificFloor, FactorHold.NONE, false);
    }

    /** Equal weights, covariance basis, default floor. */
    public static FitOptions of(FactorRule rule, double minCoverage) {
        return new FitOptions(rule, null, minCoverage, Basis.COVARIANCE, DEFAULT_SPECIFIC_FLOOR);
    }
}
