package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/** The log-barrier t and learning-rate schedules are fractions of the run (README, "How it works" 3). */
class SchedulesTest {
	@Test
	void tGrowsGeometricallyToItsCapThenHolds() {
		LearnSettings s = new LearnSettings();
		Learner l = new Learner(s);
		int total = 400;
		assertEquals(s.tStart * Math.pow(s.tMax / s.tStart, 1.0 / (s.tRamp * total)), l.tAt(1, total), 1e-9);
		int ramp = (int) Math.round(s.tRamp * total);
		assertEquals(s.tMax, l.tAt(ramp, total), 1e-9);
		assertEquals(s.tMax, l.tAt(total, total), 1e-9, "held at the cap, never beyond");
		for (int k = 2; k <= total; k++) assertTrue(l.tAt(k, total) >= l.tAt(k - 1, total));
		// a 3x longer run stretches the schedule instead of driving t higher
		assertEquals(l.tAt(100, 400), l.tAt(300, 1200), 1e-9);
		assertEquals(s.tMax, l.tAt(1200, 1200), 1e-9);
	}

	@Test
	void learningRateWarmsUpThenFollowsACosineDownToFivePercent() {
		int total = 400, warm = 20;
		assertTrue(Learner.lrFactor(0, total) < Learner.lrFactor(10, total));
		assertEquals(1.0, Learner.lrFactor(warm, total), 1e-9, "full rate when the warm-up ends");
		assertEquals(0.05, Learner.lrFactor(total, total), 1e-9);
		assertEquals(0.05 + 0.95 * 0.5, Learner.lrFactor(warm + (total - warm) / 2, total), 1e-9, "half way down the cosine");
		for (int k = warm + 1; k <= total; k++) assertTrue(Learner.lrFactor(k, total) <= Learner.lrFactor(k - 1, total));
		// short runs warm up over a tenth of the run
		assertEquals(1.0, Learner.lrFactor(6, 60), 1e-9);
	}
}
