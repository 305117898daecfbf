package dev.bracket.cli;

import com.fasterxml.jackson.databind.MappingIterator;
import com.fasterxml.jackson.dataformat.csv.CsvMapper;
import com.fasterxml.jackson.dataformat.csv.CsvParser;
import com.fasterxml.jackson.dataformat.csv.CsvSchema;
import dev.bracket.bounds.ArmStatistics;
import dev.bracket.bounds.ObservedArms;
import dev.bracket.bounds.OutcomeRange;
import dev.bracket.bounds.StudyCells;

import java.io.IOException;
import java.io.Reader;
import java.util.Locale;
import java.util.Map;
import java.util.Set;

/**
 * Reads summary statistics per cell from CSV with a header row. Columns: {@code arm}
 * ({@code treated}/{@code control}, or 1/0), {@code n}, {@code mean}, optional {@code sd},
 * optional {@code pending} (units of the arm whose outcome has not arrived; empty means 0),
 * optional {@code stratum}, optional {@code instrument}. Rows naming the same cell are merged.
 */
final class CellsCsv {

    private static final Set<String> KNOWN = Set.of("stratum", "instrument", "arm", "n", "mean", "sd", "pending");

    private CellsCsv() {
    }

    static CalcInput.Cells read(Reader in, String source, OutcomeRange range) throws IOException {
        CsvMapper mapper = new CsvMapper();
        mapper.enable(CsvParser.Feature.TRIM_SPACES);
        mapper.enable(CsvParser.Feature.SKIP_EMPTY_LINES);
        CsvSchema schema = CsvSchema.emptySchema().withHeader();
        StudyCells cells = StudyCells.empty();
        boolean everySdGiven = true;
        try (MappingIterator<Map<String, String>> rows = mapper.readerForMapOf(String.class).with(schema).readValues(in)) {
            boolean checkedHeader = false;
            while (rows.hasNext()) {
                // Where the row starts: hasNext() has just reached it. After next() the parser is
                // past the line end (and past any blank lines that follow).
                long line = rows.getParser().currentLocation().getLineNr();
                Map<String, String> row = rows.next();
                String where = source + ", line " + line;
                if (!checkedHeader) {
                    checkHeader(row.keySet(), source);
                    checkedHeader = true;
                }
                boolean treated = arm(row.get("arm"), where);
                long n = count(row.get("n"), "n", where);
                String pendingText = row.getOrDefault("pending", "");
                long pending = pendingText == null || pendingText.isEmpty() ? 0 : count(pendingText, "pending", where);
                double mean = number(row.get("mean"), "mean", where);
                String sdText = row.getOrDefault("sd", "");
                boolean sdGiven = sdText != null && !sdText.isEmpty();
                Double sd = CalcInput.knownSd(sdGiven ? number(sdText, "sd", where) : null, n, mean, range);
                everySdGiven &= sd != null || n < 2;
                ArmStatistics stats = CalcInput.arm(n, pending, mean, sd == null ? 0.0 : sd, range, where + ": ");
                ObservedArms arms = treated
                        ? new ObservedArms(stats, ArmStatistics.empty())
                        : new ObservedArms(ArmStatistics.empty(), stats);
                cells = cells.with(orNone(row.get("stratum")), orNone(row.get("instrument")), arms);
            }
            if (!checkedHeader) {
                throw new InputError(source + ": no data rows; expected a header 'arm,n,mean[,sd][,pending][,stratum][,instrument]' and one row per cell");
            }
        } catch (RuntimeException e) {
            if (e instanceof InputError) {
                throw e;
            }
            throw new InputError(source + ": not readable as CSV (" + e.getMessage().lines().findFirst().orElse("") + ")", e);
        }
        return new CalcInput.Cells(cells, everySdGiven);
    }

    private static void checkHeader(Set<String> header, String source) {
        for (String column : header) {
            if (!KNOWN.contains(column)) {
                throw new InputError(source + ": unknown column '" + column + "'; columns are arm, n, mean, sd, pending, stratum, instrument");
            }
        }
        for (String required : new String[] {"arm", "n", "mean"}) {
            if (!header.contains(required)) {
                throw new InputError(source + ": missing column '" + required + "'; required columns are arm, n, mean");
            }
        }
    }

    private static boolean arm(String text, String where) {
        String t = text == null ? "" : text.toLowerCase(Locale.ROOT);
        return switch (t) {
            case "treated", "1", "true" -> true;
            case "control", "0", "false" -> false;
            default -> throw new InputError(where + ": arm must be 'treated' or 'control' (or 1/0), was '" + text + "'");
        };
    }

    private static long count(String text, String column, String where) {
        try {
            long n = Long.parseLong(text == null ? "" : text);
            if (n < 0) {
                throw new InputError(where + ": " + column + " must be >= 0, was " + n);
            }
            return n;
        } catch (NumberFormatException e) {
            throw new InputError(where + ": " + column + " must be a whole number, was '" + text + "'");
        }
    }

    private static double number(String text, String column, String where) {
        try {
            double v = Double.parseDouble(text == null ? "" : text);
            if (!Double.isFinite(v)) {
                throw new NumberFormatException();
            }
            return v;
        } catch (NumberFormatException e) {
            throw new InputError(where + ": " + column + " must be a finite number, was '" + text + "'");
        }
    }

    private static String orNone(String s) {
        return s == null ? StudyCells.NONE : s;
    }
}
