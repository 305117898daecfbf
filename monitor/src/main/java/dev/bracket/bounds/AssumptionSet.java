package dev.bracket.bounds;

import java.util.Collection;
import java.util.Collections;
import java.util.ArrayList;
import java.util.EnumSet;
import java.util.List;
import java.util.Set;
import java.util.stream.Collectors;

/**
 * A set of assumptions held jointly: their constraints are intersected. Written as
 * comma-separated identifiers, e.g. {@code mtr-positive,mts-positive}; the canonical order is
 * the declaration order of {@link Assumption}. The set also says what is assumed about an
 * instrument when the data carry instrument levels ({@link InstrumentAssumption}, by default
 * mean independence); it is chosen per study, not written in the identifiers.
 */
public final class AssumptionSet {

    private final Set<Assumption> members;
    /** The members in canonical order, for {@link #constrain}: called at every corner of every band's boxes, it should not allocate an iterator. */
    private final Assumption[] ordered;
    private final InstrumentAssumption instrument;
    /** Written into every row of every published document: built once. */
    private final List<String> ids;
    private final String meaning;

    private AssumptionSet(Set<Assumption> members, InstrumentAssumption instrument) {
        this.members = Collections.unmodifiableSet(members);
        this.ordered = members.toArray(new Assumption[0]);
        this.instrument = instrument;
        this.ids = members.stream().map(Assumption::id).toList();
        this.meaning = members.stream().map(Assumption::meaning).collect(Collectors.joining("; and "));
    }

    private AssumptionSet(Set<Assumption> members) {
        this(members, InstrumentAssumption.MEAN_INDEPENDENT);
    }

    public static AssumptionSet of(Assumption first, Assumption... rest) {
        return new AssumptionSet(EnumSet.of(first, rest));
    }

    public static AssumptionSet of(Collection<Assumption> assumptions) {
        if (assumptions.isEmpty()) {
            throw new IllegalArgumentException("an assumption set needs at least one assumption (use worst-case for none)");
        }
        return new AssumptionSet(EnumSet.copyOf(assumptions));
    }

    /** Parses comma-separated identifiers; blank entries are an error. */
    public static AssumptionSet parse(String text) {
        if (text == null || text.isBlank()) {
            throw new IllegalArgumentException("empty assumption set; known assumptions: " + Assumption.knownIds());
        }
        EnumSet<Assumption> set = EnumSet.noneOf(Assumption.class);
        for (String part : text.split(",", -1)) {
            if (part.isBlank()) {
                throw new IllegalArgumentException("empty entry in assumption set '" + text + "'");
            }
            set.add(Assumption.fromId(part));
        }
        return new AssumptionSet(set);
    }

    /** Every single assumption, each as its own set: the default report. */
    public static List<AssumptionSet> eachSingle() {
        return EnumSet.allOf(Assumption.class).stream().map(AssumptionSet::of).collect(Collectors.toList());
    }

    /**
     * A list of sets, each written as {@link #parse} takes it; an empty list means
     * {@link #eachSingle}. A bad entry throws {@link BadEntry}, which says which one.
     */
    public static List<AssumptionSet> parseAll(List<String> texts) {
        if (texts.isEmpty()) {
            return eachSingle();
        }
        List<AssumptionSet> sets = new ArrayList<>(texts.size());
        for (int i = 0; i < texts.size(); i++) {
            try {
                sets.add(parse(texts.get(i)));
            } catch (IllegalArgumentException e) {
                throw new BadEntry(i, e.getMessage());
            }
        }
        return sets;
    }

    /** A list entry that is not an assumption set; {@code index} counts from 0. */
    public static final class BadEntry extends IllegalArgumentException {
        private final int index;

        BadEntry(int index, String message) {
            super(message);
            this.index = index;
        }

        public int index() {
            return index;
        }
    }

    public Set<Assumption> members() {
        return members;
    }

    public boolean contains(Assumption a) {
        return members.contains(a);
    }

    /** What is assumed about an instrument, when the data have instrument levels. */
    public InstrumentAssumption instrument() {
        return instrument;
    }

    /** The same assumptions with the given instrument assumption. */
    public AssumptionSet withInstrument(InstrumentAssumption assumption) {
        if (assumption == null) {
            throw new IllegalArgumentException("instrument assumption is required");
        }
        return new AssumptionSet(EnumSet.copyOf(members), assumption);
    }

    /** The identifiers in canonical order. */
    public List<String> ids() {
        return ids;
    }

    /** The plain-words meaning of the whole set, one clause per assumption. */
    public String meaning() {
        return meaning;
    }

    /** Intersects the constraints of every member, starting from the outcome range (Manski 1990). */
    public UnobservedMeans constrain(OutcomeRange range, double mu1, double mu0) {
        UnobservedMeans box = UnobservedMeans.unrestricted(range);
        // One or two members (most sets) without a loop: the compiler can then keep the boxes in registers.
        if (ordered.length == 1) {
            return ordered[0].constrain(box, mu1, mu0, range.better());
        }
        if (ordered.length == 2) {
            return ordered[1].constrain(ordered[0].constrain(box, mu1, mu0, range.better()), mu1, mu0, range.better());
        }
        for (Assumption a : ordered) {
            box = a.constrain(box, mu1, mu0, range.better());
        }
        return box;
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof AssumptionSet other && members.equals(other.members) && instrument == other.instrument;
    }

    @Override
    public int hashCode() {
        return 31 * members.hashCode() + instrument.hashCode();
    }

    /** Canonical comma-separated identifiers (the instrument assumption is not part of them). */
    @Override
    public String toString() {
        return String.join(",", ids());
    }
}
