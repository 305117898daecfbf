package dev.bracket.cli;

import java.io.PrintWriter;

/**
 * Redraws a text screen in place on a terminal (cursor home, clear), or, when output goes to a
 * file or pipe, prints each frame under a rule less often, so a log stays readable.
 */
final class TerminalView {

    private static final String HOME_AND_CLEAR = "\u001b[H\u001b[2J";

    private final PrintWriter out;
    private final boolean terminal;

    TerminalView(PrintWriter out, boolean terminal) {
        this.out = out;
        this.terminal = terminal;
    }

    void show(String frame) {
        if (terminal) {
            out.print(HOME_AND_CLEAR);
        } else {
            out.println("----");
        }
        out.print(frame);
        out.flush();
    }

    /** A second between redraws on a terminal; ten seconds between frames in a log. */
    long refreshMillis() {
        return terminal ? 1_000 : 10_000;
    }
}
