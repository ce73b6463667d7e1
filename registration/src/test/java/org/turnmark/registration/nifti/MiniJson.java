package org.turnmark.registration.nifti;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * A minimal JSON reader for test fixtures (objects → {@code Map}, arrays → {@code List}, numbers →
 * {@code Double}, strings, booleans, null). The registration module has no JSON library of its own.
 */
final class MiniJson {

    private final String s;
    private int pos;

    private MiniJson(String s) {
        this.s = s;
    }

    static Object parse(String text) {
        MiniJson p = new MiniJson(text);
        Object v = p.value();
        p.ws();
        if (p.pos != p.s.length()) {
            throw new IllegalArgumentException("trailing text at " + p.pos);
        }
        return v;
    }

    @SuppressWarnings("unchecked")
    static Map<String, Object> object(Object o) {
        return (Map<String, Object>) o;
    }

    @SuppressWarnings("unchecked")
    static List<Object> array(Object o) {
        return (List<Object>) o;
    }

    static double[] doubles(Object o) {
        List<Object> a = array(o);
        double[] d = new double[a.size()];
        for (int n = 0; n < d.length; n++) {
            d[n] = ((Number) a.get(n)).doubleValue();
        }
        return d;
    }

    /** A 4×4 nested array as 16 row-major values. */
    static double[] matrix(Object o) {
        double[] m = new double[16];
        List<Object> rows = array(o);
        for (int r = 0; r < 4; r++) {
            double[] row = doubles(rows.get(r));
            System.arraycopy(row, 0, m, 4 * r, 4);
        }
        return m;
    }

    private void ws() {
        while (pos < s.length() && Character.isWhitespace(s.charAt(pos))) {
            pos++;
        }
    }

    private Object value() {
        ws();
        char c = s.charAt(pos);
        if (c == '{') {
            pos++;
            Map<String, Object> m = new LinkedHashMap<>();
            ws();
            if (s.charAt(pos) == '}') {
                pos++;
                return m;
            }
            while (true) {
                ws();
                String k = string();
                ws();
                expect(':');
                m.put(k, value());
                ws();
                if (s.charAt(pos) == ',') {
                    pos++;
                } else {
                    expect('}');
                    return m;
                }
            }
        }
        if (c == '[') {
            pos++;
            List<Object> a = new ArrayList<>();
            ws();
            if (s.charAt(pos) == ']') {
                pos++;
                return a;
            }
            while (true) {
                a.add(value());
                ws();
                if (s.charAt(pos) == ',') {
                    pos++;
                } else {
                    expect(']');
                    return a;
                }
            }
        }
        if (c == '"') {
            return string();
        }
        if (s.startsWith("true", pos)) {
            pos += 4;
            return Boolean.TRUE;
        }
        if (s.startsWith("false", pos)) {
            pos += 5;
            return Boolean.FALSE;
        }
        if (s.startsWith("null", pos)) {
            pos += 4;
            return null;
        }
        if (s.startsWith("NaN", pos)) {
            pos += 3;
            return Double.NaN;
        }
        int start = pos;
        while (pos < s.length() && "+-0123456789.eE".indexOf(s.charAt(pos)) >= 0) {
            pos++;
        }
        return Double.parseDouble(s.substring(start, pos));
    }

    private String string() {
        expect('"');
        StringBuilder sb = new StringBuilder();
        while (s.charAt(pos) != '"') {
            char c = s.charAt(pos++);
            if (c == '\\') {
                char e = s.charAt(pos++);
                switch (e) {
                    case 'n':
                        sb.append('\n');
                        break;
                    case 't':
                        sb.append('\t');
                        break;
                    case 'u':
                        sb.append((char) Integer.parseInt(s.substring(pos, pos + 4), 16));
                        pos += 4;
                        break;
                    default:
                        sb.append(e);
                }
            } else {
                sb.append(c);
            }
        }
        pos++;
        return sb.toString();
    }

    private void expect(char c) {
        if (s.charAt(pos) != c) {
            throw new IllegalArgumentException("expected '" + c + "' at " + pos + ", got '" + s.charAt(pos) + "'");
        }
        pos++;
    }
}
