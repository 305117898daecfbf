package dev.bracket.report.render;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.util.concurrent.atomic.AtomicInteger;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

class BoundedCacheTest {

    @Test
    @DisplayName("a value is computed once per key while the cache has room, and again after it was emptied")
    void computesOncePerKeyAndStaysBounded() {
        AtomicInteger calls = new AtomicInteger();
        BoundedCache<Integer, String> cache = new BoundedCache<>(3, k -> {
            calls.incrementAndGet();
            return "v" + k;
        });
        String first = cache.get(1);
        assertSame(first, cache.get(1));
        assertEquals(1, calls.get());
        cache.get(2);
        cache.get(3);
        assertEquals(3, calls.get());
        cache.get(4); // full: emptied, then 4 computed
        assertEquals(4, calls.get());
        assertEquals("v1", cache.get(1)); // computed again after the emptying
        assertEquals(5, calls.get());
    }
}
