package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;
import ij.process.ImageProcessor;

import java.nio.file.Path;
import java.util.List;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A model learned on the demo's nuclei must still mask the same nuclei shown 3.5x larger. The demo's smooth
 * ellipses generalise across scale well (at 2.5x, rescaled and not were within 0.0004 with the instance
 * map on), so the gain asserted at 3.5x is small (0.0015 when written); the factor itself is asserted exactly.
 * The model learns one size only (no scale jitter): the rescale is for objects outside the sizes learned,
 * and a model learned at 1/1.3, 1 and 1.3x masked these smooth ellipses 0.005 better unscaled (0.9661
 * against 0.9608) than rescaled, since the 3.5x downsampling coarsens their outlines.
 */
class ScaleTest {
	@TempDir
	Path dir;

	@Test
	void largerObjectsAreMaskedAtTheLearnedSize() throws Exception {
		Path demo = ReferenceData.demo();
		var boxed = BoxedImages.find(demo.resolve("images"), demo.resolve("boxes.csv"));
		LearnSettings s = new LearnSettings();
		s.steps = 100;
		s.minutes = 0;
		s.scaleJitter = 0;
		Jobs.learn(boxed, null, s, dir.resolve("m.zip"), Progress.silent(), n -> {}).close();
		double f = 3.5;
		Scores.Tally scaled = new Scores.Tally(), unscaled = new Scores.Tally(), whole = new Scores.Tally();
		try (ModelRunner m = ModelRunner.open(dir.resolve("m.zip"))) {
			for (var e : boxed.entrySet()) {
				ImagePlus imp = ImageFiles.open(e.getKey());
				int w = (int) (imp.getWidth() * f), h = (int) (imp.getHeight() * f);
				imp.getProcessor().setInterpolationMethod(ImageProcessor.BILINEAR);
				PlanarImage big = ImageFiles.planes(new ImagePlus("big", imp.getProcessor().resize(w, h)), 1, 1);
				ImageProcessor ref = ImageFiles.open(demo.resolve("reference").resolve(e.getKey().getFileName())).getProcessor();
				ref.setInterpolationMethod(ImageProcessor.NONE);
				ImageProcessor bigRef = ref.resize(w, h);
				int[] refLabels = new int[w * h];
				for (int i = 0; i < refLabels.length; i++) refLabels[i] = (int) bigRef.getf(i);
				List<Box> boxes = e.getValue().stream().map(b -> b.scaled(f)).toList();
				double factor = m.scaleFor(ModelRunner.medianSide(boxes));
				assertTrue(Math.abs(factor - 1 / f) < 0.05, "rescaled by " + factor);
				scaled.add(Scores.compare(BoxMasks.make(m.probability(big, factor, null), w, h, boxes, 0.5).labels(), refLabels));
				unscaled.add(Scores.compare(BoxMasks.make(m.probability(big, 1, null), w, h, boxes, 0.5).labels(), refLabels));
				whole.add(Scores.compare(WholeImage.mask(m, big, 0).result().labels(), refLabels));
			}
		}
		System.out.printf("3.5x larger demo objects: per-object Dice %.4f rescaled, %.4f not; whole-image F1 %.4f%n", scaled.objectDice(), unscaled.objectDice(),
			whole.f1(0.5));
		assertTrue(scaled.objectDice() > 0.85, "rescaled " + scaled.objectDice());
		assertTrue(scaled.objectDice() >= unscaled.objectDice(), "rescaling helps: " + scaled.objectDice() + " vs " + unscaled.objectDice());
		assertTrue(whole.f1(0.5) > 0.7, "whole image with the scale measured in a first pass: F1 " + whole.f1(0.5));
	}
}
