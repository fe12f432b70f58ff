package eigencov.service;

import com.fasterxml.jackson.annotation.JsonInclude;
import com.fasterxml.jackson.annotation.JsonPropertyOrder;
import eigencov.math.Basis;
import eigencov.math.FactorCountReport;
import eigencov.math.FactorHold;
import eigencov.math.FactorRule;
import eigencov.math.FitOptions;

import java.time.Duration;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Pattern;

/**
 * A model spec as the API takes and echoes it (docs/design.md section 4, {@code PUT /v1/models/{model}}).
 * Boxed fields so that a missing value is reported by {@link #problems()} with its field name
 * rather than defaulted silently. {@link #withDefaults()} fills the optional ones.
 *
 * @param refitOnIngest fit again after an ingest adds a new last date to the panel (default false)
 * @param alignment     {@code sign} (default: each factor's sign follows the previous fit) or {@code rotate}
 *                      (then also an orthogonal Procrustes rotation onto the previous fit's factors, reported)
 * @param shortHistory  null: off; else names below the coverage threshold with at least
 *                      {@code minObservations} observations in the window are served too (docs/design.md section 6)
 */
@JsonInclude(JsonInclude.Include.NON_NULL)
@JsonPropertyOrder({"panel", "windowDays", "factors", "halfLifeDays", "minCoverage", "shortHistory", "basis", "specificFloor", "refit",
        "refitOnIngest", "alignment"})
public record ModelSpec(String panel, Integer windowDays, Factors factors, Double halfLifeDays, Double minCoverage, String basis,
                        Double specificFloor, Refit refit, Boolean refitOnIngest, String alignment, ShortHistory shortHistory) {

    /** Signs-only alignment (the default), no short-history names. */
    public ModelSpec(String panel, Integer windowDays, Factors factors, Double halfLifeDays, Double minCoverage, String basis,
                     Double specificFloor, Refit refit, Boolean refitOnIngest) {
        this(panel, windowDays, factors, halfLifeDays, minCoverage, basis, specificFloor, refit, refitOnIngest, null, null);
    }

    /** No short-history names. */
    public ModelSpec(String panel, Integer windowDays, Factors factors, Double halfLifeDays, Double minCoverage, String basis,
                     Double specificFloor, Refit refit, Boolean refitOnIngest, String alignment) {
        this(panel, windowDays, factors, halfLifeDays, minCoverage, basis, specificFloor, refit, refitOnIngest, alignment, null);
    }

    /**
     * {@code {"minObservations": 60}}: names below the coverage threshold with at least this many observations in
     * the window get exposures by weighted least squares on the fit's factor returns. At least k + 2 (an
     * intercept, k exposures, one residual degree of freedom) and at most {@code windowDays}.
     */
    public record ShortHistory(Integer minObservations) {
    }

    static final List<String> ALIGNMENTS = List.of("sign", "rotate");

    /** Fewest window dates a spec may ask for. */
    public static final int MIN_WINDOW_DAYS = 20;
    /** Most window dates a spec may ask for (about 40 years of trading days). */
    public static final int MAX_WINDOW_DAYS = 10_000;
    /** Shortest scheduled refit period. */
    public static final Duration MIN_REFIT_PERIOD = Duration.ofMinutes(1);
    public static final Pattern NAME = Pattern.compile("[A-Za-z0-9._-]{1,64}");
    static final List<String> RULES = List.of("fixed", "variance-share", "bai-ng", "eigenvalue-ratio", "random-matrix");

    /**
     * {@code {"rule": ..., "count"|"share"|"max": ..., "hold"?: n}}; which parameter applies depends on
     * the rule. {@code hold} (data-driven rules only, default 1 = none): k changes only after the rule has
     * disagreed with the current k in n consecutive fits (docs/methods.md section 2, practice).
     */
    @JsonInclude(JsonInclude.Include.NON_NULL)
    public record Factors(String rule, Integer count, Double share, Integer max, Integer hold) {
        /** Without a hold. */
        public Factors(String rule, Integer count, Double share, Integer max) {
            this(rule, count, share, max, null);
        }
    }

    /** Longest hold on k, in fits (a year of weekly refits). */
    public static final int MAX_HOLD = 52;

    /** {@code {"every": "PT24H"}}: an ISO-8601 duration. */
    public record Refit(String every) {
    }

    /** The spec with optional values filled: specificFloor 0.05 (common practice), refitOnIngest false. */
    public ModelSpec withDefaults() {
        return new ModelSpec(panel, windowDays, factors, halfLifeDays, minCoverage, basis == null ? null : basis.toLowerCase(Locale.ROOT),
                specificFloor == null ? FitOptions.DEFAULT_SPECIFIC_FLOOR : specificFloor, refit,
                refitOnIngest == null ? Boolean.FALSE : refitOnIngest, alignment, shortHistory);
    }

    /** Every problem of the spec, each naming its field; empty when valid. Does not check that the panel exists. */
    public List<InvalidInputException.Issue> problems() {
        List<InvalidInputException.Issue> out = new ArrayList<>();
        if (panel == null) add(out, "panel", "is required");
        else if (!NAME.matcher(panel).matches()) add(out, "panel", "must match [A-Za-z0-9._-]{1,64}, was '" + panel + "'");
        if (windowDays == null) add(out, "windowDays", "is required");
        else if (windowDays < MIN_WINDOW_DAYS || windowDays > MAX_WINDOW_DAYS)
            add(out, "windowDays", "must be between " + MIN_WINDOW_DAYS + " and " + MAX_WINDOW_DAYS + ", was " + windowDays);
        factorProblems(out);
        if (halfLifeDays != null && !(halfLifeDays > 0 && Double.isFinite(halfLifeDays)))
            add(out, "halfLifeDays", "must be a positive number of days, was " + halfLifeDays);
        if (minCoverage == null) add(out, "minCoverage", "is required");
        else if (!(minCoverage > 0 && minCoverage <= 1)) add(out, "minCoverage", "must be in (0, 1], was " + minCoverage);
        if (basis == null) add(out, "basis", "is required");
        else if (!basis.equalsIgnoreCase("covariance") && !basis.equalsIgnoreCase("correlation"))
            add(out, "basis", "must be covariance or correlation, was '" + basis + "'");
        if (specificFloor != null && !(specificFloor >= 0 && specificFloor < 1))
            add(out, "specificFloor", "must be in [0, 1), was " + specificFloor);
        shortHistoryProblems(out);
        if (alignment != null && !ALIGNMENTS.contains(alignment))
            add(out, "alignment", "must be sign or rotate, was '" + alignment + "'");
        if (refit != null) {
            if (refit.every() == null) add(out, "refit.every", "is required when refit is given (ISO-8601 duration such as PT24H)");
            else {
                try {
                    Duration d = Duration.parse(refit.every());
                    if (d.compareTo(MIN_REFIT_PERIOD) < 0) add(out, "refit.every", "must be at least PT1M, was " + refit.every());
                } catch (DateTimeParseException e) {
                    add(out, "refit.every", "must be an ISO-8601 duration such as PT24H or P1D, was '" + refit.every() + "'");
                }
            }
        }
        return out;
    }

    private void factorProblems(List<InvalidInputException.Issue> out) {
        if (factors == null) {
            add(out, "factors", "is required, e.g. {\"rule\": \"bai-ng\", \"max\": 30}");
            return;
        }
        String rule = factors.rule();
        if (rule == null) {
            add(out, "factors.rule", "is required: one of " + String.join(", ", RULES));
            return;
        }
        if (!RULES.contains(rule)) {
            add(out, "factors.rule", "unknown rule '" + rule + "': one of " + String.join(", ", RULES));
            return;
        }
        String needs = switch (rule) {
            case "fixed" -> "count";
            case "variance-share" -> "share";
            case "bai-ng", "eigenvalue-ratio" -> "max";
            default -> null;
        };
        if (factors.count() != null && !"count".equals(needs)) add(out, "factors.count", "is not used by rule " + rule);
        if (factors.share() != null && !"share".equals(needs)) add(out, "factors.share", "is not used by rule " + rule);
        if (factors.max() != null && !"max".equals(needs)) add(out, "factors.max", "is not used by rule " + rule);
        if (factors.hold() != null) {
            if ("fixed".equals(rule)) add(out, "factors.hold", "is not used by rule fixed (its k never changes)");
            else if (factors.hold() < 1 || factors.hold() > MAX_HOLD)
                add(out, "factors.hold", "must be between 1 and " + MAX_HOLD + " fits, was " + factors.hold());
        }
        if ("count".equals(needs)) {
            if (factors.count() == null) add(out, "factors.count", "is required by rule fixed");
            else if (factors.count() < 1) add(out, "factors.count", "must be at least 1, was " + factors.count());
        } else if ("share".equals(needs)) {
            if (factors.share() == null) add(out, "factors.share", "is required by rule variance-share");
            else if (!(factors.share() > 0 && factors.share() <= 1)) add(out, "factors.share", "must be in (0, 1], was " + factors.share());
        } else if ("max".equals(needs)) {
            if (factors.max() == null) add(out, "factors.max", "is required by rule " + rule);
            else if (factors.max() < 1) add(out, "factors.max", "must be at least 1, was " + factors.max());
        }
    }

    /**
     * minObservations: at least k + 2 where the rule fixes k or caps it (count, max; the fit checks the other
     * rules' k), at least {@link FitOptions#MIN_SHORT_HISTORY_OBSERVATIONS} always, at most windowDays.
     */
    private void shortHistoryProblems(List<InvalidInputException.Issue> out) {
        if (shortHistory == null) return;
        Integer min = shortHistory.minObservations();
        String field = "shortHistory.minObservations";
        if (min == null) {
            add(out, field, "is required when shortHistory is given (observations in the window a name needs, e.g. 60)");
            return;
        }
        Integer k = factors == null ? null : "fixed".equals(factors.rule()) ? factors.count()
                : "bai-ng".equals(factors.rule()) || "eigenvalue-ratio".equals(factors.rule()) ? factors.max() : null;
        if (k != null && k >= 1 && min < k + 2) {
            add(out, field, "must be at least k + 2 = " + (k + 2) + " for factors." + ("fixed".equals(factors.rule()) ? "count" : "max")
                    + " " + k + " (an intercept, k exposures and one residual degree of freedom), was " + min);
        } else if (min < FitOptions.MIN_SHORT_HISTORY_OBSERVATIONS) {
            add(out, field, "must be at least " + FitOptions.MIN_SHORT_HISTORY_OBSERVATIONS + " (k + 2 for one factor), was " + min);
        }
        if (windowDays != null && min > windowDays) add(out, field, "must be at most windowDays (" + windowDays + "), was " + min);
    }

    private static void add(List<InvalidInputException.Issue> out, String field, String message) {
        out.add(new InvalidInputException.Issue(null, field, message));
    }

    /** The engine's options for this (valid, defaulted) spec. */
    public FitOptions fitOptions() {
        return fitOptions(null);
    }

    /**
     * Options of a fit whose predecessor (the model's fit with the latest earlier as-of date) reported
     * {@code previous} (null: none): carries the hold on k forward.
     */
    public FitOptions fitOptions(FactorCountReport previous) {
        FactorRule rule = switch (factors.rule()) {
            case "fixed" -> new FactorRule.Fixed(factors.count());
            case "variance-share" -> new FactorRule.VarianceShare(factors.share());
            case "bai-ng" -> new FactorRule.BaiNg(factors.max());
            case "eigenvalue-ratio" -> new FactorRule.EigenvalueRatio(factors.max());
            case "random-matrix" -> new FactorRule.RandomMatrix();
            default -> throw new IllegalStateException("unknown rule " + factors.rule());
        };
        FactorHold hold = FactorHold.after(factors.hold() == null ? 1 : factors.hold(), previous, rule);
        return new FitOptions(rule, halfLifeDays, minCoverage, Basis.valueOf(basis.toUpperCase(Locale.ROOT)),
                specificFloor == null ? FitOptions.DEFAULT_SPECIFIC_FLOOR : specificFloor, hold, "rotate".equals(alignment),
                shortHistory == null ? null : shortHistory.minObservations());
    }

    /** The scheduled refit period, or null. */
    public Duration refitPeriod() {
        return refit == null || refit.every() == null ? null : Duration.parse(refit.every());
    }
}
