package org.turnmark.registration.transform;

import org.turnmark.geom.Affine3D;
import org.turnmark.geom.Grid3;
import org.turnmark.registration.volume.VectorField;

/** Analytic vector fields sampled on grids, shared by the transform tests. */
final class TestFields {

    private TestFields() {
    }

    /** A smooth analytic field x ↦ f(x) in RAS mm. */
    interface Analytic {
        void eval(double x, double y, double z, double[] out);
    }

    /**
     * Sinusoidal field with amplitude {@code amp} mm and wavelength {@code wavelength} mm:
     * (amp·sin(2πy/L + p), amp·sin(2πz/L + p), amp·sin(2πx/L + p)).
     */
    static Analytic sine(double amp, double wavelength, double phase) {
        double k = 2 * Math.PI / wavelength;
        return (x, y, z, o) -> {
            o[0] = amp * Math.sin(k * y + phase);
            o[1] = amp * Math.sin(k * z + phase);
            o[2] = amp * Math.sin(k * x + phase);
        };
    }

    /** A second, differently oriented smooth field (so that the bracket with {@link #sine} is non-zero). */
    static Analytic cosine(double amp, double wavelength) {
        double k = 2 * Math.PI / wavelength;
        return (x, y, z, o) -> {
            o[0] = amp * Math.cos(k * z);
            o[1] = amp * Math.cos(k * x);
            o[2] = amp * Math.cos(k * y);
        };
    }

    static VectorField sample(Analytic f, Grid3 g) {
        VectorField v = VectorField.zeros(g);
        double[] o = new double[3];
        for (int k = 0; k < g.nz(); k++) {
            for (int j = 0; j < g.ny(); j++) {
                for (int i = 0; i < g.nx(); i++) {
                    double[] p = g.worldOf(i, j, k);
                    f.eval(p[0], p[1], p[2], o);
                    int n = g.index(i, j, k);
                    v.x()[n] = (float) o[0];
                    v.y()[n] = (float) o[1];
                    v.z()[n] = (float) o[2];
                }
            }
        }
        return v;
    }

    /** An oblique grid: 1.0 × 1.1 × 1.3 mm voxels rotated 20° about an oblique axis. */
    static Grid3 oblique(int nx, int ny, int nz) {
        Affine3D r = Affine3D.rotation(1, 2, 3, Math.toRadians(20));
        Affine3D a = Affine3D.translation(-12.5, 30.25, -7).compose(r).compose(Affine3D.scaling(1.0, 1.1, 1.3));
        return new Grid3(nx, ny, nz, a);
    }

    /** Time-1 flow of dx/dt = f(x) from p by classical Runge–Kutta 4 with {@code steps} steps. */
    static double[] rk4(Analytic f, double[] p, int steps) {
        double h = 1.0 / steps;
        double[] x = p.clone();
        double[] k1 = new double[3];
        double[] k2 = new double[3];
        double[] k3 = new double[3];
        double[] k4 = new double[3];
        for (int s = 0; s < steps; s++) {
            f.eval(x[0], x[1], x[2], k1);
            f.eval(x[0] + 0.5 * h * k1[0], x[1] + 0.5 * h * k1[1], x[2] + 0.5 * h * k1[2], k2);
            f.eval(x[0] + 0.5 * h * k2[0], x[1] + 0.5 * h * k2[1], x[2] + 0.5 * h * k2[2], k3);
            f.eval(x[0] + h * k3[0], x[1] + h * k3[1], x[2] + h * k3[2], k4);
            for (int c = 0; c < 3; c++) {
                x[c] += h / 6 * (k1[c] + 2 * k2[c] + 2 * k3[c] + k4[c]);
            }
        }
        return x;
    }
}
