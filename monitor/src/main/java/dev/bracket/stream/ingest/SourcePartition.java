package dev.bracket.stream.ingest;

/**
 * Where statistics came from: an input topic's partition, or for {@code replay} a file (its
 * name as topic, its position as partition). Partial statistics are kept per source so that
 * totals are sums over sources and each source has exactly one writer.
 */
public record SourcePartition(String topic, int partition) {

    @Override
    public String toString() {
        return topic + "-" + partition;
    }
}
