package dev.bracket.config;

/** A topic the monitor consumes events from, with the field names its events use. */
public record InputTopic(String topic, FieldMapping fields) {
}
