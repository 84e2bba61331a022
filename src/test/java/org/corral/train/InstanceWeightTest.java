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
 * ({@link Learner#maskTargetStep}); before that, its inscribed-ellipse warm-up weighs at most 1. Read
 * from a real run's reports: each step's loss is the weighted sum of its parts.
 */
class InstanceWeightTest {
	@TempDir
	Path dir;

	@Test
	void theInstanceWeightActsFromTheMaskTargetStep() {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		LearnSettings s = new LearnSettings();
		s.steps = 10;
		s.minutes = 0;
		s.reportEvery = 1;
		s.batch = 2;
		s.scaleJitter = 0;
		s.chooseWholeImageSettings = false;
		double w = 5;
		s.weights = new LossWeights(1, 1, 1, w);
		List<Progress.Report> reports = new ArrayList<>();
		Jobs.learn(boxed, null, s, dir.resolve("model.zip"), reports::add, n -> {});
		assertEquals(s.steps, reports.size());
		int from = Learner.maskTargetStep(s.steps);
		assertTrue(from > 1 && from < s.steps);
		for (Progress.Report r : reports) {
			double rest = r.loss() - r.part("background") - r.part("pairwise") - r.part("constraints");
			double weight = r.step() < from ? LossWeights.WARM_UP_INSTANCE : w;
			assertTrue(r.part("instance") > 0.01, "the instance map is learned at step " + r.step());
			assertEquals(weight * r.part("instance"), rest, 1e-4 * Math.max(1, Math.abs(r.loss())), "step " + r.step());
		}
	}
}
