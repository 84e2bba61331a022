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
		double rate = 1e-3;
		int total = 400, warm = 20;
		LearningRateSchedule lr = new LearningRateSchedule(rate, total);
		assertEquals(rate / warm, lr.getNewValue(0), 1e-9, "the warm-up starts from a twentieth");
		for (int k = 1; k <= warm; k++) assertTrue(lr.getNewValue(k) > lr.getNewValue(k - 1), "rising through the warm-up at " + k);
		assertEquals(rate, lr.getNewValue(warm), 1e-9, "full rate when the warm-up ends");
		assertEquals(rate * (0.05 + 0.95 * 0.5), lr.getNewValue(warm + (total - warm) / 2), 1e-9, "half way down the cosine");
		assertEquals(0.05 * rate, lr.getNewValue(total), 1e-9, "5 % at the last step");
		for (int k = warm + 1; k <= total; k++) assertTrue(lr.getNewValue(k) <= lr.getNewValue(k - 1));
		// short runs warm up over a tenth of the run
		assertEquals(rate, new LearningRateSchedule(rate, 60).getNewValue(6), 1e-9);
	}

	/** Shortened by the time budget, the schedule reaches its floor at the new last step. */
	@Test
	void aShortenedRunEndsAtTheFloor() {
		double rate = 1e-3;
		LearningRateSchedule lr = new LearningRateSchedule(rate, 400);
		float before = lr.getNewValue(150);
		lr.setTotal(200);
		assertTrue(lr.getNewValue(150) < before, "further down the cosine at the same step");
		assertEquals(0.05 * rate, lr.getNewValue(200), 1e-9);
		assertEquals(rate * (0.05 + 0.95 * 0.5), lr.getNewValue(20 + 90), 1e-9, "the middle of the shortened cosine");
	}
}
