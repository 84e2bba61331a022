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
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.train.TrainingImage;

/**
 * Learn on the first half of a reference set (images/, labels/, boxes.csv), mask the boxes of the
 * other half, and score against the reference labels; the same for the box itself and Otsu in the
 * box. Prints numbers; asserts nothing.
 */
public final class Benchmark {
	private Benchmark() {}

	public record Row(String method, Scores.Tally tally, double learnSeconds, double secondsPerStep, double megapixelsPerSecond) {}

	public static List<Row> run(Path set, LearnSettings settings, int nLearn, Consumer<String> log) {
		return run(set, settings, nLearn, 0, log);
	}

	/**
	 * Loose boxes: the per-object Dice when every box (learning and masking) is enlarged by each of
	 * {@code grows} pixels per side, learned once without a margin and once with the margin set to
	 * the enlargement. Rows: grow, margin, per-object Dice, and the box itself for reference.
	 */
	public static String sensitivity(Path set, LearnSettings settings, int nLearn, int[] grows, Consumer<String> log) {
		StringBuilder sb = new StringBuilder(String.format(Locale.ROOT, "%-28s %6s %7s %9s %9s%n", "set", "grow", "margin", "objDice", "boxDice"));
		int margin0 = settings.margin;
		for (int g : grows)
			for (int m : g == 0 ? new int[] {0} : new int[] {0, g}) {
				settings.margin = m;
				log.accept("-- boxes grown by " + g + " px, margin " + m);
				List<Row> rows = run(set, settings, nLearn, g, log);
				sb.append(String.format(Locale.ROOT, "%-28s %6d %7d %9.4f %9.4f%n", set.getFileName(), g, m, rows.get(0).tally().objectDice(), rows.get(1).tally().objectDice()));
			}
		settings.margin = margin0;
		return sb.toString();
	}

	public static List<Row> run(Path set, LearnSettings settings, int nLearn, int grow, Consumer<String> log) {
		Path images = set.resolve("images"), labels = set.resolve("labels"), boxFile = set.resolve("boxes.csv");
		if (!Files.isDirectory(images) || !Files.isDirectory(labels) || !Files.isRegularFile(boxFile))
			throw new CorralException(set + " is not a reference set (needs images/, labels/ and boxes.csv)");
		Map<Path, List<Box>> all = BoxedImages.find(images, boxFile);
		if (grow != 0) all.replaceAll((k, v) -> v.stream().map(b -> b.grown(grow)).toList());
		List<Path> names = new ArrayList<>(all.keySet());
		names.sort(null);
		if (names.size() <= nLearn) throw new CorralException(set + ": needs more than " + nLearn + " boxed images");
		Map<Path, List<Box>> learn = new LinkedHashMap<>(), test = new LinkedHashMap<>();
		for (int i = 0; i < names.size(); i++) (i < nLearn ? learn : test).put(names.get(i), all.get(names.get(i)));

		long t0 = System.nanoTime();
		List<TrainingImage> ti = Jobs.trainingImages(learn);
		Learner.Result r = new Learner(settings).learn(ti, rep -> {
			if (rep.step() % 50 == 0 || rep.step() == rep.total())
				log.accept(String.format(Locale.ROOT, "  step %d/%d loss %.4f (%s) t %.1f %.2f s/step", rep.step(), rep.total(), rep.loss(), rep.partsLine(), rep.t(),
					rep.secondsPerStep()));
		});
		double learnSeconds = (System.nanoTime() - t0) / 1e9;
		double sps = r.header().counts.secondsPerStep;
		Scores.Tally model = new Scores.Tally(), box = new Scores.Tally(), otsu = new Scores.Tally();
		Scores.Tally whole = new Scores.Tally(), plainCC = new Scores.Tally(), classical = new Scores.Tally();
		double wholeSeconds = 0;
		double predSeconds = 0;
		long pixels = 0;
		try (ModelRunner runner = new ModelRunner(r.header(), r.net(), r.manager())) {
			for (Map.Entry<Path, List<Box>> e : test.entrySet()) {
				PlanarImage im = ImageFiles.read(e.getKey());
				int[] ref = ImageFiles.readLabels(labels.resolve(e.getKey().getFileName()), null);
				long p0 = System.nanoTime();
				float[] prob = runner.boxMaps(im, e.getValue(), runner.scaleFor(ModelRunner.medianSide(e.getValue())), null, ModelRunner.boxFlips())[0]; // as mask-boxes
				predSeconds += (System.nanoTime() - p0) / 1e9;
				pixels += im.pixels();
				model.add(Scores.compare(BoxMasks.make(prob, im.width, im.height, e.getValue(), BoxMasks.Options.DEFAULTS.withMargin(settings.margin)).labels(), ref));
				box.add(Scores.compare(Baselines.boxItself(im, e.getValue()), ref));
				otsu.add(Scores.compare(Baselines.otsuInBox(im, e.getValue()), ref));
				// no boxes: the whole image
				long w0 = System.nanoTime();
				WholeImage.Outcome o = WholeImage.mask(runner, im, 0);
				wholeSeconds += (System.nanoTime() - w0) / 1e9;
				whole.add(Scores.compare(o.result().labels(), ref));
				double size = r.header().objectSize / o.scale();
				plainCC.add(Scores.compare(org.corral.instances.ImageMasks.make(o.probability(), im.width, im.height, size, org.corral.instances.ImageMasks.THRESHOLD, false).labels(), ref));
				classical.add(Scores.compare(Baselines.otsuWatershed(im, r.header().objectSize), ref));
			}
		}
		List<Row> rows = new ArrayList<>();
		rows.add(new Row("corral", model, learnSeconds, sps, pixels / 1e6 / predSeconds));
		rows.add(new Row("box itself", box, 0, 0, 0));
		rows.add(new Row("otsu in box", otsu, 0, 0, 0));
		rows.add(new Row("whole image", whole, 0, 0, pixels / 1e6 / wholeSeconds));
		rows.add(new Row("prob+CC", plainCC, 0, 0, 0));
		rows.add(new Row("otsu+wshed", classical, 0, 0, 0));
		return rows;
	}

	public static String table(String set, List<Row> rows) {
		StringBuilder sb = new StringBuilder();
		sb.append(String.format(Locale.ROOT, "%-28s %-12s %8s %8s %8s %8s %8s %8s %9s %8s %8s%n", "set", "method", "objDice", "objIoU", "pixDice", "F1@0.5", "meanAP", "mDice",
			"learn_s", "s/step", "MP/s"));
		for (Row r : rows)
			sb.append(String.format(Locale.ROOT, "%-28s %-12s %8.4f %8.4f %8.4f %8.4f %8.4f %8.4f %9.1f %8.3f %8.2f%n", set, r.method(), r.tally().objectDice(),
				r.tally().objectIoU(), r.tally().pixelDice(), r.tally().f1(0.5), r.tally().meanAP(), r.tally().matchedDice(), r.learnSeconds(), r.secondsPerStep(), r.megapixelsPerSecond()));
		return sb.toString();
	}

	/** Peak resident memory of this process (Java heap and native buffers), from /proc; -1 elsewhere. */
	public static long peakMemoryBytes() {
		try {
			for (String l : Files.readAllLines(Path.of("/proc/self/status")))
				if (l.startsWith("VmHWM:")) return Long.parseLong(l.replaceAll("[^0-9]", "")) * 1024;
		} catch (Exception e) {
			// not Linux: unknown
		}
		return -1;
	}
}
