package dev.bracket.stream.publish;

import java.util.Set;

/**
 * Told when this instance starts or stops being the one that updates and alerts on some studies
 * (it gained or lost their partials partition in the updater group). Called on the updater's
 * thread; {@link #taken} runs before any report of those studies is published.
 */
public interface StudyOwnership {

    /** This instance now owns {@code studies}: their merged state is complete. */
    void taken(Set<String> studies);

    /** Another instance owns {@code studies} from now on (or will, once the group has rebalanced). */
    void released(Set<String> studies);

    StudyOwnership NONE = new StudyOwnership() {
        @Override
        public void taken(Set<String> studies) {
        }

        @Override
        public void released(Set<String> studies) {
        }
    };
}
