package org.corral.train;

import java.util.Map;

import org.corral.loss.ConstraintTerm;

/** Receives learning progress; {@link #cancelled()} is polled between steps. */
public interface Progress {
	/**
	 * One report: step (1-based) of total, the total loss and each part by name (every loss term's
	 * value, then the figures the terms report, such as the fraction of constraints met), averaged
	 * since the last report; the log-barrier t; timing.
	 */
	record Report(int step, int total, double loss, Map<String, Double> parts, double t, double secondsPerStep, double secondsLeft) {
		public Report {
			parts = java.util.Collections.unmodifiableMap(new java.util.LinkedHashMap<>(parts));
		}

		/** A part by name; NaN when this run has no such part. */
		public double part(String name) {
			return parts.getOrDefault(name, Double.NaN);
		}

		/** The parts as "name value, ..." with 4 decimals, in the order of the loss terms. */
		public String partsLine() {
			StringBuilder sb = new StringBuilder();
			for (var e : parts.entrySet()) {
				if (sb.length() > 0) sb.append(", ");
				sb.append(e.getKey()).append(' ').append(String.format(java.util.Locale.ROOT, "%.4f", e.getValue()));
			}
			return sb.toString();
		}

		/** The fraction of box constraints met. */
		public double met() {
			return part(ConstraintTerm.MET);
		}
	}

	void report(Report r);

	default boolean cancelled() {
		return false;
	}

	static Progress silent() {
		return r -> {};
	}
}
