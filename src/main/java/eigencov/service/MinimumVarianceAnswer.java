package eigencov.service;

import java.util.List;

/**
 * The fully invested minimum-variance portfolio of the answered tickers under the fit's model,
 * {@code w = budget C_S^-1 1 / (1'C_S^-1 1)} (docs/design.md section 6; docs/methods.md section 9),
 * unconstrained (short positions allowed). Arrays are copied in and out.
 *
 * @param weights    one weight per answered ticker, summing to {@code budget}
 * @param volatility {@code sqrt(w'C_S w)} at {@code scale}
 */
public record MinimumVarianceAnswer(FitRef fit, Scale scale, List<String> tickers, List<String> omitted, List<String> shortHistory,
                                    double[] weights, double budget, double volatility) {
    public MinimumVarianceAnswer {
        tickers = List.copyOf(tickers);
        omitted = List.copyOf(omitted);
        shortHistory = List.copyOf(shortHistory);
        if (weights.length != tickers.size()) throw new IllegalArgumentException("weights length " + weights.length + " != tickers " + tickers.size());
        weights = weights.clone();
    }

    @Override
    public double[] weights() {
        return weights.clone();
    }
}
