package dev.bracket.cli;

import org.junit.jupiter.api.DisplayName;
import org.junit.jupiter.api.Test;
import picocli.CommandLine;

import static org.assertj.core.api.Assertions.assertThat;

/** The launcher itself: what a new user sees before choosing a command. */
class BracketCommandTest {

    @Test
    @DisplayName("'bracket' alone says a command is required, shows the commands and exits 2")
    void noCommandIsAUsageError() {
        CalcCommandTest.Run r = CalcCommandTest.run();
        assertThat(r.exitCode()).isEqualTo(2);
        assertThat(r.err()).startsWith("bracket: a command is required").contains("Commands:", "monitor", "demo");
        assertThat(r.out()).isEmpty();
    }

    @Test
    @DisplayName("-V prints a version line")
    void versionIsPrinted() {
        CalcCommandTest.Run r = CalcCommandTest.run("-V");
        assertThat(r.exitCode()).isZero();
        assertThat(r.out()).matches("bracket \\S.*\\R");
    }

    @Test
    @DisplayName("the command list shows each command's first description line, a whole sentence")
    void commandSummariesAreSentences() {
        CommandLine cl = BracketCommand.newCommandLine();
        cl.getSubcommands().forEach((name, sub) -> {
            String[] description = sub.getCommandSpec().usageMessage().description();
            assertThat(description).as(name).isNotEmpty();
            assertThat(description[0]).as(name + ": first description line").endsWith(".");
        });
    }
}
