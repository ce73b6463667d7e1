package org.turnmark.registration.diffeo;

import java.util.Random;

import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;
import org.turnmark.registration.volume.Volume;

/**
 * An invented MR-like pair with a known smooth deformation. The texture T is an analytic function
 * (soft ellipsoidal "tissue" envelope on a dark background, filled with random Gaussian blobs of
 * 2.5–5.5 mm σ, seeded). The true map fixed → moving is φ = exp(v*) for an analytic smooth stationary
 * velocity v*, integrated with RK4; the fixed image is F = T and the moving image M = T ∘ φ⁻¹ with
 * φ⁻¹ = exp(−v*), so that M ∘ φ = F exactly in the continuum.
 */
final class SyntheticPair {

    /** RK4 steps for the true flow; the field varies on a 70 mm scale, so 40 steps are far below 0.01 mm error. */
    private static final int RK4_STEPS = 40;

    private final double[][] blobs;
    private final double amplitudeMm;

    SyntheticPair(long seed, double amplitudeMm) {
        Random r = new Random(seed);
        blobs = new double[60][5];
        for (double[] b : blobs) {
            b[0] = (r.nextDouble() - 0.5) * 60;
            b[1] = (r.nextDouble() - 0.5) * 56;
            b[2] = (r.nextDouble() - 0.5) * 48;
            b[3] = (r.nextDouble() - 0.5) * 120;
            b[4] = 2.5 + 3 * r.nextDouble();
        }
        this.amplitudeMm = amplitudeMm;
    }

    /** The texture at a world point (intensity units). */
    double texture(double x, double y, double z) {
        double e = x * x / (30 * 30) + y * y / (28 * 28) + z * z / (24 * 24);
        double env = 1 / (1 + Math.exp((Math.sqrt(e) - 1) * 12));
        double s = 0;
        for (double[] b : blobs) {
            double d = (x - b[0]) * (x - b[0]) + (y - b[1]) * (y - b[1]) + (z - b[2]) * (z - b[2]);
            s += b[3] * Math.exp(-d / (2 * b[4] * b[4]));
        }
        return 20 + env * (100 + s);
    }

    /** The true velocity v*(x) times sign. */
    void velocity(double x, double y, double z, double sign, double[] o) {
        double k = 2 * Math.PI / 70;
        double a = amplitudeMm * sign;
        o[0] = a * Math.sin(k * y + 0.4) * Math.cos(k * z);
        o[1] = a * Math.sin(k * z + 1.1) * Math.cos(k * x * 0.8);
        o[2] = 0.8 * a * Math.sin(k * x + 2.0);
    }

    /** exp(sign·v*)(p) by RK4. */
    double[] flow(double[] p, double sign) {
        double h = 1.0 / RK4_STEPS;
        double[] x = p.clone();
        double[] k1 = new double[3];
        double[] k2 = new double[3];
        double[] k3 = new double[3];
        double[] k4 = new double[3];
        for (int s = 0; s < RK4_STEPS; s++) {
            velocity(x[0], x[1], x[2], sign, k1);
            velocity(x[0] + 0.5 * h * k1[0], x[1] + 0.5 * h * k1[1], x[2] + 0.5 * h * k1[2], sign, k2);
            velocity(x[0] + 0.5 * h * k2[0], x[1] + 0.5 * h * k2[1], x[2] + 0.5 * h * k2[2], sign, k3);
            velocity(x[0] + h * k3[0], x[1] + h * k3[1], x[2] + h * k3[2], sign, k4);
            for (int c = 0; c < 3; c++) {
                x[c] += h / 6 * (k1[c] + 2 * k2[c] + 2 * k3[c] + k4[c]);
            }
        }
        return x;
    }

    /** F = T on grid g. */
    Volume fixed(Grid3 g) {
        float[] d = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    d[g.index(i, j, k)] = (float) texture(p[0], p[1], p[2]);
                }
            }
        }
        return new Volume(g, d);
    }

    /** M = contrast(T ∘ φ⁻¹) on grid g; {@code invertContrast} maps t ↦ 300 − 2t (for MI). */
    Volume moving(Grid3 g, boolean invertContrast) {
        float[] d = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] q = flow(g.worldOf(i, j, k), -1);
                    double t = texture(q[0], q[1], q[2]);
                    d[g.index(i, j, k)] = (float) (invertContrast ? 300 - 2 * t : t);
                }
            }
        }
        return new Volume(g, d);
    }

    /** The true displacement u*(x) = φ(x) − x on grid g. */
    VectorField trueDisplacement(Grid3 g) {
        VectorField u = VectorField.zeros(g);
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    double[] q = flow(p, 1);
                    int n = g.index(i, j, k);
                    u.x()[n] = (float) (q[0] - p[0]);
                    u.y()[n] = (float) (q[1] - p[1]);
                    u.z()[n] = (float) (q[2] - p[2]);
                }
            }
        }
        return u;
    }

    /** Tissue mask: an ellipsoid well inside the envelope (semi-axes 26, 24, 20 mm). */
    static Volume mask(Grid3 g) {
        float[] d = new float[g.size()];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    double e = p[0] * p[0] / (26 * 26) + p[1] * p[1] / (24 * 24) + p[2] * p[2] / (20 * 20);
                    d[g.index(i, j, k)] = e < 1 ? 1 : 0;
                }
            }
        }
        return new Volume(g, d);
    }

    /** Mean |a − b| (mm) over mask voxels. */
    static double meanDistance(VectorField a, VectorField b, Volume mask) {
        double s = 0;
        int c = 0;
        for (int n = 0; n < mask.data().length; n++) {
            if (mask.data()[n] > 0.5f) {
                double dx = a.x()[n] - (b == null ? 0 : b.x()[n]);
                double dy = a.y()[n] - (b == null ? 0 : b.y()[n]);
                double dz = a.z()[n] - (b == null ? 0 : b.z()[n]);
                s += Math.sqrt(dx * dx + dy * dy + dz * dz);
                c++;
            }
        }
        return s / c;
    }

    /** Centred axis-aligned grid with isotropic spacing h. */
    static Grid3 centred(int nx, int ny, int nz, double h) {
        return Grid3.axisAligned(nx, ny, nz, h, h, h, -(nx - 1) * h / 2, -(ny - 1) * h / 2, -(nz - 1) * h / 2);
    }
}
