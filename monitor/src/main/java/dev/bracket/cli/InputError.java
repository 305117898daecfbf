package dev.bracket.cli;

/**
 * Bad user input: a one-line message that names where the problem is (flag, file and line) and
 * the rule it broke. Commands exit with code 2 on it.
 */
public final class InputError extends RuntimeException {

    public InputError(String message) {
        super(message);
    }

    public InputError(String message, Throwable cause) {
        super(message, cause);
    }
}
