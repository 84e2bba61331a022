package org.corral.workflow;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.model.ModelFile;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.train.TrainingImage;

/**
 * The cross-collection protocol: learn on reference set A, mask the boxes of set B (another lab,
 * stain or magnification), with and without adaptation to B's boxes, next to the box itself, the
 * inscribed ellipse and Otsu in the box; and every object of B's images without boxes. When A and B
 * are the same set, the first {@code nLearn} images (by name) are learned and the others masked.
 * Prints numbers; asserts nothing.
 */
public final class CrossBenchmark {
	private CrossBenchmark() {}

	public record Row(String method, Scores.Tally tally, double seconds) {}

	/** Images and boxes of a reference set (images/, labels/, boxes.csv), sorted by name. */
	public static Map<Path, List<Box>> load(Path set) {
		Path images = set.resolve("images"), labels = set.resolve("labels"), boxFile = set.resolve("boxes.csv");
		if (!Files.isDirectory(images) || !Files.isDirectory(labels) || !Files.isRegularFile(boxFile))
			throw new CorralException(set + " is not a reference set (needs images/, labels/ and boxes.csv)");
		Map<Path, List<Box>> all = BoxedImages.find(images, boxFile);
		List<Path> names = new ArrayList<>(all.keySet());
		names.sort(null);
		Map<Path, List<Box>> sorted = new LinkedHashMap<>();
		for (Path p : names) sorted.put(p, all.get(p));
		return sorted;
	}

	/** The learning and masked parts of a pair: all of A and all of B, or a split of one set. */
	public record Split(Map<Path, List<Box>> learn, Map<Path, List<Box>> mask) {}

	public static Split split(Path a, Path b, int nLearn) {
		Map<Path, List<Box>> learn = new LinkedHashMap<>(), mask = new LinkedHashMap<>();
		if (a.toAbsolutePath().normalize().equals(b.toAbsolutePath().normalize())) {
			Map<Path, List<Box>> all = load(a);
			if (all.size() <= nLearn) throw new CorralException(a + ": needs more than " + nLearn + " boxed images");
			int i = 0;
			for (var e : all.entrySet()) (i++ < nLearn ? learn : mask).put(e.getKey(), e.getValue());
		} else {
			learn.putAll(load(a));
			mask.putAll(load(b));
		}
		return new Split(learn, mask);
	}

	/** Learns on the learning part, or reads the model from {@code cache} when it holds one for these settings. */
	public static ModelRunner model(Path set, Map<Path, List<Box>> learn, LearnSettings s, Path cache, Consumer<String> log) {
		Path file = cache == null ? null
			: cache.resolve(String.format(Locale.ROOT, "%s-%d-%d-%d-%d.zip", set.getFileName(), learn.size(), s.steps, s.seed, s.asMap().hashCode() & 0xffff));
		if (file != null && Files.isRegularFile(file)) {
			log.accept("  model from cache " + file);
			ModelRunner cached = ModelRunner.open(file);
			if (cached.header().activationRanges == null) { // a model of an earlier version: ranges measured as learning ends
				try (ai.djl.ndarray.NDManager m = ai.djl.ndarray.NDManager.newBaseManager()) {
					List<PlanarImage> seen = new ArrayList<>();
					for (Path img : learn.keySet()) seen.add(org.corral.image.Normalise.percentiles(ImageFiles.read(img)));
					cached.header().activationRanges = org.corral.predict.ActivationRanges.measure(cached.net(), m, seen);
				}
				ModelFile.write(file, cached.header(), cached.net());
			}
			return cached;
		}
		Learner.Result r = new Learner(s).learn(Jobs.trainingImages(learn), quiet(log));
		if (file != null) ModelFile.write(file, r.header(), r.net());
		return new ModelRunner(r.header(), r.net(), r.manager());
	}

	static Progress quiet(Consumer<String> log) {
		return rep -> {
			if (rep.step() % 50 == 0 || rep.step() == rep.total())
				log.accept(String.format(Locale.ROOT, "  step %d/%d loss %.4f met %.3f t %.1f %.2f s/step", rep.step(), rep.total(), rep.loss(), rep.met(), rep.t(),
					rep.secondsPerStep()));
		};
	}

	/** {@code adaptSteps}: steps of every adaptation (0 = the rule of {@link Adaptation#steps}). */
	public static List<Row> run(Path a, Path b, LearnSettings s, int nLearn, int adaptSteps, Path cache, Consumer<String> log) {
		Split sp = split(a, b, nLearn);
		Path labels = b.resolve("labels");
		List<Row> rows = new ArrayList<>();
		long t0 = System.nanoTime();
		try (ModelRunner base = model(a, sp.learn(), s, cache, log)) {
			double learnS = (System.nanoTime() - t0) / 1e9;
			rows.addAll(mask("corral, no adapt", base, sp.mask(), labels, learnS, cache, log));
			long t1 = System.nanoTime();
			List<TrainingImage> own = Jobs.trainingImages(sp.mask());
			int nBoxes = own.stream().mapToInt(t -> t.boxes().size()).sum();
			LearnSettings as = Adaptation.settings(s, base, nBoxes, adaptSteps);
			log.accept("  adapting: " + as.steps + " steps on " + nBoxes + " boxes of " + own.size() + " images");
			try (Learner.Result r = Adaptation.adapt(base, own, as, quiet(log)); ModelRunner adapted = new ModelRunner(r.header(), r.net(), r.manager())) {
				double adaptS = (System.nanoTime() - t1) / 1e9;
				if (cache != null) // kept for offline study of the instance stage
					ModelFile.write(cache.resolve("adapted").resolve(a.getFileName() + "-to-" + b.getFileName() + ".zip"), r.header(), r.net());
				rows.addAll(mask("corral, adapted", adapted, sp.mask(), labels, adaptS, cache, log));
			}
			rows.addAll(halfBoxed(base, sp.mask(), labels, s, adaptSteps, log));
		}
		Scores.Tally box = new Scores.Tally(), ellipse = new Scores.Tally(), otsu = new Scores.Tally();
		for (var e : sp.mask().entrySet()) {
			PlanarImage im = ImageFiles.read(e.getKey());
			int[] ref = ImageFiles.readLabels(labels.resolve(e.getKey().getFileName()), null);
			box.add(Scores.compare(Baselines.boxItself(im, e.getValue()), ref));
			ellipse.add(Scores.compare(Baselines.ellipse(im, e.getValue()), ref));
			otsu.add(Scores.compare(Baselines.otsuInBox(im, e.getValue()), ref));
		}
		rows.add(new Row("box itself", box, 0));
		rows.add(new Row("ellipse", ellipse, 0));
		rows.add(new Row("otsu in box", otsu, 0));
		return rows;
	}

	/** Box masks and whole-image masks of the masked part with one model; rows "NAME" and "NAME, whole". */
	static List<Row> mask(String name, ModelRunner m, Map<Path, List<Box>> images, Path labels, double learnSeconds, Path cache, Consumer<String> log) {
		Scores.Tally boxes = new Scores.Tally(), whole = new Scores.Tally();
		double boxS = 0, wholeS = 0;
		for (var e : images.entrySet()) {
			PlanarImage im = ImageFiles.read(e.getKey());
			int[] ref = ImageFiles.readLabels(labels.resolve(e.getKey().getFileName()), null);
			long t0 = System.nanoTime();
			// the boxes' maps as mask-boxes computes them (their tiles only; 8-bit where the model allows)
			float[] prob = m.boxMaps(im, e.getValue(), m.scaleFor(ModelRunner.medianSide(e.getValue())), null, ModelRunner.boxFlips())[0];
			int[] lab = BoxMasks.make(prob, im.width, im.height, e.getValue(), BoxMasks.Options.DEFAULTS).labels();
			boxS += (System.nanoTime() - t0) / 1e9;
			boxes.add(Scores.compare(lab, ref));
			if (cache != null) dump(cache, name, e.getKey(), prob, im);
			long t1 = System.nanoTime();
			WholeImage.Outcome o = WholeImage.mask(m, im, 0);
			wholeS += (System.nanoTime() - t1) / 1e9;
			whole.add(Scores.compare(o.result().labels(), ref));
		}
		log.accept(String.format(Locale.ROOT, "  %s: per-object Dice %.4f, whole-image F1 %.4f mAP %.4f", name, boxes.objectDice(), whole.f1(0.5), whole.meanAP()));
		return List.of(new Row(name, boxes, learnSeconds + boxS), new Row(name + ", whole", whole, wholeS));
	}

	/**
	 * A user of a new look boxes some of its images and masks the rest whole ({@code mask-image
	 * --boxes}): the model adapts to the boxes of every other masked image (1st, 3rd, ... by name, so
	 * that a set whose names group its preparations gives boxes of each), and the other half is masked
	 * whole, next to the same images masked by the model as it was. Rows "half boxed: …, whole (other
	 * half)"; none when fewer than 2 images are masked.
	 */
	static List<Row> halfBoxed(ModelRunner base, Map<Path, List<Box>> images, Path labels, LearnSettings s, int adaptSteps, Consumer<String> log) {
		List<Path> names = new ArrayList<>(images.keySet());
		if (names.size() < 2) return List.of();
		Map<Path, List<Box>> boxed = new LinkedHashMap<>();
		List<Path> rest = new ArrayList<>();
		for (int i = 0; i < names.size(); i++) {
			if (i % 2 == 0) boxed.put(names.get(i), images.get(names.get(i)));
			else rest.add(names.get(i));
		}
		List<TrainingImage> own = Jobs.trainingImages(boxed);
		int nBoxes = own.stream().mapToInt(t -> t.boxes().size()).sum();
		LearnSettings as = Adaptation.settings(s, base, nBoxes, adaptSteps);
		log.accept("  half boxed: adapting " + as.steps + " steps on the " + nBoxes + " boxes of " + boxed.size() + " image(s), masking the other " + rest.size() + " whole");
		long t0 = System.nanoTime();
		try (Learner.Result r = Adaptation.adapt(base, own, as, quiet(log)); ModelRunner adapted = new ModelRunner(r.header(), r.net(), r.manager())) {
			double adaptS = (System.nanoTime() - t0) / 1e9;
			Row before = whole("half boxed: not adapted, whole (other half)", base, rest, labels, 0);
			Row after = whole("half boxed: adapted to the boxed half, whole (other half)", adapted, rest, labels, adaptS);
			log.accept(String.format(Locale.ROOT, "  half boxed, other half whole: F1 %.4f mAP %.4f -> %.4f mAP %.4f", before.tally().f1(0.5), before.tally().meanAP(),
				after.tally().f1(0.5), after.tally().meanAP()));
			return List.of(before, after);
		}
	}

	static Row whole(String name, ModelRunner m, List<Path> images, Path labels, double seconds) {
		Scores.Tally t = new Scores.Tally();
		long t0 = System.nanoTime();
		for (Path p : images)
			t.add(Scores.compare(WholeImage.mask(m, ImageFiles.read(p), 0).result().labels(), ImageFiles.readLabels(labels.resolve(p.getFileName()), null)));
		return new Row(name, t, seconds + (System.nanoTime() - t0) / 1e9);
	}

	/** Probability maps kept for offline study of the mask stage (with --cache). */
	static void dump(Path cache, String name, Path image, float[] prob, PlanarImage im) {
		Path d = cache.resolve("probability").resolve(name.replaceAll("[^a-z]+", "-")).resolve(image.getParent().getParent().getFileName().toString());
		ImageFiles.saveTiff(new ij.ImagePlus("p", new ij.process.FloatProcessor(im.width, im.height, prob)), d.resolve(image.getFileName()));
	}

	public static String table(String a, String b, List<Row> rows) {
		StringBuilder sb = new StringBuilder(String.format(Locale.ROOT, "%-30s %-30s %-58s %8s %8s %8s %8s %8s %8s%n", "learned on", "masked", "method", "objDice", "pixDice",
			"F1@0.5", "meanAP", "mDice", "seconds"));
		for (Row r : rows)
			sb.append(String.format(Locale.ROOT, "%-30s %-30s %-58s %8.4f %8.4f %8.4f %8.4f %8.4f %8.1f%n", a, b, r.method(), r.tally().objectDice(), r.tally().pixelDice(),
				r.tally().f1(0.5), r.tally().meanAP(), r.tally().matchedDice(), r.seconds()));
		return sb.toString();
	}
}
