package org.turnmark.mechanics.element;

/** Unrolled 3×3 row-major matrix helpers (package-private kernels). Stateless, thread safe. */
final class Mat3 {

    private Mat3() {
    }

    static double det(double[] m) {
        return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6])
                + m[2] * (m[3] * m[7] - m[4] * m[6]);
    }

    /** Writes m⁻¹ into {@code out} (must not alias m) and returns det m. */
    static double inverse(double[] m, double[] out) {
        double c00 = m[4] * m[8] - m[5] * m[7];
        double c01 = m[5] * m[6] - m[3] * m[8];
        double c02 = m[3] * m[7] - m[4] * m[6];
        double det = m[0] * c00 + m[1] * c01 + m[2] * c02;
        double id = 1 / det;
        out[0] = c00 * id;
        out[3] = c01 * id;
        out[6] = c02 * id;
        out[1] = (m[2] * m[7] - m[1] * m[8]) * id;
        out[4] = (m[0] * m[8] - m[2] * m[6]) * id;
        out[7] = (m[1] * m[6] - m[0] * m[7]) * id;
        out[2] = (m[1] * m[5] - m[2] * m[4]) * id;
        out[5] = (m[2] * m[3] - m[0] * m[5]) * id;
        out[8] = (m[0] * m[4] - m[1] * m[3]) * id;
        return det;
    }

    /** out = a·b; out must not alias a or b. */
    static void multiply(double[] a, double[] b, double[] out) {
        for (int r = 0; r < 3; r++) {
            for (int c = 0; c < 3; c++) {
                out[3 * r + c] = a[3 * r] * b[c] + a[3 * r + 1] * b[3 + c] + a[3 * r + 2] * b[6 + c];
            }
        }
    }
}
