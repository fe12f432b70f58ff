package eigencov.service;

import eigencov.math.FactorInverse;
import eigencov.math.FactorModel;
import eigencov.math.FitResult;
import eigencov.math.PortfolioRisk;
import eigencov.math.RiskCalculator;
import eigencov.math.SingularCovarianceException;

import java.time.LocalDate;
import java.util.ArrayList;
import java.util.List;

/**
 * Answers queries from served fits: covariance (matrix or factor form), exposures, factors, factor
 * returns, portfolio risk, the inverse of a covariance submatrix and minimum-variance weights.
 * Everything is read from the fit's factor form, never from a K x K matrix, and no n x n matrix is
 * ever inverted (Woodbury, {@link FactorInverse}; style practice 9). Short-history names are part of
 * every served model ({@link ServedFit#model()}); answers list the ones they involve. Stateless apart
 * from the {@link FitLookup} it reads; safe for concurrent use.
 */
public final class QueryService {
    /** Problem type of a query naming tickers a fit does not cover (HTTP 422). */
    public static final String UNKNOWN_TICKERS = "unknown-tickers";
    /** Problem type of an inverse that does not exist: names with zero specific variance (HTTP 422). */
    public static final String SINGULAR_COVARIANCE = "singular-covariance";

    private final FitLookup fits;

    public QueryService(FitLookup fits) {
        this.fits = java.util.Objects.requireNonNull(fits, "fits");
    }

    /** Covariance of the requested tickers in matrix or factor form. */
    public CovarianceAnswer covariance(String model, FitSelector selector, CovarianceQuery q) {
        ServedFit served = resolve(model, selector);
        TickerSelection sel = select(served, q.tickers(), i -> "tickers[" + i + "]", q.missing());
        double scale = q.scale().varianceMultiplier();
        if (q.form() == CovarianceForm.MATRIX) {
            double[] c = RiskCalculator.covariance(served.model(), sel.rows(), scale, q.correlation());
            return CovarianceMatrix.ofComputed(served.ref(), sel, q.scale(), q.correlation(), c);
        }
        return factorForm(served, sel, q.scale());
    }

    /** Exposures, daily specific variances and first-factor betas of the requested tickers (the factor form without F). */
    public FactorForm exposures(String model, FitSelector selector, ExposuresQuery q) {
        ServedFit served = resolve(model, selector);
        TickerSelection sel = select(served, q.tickers(), i -> "tickers[" + i + "]", q.missing());
        return factorForm(served, sel, Scale.daily());
    }

    /** Factor covariance and the eigenvalue spectrum of the fit. */
    public FactorSpectrum factors(String model, FitSelector selector) {
        ServedFit served = resolve(model, selector);
        FitResult r = served.result();
        return new FactorSpectrum(served.ref(), r.model().factors(), r.model().factorCovariance(), r.eigenvalues(),
                r.varianceShare());
    }

    /**
     * Factor returns of the fit's window dated within [from, to] (either may be null: open end).
     * A range outside the window gives an empty series.
     */
    public FactorReturnSeries factorReturns(String model, FitSelector selector, LocalDate from, LocalDate to) {
        if (from != null && to != null && from.isAfter(to)) {
            throw InvalidInputException.field("from", "must not be after to (" + from + " > " + to + ")");
        }
        ServedFit served = resolve(model, selector);
        FitResult r = served.result();
        List<LocalDate> dates = r.dates();
        int first = 0;
        int end = dates.size();
        while (first < end && from != null && dates.get(first).isBefore(from)) first++;
        while (end > first && to != null && dates.get(end - 1).isAfter(to)) end--;
        int k = r.model().factors();
        double[] all = r.factorReturns();
        double[] part = java.util.Arrays.copyOfRange(all, first * k, end * k);
        return new FactorReturnSeries(served.ref(), k, dates.subList(first, end), part);
    }

    /** Risk of a portfolio, with tracking error when a benchmark is given. */
    public RiskAnswer risk(String model, FitSelector selector, RiskQuery q) {
        ServedFit served = resolve(model, selector);
        TickerSelection sel = select(served, q.weights(), "weights");
        List<InvalidInputException.Issue> issues = new ArrayList<>(sel.issues());
        TickerSelection bench = null;
        if (q.benchmark() != null) {
            bench = select(served, q.benchmark(), "benchmark");
            issues.addAll(bench.issues());
        }
        if (q.missing() == MissingTickers.ERROR && !issues.isEmpty()) throw uncovered(served, issues);
        requireSome(served, sel, "weights");
        if (bench != null) requireSome(served, bench, "benchmark");

        double[] w = weightsOf(q.weights(), sel);
        double[] bw = bench == null ? null : weightsOf(q.benchmark(), bench);
        FactorModel m = served.model();
        PortfolioRisk risk = RiskCalculator.portfolio(m, sel.rows(), w, bench == null ? null : bench.rows(), bw,
                q.scale().varianceMultiplier(), served.betaView());
        List<String> omitted = new ArrayList<>(sel.omitted());
        List<String> shortHistory = new ArrayList<>(sel.shortHistory());
        if (bench != null) {
            for (String t : bench.omitted()) if (!omitted.contains(t)) omitted.add(t);
            for (String t : bench.shortHistory()) if (!shortHistory.contains(t)) shortHistory.add(t);
        }
        List<String> activeTickers = new ArrayList<>();
        if (risk.active() != null) {
            for (int row : risk.active().indices()) activeTickers.add(m.tickers().get(row));
        }
        return new RiskAnswer(served.ref(), q.scale(), sel.kept(), w, omitted, risk, activeTickers, shortHistory);
    }

    /**
     * The inverse of the requested tickers' covariance at the query's scale, {@code (s C_S)^-1 = C_S^-1 / s},
     * by Woodbury on the factor form: O(n k^2) plus O(n^2 k) for the n^2 entries.
     *
     * @throws InvalidInputException 422 naming the tickers with zero specific variance (no inverse exists)
     */
    public PrecisionMatrix precision(String model, FitSelector selector, PrecisionQuery q) {
        ServedFit served = resolve(model, selector);
        TickerSelection sel = select(served, q.tickers(), i -> "tickers[" + i + "]", q.missing());
        double[] inverse = inverse(served, sel, q.tickers()).inverse(q.scale().varianceMultiplier());
        return PrecisionMatrix.ofComputed(served.ref(), sel, q.scale(), inverse);
    }

    /**
     * The minimum-variance weights of the requested tickers, {@code budget C_S^-1 1 / (1'C_S^-1 1)}, and
     * their volatility at the query's scale: O(n k^2), no n x n matrix.
     *
     * @throws InvalidInputException 422 naming the tickers with zero specific variance (no inverse exists)
     */
    public MinimumVarianceAnswer minimumVariance(String model, FitSelector selector, MinimumVarianceQuery q) {
        ServedFit served = resolve(model, selector);
        TickerSelection sel = select(served, q.tickers(), i -> "tickers[" + i + "]", q.missing());
        double[] w = new double[sel.rows().length];
        double variance = inverse(served, sel, q.tickers()).minimumVariance(q.budget(), w);
        double volatility = Math.sqrt(Math.max(0, variance) * q.scale().varianceMultiplier());
        return new MinimumVarianceAnswer(served.ref(), q.scale(), sel.kept(), sel.omitted(), sel.shortHistory(), w, q.budget(),
                volatility);
    }

    /** The Woodbury inverse on the selected rows, or a 422 naming the requested tickers that make it singular. */
    private static FactorInverse inverse(ServedFit served, TickerSelection sel, List<String> requested) {
        try {
            return FactorInverse.of(served.model(), sel.rows());
        } catch (SingularCovarianceException e) {
            int[] at = e.positions();
            List<InvalidInputException.Issue> issues = new ArrayList<>(at.length);
            for (int a : at) {
                int i = sel.positions()[a];
                issues.add(new InvalidInputException.Issue(null, "tickers[" + i + "]", "'" + requested.get(i)
                        + "' has zero specific variance in this fit, so the covariance has no inverse"));
            }
            FitRef ref = served.ref();
            throw new InvalidInputException(at.length + " requested ticker" + (at.length == 1 ? " has" : "s have")
                    + " zero specific variance in fit " + ref.id() + " of model '" + ref.model() + "' (its specificFloor is 0): "
                    + "the covariance of these tickers has no inverse; leave " + (at.length == 1 ? "it" : "them") + " out",
                    Tickers.cap(issues), true, SINGULAR_COVARIANCE);
        }
    }

    private ServedFit resolve(String model, FitSelector selector) {
        return fits.resolve(model, selector.asOf(), selector.fitId());
    }

    private static TickerSelection select(ServedFit served, List<String> tickers, java.util.function.IntFunction<String> fieldOf,
                                          MissingTickers missing) {
        TickerSelection sel = TickerSelection.of(served, tickers, fieldOf);
        if (missing == MissingTickers.ERROR && !sel.issues().isEmpty()) throw uncovered(served, sel.issues());
        requireSome(served, sel, "tickers");
        return sel;
    }

    private static void requireSome(ServedFit served, TickerSelection sel, String field) {
        if (sel.kept().isEmpty()) {
            throw new InvalidInputException("none of the requested " + field + " is covered by fit " + served.ref().id()
                    + " of model '" + served.ref().model() + "'", Tickers.cap(sel.issues()), true, UNKNOWN_TICKERS);
        }
    }

    private static InvalidInputException uncovered(ServedFit served, List<InvalidInputException.Issue> issues) {
        FitRef ref = served.ref();
        return new InvalidInputException(issues.size() + " requested ticker" + (issues.size() == 1 ? " is" : "s are")
                + " not covered by fit " + ref.id() + " of model '" + ref.model() + "' (as of " + ref.asOf()
                + "); use missing=omit to answer on the others", Tickers.cap(issues), true, UNKNOWN_TICKERS);
    }

    /** Gathers rows of B, D and the betas for the selected tickers (EJML-style extract by row index). */
    private static FactorForm factorForm(ServedFit served, TickerSelection sel, Scale scale) {
        FactorModel m = served.model();
        double[] betas = served.betaView();
        int k = m.factors();
        int[] rows = sel.rows();
        double s = scale.varianceMultiplier();
        double[] b = new double[rows.length * k];
        double[] d = new double[rows.length];
        double[] beta = new double[rows.length];
        for (int r = 0; r < rows.length; r++) {
            int i = rows[r];
            for (int j = 0; j < k; j++) b[r * k + j] = m.exposure(i, j);
            d[r] = m.specificVariance(i) * s;
            beta[r] = betas[i];
        }
        double[] f = m.factorCovariance();
        for (int p = 0; p < f.length; p++) f[p] *= s;
        return new FactorForm(served.ref(), sel.kept(), sel.omitted(), sel.shortHistory(), scale, k, b, f, d, beta);
    }

    /** The weights' tickers matched against the fit; an uncovered one is named {@code field.TICKER}. */
    private static TickerSelection select(ServedFit served, Weights w, String field) {
        return TickerSelection.of(served, w.tickers(), i -> field + "." + w.ticker(i));
    }

    private static double[] weightsOf(Weights weights, TickerSelection sel) {
        int[] at = sel.positions();
        double[] w = new double[at.length];
        for (int i = 0; i < w.length; i++) w[i] = weights.weight(at[i]);
        return w;
    }
}
