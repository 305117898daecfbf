package dev.bracket;

import com.tngtech.archunit.core.domain.Dependency;
import com.tngtech.archunit.core.domain.JavaClass;
import com.tngtech.archunit.core.domain.JavaClasses;
import com.tngtech.archunit.core.importer.ClassFileImporter;
import com.tngtech.archunit.lang.ArchRule;
import dev.bracket.cli.BracketCommand;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;

import java.io.IOException;
import java.net.URISyntaxException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.classes;
import static com.tngtech.archunit.lang.syntax.ArchRuleDefinition.noClasses;
import static org.assertj.core.api.Assertions.assertThat;

/**
 * The package table in DEVELOPERS.md is the rule: each package of the monitor may depend on the
 * project packages and libraries its "may import" column names, and on nothing else. The table
 * must also not allow what no class uses, so it cannot drift in either direction. The compiled
 * classes are read with ArchUnit, so fully qualified names in code count as imports too.
 */
class LayeringTest {

    private static final String BASE = "dev.bracket.";
    private static final String MAY_USE_ANYTHING = "everything";

    /** Library names allowed in the table's "may import" column and the Java packages each one means. */
    private static final Map<String, List<String>> LIBRARIES = Map.of(
            "Commons Math", List.of("org.apache.commons.math3."),
            "Jackson", List.of("com.fasterxml.jackson."),
            "Kafka clients", List.of("org.apache.kafka.clients.", "org.apache.kafka.common."),
            "Kafka server", List.of("kafka.", "org.apache.kafka."),
            "Micrometer", List.of("io.micrometer."),
            "SLF4J", List.of("org.slf4j."),
            "Javalin", List.of("io.javalin."),
            "picocli", List.of("picocli."));

    private static JavaClasses monitor;
    private static Map<String, Row> table;

    private record Row(String pkg, Set<String> packages, Set<String> libraries, boolean anything) {
    }

    @BeforeAll
    static void readClassesAndTable() throws IOException, URISyntaxException {
        Path classesDir = Path.of(BracketCommand.class.getProtectionDomain().getCodeSource().getLocation().toURI());
        monitor = new ClassFileImporter().importPath(classesDir);
        table = packageTable(Files.readString(developersGuide(), StandardCharsets.UTF_8));
    }

    @Test
    void statisticsCoreImportsNoKafkaHttpJsonOrIo() {
        ArchRule core = classes().that().resideInAnyPackage("dev.bracket.bounds..", "dev.bracket.bands..")
                .should().onlyDependOnClassesThat().resideInAnyPackage(
                        "java.lang..", "java.util..", "java.math..",
                        "dev.bracket.bounds..", "dev.bracket.bands..", "org.apache.commons.math3..");
        core.check(monitor);
        ArchRule notOutward = noClasses().that().resideInAnyPackage("dev.bracket.bounds..")
                .should().dependOnClassesThat().resideInAnyPackage("dev.bracket.bands..");
        notOutward.check(monitor);
    }

    @Test
    void everyPackageIsInTheTable() {
        Set<String> unlisted = new TreeSet<>();
        for (JavaClass c : monitor) {
            if (rowOf(table, c.getPackageName()) == null) {
                unlisted.add(c.getPackageName());
            }
        }
        assertThat(unlisted).as("packages missing from the table in DEVELOPERS.md").isEmpty();
    }

    @Test
    void packagesImportOnlyWhatTheTableAllows() {
        assertThat(violations(table)).as("dependencies the table in DEVELOPERS.md does not allow "
                + "(change the code, or the table if the new dependency is meant)").isEmpty();
    }

    @Test
    void aRowWithoutAnAllowanceTheCodeNeedsIsReported() {
        Map<String, Row> tooStrict = packageTable("| `bands` | confidence bands | `bounds` |\n");
        assertThat(violations(tooStrict)).isNotEmpty()
                .allMatch(v -> v.startsWith("`bands` may not import org.apache.commons.math3."));
    }

    private static List<String> violations(Map<String, Row> rows) {
        List<String> violations = new ArrayList<>();
        for (JavaClass c : monitor) {
            Row row = rowOf(rows, c.getPackageName());
            if (row == null || row.anything()) {
                continue;
            }
            for (Dependency d : c.getDirectDependenciesFromSelf()) {
                String target = d.getTargetClass().getBaseComponentType().getName();
                if (!allowed(rows, row, target)) {
                    violations.add("`" + row.pkg() + "` may not import " + target + ": " + d.getDescription());
                }
            }
        }
        return violations;
    }

    @Test
    void tableAllowsNothingUnused() {
        Map<String, Set<String>> used = new TreeMap<>();
        for (JavaClass c : monitor) {
            Row row = rowOf(table, c.getPackageName());
            if (row == null || row.anything()) {
                continue;
            }
            Set<String> uses = used.computeIfAbsent(row.pkg(), k -> new TreeSet<>());
            for (Dependency d : c.getDirectDependenciesFromSelf()) {
                String target = d.getTargetClass().getBaseComponentType().getName();
                row.packages().stream().filter(p -> inPackage(target, BASE + p)).forEach(p -> uses.add("`" + p + "`"));
                row.libraries().stream().filter(l -> LIBRARIES.get(l).stream().anyMatch(target::startsWith)).forEach(uses::add);
            }
        }
        List<String> unused = new ArrayList<>();
        for (Row row : table.values()) {
            if (row.anything()) {
                continue;
            }
            Set<String> uses = used.getOrDefault(row.pkg(), Set.of());
            row.packages().stream().map(p -> "`" + p + "`").filter(p -> !uses.contains(p))
                    .forEach(p -> unused.add("`" + row.pkg() + "` may import " + p + " but does not"));
            row.libraries().stream().filter(l -> !uses.contains(l))
                    .forEach(l -> unused.add("`" + row.pkg() + "` may import " + l + " but does not"));
        }
        assertThat(unused).as("allowances in DEVELOPERS.md that no class uses (remove them from the table)").isEmpty();
    }

    private static boolean allowed(Map<String, Row> rows, Row row, String target) {
        if (!target.contains(".") || target.startsWith("java.") || target.startsWith("javax.")) {
            return true;
        }
        if (row.packages().stream().anyMatch(p -> inPackage(target, BASE + p))) {
            return true;
        }
        if (!target.startsWith(BASE) && row.libraries().stream().anyMatch(l -> LIBRARIES.get(l).stream().anyMatch(target::startsWith))) {
            return true;
        }
        return target.startsWith(BASE) && rowOf(rows, packageOf(target)) == row;
    }

    private static boolean inPackage(String className, String pkg) {
        return className.startsWith(pkg + ".");
    }

    private static String packageOf(String className) {
        return className.substring(0, className.lastIndexOf('.'));
    }

    /** The row of the most specific listed package that holds {@code javaPackage}. */
    private static Row rowOf(Map<String, Row> rows, String javaPackage) {
        return rows.values().stream()
                .filter(r -> javaPackage.equals(BASE + r.pkg()) || javaPackage.startsWith(BASE + r.pkg() + "."))
                .max(Comparator.comparingInt(r -> r.pkg().length()))
                .orElse(null);
    }

    private static Path developersGuide() {
        Path dir = Path.of("").toAbsolutePath();
        while (dir != null && !Files.exists(dir.resolve("DEVELOPERS.md"))) {
            dir = dir.getParent();
        }
        assertThat(dir).as("DEVELOPERS.md in the working directory or above").isNotNull();
        return dir.resolve("DEVELOPERS.md");
    }

    /** Rows {@code | `pkg` | what it holds | may import |}; the last column lists `packages` and library names. */
    static Map<String, Row> packageTable(String markdown) {
        Pattern rowPattern = Pattern.compile("(?m)^\\|\\s*`([a-z.]+)`\\s*\\|[^|]*\\|([^|]*)\\|\\s*$");
        Pattern ticked = Pattern.compile("`([a-z.]+)`");
        Map<String, Row> rows = new LinkedHashMap<>();
        Matcher m = rowPattern.matcher(markdown);
        while (m.find()) {
            String pkg = m.group(1);
            Set<String> packages = new TreeSet<>();
            Set<String> libraries = new TreeSet<>();
            boolean anything = false;
            for (String item : m.group(2).split(",")) {
                String entry = item.strip();
                Matcher t = ticked.matcher(entry);
                if (t.matches()) {
                    packages.add(t.group(1));
                } else if (entry.equals(MAY_USE_ANYTHING)) {
                    anything = true;
                } else if (LIBRARIES.containsKey(entry)) {
                    libraries.add(entry);
                } else if (!entry.equals("JDK")) {
                    throw new AssertionError("DEVELOPERS.md, package `" + pkg + "`: unknown entry '" + entry
                            + "' in the may-import column; use `package`, JDK, " + MAY_USE_ANYTHING + " or one of "
                            + new TreeSet<>(LIBRARIES.keySet()));
                }
            }
            if (rows.put(pkg, new Row(pkg, packages, libraries, anything)) != null) {
                throw new AssertionError("DEVELOPERS.md lists package `" + pkg + "` twice");
            }
        }
        assertThat(rows).as("package table rows in DEVELOPERS.md").isNotEmpty();
        return rows;
    }
}
