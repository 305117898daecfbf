package dev.bracket.lines;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;

import java.io.ByteArrayInputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;

import static org.assertj.core.api.Assertions.assertThat;

/**
 * Line ends and blank lines. Sources: the JSON Lines convention (jsonlines.org: one value per
 * line, {@code \n} ends a line, {@code \r\n} is accepted too since JSON ignores the {@code \r});
 * RFC 8259 section 2: JSON whitespace is space, tab, line feed and carriage return only, so a form
 * feed or vertical tab is not whitespace. A lone {@code \r} ending a line follows
 * {@code java.io.BufferedReader#readLine}'s documented rule.
 */
class JsonLinesTest {

    /** Every kind of line end and blank line, and a last line without an end. */
    static final String MIXED = "{\"a\":1}\r\n"   // 1: CRLF
            + "{\"a\":2}\r"                      // 2: lone CR
            + "{\"a\":3}\n"                      // 3: LF
            + "\n"                               // 4: empty
            + " \t \r\n"                         // 5: spaces and a tab: blank
            + "\f\n"                             // 6: form feed: not JSON whitespace, a record
            + "\u000B\n"                         // 7: vertical tab: likewise
            + "{\"a\":\"\u00e9\"}\n"             // 8: non-ASCII in UTF-8
            + "\r\n"                             // 9: empty, CRLF
            + "{\"a\":9}";                       // 10: no line end

    private static List<String> read(InputStream in) throws IOException {
        List<String> out = new ArrayList<>();
        try (JsonLines lines = new JsonLines(in)) {
            for (JsonLines.Line l = lines.next(); l != null; l = lines.next()) {
                out.add(l.number() + ":" + new String(l.bytes(), StandardCharsets.UTF_8));
            }
        }
        return out;
    }

    private static final List<String> EXPECTED = List.of(
            "1:{\"a\":1}", "2:{\"a\":2}", "3:{\"a\":3}", "6:\f", "7:\u000B", "8:{\"a\":\"\u00e9\"}", "10:{\"a\":9}");

    @Test
    @DisplayName("CRLF, lone CR and LF end lines; blank lines count in the numbering but are no records; form feed and vertical tab lines are records")
    void mixedLineEnds() throws IOException {
        assertThat(read(new ByteArrayInputStream(MIXED.getBytes(StandardCharsets.UTF_8)))).isEqualTo(EXPECTED);
    }

    @Test
    @DisplayName("the same records when the input arrives one byte at a time (a CRLF split between two reads)")
    void byteAtATime() throws IOException {
        InputStream trickle = new ByteArrayInputStream(MIXED.getBytes(StandardCharsets.UTF_8)) {
            @Override
            public synchronized int read(byte[] b, int off, int len) {
                return super.read(b, off, Math.min(len, 1));
            }
        };
        assertThat(read(trickle)).isEqualTo(EXPECTED);
    }

    @Test
    @DisplayName("a line longer than the read buffer stays whole; a file ending in CR or CRLF has no empty record at the end")
    void longLinesAndEnds() throws IOException {
        String longLine = "x".repeat(200_000);
        assertThat(read(new ByteArrayInputStream((longLine + "\r\n").getBytes(StandardCharsets.US_ASCII))))
                .containsExactly("1:" + longLine);
        assertThat(read(new ByteArrayInputStream("a\r".getBytes(StandardCharsets.US_ASCII)))).containsExactly("1:a");
        assertThat(read(new ByteArrayInputStream(new byte[0]))).isEmpty();
    }
}
