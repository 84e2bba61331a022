package org.corral.workflow;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.Function;

/**
 * A table of records, defined once as named columns and rendered to CSV here or to an ImageJ
 * {@code ResultsTable} in the Fiji layer, so that both always carry the same columns. A cell is an
 * integer (written as is), a double (4 decimals) or text (quoted by RFC 4180 when needed).
 */
public final class Table<R> {
	/** A column: its heading and the cell of a record. */
	public record Column<R>(String name, Function<R, Object> cell) {}

	private final List<Column<R>> columns = new ArrayList<>();

	/** Adds a column (DJL-style builder; the order of calls is the order of the columns). */
	public Table<R> with(String name, Function<R, Object> cell) {
		columns.add(new Column<>(name, cell));
		return this;
	}

	public List<Column<R>> columns() {
		return List.copyOf(columns);
	}

	public List<String> header() {
		return columns.stream().map(Column::name).toList();
	}

	/** The rows as CSV text, a header line first. */
	public String csv(List<R> rows) {
		StringBuilder sb = new StringBuilder(String.join(",", header())).append('\n');
		for (R r : rows) {
			for (int c = 0; c < columns.size(); c++) {
				if (c > 0) sb.append(',');
				sb.append(cell(columns.get(c).cell().apply(r)));
			}
			sb.append('\n');
		}
		return sb.toString();
	}

	static String cell(Object v) {
		if (v == null) return "";
		if (v instanceof Double d) return String.format(Locale.ROOT, "%.4f", d);
		if (v instanceof Float f) return String.format(Locale.ROOT, "%.4f", f);
		if (v instanceof Number n) return String.valueOf(n.longValue());
		if (v instanceof Boolean b) return b ? "1" : "0";
		return text(v.toString());
	}

	/** A text cell for CSV (RFC 4180): quoted when it holds a comma, quote or line break. */
	public static String text(String s) {
		if (s == null) return "";
		if (s.indexOf(',') < 0 && s.indexOf('"') < 0 && s.indexOf('\n') < 0) return s;
		return '"' + s.replace("\"", "\"\"") + '"';
	}
}
