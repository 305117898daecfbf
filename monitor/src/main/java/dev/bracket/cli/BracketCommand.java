package dev.bracket.cli;

import dev.bracket.report.Cautions;
import dev.bracket.broker.BrokerStartException;
import dev.bracket.demo.DemoProducerCommand;
import picocli.CommandLine;
import picocli.CommandLine.Command;

import java.io.PrintWriter;
import java.util.concurrent.Callable;

/** The {@code bracket} launcher: subcommands for calculation, monitoring, replay and the demo. */
@Command(name = "bracket",
        mixinStandardHelpOptions = true,
        versionProvider = BracketCommand.Version.class,
        description = {
                "Honest intervals for the average treatment effect when treatment was not randomised.",
                Cautions.TEXT},
        subcommands = {CalcCommand.class, MonitorCommand.class, ReplayCommand.class, DemoCommand.class,
                DemoProducerCommand.class, CommandLine.HelpCommand.class})
public final class BracketCommand implements Callable<Integer> {

    @CommandLine.Spec
    CommandLine.Model.CommandSpec spec;

    /** Without a command there is nothing to do: say so, show the commands, exit as for bad arguments. */
    @Override
    public Integer call() {
        PrintWriter err = spec.commandLine().getErr();
        err.println("bracket: a command is required, e.g. 'bracket demo'; 'bracket COMMAND --help' tells more");
        spec.commandLine().usage(err);
        return CommandLine.ExitCode.USAGE;
    }

    /**
     * Runs a command and exits with its code. An error that escapes a command (a class missing
     * from the jar, say) ends the process with one line and code 1 instead of leaving it running
     * on whatever threads were already started.
     */
    public static void main(String[] args) {
        int code;
        try {
            code = newCommandLine().execute(args);
        } catch (Throwable e) {
            System.err.println("bracket: failed: " + e);
            code = CommandLine.ExitCode.SOFTWARE;
        }
        System.exit(code);
    }

    /** The configured command line, shared by {@link #main} and tests. */
    public static CommandLine newCommandLine() {
        CommandLine cl = new CommandLine(new BracketCommand());
        cl.setUsageHelpWidth(110);
        cl.setParameterExceptionHandler(BracketCommand::onBadParameters);
        cl.setExecutionExceptionHandler(BracketCommand::onFailure);
        return cl;
    }

    /** Picocli's own parse errors (unknown flag, not a number): one line, ending with a pointer to help. */
    private static int onBadParameters(CommandLine.ParameterException e, String[] args) {
        PrintWriter err = e.getCommandLine().getErr();
        err.println(e.getCommandLine().getCommandName() + ": " + e.getMessage()
                + "; try '" + e.getCommandLine().getCommandSpec().qualifiedName() + " --help'");
        return CommandLine.ExitCode.USAGE;
    }

    private static int onFailure(Exception e, CommandLine cl, CommandLine.ParseResult parsed) {
        PrintWriter err = cl.getErr();
        if (e instanceof InputError) {
            err.println(cl.getCommandName() + ": " + e.getMessage());
            return CommandLine.ExitCode.USAGE;
        }
        if (e instanceof BrokerStartException) {
            err.println(cl.getCommandName() + ": " + e.getMessage());
            return CommandLine.ExitCode.SOFTWARE;
        }
        err.println(cl.getCommandName() + ": failed: " + e);
        return CommandLine.ExitCode.SOFTWARE;
    }

    /** Version from the jar manifest ({@code Implementation-Version}, the pom's version) when packaged. */
    static final class Version implements CommandLine.IVersionProvider {
        @Override
        public String[] getVersion() {
            String v = BracketCommand.class.getPackage().getImplementationVersion();
            return new String[] {"bracket " + (v == null ? "(development build)" : v)};
        }
    }
}
