package eigencov.service;

import eigencov.math.FactorModel;
import eigencov.math.FirstFactorBeta;
import eigencov.math.FitResult;

import java.util.Objects;

/**
 * One complete, immutable fit as served: its reference, the engine's result (factor model,
 * eigenvalues, factor returns, window, reports), and what every query reads of it, prepared once:
 * the served model (the universe's rows, then the short-history names') and each served row's beta
 * to the first factor (docs/design.md section 6). Built whole, then published; never mutated.
 */
public final class ServedFit {
    private final FitRef ref;
    private final FitResult result;
    private final FactorModel model;
    private final double[] betas;

    public ServedFit(FitRef ref, FitResult result) {
        if (ref == null || result == null) throw new IllegalArgumentException("served fit needs ref and result");
        this.ref = ref;
        this.result = result;
        this.model = result.servedModel();
        this.betas = FirstFactorBeta.betas(result, model);
    }

    public FitRef ref() {
        return ref;
    }

    public FitResult result() {
        return result;
    }

    /** The model queries answer from: {@link FitResult#model()}'s rows, then the short-history names. */
    public FactorModel model() {
        return model;
    }

    /** Rows of {@link #model()} that are the fit's universe; the rows after them are short-history names. */
    public int universeSize() {
        return result.model().size();
    }

    /** Each served row's beta to the first factor (a copy). */
    public double[] betas() {
        return betas.clone();
    }

    /** The betas without a copy, for the query service (read only). */
    double[] betaView() {
        return betas;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof ServedFit f && ref.equals(f.ref) && result.equals(f.result);
    }

    @Override
    public int hashCode() {
        return Objects.hash(ref, result);
    }

    @Override
    public String toString() {
        return "ServedFit[ref=" + ref + ", tickers=" + model.size() + "]";
    }
}
