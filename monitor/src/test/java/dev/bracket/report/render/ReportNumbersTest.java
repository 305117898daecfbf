package dev.bracket.report.render;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import dev.bracket.report.PendingOutcomes;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.Iterator;
import java.util.List;
import java.util.Map;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

/**
 * The speed work (critical values without a root search per call, sums kept in the cells, bands
 * built once per settings) must not move a published number by more than 1e-12 relative: the
 * reports of random studies are compared with those written by the implementation before it
 * (commit 6cc2b2a, see {@link ReferenceReports}), field by field. The fields that pending outcomes
 * added later are not in that file; the random studies report no exposures, so those fields must
 * say so ({@link #NO_PENDING}), and every other field must be in the file. The anytime band was
 * changed on purpose afterwards (each end on its own where that is tighter, the boundary's grid
 * centred on a typical spread; it can now also refute where it could not, which shows it on a
 * refuted row), so anytime bands are left out of the comparison; their numbers are the subject of
 * the band tests ({@code AnytimeWidthTest}, {@code AnytimeValidityTest},
 * {@code StudyBandsCoverageTest}).
 */
class ReportNumbersTest {

    /** The fields pending outcomes added, with their values when no exposure was reported. */
    private static final Map<String, String> NO_PENDING = Map.of(
            "exposed", "0", "pending", "0", "pendingShare", "0.0", "excessOutcomes", "0",
            "exposuresReported", "false", "pendingOutcomes", "\"in-range\"");

    @Test
    @DisplayName("reports of random studies equal those of the implementation before the speed work (numbers within 1e-12 relative)")
    void sameNumbersAsBefore() throws IOException {
        List<String> reference;
        try (InputStream in = getClass().getResourceAsStream("reference-reports.jsonl")) {
            reference = new String(in.readAllBytes(), StandardCharsets.UTF_8).lines().toList();
        }
        assertEquals(ReferenceReports.STUDIES, reference.size());
        int[] numbers = {0};
        for (int i = 0; i < reference.size(); i++) {
            JsonNode before = ReportJson.mapper().readTree(reference.get(i));
            JsonNode now = ReportJson.mapper().readTree(ReferenceReports.document(i));
            compare(before, now, "study " + i, numbers);
        }
        assertTrue(numbers[0] > 2_000, "compared " + numbers[0] + " numbers");
    }

    private static void compare(JsonNode before, JsonNode now, String path, int[] numbers) {
        if (path.endsWith(".bands")) {
            compare(withoutAnytime(before), withoutAnytime(now), path + " (fixed)", numbers);
            return;
        }
        if (before.isNumber() && now.isNumber()) {
            double a = before.doubleValue();
            double b = now.doubleValue();
            assertEquals(a, b, 1e-12 * Math.max(1, Math.abs(a)), path);
            numbers[0]++;
        } else if (before.isContainerNode()) {
            if (before.isArray()) {
                assertEquals(before.size(), now.size(), path + " size");
                for (int i = 0; i < before.size(); i++) {
                    compare(before.get(i), now.get(i), path + "[" + i + "]", numbers);
                }
            } else {
                for (Iterator<Map.Entry<String, JsonNode>> it = before.fields(); it.hasNext(); ) {
                    Map.Entry<String, JsonNode> e = it.next();
                    if (!now.has(e.getKey())) {
                        fail(path + "." + e.getKey() + " missing");
                    }
                    compare(e.getValue(), now.get(e.getKey()), path + "." + e.getKey(), numbers);
                }
                for (Iterator<String> it = now.fieldNames(); it.hasNext(); ) {
                    String name = it.next();
                    if (!before.has(name)) {
                        added(name, now.get(name), path);
                    }
                }
            }
        } else {
            assertEquals(before, now, path);
        }
    }

    /** A row's bands without the anytime band. */
    private static JsonNode withoutAnytime(JsonNode bands) {
        ArrayNode out = ReportJson.mapper().createArrayNode();
        bands.forEach(b -> {
            if (!"anytime".equals(b.path("method").asText())) {
                out.add(b);
            }
        });
        return out;
    }

    /** A field the reference lacks: one pending outcomes added, with its value for no exposures. */
    private static void added(String name, JsonNode value, String path) {
        if (name.equals("pendingNote")) {
            assertEquals(PendingOutcomes.NOT_ACCOUNTED, value.asText(), path + ".pendingNote");
        } else if (NO_PENDING.containsKey(name)) {
            assertEquals(NO_PENDING.get(name), value.toString(), path + "." + name);
        } else {
            fail(path + "." + name + " is not in the reference and not a pending-outcome field");
        }
    }
}
