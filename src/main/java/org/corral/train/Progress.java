package org.corral.train;

/** Receives learning progress; {@link #cancelled()} is polled between steps. */
public interface Progress {
	/** One report: step (1-based) of total, the loss parts averaged since the last report, t, timing. */
	record Report(int step, int total, double loss, double background, double constraints, double pairwise,
		double met, double t, double secondsPerStep, double secondsLeft) {}

	void report(Report r);

	default boolean cancelled() {
		return false;
	}

	static Progress silent() {
		return r -> {};
	}
}
