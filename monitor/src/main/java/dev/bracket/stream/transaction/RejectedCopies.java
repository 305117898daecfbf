package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.RejectReason;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.common.header.Headers;
import org.apache.kafka.common.header.internals.RecordHeaders;

import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.Map;

/**
 * Builds the copy of a rejected record for the rejected topic: the original key, value and
 * headers plus why it was rejected and where it came from. A copy that would not fit the
 * producer's request limit (an input record near the broker's limit gains the reason headers)
 * would fail its whole transaction again on every retry; such a copy keeps only the first bytes
 * of its value and key, drops the original headers and says so in {@link #TRUNCATED_HEADER}.
 */
public final class RejectedCopies {

    /** Header names on rejected records. */
    public static final String REASON_HEADER = "bracket.reason";
    public static final String DETAIL_HEADER = "bracket.detail";
    public static final String SOURCE_TOPIC_HEADER = "bracket.source.topic";
    public static final String SOURCE_PARTITION_HEADER = "bracket.source.partition";
    public static final String SOURCE_OFFSET_HEADER = "bracket.source.offset";
    /** Present only on a cut copy: what was kept of what. */
    public static final String TRUNCATED_HEADER = "bracket.truncated";

    /** The brokers' default record batch limit ({@code message.max.bytes}, rounded down to 1 MiB). */
    static final int BROKER_DEFAULT_LIMIT = 1 << 20;
    /** Room left for the request around one batch (common practice, no source: generous against the few bytes needed). */
    private static final int MARGIN = 1024;
    /**
     * Bytes of a one-record batch besides key, value and headers: 61 of batch header and at most 21
     * of record framing (the v2 record format in Kafka's protocol documentation).
     */
    private static final int FRAMING = 61 + 21;
    /** Length prefixes of one header's key and value, at most (two varints). */
    private static final int HEADER_FRAMING = 10;

    private final String topic;
    private final int limit;

    /** @param limit the largest copy in bytes as the producer estimates it; see {@link #limit(Map)} */
    RejectedCopies(String topic, int limit) {
        this.topic = topic;
        this.limit = limit;
    }

    /** The producer's {@code max.request.size} from the client properties (Kafka's default 1 MiB), at most 1 MiB. */
    static int limit(Map<String, String> kafka) {
        String configured = kafka.get(ProducerConfig.MAX_REQUEST_SIZE_CONFIG);
        int request = BROKER_DEFAULT_LIMIT;
        if (configured != null) {
            try {
                request = Integer.parseInt(configured.trim());
            } catch (NumberFormatException e) {
                // the producer itself refuses the property at start; the default is as good as any here
            }
        }
        return Math.min(request, BROKER_DEFAULT_LIMIT) - MARGIN;
    }

    ProducerRecord<byte[], byte[]> copy(ConsumerRecord<ByteBuffer, ByteBuffer> r, RejectReason reason, String detail) {
        byte[] key = bytes(r.key());
        byte[] value = bytes(r.value());
        Headers ours = new RecordHeaders();
        ours.add(REASON_HEADER, utf8(reason.id()));
        ours.add(DETAIL_HEADER, utf8(detail));
        ours.add(SOURCE_TOPIC_HEADER, utf8(r.topic()));
        ours.add(SOURCE_PARTITION_HEADER, utf8(Integer.toString(r.partition())));
        ours.add(SOURCE_OFFSET_HEADER, utf8(Long.toString(r.offset())));
        Header[] original = r.headers().toArray();
        Headers all = new RecordHeaders(original);
        ours.forEach(all::add);
        if (size(key, value, all) <= limit) {
            return new ProducerRecord<>(topic, null, r.timestamp(), key, value, all);
        }
        int keyLength = key == null ? 0 : key.length;
        int valueLength = value == null ? 0 : value.length;
        // The truncation header's digits never get longer than these maxima, so sizing with them is safe.
        ours.add(TRUNCATED_HEADER, utf8(truncation(valueLength, valueLength, keyLength, keyLength, original.length)));
        int room = (int) Math.max(0, limit - size(null, null, ours));
        int keyKept = Math.min(keyLength, room / 4);
        int valueKept = Math.min(valueLength, room - keyKept);
        ours.remove(TRUNCATED_HEADER);
        ours.add(TRUNCATED_HEADER, utf8(truncation(valueKept, valueLength, keyKept, keyLength, original.length)));
        return new ProducerRecord<>(topic, null, r.timestamp(), prefix(key, keyKept), prefix(value, valueKept), ours);
    }

    private static String truncation(int valueKept, int valueLength, int keyKept, int keyLength, int headersDropped) {
        return "value: first " + valueKept + " of " + valueLength + " bytes; key: first " + keyKept + " of " + keyLength
                + " bytes; " + headersDropped + " original header(s) dropped";
    }

    /** An upper bound of the record's size in an uncompressed batch of its own, as the producer checks it. */
    private static long size(byte[] key, byte[] value, Headers headers) {
        long n = FRAMING + (key == null ? 0 : key.length) + (value == null ? 0 : value.length);
        for (Header h : headers) {
            n += HEADER_FRAMING + utf8(h.key()).length + (h.value() == null ? 0 : h.value().length);
        }
        return n;
    }

    /** A copy of the buffer's remaining bytes (its position untouched), or null. */
    static byte[] bytes(ByteBuffer b) {
        if (b == null) {
            return null;
        }
        byte[] out = new byte[b.remaining()];
        b.duplicate().get(out);
        return out;
    }

    private static byte[] prefix(byte[] b, int n) {
        return b == null ? null : Arrays.copyOf(b, n);
    }

    private static byte[] utf8(String s) {
        return s.getBytes(StandardCharsets.UTF_8);
    }
}
