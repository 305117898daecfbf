package dev.bracket.lines;

import java.io.ByteArrayOutputStream;
import java.io.Closeable;
import java.io.IOException;
import java.io.InputStream;

/**
 * Splits a stream of JSON lines into records, byte for byte, the one way both {@code replay}
 * and {@code demo-producer --from-file} read files, so the same file gives the same records.
 *
 * <p>A line ends at {@code \n}, {@code \r\n} or a lone {@code \r}; the last line needs no end.
 * A line holding nothing but spaces and tabs (the JSON whitespace left once line ends are taken
 * out) is blank: it is counted in the line numbers but is not a record. Any other line is a
 * record, including one holding only a form feed or vertical tab, which are not JSON whitespace:
 * it goes on to be rejected with a reason rather than vanish.
 */
public final class JsonLines implements Closeable {

    /** One record: its 1-based line number in the input and its bytes without the line end. */
    public record Line(long number, byte[] bytes) {
    }

    private final InputStream in;
    private final byte[] buffer = new byte[1 << 16];
    private final ByteArrayOutputStream line = new ByteArrayOutputStream();
    private int position;
    private int limit;
    private boolean afterCarriageReturn;
    private long number;

    public JsonLines(InputStream in) {
        this.in = in;
    }

    /** The next line that is not blank, or null at the end of the input. */
    public Line next() throws IOException {
        byte[] bytes;
        while ((bytes = nextLine()) != null) {
            number++;
            if (!isBlank(bytes)) {
                return new Line(number, bytes);
            }
        }
        return null;
    }

    private byte[] nextLine() throws IOException {
        line.reset();
        while (true) {
            if (position == limit) {
                int n = in.read(buffer);
                if (n < 0) {
                    return line.size() > 0 ? line.toByteArray() : null;
                }
                position = 0;
                limit = n;
            }
            int start = position;
            if (afterCarriageReturn && start < limit) {
                afterCarriageReturn = false;
                if (buffer[start] == '\n') {
                    // the second half of a \r\n, whose line was already returned
                    start = ++position;
                }
            }
            for (; position < limit; position++) {
                byte b = buffer[position];
                if (b == '\n' || b == '\r') {
                    line.write(buffer, start, position - start);
                    afterCarriageReturn = b == '\r';
                    position++;
                    return line.toByteArray();
                }
            }
            line.write(buffer, start, limit - start);
        }
    }

    private static boolean isBlank(byte[] bytes) {
        for (byte b : bytes) {
            if (b != ' ' && b != '\t') {
                return false;
            }
        }
        return true;
    }

    @Override
    public void close() throws IOException {
        in.close();
    }
}
