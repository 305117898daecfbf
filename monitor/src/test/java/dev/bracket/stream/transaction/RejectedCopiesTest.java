package dev.bracket.stream.transaction;

import dev.bracket.stream.ingest.RejectReason;

import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.header.Header;
import org.apache.kafka.common.header.internals.RecordHeaders;
import org.apache.kafka.common.record.TimestampType;
import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.nio.ByteBuffer;
import java.nio.charset.StandardCharsets;
import java.util.Arrays;
import java.util.Map;
import java.util.Optional;

import static org.assertj.core.api.Assertions.assertThat;

/** Copies for the rejected topic: whole when they fit the producer's limit, cut and marked when they do not. */
class RejectedCopiesTest {

    /** A record as the aggregator's consumer hands it over: key and value as views into a larger fetched buffer. */
    private static ConsumerRecord<ByteBuffer, ByteBuffer> record(byte[] key, byte[] value) {
        RecordHeaders headers = new RecordHeaders();
        headers.add("trace", "abc".getBytes(StandardCharsets.UTF_8));
        return new ConsumerRecord<>("in", 2, 77, 1_000L, TimestampType.CREATE_TIME, key == null ? -1 : key.length, value.length,
                key == null ? null : view(key), view(value), headers, Optional.empty());
    }

    private static ByteBuffer view(byte[] b) {
        byte[] fetched = new byte[b.length + 10];
        System.arraycopy(b, 0, fetched, 5, b.length);
        return ByteBuffer.wrap(fetched, 5, b.length).slice();
    }

    private static String header(ProducerRecord<byte[], byte[]> r, String name) {
        Header h = r.headers().lastHeader(name);
        return h == null ? null : new String(h.value(), StandardCharsets.UTF_8);
    }

    /** Bytes of key, value and headers: what the producer's size check counts besides its fixed framing. */
    private static long payload(ProducerRecord<byte[], byte[]> r) {
        long n = (r.key() == null ? 0 : r.key().length) + r.value().length;
        for (Header h : r.headers()) {
            n += h.key().length() + h.value().length;
        }
        return n;
    }

    @Test
    @DisplayName("a small record is copied whole with its own headers, the reason and its origin")
    void smallRecordIsCopiedWhole() {
        RejectedCopies copies = new RejectedCopies("rej", RejectedCopies.limit(Map.of()));
        byte[] value = "not json".getBytes(StandardCharsets.UTF_8);
        ProducerRecord<byte[], byte[]> copy = copies.copy(record(null, value), RejectReason.BAD_JSON, "not valid JSON");
        assertThat(copy.topic()).isEqualTo("rej");
        assertThat(copy.value()).isEqualTo(value);
        assertThat(copy.timestamp()).isEqualTo(1_000L);
        assertThat(header(copy, "trace")).isEqualTo("abc");
        assertThat(header(copy, RejectedCopies.REASON_HEADER)).isEqualTo("bad-json");
        assertThat(header(copy, RejectedCopies.SOURCE_TOPIC_HEADER)).isEqualTo("in");
        assertThat(header(copy, RejectedCopies.SOURCE_PARTITION_HEADER)).isEqualTo("2");
        assertThat(header(copy, RejectedCopies.SOURCE_OFFSET_HEADER)).isEqualTo("77");
        assertThat(header(copy, RejectedCopies.TRUNCATED_HEADER)).isNull();
    }

    @Test
    @DisplayName("a record just under 1 MiB is cut to fit the producer's default 1 MiB request limit, and the copy says so")
    void nearLimitRecordIsCut() {
        int limit = RejectedCopies.limit(Map.of());
        assertThat(limit).isLessThan(1 << 20); // Kafka's default max.request.size is 1048576 (producer configuration docs)
        RejectedCopies copies = new RejectedCopies("rej", limit);
        byte[] value = new byte[(1 << 20) - 100];
        Arrays.fill(value, (byte) 'x');
        byte[] key = "k-1".getBytes(StandardCharsets.UTF_8);
        ProducerRecord<byte[], byte[]> copy = copies.copy(record(key, value), RejectReason.TOO_LARGE, "too large");
        assertThat(payload(copy)).isLessThan(limit);
        assertThat(copy.value().length).isGreaterThan(limit - 2_000).isLessThan(value.length);
        assertThat(Arrays.equals(copy.value(), 0, copy.value().length, value, 0, copy.value().length)).isTrue();
        assertThat(copy.key()).isEqualTo(key);
        assertThat(header(copy, "trace")).isNull();
        assertThat(header(copy, RejectedCopies.TRUNCATED_HEADER))
                .isEqualTo("value: first " + copy.value().length + " of " + value.length + " bytes; key: first 3 of 3 bytes; "
                        + "1 original header(s) dropped");
        assertThat(header(copy, RejectedCopies.REASON_HEADER)).isEqualTo("too-large");
    }

    @Test
    @DisplayName("a lower max.request.size in the Kafka properties lowers the limit")
    void configuredRequestSizeLowersTheLimit() {
        assertThat(RejectedCopies.limit(Map.of("max.request.size", "200000"))).isEqualTo(200_000 - 1024);
        assertThat(RejectedCopies.limit(Map.of("max.request.size", "5000000"))).isEqualTo((1 << 20) - 1024);
    }
}
