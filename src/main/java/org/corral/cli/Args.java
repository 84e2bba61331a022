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

	int integer(String k, int def) {
		used.add(k);
		String v = values.get(k);
		if (v == null) return def;
		try {
			return Integer.parseInt(v.trim());
		} catch (NumberFormatException e) {
			throw new CorralException(job + ": --" + k + " must be a whole number, got '" + v + "'");
		}
	}

	double number(String k, double def) {
		used.add(k);
		String v = values.get(k);
		if (v == null) return def;
		try {
			double d = Double.parseDouble(v.trim());
			if (!Double.isFinite(d)) throw new NumberFormatException();
			return d;
		} catch (NumberFormatException e) {
			throw new CorralException(job + ": --" + k + " must be a number, got '" + v + "'");
		}
	}

	/** Refuses options nobody asked for, so a typo is not silently ignored. */
	void checkAllUsed() {
		for (String k : values.keySet())
			if (!used.contains(k)) throw new CorralException(job + ": unknown option --" + k + " (see " + job + " --help)");
	}
}
