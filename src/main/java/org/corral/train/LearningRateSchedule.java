package org.corral.train;

import ai.djl.training.tracker.CosineTracker;
import ai.djl.training.tracker.Tracker;
import ai.djl.training.tracker.WarmUpTracker;

/**
 * The learning rate of a run: DJL's linear warm-up over the first tenth of the run (at most 20
 * steps; common practice), then DJL's cosine decay to {@link #FLOOR} of the rate (the cosine schedule
 * of "SGDR: Stochastic Gradient Descent with Warm Restarts", ICLR 2017, without restarts). The time
 * budget may shorten the run while it learns; {@link #setTotal} then lays both out again over the
 * new length, from the step reached.
 */
final class LearningRateSchedule implements Tracker {
	/** The rate at the end of the run, as a share of the full rate. */
	static final double FLOOR = 0.05;

	private final float rate;
	private int total;
	private Tracker schedule;

	LearningRateSchedule(double rate, int total) {
		this.rate = (float) rate;
		setTotal(total);
	}

	/** Steps of the warm-up in a run of {@code total} steps. */
	static int warmUpSteps(int total) {
		return Math.max(1, Math.min(20, total / 10));
	}

	void setTotal(int total) {
		if (total < 1) throw new IllegalArgumentException("a run has at least one step");
		if (total == this.total) return;
		this.total = total;
		int warm = warmUpSteps(total);
		Tracker cosine = CosineTracker.builder().setBaseValue(rate).optFinalValue((float) (FLOOR * rate)).setMaxUpdates(Math.max(1, total - warm)).build();
		schedule = WarmUpTracker.builder().setMainTracker(cosine).optWarmUpSteps(warm).optWarmUpBeginValue(rate / warm).build();
	}

	/** The rate of update {@code step} (the optimiser counts from 1). */
	@Override
	public float getNewValue(int step) {
		return schedule.getNewValue(step);
	}
}
