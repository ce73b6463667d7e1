package org.turnmark.app.pipeline;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.turnmark.registration.transform.JacobianStats;

class QualityFlagsTest {

    private static JacobianStats stats(double minDet, double percentNonPositive) {
        return new JacobianStats(1000, minDet, 1.5, percentNonPositive, 0, 0.1);
    }

    /**
     * A hybrid map that folds only where its mechanics start folds says so, and is still a problem
     * (no body statistics: every fold counts as tissue).
     */
    @Test
    void foldingIsAttributedToTheMechanicsStartWhenTheResidualDoesNotFold() {
        PlanResult.QualityFlag f = QualityFlags.folding("hybrid registration", stats(-0.08, 0.006), null, stats(0.4, 0));
        assertEquals(PlanResult.QualityFlag.PROBLEM, f.severity());
        assertTrue(f.message().contains("mechanics start folds"), f.message());
        assertTrue(f.message().contains("residual registration alone: min 0.400"), f.message());
    }

    /** Folding inside the body where the residual folds too: a problem, not blamed on the start. */
    @Test
    void foldingOfTheResidualIsNotAttributedToTheStart() {
        PlanResult.QualityFlag f = QualityFlags.folding("hybrid registration", stats(-0.08, 0.006), stats(-0.05, 0.01), stats(-0.01, 0.002));
        assertEquals(PlanResult.QualityFlag.PROBLEM, f.severity());
        assertFalse(f.message().contains("mechanics start"), f.message());
        assertTrue(f.message().endsWith("the map folds tissue"), f.message());
    }

    /** Folds only outside the body (in the extrapolated air) move no tissue: OK, and said so. */
    @Test
    void foldingOnlyOutsideTheBodyIsNotAProblem() {
        PlanResult.QualityFlag f = QualityFlags.folding("hybrid registration", stats(-0.08, 0.006), stats(0.3, 0),
                stats(0.4, 0));
        assertEquals(PlanResult.QualityFlag.OK, f.severity());
        assertTrue(f.message().contains("only in the air outside the body"), f.message());
        assertTrue(f.message().startsWith("inside the body: Jacobian determinant min 0.300"), f.message());
    }

    /** No folding: an OK flag; a baseline without a mechanics start reports only its total map. */
    @Test
    void noFoldingIsOk() {
        PlanResult.QualityFlag f = QualityFlags.folding("registration-only baseline", stats(0.42, 0), stats(0.5, 0), null);
        assertEquals(PlanResult.QualityFlag.OK, f.severity());
        assertFalse(f.message().contains("residual"), f.message());
        assertFalse(f.message().contains("folds"), f.message());
    }

    private static org.turnmark.mechanics.solve.SolveResult solve(double minDetF) {
        return new org.turnmark.mechanics.solve.SolveResult(new double[3], true, 3, 0, 12, 200, 1e-6, 1e-9, 1e-12, 1,
                minDetF, 10, new double[0], 0);
    }

    /**
     * A reference state that held nodes back says so in the convergence flag, with the count and the
     * furthest mismatch; one that did not, does not mention it.
     */
    @Test
    void heldBackNodesAreReportedInTheConvergenceFlag() {
        java.util.List<PlanResult.QualityFlag> flags = new java.util.ArrayList<>();
        QualityFlags.mechanics(flags, new MechanicsModel.Reference(new double[3], new double[3], 14, 3.24, solve(0.6),
                20, 12), solve(0.7), 0, 8);
        String msg = flags.get(0).message();
        assertEquals("finite-element convergence", flags.get(0).check());
        assertTrue(msg.contains("the furthest 3.24 mm (12 nodes were held back"), msg);
        flags.clear();
        QualityFlags.mechanics(flags, new MechanicsModel.Reference(new double[3], new double[3], 9, 0.4, solve(0.6),
                20, 0), solve(0.7), 0, 8);
        assertFalse(flags.get(0).message().contains("held back"), flags.get(0).message());
    }
}
