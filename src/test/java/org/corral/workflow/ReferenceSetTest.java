package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
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
import org.corral.instances.ImageMasks;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.supervision.Supervision;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.MethodOrderer;
import org.junit.jupiter.api.Order;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestMethodOrder;

/**
 * BBBC039 (../shared/reference-data/bbbc039-u2os-nuclei, SOURCE.md there): learn from the boxes of
 * the first 5 images, mask the boxes of the other 5, score against the authors' masks. The figures
 * to beat are from BASELINES.md there: box itself 0.840, inscribed ellipse 0.879 (per-object Dice).
 */
@TestMethodOrder(MethodOrderer.OrderAnnotation.class)
class ReferenceSetTest {
	static final int STEPS = 200; // a bounded budget: about a minute on 2 cores
	/** How much worse the boxed objects may get when only half of them are boxed (stated in README). */
	static final double PARTIAL_TOLERANCE = 0.02;
	static double fullDice = Double.NaN;

	static Map<Path, List<Box>> all;
	static List<Path> names;

	static void load() {
		if (all != null) return;
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		all = BoxedImages.find(set.resolve("images"), set.resolve("boxes.csv"));
		names = new ArrayList<>(all.keySet());
		names.sort(null);
	}

	static Learner.Result learn(Map<Path, List<Box>> learn, Supervision.BackgroundMode mode) {
		LearnSettings s = new LearnSettings();
		s.steps = STEPS;
		s.minutes = 0;
		s.background = mode;
		return new Learner(s).learn(Jobs.trainingImages(learn), Progress.silent());
	}

	/** Per-object Dice on the 5 held-out images, with all their boxes. */
	static Scores.Tally heldOut(ModelRunner runner, boolean baseline, Scores.Tally box) {
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		Scores.Tally model = new Scores.Tally();
		for (Path p : names.subList(5, names.size())) {
			PlanarImage im = ImageFiles.read(p);
			int[] ref = ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null);
			float[] prob = runner.probability(im, 1, null, ModelRunner.BOX_FLIPS);
			model.add(Scores.compare(BoxMasks.make(prob, im.width, im.height, all.get(p), BoxMasks.Options.DEFAULTS).labels(), ref));
			if (baseline) box.add(Scores.compare(Baselines.boxItself(im, all.get(p)), ref));
		}
		return model;
	}

	@Test
	@Order(1)
	void masksOfUnseenImagesBeatTheBoxAndTheEllipseAndWholeImagesBeatComponents() {
		load();
		Map<Path, List<Box>> learn = new LinkedHashMap<>();
		for (Path p : names.subList(0, 5)) learn.put(p, all.get(p));
		Scores.Tally box = new Scores.Tally(), whole = new Scores.Tally(), components = new Scores.Tally();
		Scores.Tally model;
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		try (Learner.Result r = learn(learn, Supervision.BackgroundMode.FULL); ModelRunner runner = new ModelRunner(r.header(), r.net(), r.manager())) {
			model = heldOut(runner, true, box);
			// the same images without boxes: watershed instances vs plain connected components
			for (Path p : names.subList(5, names.size())) {
				PlanarImage im = ImageFiles.read(p);
				int[] ref = ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null);
				WholeImage.Outcome o = WholeImage.mask(runner, im, 0);
				whole.add(Scores.compare(o.result().labels(), ref));
				components.add(Scores.compare(ImageMasks.make(o.probability(), im.width, im.height, r.header().objectSize / o.scale(), 0.5, false).labels(), ref));
			}
		}
		fullDice = model.objectDice();
		System.out.printf("BBBC039 held-out per-object Dice: corral %.4f, box itself %.4f; no boxes: F1@0.5 %.4f (connected components %.4f), mean AP %.4f%n",
			model.objectDice(), box.objectDice(), whole.f1(0.5), components.f1(0.5), whole.meanAP());
		assertTrue(box.objectDice() < 0.87, "the box baseline is computed as documented: " + box.objectDice());
		assertTrue(model.objectDice() >= 0.92, "per-object Dice " + model.objectDice() + " must clearly beat the ellipse (0.879)");
		assertTrue(whole.f1(0.5) > components.f1(0.5) + 0.03, "watershed F1 " + whole.f1(0.5) + " vs connected components " + components.f1(0.5));
		assertTrue(whole.f1(0.5) >= 0.88, "whole-image F1 at IoU 0.5: " + whole.f1(0.5));
	}

	/**
	 * Half the objects boxed (every other box), learned with a background ring around each box:
	 * the held-out masks stay within {@link #PARTIAL_TOLERANCE} of the fully boxed run, and the
	 * unboxed objects of the learning images are not learned as background.
	 */
	@Test
	@Order(2)
	void halfBoxedImagesLearnNearlyAsWellAndKeepTheirUnboxedObjects() {
		load();
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		Map<Path, List<Box>> half = new LinkedHashMap<>();
		for (Path p : names.subList(0, 5)) {
			List<Box> kept = new ArrayList<>();
			for (Box b : all.get(p)) if (b.index() % 2 == 1) kept.add(b);
			half.put(p, kept);
		}
		double unboxedProbability = 0;
		int unboxed = 0;
		Scores.Tally model;
		ringModel = learn(half, Supervision.BackgroundMode.RING);
		{
			ModelRunner runner = ringRunner = new ModelRunner(ringModel.header(), ringModel.net(), ringModel.manager());
			model = heldOut(runner, false, null);
			for (Path p : names.subList(0, 5)) {
				PlanarImage im = ImageFiles.read(p);
				int[] ref = ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null);
				float[] prob = runner.probability(im, 1, null);
				double[] sum = new double[all.get(p).size() + 1];
				long[] n = new long[sum.length];
				for (int i = 0; i < ref.length; i++) {
					sum[ref[i]] += prob[i];
					n[ref[i]]++;
				}
				for (Box b : all.get(p)) {
					if (b.index() % 2 == 1) continue; // boxed
					assertEquals(b.width() * b.height() >= n[b.index()], true, "label k is the object of box k");
					unboxedProbability += sum[b.index()] / n[b.index()];
					unboxed++;
				}
			}
		}
		double meanUnboxed = unboxedProbability / unboxed;
		System.out.printf("BBBC039 half boxed: held-out per-object Dice %.4f (fully boxed %.4f); mean probability inside the %d unboxed objects %.3f%n",
			model.objectDice(), fullDice, unboxed, meanUnboxed);
		if (!Double.isNaN(fullDice))
			assertTrue(model.objectDice() >= fullDice - PARTIAL_TOLERANCE, "half boxed " + model.objectDice() + " vs fully boxed " + fullDice);
		assertTrue(model.objectDice() >= 0.90, "half boxed per-object Dice " + model.objectDice());
		assertTrue(meanUnboxed > 0.6, "unboxed objects must not be learned as background: mean probability " + meanUnboxed);
	}

	/** The model of {@link #halfBoxedImagesLearnNearlyAsWellAndKeepTheirUnboxedObjects} (the default background ring), for the next test. */
	static Learner.Result ringModel;
	static ModelRunner ringRunner;

	@AfterAll
	static void close() {
		if (ringRunner != null) ringRunner.close();
		if (ringModel != null) ringModel.close();
	}

	/**
	 * Nearly empty fields, made from held-out BBBC039 fields by covering all but 0, 2 or 10 of their
	 * nuclei (each grown by 5 px) with background noise (the field's median, its noise). Percentiles
	 * alone stretch such a field's background noise into objects; normalised as the learning images
	 * were (Normalise.bounds with the model's noise and background levels), the few nuclei are found.
	 */
	@Test
	@Order(3)
	void nearlyEmptyFieldsAreNormalisedAsTheLearningImagesWere() {
		load();
		org.junit.jupiter.api.Assumptions.assumeTrue(ringRunner != null, "needs the model of the test before");
		Path set = ReferenceData.set("bbbc039-u2os-nuclei");
		var h = ringModel.header();
		assertTrue(h.noiseLevel > 0 && h.noiseLevel < 0.05 && h.backgroundLevel.length == 1 && h.backgroundLevel[0] < 0.1,
			"learning records the noise and background of its fluorescence images: " + h.noiseLevel + ", " + java.util.Arrays.toString(h.backgroundLevel));
		double level = h.noiseLevel;
		Scores.Tally learned = new Scores.Tally(), percentiles = new Scores.Tally();
		int[] onEmpty = new int[2]; // objects found on the fields with no nucleus left
		java.util.Random rnd = new java.util.Random(1);
		for (Path p : names.subList(5, 8)) {
			PlanarImage im = ImageFiles.read(p);
			int[] ref = ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null);
			for (int keep : new int[] {0, 2, 10}) {
				int[] kept = new int[ref.length];
				PlanarImage field = nearlyEmpty(im, ref, keep, kept, rnd);
				assertTrue(org.corral.image.Normalise.sparse(field));
				for (int way = 0; way < 2; way++) {
					h.noiseLevel = way == 0 ? level : 0; // 0: as models of earlier versions, percentiles alone
					var found = WholeImage.mask(ringRunner, field, 0).result();
					if (way == 1 || keep == 0) // the job's log says when a field was normalised as nearly empty
						assertEquals(way == 0, ringRunner.lastNearlyEmpty(), "an empty field with the model's levels, or any field without them");
					(way == 0 ? learned : percentiles).add(Scores.compare(found.labels(), kept));
					if (keep == 0) onEmpty[way] += found.count();
				}
			}
		}
		h.noiseLevel = level;
		WholeImage.mask(ringRunner, ImageFiles.read(names.get(5)), 0);
		assertTrue(!ringRunner.lastNearlyEmpty(), "a field full of nuclei keeps its percentiles");
		System.out.printf("nearly empty fields (36 nuclei on 9 fields): F1@0.5 %.3f normalised as learned, %.3f by percentiles alone; objects on the 3 empty fields %d and %d%n",
			learned.f1(0.5), percentiles.f1(0.5), onEmpty[0], onEmpty[1]);
		// how much percentiles alone lose depends on the model: this one (200 steps, half boxed) loses
		// little, the default model learned on 5 of these fields (400 steps) gave 0.23 (README)
		assertTrue(learned.f1(0.5) >= 0.85, "F1 on nearly empty fields " + learned.f1(0.5));
		assertTrue(learned.f1(0.5) > percentiles.f1(0.5), "normalised as learned " + learned.f1(0.5) + " vs percentiles alone " + percentiles.f1(0.5));
		assertTrue(onEmpty[0] <= 1, onEmpty[0] + " objects found on the 3 empty fields");
	}

	/** {@code im} with all but its first {@code keep} labelled objects covered by background noise; {@code kept} gets their labels. */
	static PlanarImage nearlyEmpty(PlanarImage im, int[] ref, int keep, int[] kept, java.util.Random rnd) {
		int w = im.width, h = im.height;
		float[] v = im.channels[0];
		float med = org.corral.image.Normalise.medians(im)[0], sigma = org.corral.image.Normalise.noise(im)[0];
		boolean[] near = new boolean[v.length], cover = new boolean[v.length];
		for (int i = 0; i < v.length; i++) {
			if (ref[i] == 0) continue;
			boolean k = ref[i] <= keep;
			if (k) kept[i] = ref[i];
			int r = k ? 2 : 5, x0 = i % w, y0 = i / w;
			for (int y = Math.max(0, y0 - r); y <= Math.min(h - 1, y0 + r); y++)
				for (int x = Math.max(0, x0 - r); x <= Math.min(w - 1, x0 + r); x++)
					if ((x - x0) * (x - x0) + (y - y0) * (y - y0) <= r * r) (k ? near : cover)[y * w + x] = true;
		}
		float[] out = v.clone();
		for (int i = 0; i < v.length; i++) if (cover[i] && !near[i]) out[i] = med + (float) (sigma * rnd.nextGaussian());
		return new PlanarImage(w, h, new float[][] {out});
	}
}
