package eigencov.math;

import org.junit.jupiter.api.Test;

import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;

/** The hold on k (docs/methods.md section 2, practice: change k only if the rule disagrees for n consecutive refits). */
class FactorHoldTest {
    private static final FactorRule RULE = new FactorRule.BaiNg(10);

    /** The k of each fit in a chain of refits whose rule says {@code ruleKs}, with a hold of {@code fits}. */
    private static int[] chain(int fits, int rank, int... ruleKs) {
        int[] out = new int[ruleKs.length];
        FactorCountReport previous = null;
        for (int i = 0; i < ruleKs.length; i++) {
            FactorHold hold = FactorHold.after(fits, previous, RULE);
            previous = hold.apply(report(RULE.name(), ruleKs[i]), RULE, rank);
            out[i] = previous.k();
        }
        return out;
    }

    private static FactorCountReport report(String rule, int k) {
        return new FactorCountReport(rule, k, k, "IC_p2(k)", 0, new double[] {1, 0.5}, Map.of("penalty", 0.1));
    }

    @Test
    void k_changes_only_after_the_rule_disagrees_in_n_consecutive_fits() {
        // a criterion hovering between 5 and 6 does not move k; three 6s in a row do
        assertArrayEquals(new int[] {5, 5, 5, 5, 5, 5, 5, 5, 6, 6}, chain(3, 20, 5, 6, 5, 6, 6, 5, 6, 6, 6, 6));
        // disagreements need not agree with each other: 7 then 4 then 6 are three disagreements with 5
        assertArrayEquals(new int[] {5, 5, 5, 6, 6}, chain(3, 20, 5, 7, 4, 6, 6));
        // a hold of 1 is no hold
        assertArrayEquals(new int[] {5, 6, 5, 6}, chain(1, 20, 5, 6, 5, 6));
        // the held k is clipped to the rank (a shrunken universe) and to the rule's maximum
        assertArrayEquals(new int[] {8, 4, 4}, chain(3, 4, 8, 3, 3));
    }

    @Test
    void the_state_is_carried_in_the_report_parameters_and_reset_when_the_rule_changes() {
        FactorCountReport first = new FactorHold(2, null, 0).apply(report("bai-ng", 5), RULE, 20);
        assertEquals(5.0, first.parameters().get(FactorHold.RULE_K));
        assertEquals(2.0, first.parameters().get(FactorHold.FITS));
        assertEquals(0.0, first.parameters().get(FactorHold.DISAGREEMENTS));
        assertEquals(0.1, first.parameters().get("penalty"), "the rule's own parameters stay");
        FactorCountReport second = FactorHold.after(2, first, RULE).apply(report("bai-ng", 7), RULE, 20);
        assertEquals(5, second.k());
        assertEquals(7.0, second.parameters().get(FactorHold.RULE_K));
        assertEquals(1.0, second.parameters().get(FactorHold.DISAGREEMENTS));
        // a predecessor fitted under another rule holds nothing
        FactorRule other = new FactorRule.EigenvalueRatio(10);
        assertEquals(new FactorHold(2, null, 0), FactorHold.after(2, second, other));
        // without a hold the report is passed through untouched
        FactorCountReport plain = report("bai-ng", 7);
        assertSame(plain, FactorHold.after(1, second, RULE).apply(plain, RULE, 20));
        assertThrows(IllegalArgumentException.class, () -> new FactorHold(0, null, 0));
    }
}
