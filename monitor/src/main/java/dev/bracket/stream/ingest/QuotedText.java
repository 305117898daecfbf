package dev.bracket.stream.ingest;

import java.lang.invoke.MethodHandles;
import java.lang.invoke.VarHandle;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;

/**
 * A known text (a field name, a study id) as it appears inside a JSON string: its bytes and the
 * closing quote. {@link FlatEventScanner} compares it at a position eight bytes at a time, so
 * recognising a field or a study costs a compare or two instead of finding the string's end
 * and looking the text up. Only plain text (printable ASCII without quote or backslash) is
 * ever matched: there one byte is one character and the bytes are the only way to write it
 * without escapes.
 */
final class QuotedText {

    static final VarHandle LONGS = MethodHandles.byteArrayViewVarHandle(long[].class, ByteOrder.LITTLE_ENDIAN);

    private final String text;
    /** The text and its closing quote. */
    private final byte[] bytes;
    /** The same in little-endian words, the last one padded with zeros. */
    private final long[] words;
    /** Which bytes of the last word belong to the text. */
    private final long lastMask;
    /** Which bytes of the first word belong to the text. */
    private final long firstMask;
    private final boolean plain;

    QuotedText(String text) {
        this.text = text;
        byte[] raw = text.getBytes(StandardCharsets.UTF_8);
        boolean ok = true;
        for (byte c : raw) {
            ok &= c >= 0x20 && c < 0x7f && c != '"' && c != '\\';
        }
        plain = ok;
        bytes = new byte[raw.length + 1];
        System.arraycopy(raw, 0, bytes, 0, raw.length);
        bytes[raw.length] = '"';
        words = new long[(bytes.length + 7) / 8];
        for (int k = 0; k < bytes.length; k++) {
            words[k / 8] |= (bytes[k] & 0xFFL) << (8 * (k % 8));
        }
        int rest = bytes.length % 8;
        lastMask = rest == 0 ? -1L : (1L << (8 * rest)) - 1;
        firstMask = words.length == 1 ? lastMask : -1L;
    }

    String text() {
        return text;
    }

    /** The text's length in bytes, without the quote. */
    int length() {
        return bytes.length - 1;
    }

    /**
     * Whether {@code b} holds this text and then a quote from {@code at} on, before {@code end};
     * false for a text that is not plain.
     */
    boolean at(byte[] b, int at, int end) {
        if (!plain) {
            return false;
        }
        if (at + 8 * words.length <= end) {
            // Most mismatches show in the first word.
            if ((((long) LONGS.get(b, at) ^ words[0]) & firstMask) != 0) {
                return false;
            }
            int last = words.length - 1;
            for (int k = 1; k < last; k++) {
                if ((long) LONGS.get(b, at + 8 * k) != words[k]) {
                    return false;
                }
            }
            return last == 0 || (((long) LONGS.get(b, at + 8 * last) ^ words[last]) & lastMask) == 0;
        }
        if (at + bytes.length > end) {
            return false;
        }
        for (int k = 0; k < bytes.length; k++) {
            if (b[at + k] != bytes[k]) {
                return false;
            }
        }
        return true;
    }
}
