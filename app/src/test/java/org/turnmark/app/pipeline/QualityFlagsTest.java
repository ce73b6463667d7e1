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
                20, 12, 99.2, false), solve(0.7), 0, 8);
        String msg = flags.get(0).message();
        assertEquals("finite-element convergence", flags.get(0).check());
        assertTrue(msg.contains("the furthest 3.24 mm (12 nodes were held back"), msg);
        flags.clear();
        QualityFlags.mechanics(flags, new MechanicsModel.Reference(new double[3], new double[3], 9, 0.4, solve(0.6),
                20, 0, 100, false), solve(0.7), 0, 8);
        assertFalse(flags.get(0).message().contains("held back"), flags.get(0).message());
    }

    private static PlanResult.Prediction at(String method, double[] position, double[] covariance) {
        return new PlanResult.Prediction(method, PlanResult.FRAME_SUPINE, position, new double[3], covariance, null,
                null, null, null, null, null);
    }

    /**
     * The registration-agreement flag warns exactly when the registration-only position lies outside the
     * hybrid 95 % ellipsoid. Hybrid covariance 4 I mm² (SD 2 mm): the 95 % sphere has radius
     * 2 √χ²₃(0.95) = 2 √7.81473 = 5.591 mm (χ²₃(0.95) from the NIST/SEMATECH e-Handbook table,
     * §1.3.6.7.4). At 5 mm (d² = 6.25) the flag is ok, at 6 mm (d² = 9) it warns; both are far from the
     * boundary, so no rounding decides them.
     */
    @Test
    void registrationOnlyOutsideTheHybridEllipsoidIsAWarning() {
        double[] cov = {4, 0, 0, 0, 4, 0, 0, 0, 4};
        double[] h = {10, -20, 30};
        java.util.List<PlanResult.QualityFlag> flags = new java.util.ArrayList<>();
        QualityFlags.registrationSpread(flags, "L1", at(PlanResult.HYBRID, h, cov),
                at(PlanResult.REGISTRATION, new double[] {10, -20, 35}, null));
        QualityFlags.registrationSpread(flags, "L1", at(PlanResult.HYBRID, h, cov),
                at(PlanResult.REGISTRATION, new double[] {10, -26, 30}, null));
        QualityFlags.registrationSpread(flags, "L1", at(PlanResult.HYBRID, h, null),
                at(PlanResult.REGISTRATION, new double[] {10, -26, 30}, null));
        assertEquals(PlanResult.QualityFlag.OK, flags.get(0).severity(), flags.get(0).message());
        assertTrue(flags.get(0).message().contains("differ by 5.0 mm"), flags.get(0).message());
        assertEquals(PlanResult.QualityFlag.WARNING, flags.get(1).severity(), flags.get(1).message());
        assertTrue(flags.get(1).message().contains("differ by 6.0 mm"), flags.get(1).message());
        assertEquals(PlanResult.QualityFlag.OK, flags.get(2).severity(), "no ellipsoid: nothing to compare against");
        assertEquals("registration agreement", flags.get(1).check());
    }

    /** The lesion loop adds the registration-agreement flag only when both registrations ran. */
    @Test
    void registrationAgreementNeedsBothRegistrations() {
        double[] cov = {4, 0, 0, 0, 4, 0, 0, 0, 4};
        PlanResult.Prediction h = at(PlanResult.HYBRID, new double[3], cov);
        PlanResult.Prediction r = at(PlanResult.REGISTRATION, new double[] {1, 0, 0}, null);
        java.util.List<PlanResult.QualityFlag> flags = new java.util.ArrayList<>();
        QualityFlags.disagreement(flags, java.util.List.of(new PlanResult.LesionResult("L1", "right", new double[3],
                new double[3], "mark", null, java.util.List.of(h, r), java.util.List.of())));
        assertEquals(1, flags.stream().filter(f -> f.check().equals("registration agreement")).count());
        flags.clear();
        QualityFlags.disagreement(flags, java.util.List.of(new PlanResult.LesionResult("L1", "right", new double[3],
                new double[3], "mark", null, java.util.List.of(h), java.util.List.of())));
        assertEquals(0, flags.stream().filter(f -> f.check().equals("registration agreement")).count());
    }

    /**
     * A reference state accepted by the fallback rule is a warning that gives the share of nodes within the
     * tolerance, the furthest mismatch and the rule; one that met its rule is ok.
     */
    @Test
    void aReferenceStateAcceptedByTheFallbackRuleIsAWarning() {
        java.util.List<PlanResult.QualityFlag> flags = new java.util.ArrayList<>();
        QualityFlags.mechanics(flags, new MechanicsModel.Reference(new double[3], new double[3], 41, 1.29, solve(0.6),
                20, 0, 97.5, true), solve(0.7), 0, 8);
        PlanResult.QualityFlag f = flags.get(0);
        assertEquals("finite-element convergence", f.check());
        assertEquals(PlanResult.QualityFlag.WARNING, f.severity());
        assertTrue(f.message().contains("97.5 % of the nodes within 0.50 mm"), f.message());
        assertTrue(f.message().contains("the furthest at 1.29 mm"), f.message());
        assertTrue(f.message().contains("at least 95 %"), f.message());
        flags.clear();
        QualityFlags.mechanics(flags, new MechanicsModel.Reference(new double[3], new double[3], 9, 0.8, solve(0.6),
                20, 0, 99.5, false), solve(0.7), 0, 8);
        assertEquals(PlanResult.QualityFlag.OK, flags.get(0).severity(), flags.get(0).message());
        assertTrue(flags.get(0).message().contains("99.5 % of the nodes"), flags.get(0).message());
    }
}
