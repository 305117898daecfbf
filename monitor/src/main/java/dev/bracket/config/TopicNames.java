package dev.bracket.config;

/**
 * The topics the monitor writes: rejected events, per-partition partial statistics (compacted)
 * and published bound documents; and how to create topics that do not exist yet.
 *
 * @param partitions        partitions for topics the monitor creates
 * @param replicationFactor replication for created topics; {@code -1} leaves it to the broker default
 */
public record TopicNames(String rejected, String partials, String bounds, int partitions, short replicationFactor) {

    public static final TopicNames DEFAULT = new TopicNames("bracket-rejected", "bracket-partials", "bracket-bounds", 3, (short) -1);
}
