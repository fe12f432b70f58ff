package eigencov.service;

import eigencov.math.FitResult;

/**
 * One complete, immutable fit as served: its reference and the engine's result (factor model,
 * eigenvalues, factor returns, window, reports). Built whole, then published; never mutated.
 */
public record ServedFit(FitRef ref, FitResult result) {
    public ServedFit {
        if (ref == null || result == null) throw new IllegalArgumentException("served fit needs ref and result");
    }
}
