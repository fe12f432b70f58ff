package eigencov.math;

import org.junit.jupiter.api.Test;

import java.util.List;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

/** The optional rotation onto the previous fit's factors (docs/methods.md section 8; Schönemann 1966). */
class ProcrustesAlignmentTest {

    @Test
    void recovers_a_known_rotation_methods_check_values() {
        // docs/methods.md section 8, Check: V_old = [[.5,.5],[.5,.5],[.5,-.5],[.5,-.5]], V_new = V_old Rot(30 deg)
        // => R = Rot(30 deg)' = [[0.866025, 0.5], [-0.5, 0.866025]] and ||V_new R - V_old|| = 0
        double[] vOld = {.5, .5, .5, .5, .5, -.5, .5, -.5};
        double c = Math.cos(Math.toRadians(30));
        double s = Math.sin(Math.toRadians(30));
        double[] rot = {c, -s, s, c};
        double[] vNew = multiply(vOld, 4, 2, rot, 2);
        double[] r = ProcrustesAlignment.rotation(multiplyTransposeA(vNew, vOld, 4, 2), 2);
        assertArrayEquals(new double[] {0.866025, 0.5, -0.5, 0.866025}, r, 1e-6);
        assertArrayEquals(vOld, multiply(vNew, 4, 2, r, 2), 1e-12);
        // docs/methods.md section 8: a sign flip of column 1 is recovered as diag(-1, 1)
        double[] flipped = vOld.clone();
        for (int i = 0; i < 4; i++) flipped[2 * i] = -flipped[2 * i];
        assertArrayEquals(new double[] {-1, 0, 0, 1}, ProcrustesAlignment.rotation(multiplyTransposeA(flipped, vOld, 4, 2), 2), 1e-12);
        // docs/methods.md section 8: a column swap is recovered as the permutation (2, 1)
        double[] swapped = new double[8];
        for (int i = 0; i < 4; i++) {
            swapped[2 * i] = vOld[2 * i + 1];
            swapped[2 * i + 1] = vOld[2 * i];
        }
        assertArrayEquals(new double[] {0, 1, 1, 0}, ProcrustesAlignment.rotation(multiplyTransposeA(swapped, vOld, 4, 2), 2), 1e-12);
    }

    @Test
    void a_rotated_refit_follows_the_previous_factors_and_changes_no_risk_number() {
        double[][] pl = Fixtures.planted(160, 40, 4, 0.5, 8);
        double[] first = java.util.Arrays.copyOfRange(pl[0], 0, 120 * 40);
        double[] later = java.util.Arrays.copyOfRange(pl[0], 40 * 40, 160 * 40); // the window a third later
        FactorFitter fitter = new FactorFitter(null);
        FitOptions signs = FitOptions.of(new FactorRule.Fixed(4), 1.0);
        FitOptions rotate = new FitOptions(signs.rule(), null, 1.0, Basis.COVARIANCE, FitOptions.DEFAULT_SPECIFIC_FLOOR,
                FactorHold.NONE, true);
        FactorModel previous = fitter.fit(Fixtures.panel(120, 40, first), signs, null).model();
        FitResult plain = fitter.fit(Fixtures.panel(120, 40, later), signs, previous);
        FitResult turned = fitter.fit(Fixtures.panel(120, 40, later), rotate, previous);

        assertNull(plain.alignment().rotation());
        Rotation rot = turned.alignment().rotation();
        assertTrue(rot.applied(), rot.reason());
        double[] r = rot.matrix();
        // R is orthogonal, and a real turn (the later window's factors are not the earlier ones exactly)
        assertArrayEquals(identity(4), multiplyTransposeA(r, r, 4, 4), 1e-12);
        double turn = 0;
        for (int x = 0; x < r.length; x++) turn = Math.max(turn, Math.abs(r[x] - identity(4)[x]));
        assertTrue(turn > 1e-3, "R differs from the identity by " + turn);
        // the rotated exposures are at least as close to the previous ones as the sign-aligned ones
        assertTrue(distance(turned.model(), previous) <= distance(plain.model(), previous) + 1e-15,
                distance(turned.model(), previous) + " vs " + distance(plain.model(), previous));
        // B F B' + D is unchanged (every covariance, hence every risk number) ...
        List<String> names = plain.model().tickers();
        int[] all = new int[names.size()];
        for (int i = 0; i < all.length; i++) all[i] = i;
        double[] c0 = RiskCalculator.covariance(plain.model(), all, 1, false);
        double[] c1 = RiskCalculator.covariance(turned.model(), all, 1, false);
        double scale = 0;
        for (double x : c0) scale = Math.max(scale, Math.abs(x));
        for (int x = 0; x < c0.length; x++) assertEquals(c0[x], c1[x], 1e-12 * scale);
        assertFalse(turned.model().diagonalFactorCovariance(), "R' F R is not diagonal");
        // ... and so is the common component B f_t of every return
        int k = 4;
        double[] fr0 = plain.factorReturns();
        double[] fr1 = turned.factorReturns();
        for (int t = 0; t < 120; t += 7) {
            for (int i = 0; i < names.size(); i++) {
                double a = 0;
                double b = 0;
                for (int j = 0; j < k; j++) {
                    a += plain.model().exposure(i, j) * fr0[t * k + j];
                    b += turned.model().exposure(i, j) * fr1[t * k + j];
                }
                assertEquals(a, b, 1e-12);
            }
        }
    }

    @Test
    void no_rotation_without_a_comparable_previous_fit() {
        double[][] pl = Fixtures.planted(120, 40, 4, 0.5, 8);
        FactorFitter fitter = new FactorFitter(null);
        FitOptions rotate4 = new FitOptions(new FactorRule.Fixed(4), null, 1.0, Basis.COVARIANCE, 0.05, FactorHold.NONE, true);
        FitOptions rotate3 = new FitOptions(new FactorRule.Fixed(3), null, 1.0, Basis.COVARIANCE, 0.05, FactorHold.NONE, true);
        FitResult first = fitter.fit(Fixtures.panel(120, 40, pl[0]), rotate4, null);
        assertFalse(first.alignment().rotation().applied());
        assertEquals("first fit", first.alignment().rotation().reason());
        FitResult fewer = fitter.fit(Fixtures.panel(120, 40, pl[0]), rotate3, first.model());
        assertFalse(fewer.alignment().rotation().applied());
        assertTrue(fewer.alignment().rotation().reason().startsWith("k changed"), fewer.alignment().rotation().reason());
        assertEquals(0, fewer.alignment().rotation().matrix().length);
        assertTrue(fewer.model().diagonalFactorCovariance());
    }

    private static double distance(FactorModel a, FactorModel b) {
        double d = 0;
        for (int i = 0; i < a.size(); i++) {
            int p = b.indexOf(a.tickers().get(i));
            for (int j = 0; j < a.factors(); j++) {
                double x = a.exposure(i, j) - b.exposure(p, j);
                d += x * x;
            }
        }
        return d;
    }

    private static double[] identity(int k) {
        double[] id = new double[k * k];
        for (int i = 0; i < k; i++) id[i * k + i] = 1;
        return id;
    }

    /** A (n x p) B (p x q). */
    private static double[] multiply(double[] a, int n, int p, double[] b, int q) {
        double[] out = new double[n * q];
        for (int i = 0; i < n; i++) {
            for (int j = 0; j < q; j++) {
                double s = 0;
                for (int x = 0; x < p; x++) s += a[i * p + x] * b[x * q + j];
                out[i * q + j] = s;
            }
        }
        return out;
    }

    /** A' B for A, B both n x p. */
    private static double[] multiplyTransposeA(double[] a, double[] b, int n, int p) {
        double[] out = new double[p * p];
        for (int x = 0; x < n; x++) {
            for (int i = 0; i < p; i++) {
                for (int j = 0; j < p; j++) out[i * p + j] += a[x * p + i] * b[x * p + j];
            }
        }
        return out;
    }
}
