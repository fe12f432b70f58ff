package eigencov.math;

import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Objects;

/**
 * Evidence for the number of factors a rule chose.
 *
 * @param rule       rule name ({@link FactorRule#name()})
 * @param k          chosen number of factors, in [1, rank]
 * @param unclipped  the rule's own choice before clipping to [1, rank] (may be 0 or above rank)
 * @param criterion  what {@code values} holds, e.g. "IC_p2(k)", "lambda_k/lambda_k+1"
 * @param firstK     the k of {@code values[0]}; {@code values[i]} belongs to k = firstK + i
 * @param values     criterion value per k
 * @param parameters named inputs of the rule (penalty, sigma2, edge, T_eff, ...), in insertion order
 */
public record FactorCountReport(String rule, int k, int unclipped, String criterion, int firstK, double[] values,
                                Map<String, Double> parameters) {
    public FactorCountReport {
        Objects.requireNonNull(rule, "rule");
        Objects.requireNonNull(criterion, "criterion");
        values = values.clone();
        parameters = Collections.unmodifiableMap(new LinkedHashMap<>(parameters));
    }

    @Override
    public double[] values() {
        return values.clone();
    }
}
