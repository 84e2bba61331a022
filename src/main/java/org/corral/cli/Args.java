package org.corral.cli;

import java.nio.file.Path;
import java.util.HashMap;
import java.util.HashSet;
import java.util.Map;
import java.util.Set;

import org.corral.CorralException;

/** {@code --key value} and {@code --flag} options of one command-line job. */
final class Args {
	private final Map<String, String> values = new HashMap<>();
	private final Set<String> used = new HashSet<>();
	private final String job;

	Args(String job, String[] argv, int from, Set<String> flags) {
		this.job = job;
		for (int i = from; i < argv.length; i++) {
			String a = argv[i];
			if (!a.startsWith("--")) throw new CorralException(job + ": unexpected argument '" + a + "' (options start with --)");
			String k = a.substring(2);
			if (flags.contains(k)) values.put(k, "true");
			else {
				if (i + 1 >= argv.length) throw new CorralException(job + ": option --" + k + " needs a value");
				values.put(k, argv[++i]);
			}
		}
	}

	String job() {
		return job;
	}

	boolean has(String k) {
		used.add(k);
		return values.containsKey(k);
	}

	String str(String k, String def) {
		used.add(k);
		return values.getOrDefault(k, def);
	}

	Path path(String k, boolean required) {
		used.add(k);
		String v = values.get(k);
		if (v == null) {
			if (required) throw new CorralException(job + ": --" + k + " is required (see " + job + " --help)");
			return null;
		}
		return Path.of(v);
	}

	/** A whole number in [min, max]; the error names the option and the expected form. */
	int integer(String k, int def, int min, int max) {
		return (int) whole(k, def, min, max);
	}

	long whole(String k, long def, long min, long max) {
		used.add(k);
		String v = values.get(k);
		if (v == null) return def;
		long n;
		try {
			n = Long.parseLong(v.trim());
		} catch (NumberFormatException e) {
			throw new CorralException(job + ": --" + k + " must be a whole number" + range(min, max) + ", got '" + v + "'");
		}
		if (n < min || n > max) throw new CorralException(job + ": --" + k + " must be a whole number" + range(min, max) + ", got " + n);
		return n;
	}

	/** A number in [min, max]; the error names the option and the expected form. */
	double number(String k, double def, double min, double max) {
		used.add(k);
		String v = values.get(k);
		if (v == null) return def;
		double d;
		try {
			d = Double.parseDouble(v.trim());
		} catch (NumberFormatException e) {
			d = Double.NaN;
		}
		if (!Double.isFinite(d) || d < min || d > max) throw new CorralException(job + ": --" + k + " must be a number" + range(min, max) + ", got '" + v + "'");
		return d;
	}

	/** A comma-separated list of whole numbers in [min, max], e.g. {@code 0,2,4}. */
	int[] integers(String k, int min, int max) {
		used.add(k);
		String v = values.get(k);
		if (v == null) return null;
		String[] parts = v.split(",", -1);
		int[] out = new int[parts.length];
		for (int i = 0; i < parts.length; i++) {
			try {
				out[i] = Integer.parseInt(parts[i].trim());
			} catch (NumberFormatException e) {
				throw new CorralException(job + ": --" + k + " must be a comma-separated list of whole numbers" + range(min, max) + " (e.g. 0,2,4), got '" + v + "'");
			}
			if (out[i] < min || out[i] > max)
				throw new CorralException(job + ": --" + k + " must be a comma-separated list of whole numbers" + range(min, max) + ", got " + out[i]);
		}
		return out;
	}

	private static String range(double min, double max) {
		boolean lo = min > -1e15, hi = max < 1e15;
		if (lo && hi) return " from " + fmt(min) + " to " + fmt(max);
		if (lo) return " >= " + fmt(min);
		return hi ? " <= " + fmt(max) : "";
	}

	private static String fmt(double d) {
		return d == Math.rint(d) ? String.valueOf((long) d) : String.valueOf(d);
	}

		/** Refuses options nobody asked for, so a typo is not silently ignored. */
	void checkAllUsed() {
		for (String k : values.keySet())
			if (!used.contains(k)) throw new CorralException(job + ": unknown option --" + k + " (see " + job + " --help)");
	}
}
