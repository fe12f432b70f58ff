package eigencov.math;

/**
 * How the number of factors was chosen (temporary copy of the engine's API type).
 *
 * @param rule     rule name as in the API
 * @param chosen   k
 * @param criterion criterion value per candidate k (index 0 = k of 1 or 0 as the rule defines)
 */
public record FactorCountReport(String rule, int chosen, double[] criterion) {
    public FactorCountReport {
        criterion = criterion.clone();
    }
}
