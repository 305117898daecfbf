package dev.bracket.report.render;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.charset.StandardCharsets;
import java.util.SplittableRandom;

import static org.junit.jupiter.api.Assertions.assertEquals;

/**
 * Documents write doubles with Jackson's fast (Schubfach) writer instead of {@link Double#toString}:
 * a reader must still parse back exactly the double that was computed. Checked against the JDK's
 * own {@link Double#parseDouble} (correctly rounded, JLS 3.10.2) on random bit patterns of every
 * magnitude and on values like those in reports (ends and widths of intervals).
 */
class DoubleWritingTest {

    @Test
    @DisplayName("every double a document writes reads back as the very same double")
    void writtenDoublesReadBackExactly() {
        SplittableRandom rng = new SplittableRandom(7);
        double[] values = new double[200_000];
        for (int i = 0; i < values.length; i++) {
            double x;
            do {
                x = i % 2 == 0 ? Double.longBitsToDouble(rng.nextLong()) : (rng.nextDouble() - 0.5) * Math.pow(10, rng.nextInt(-3, 4));
            } while (!Double.isFinite(x));
            values[i] = x;
        }
        byte[] written = ReportJson.bytes(g -> {
            g.writeStartArray();
            for (double x : values) {
                g.writeNumber(x);
            }
            g.writeEndArray();
        });
        String text = new String(written, StandardCharsets.UTF_8);
        String[] parts = text.substring(1, text.length() - 1).split(",");
        assertEquals(values.length, parts.length);
        for (int i = 0; i < values.length; i++) {
            assertEquals(Double.doubleToLongBits(values[i]), Double.doubleToLongBits(Double.parseDouble(parts[i])),
                    values[i] + " written as " + parts[i]);
        }
    }
}
