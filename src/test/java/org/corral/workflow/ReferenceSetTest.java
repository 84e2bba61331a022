package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;

/**
 * BBBC039 (../shared/reference-data/bbbc039-u2os-nuclei, SOURCE.md there): learn from the boxes of
 * the first 5 images, mask the boxes of the other 5, score against the authors' masks.
 * The figures to beat are from BASELINES.md there: box itself 0.840, inscribed ellipse 0.879.
 */
class ReferenceSetTest {

	@Test
	void masksOfUnseenImagesBeatTheBoxAndTheEllipse() {
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		Map<Path, List<Box>> all = BoxedImages.find(set.resolve("images"), set.resolve("boxes.csv"));
		List<Path> names = new ArrayList<>(all.keySet());
		names.sort(null);
		Map<Path, List<Box>> learn = new LinkedHashMap<>();
		for (Path p : names.subList(0, 5)) learn.put(p, all.get(p));
		LearnSettings s = new LearnSettings();
		s.steps = 200; // a bounded budget: about a minute and a half on 2 cores
		s.minutes = 0;
		Scores.Tally model = new Scores.Tally(), box = new Scores.Tally();
		try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(learn), Progress.silent());
			ModelRunner runner = new ModelRunner(r.header(), r.net(), r.manager())) {
			for (Path p : names.subList(5, names.size())) {
				PlanarImage im = ImageFiles.read(p);
				int[] ref = ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null);
				float[] prob = runner.probability(im, 1, null);
				model.add(Scores.compare(BoxMasks.make(prob, im.width, im.height, all.get(p), 0.5).labels(), ref));
				box.add(Scores.compare(Baselines.boxItself(im, all.get(p)), ref));
			}
		}
		System.out.printf("BBBC039 held-out per-object Dice: corral %.4f, box itself %.4f%n", model.objectDice(), box.objectDice());
		assertTrue(box.objectDice() < 0.87, "the box baseline is computed as documented: " + box.objectDice());
		assertTrue(model.objectDice() >= 0.92, "per-object Dice " + model.objectDice() + " must clearly beat the ellipse (0.879)");
	}
}
