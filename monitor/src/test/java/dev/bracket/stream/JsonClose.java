package dev.bracket.stream;

import com.fasterxml.jackson.databind.JsonNode;

import java.util.Iterator;
import java.util.Set;

import static org.assertj.core.api.Assertions.assertThat;
import static org.assertj.core.api.Assertions.fail;

/**
 * Compares two JSON documents: same structure, same strings, booleans and whole numbers, and
 * decimal numbers equal to {@code 1e-12} relative (absolute below magnitude 1). Used to show that
 * the live path and replay agree up to the order in which partitions were added.
 */
final class JsonClose {

    private JsonClose() {
    }

    static void assertClose(JsonNode actual, JsonNode expected, Set<String> ignoredFields) {
        compare(actual, expected, "$", ignoredFields);
    }

    private static void compare(JsonNode a, JsonNode e, String path, Set<String> ignored) {
        if (e.isObject()) {
            assertThat(a.isObject()).as(path + " is an object").isTrue();
            for (Iterator<String> it = e.fieldNames(); it.hasNext(); ) {
                String f = it.next();
                if (!ignored.contains(f)) {
                    assertThat(a.has(f)).as(path + "." + f + " present").isTrue();
                    compare(a.get(f), e.get(f), path + "." + f, ignored);
                }
            }
            for (Iterator<String> it = a.fieldNames(); it.hasNext(); ) {
                String f = it.next();
                assertThat(ignored.contains(f) || e.has(f)).as(path + "." + f + " unexpected").isTrue();
            }
        } else if (e.isArray()) {
            assertThat(a.size()).as(path + " length").isEqualTo(e.size());
            for (int i = 0; i < e.size(); i++) {
                compare(a.get(i), e.get(i), path + "[" + i + "]", ignored);
            }
        } else if (e.isFloatingPointNumber() || a.isFloatingPointNumber()) {
            double x = a.asDouble();
            double y = e.asDouble();
            double tolerance = 1e-12 * Math.max(1, Math.max(Math.abs(x), Math.abs(y)));
            if (!(Math.abs(x - y) <= tolerance)) {
                fail(path + ": " + x + " differs from " + y + " by more than " + tolerance);
            }
        } else {
            assertThat(a).as(path).isEqualTo(e);
        }
    }
}
