package dev.bracket.report.render;

import java.util.Map;
import java.util.concurrent.ConcurrentHashMap;
import java.util.function.Function;

/**
 * Values computed once per key, for keys from a small set (texts written into every document):
 * at most {@code max} entries, emptied when full so that an unexpected stream of keys cannot grow
 * it without end. Thread-safe.
 */
public final class BoundedCache<K, V> {

    private final Map<K, V> values = new ConcurrentHashMap<>();
    private final int max;
    private final Function<K, V> compute;

    public BoundedCache(int max, Function<K, V> compute) {
        this.max = max;
        this.compute = compute;
    }

    /** The value for {@code key}, computed on first use. */
    public V get(K key) {
        V value = values.get(key);
        if (value == null) {
            if (values.size() >= max) {
                values.clear();
            }
            value = values.computeIfAbsent(key, compute);
        }
        return value;
    }
}
