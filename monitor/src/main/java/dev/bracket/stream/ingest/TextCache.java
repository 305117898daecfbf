package dev.bracket.stream.ingest;

import java.nio.charset.StandardCharsets;

/**
 * Turns the parser's characters into Strings, reusing the String last made for the same
 * characters in a small direct-mapped table. Study, stratum and instrument values repeat across
 * events, so most lookups allocate nothing, and the reused Strings keep their cached hash codes
 * for the pane maps. One cache per parser (not thread-safe).
 */
final class TextCache {

    private static final int SLOTS = 1024;
    private static final int MAX_LENGTH = 64;

    private final String[] table = new String[SLOTS];

    String get(char[] c, int off, int len) {
        if (len > MAX_LENGTH) {
            return new String(c, off, len);
        }
        int h = 0;
        for (int i = 0; i < len; i++) {
            h = 31 * h + c[off + i];
        }
        int slot = (h ^ (h >>> 16)) & (SLOTS - 1);
        String s = table[slot];
        if (s != null && s.length() == len && matches(s, c, off, len)) {
            return s;
        }
        s = new String(c, off, len);
        table[slot] = s;
        return s;
    }

    /** The same for ASCII bytes (each byte one character). */
    String get(byte[] b, int off, int len) {
        if (len > MAX_LENGTH) {
            return new String(b, off, len, StandardCharsets.ISO_8859_1);
        }
        int h = 0;
        for (int i = 0; i < len; i++) {
            h = 31 * h + b[off + i];
        }
        int slot = (h ^ (h >>> 16)) & (SLOTS - 1);
        String s = table[slot];
        if (s != null && s.length() == len && matches(s, b, off, len)) {
            return s;
        }
        s = new String(b, off, len, StandardCharsets.ISO_8859_1);
        table[slot] = s;
        return s;
    }

    private static boolean matches(String s, byte[] b, int off, int len) {
        for (int i = 0; i < len; i++) {
            if (s.charAt(i) != b[off + i]) {
                return false;
            }
        }
        return true;
    }

    private static boolean matches(String s, char[] c, int off, int len) {
        for (int i = 0; i < len; i++) {
            if (s.charAt(i) != c[off + i]) {
                return false;
            }
        }
        return true;
    }
}
