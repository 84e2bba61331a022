package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.corral.ReferenceData;
import org.corral.loss.LossWeights;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Jobs;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The instance map's weight acts only once its targets come from the network's own box masks
 * ({@link Learner#maskTargetStep}) and, from scratch, not before {@link LearnSettings#heavyInstanceFrom};
 * before that, its inscribed-ellipse warm-up weighs at most 1. Read from real runs' reports.
 */
class InstanceWeightTest {
	@TempDir
	Path dir;

	@Test
	void theInstanceWeightActsFromTheMaskTargetStep() {
		LearnSettings s = settings();
		s.heavyInstanceFrom = 0;
		List<Progress.Report> reports = learn(s);
		int from = Learner.maskTargetStep(s.steps);
		assertTrue(from > 1 && from < s.steps);
		for (Progress.Report r : reports) assertWeighs(r.step() < from ? LossWeights.WARM_UP_INSTANCE : s.weights.instance(), r);
	}

	/** From scratch, a run too short for the box masks to settle keeps weight 1 throughout. */
	@Test
	void aShortRunFromScratchKeepsTheWarmUpWeight() {
		LearnSettings s = settings();
		assertTrue(s.heavyInstanceFrom > s.steps);
		for (Progress.Report r : learn(s)) assertWeighs(LossWeights.WARM_UP_INSTANCE, r);
	}

	/** Where the switch falls: at the mask-target step, from scratch not before the settled step. */
	@Test
	void theSwitchStep() {
		Learner l = new Learner(new LearnSettings());
		assertEquals(240, l.heavyInstanceStep(400, false));
		assertEquals(240, l.heavyInstanceStep(200, false), "from scratch: not before step 240");
		assertEquals(120, l.heavyInstanceStep(200, true), "continued learning: at its mask-target step");
		assertEquals(600, l.heavyInstanceStep(1000, false));
	}

	private static LearnSettings settings() {
		LearnSettings s = new LearnSettings();
		s.steps = 10;
		s.minutes = 0;
		s.reportEvery = 1;
		s.batch = 2;
		s.scaleJitter = 0;
		s.weights = new LossWeights(1, 1, 1, 5);
		return s;
	}

	private List<Progress.Report> learn(LearnSettings s) {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		List<Progress.Report> reports = new ArrayList<>();
		Jobs.learn(boxed, null, s, dir.resolve("model.zip"), reports::add, n -> {});
		assertEquals(s.steps, reports.size());
		return reports;
	}

	/** Each step's loss is the weighted sum of its parts, the instance map's with {@code weight}. */
	private static void assertWeighs(double weight, Progress.Report r) {
		double rest = r.loss() - r.part("background") - r.part("pairwise") - r.part("constraints");
		assertTrue(r.part("instance") > 0.01, "the instance map is learned at step " + r.step());
		assertEquals(weight * r.part("instance"), rest, 1e-4 * Math.max(1, Math.abs(r.loss())), "step " + r.step());
	}
}
