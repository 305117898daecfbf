package dev.bracket.broker;

/** The embedded broker could not start; the message says why and what to change. */
public final class BrokerStartException extends RuntimeException {

    /** @param detail what follows "cannot start the embedded Kafka broker", e.g. " in DIR: reason" */
    BrokerStartException(String detail, Throwable cause) {
        super("cannot start the embedded Kafka broker" + detail, cause);
    }
}
