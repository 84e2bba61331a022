package org.corral.workflow;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.Shape;

import ij.ImagePlus;
import ij.process.ByteProcessor;

import java.io.IOException;
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
import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.instances.ImageMasks;
import org.corral.instances.SeededWatershed;
import org.corral.io.ImageFiles;
import org.corral.io.RoiSets;
import org.corral.predict.ModelRunner;
import org.corral.predict.TiledPredictor;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;

/**
 * Where the time goes: learning seconds per step, then every stage of masking a folder (reading,
 * normalisation, the network, the extra flips of box masks, the instance stage with its distance
 * map and watershed, outlines, writing), each in megapixels per second, the network's GFLOP/s next
 * to a matrix product measured in the same run, end-to-end rates of the real jobs, and peak memory.
 * Prints numbers; asserts nothing.
 */
public final class SpeedBenchmark {
	private SpeedBenchmark() {}

	/** Seconds and megapixels of one stage, summed over the images. */
	static final class Stage {
		final String name;
		double seconds, megapixels;

		Stage(String name) {
			this.name = name;
		}

		void add(long t0, double mp) {
			seconds += (System.nanoTime() - t0) / 1e9;
			megapixels += mp;
		}
	}

	/**
	 * @param images    folder of images; its boxes ({@code boxFile}, or ROI sets) are used to learn
	 *                  when no model is given, and for the box-mask figures
	 * @param modelFile a model, or null to learn one for {@code settings.steps} steps
	 */
	public static String run(Path images, Path boxFile, Path modelFile, LearnSettings settings, Consumer<String> log) {
		Map<Path, List<Box>> boxed = BoxedImages.find(images, boxFile);
		List<Path> files = new ArrayList<>(boxed.keySet());
		files.sort(null);
		if (files.isEmpty()) throw new CorralException("benchmark --speed: no boxed images in " + images);
		StringBuilder out = new StringBuilder();
		double gemm = gemmGflops();
		out.append(String.format(Locale.ROOT, "matrix product 1024x1024 fp32: %.1f GFLOP/s (%d threads)%n", gemm, Runtime.getRuntime().availableProcessors()));

		ModelRunner model;
		if (modelFile != null) model = ModelRunner.open(modelFile);
		else {
			double[] times = new double[settings.steps + 1];
			LearnSettings s = settings.copy();
			s.reportEvery = 1;
			s.minutes = 0;
			Learner.Result r = new Learner(s).learn(Jobs.trainingImages(sorted(boxed)), rep -> times[rep.step()] = rep.secondsPerStep() * rep.step());
			// the median step: neither the warm-up steps nor the step that masks the learning images
			// for the instance map's targets count
			double[] per = new double[s.steps - 1];
			for (int k = 2; k <= s.steps; k++) per[k - 2] = times[k] - times[k - 1];
			java.util.Arrays.sort(per);
			double sps = per.length == 0 ? times[s.steps] : per[per.length / 2];
			out.append(String.format(Locale.ROOT, "learning: %.3f s/step (median of %d steps; batch %d of %dx%d, width %d)%n", sps, s.steps, s.batch, s.crop,
				s.crop, s.base));
			out.append(String.format(Locale.ROOT, "learning, whole run: %.1f s for %d steps%n", times[s.steps], s.steps));
			model = new ModelRunner(r.header(), r.net(), r.manager());
		}
		try (model; NDManager m = NDManager.newBaseManager()) {
			long flops = model.net().flopsPerPixel();
			Stage read = new Stage("read"), norm = new Stage("normalise"),
				inst = new Stage("instance stage (whole image)"), seedStage = new Stage("  of which seeds"), floodStage = new Stage("  of which flooding"),
				outl = new Stage("outlines"), write = new Stage("writing"), fit = new Stage("box masks, fitted");
			int djlTile = TiledPredictor.defaultTile(model.net(), TiledPredictor.Engine.DJL);
			Path tmp = Files.createTempDirectory("corral-speed");
			float[] ranges = model.header().activationRanges;
			try (TiledPredictor one = new TiledPredictor(model.net(), m); TiledPredictor four = new TiledPredictor(model.net(), m).optFlips(ModelRunner.boxFlips()).optActivationRanges(ranges);
				TiledPredictor fourFloat = new TiledPredictor(model.net(), m).optFlips(ModelRunner.boxFlips());
				TiledPredictor djl = new TiledPredictor(model.net(), m, djlTile, 32).optEngine(TiledPredictor.Engine.DJL)) {
				// whole images in float, box masks as masking runs them (8-bit where the model has ranges) and in float, and DJL
				boolean int8 = four.network().engine().endsWith("8-bit");
				Stage net = new Stage("network, 1 pass, tiles of " + one.tile()), flips = new Stage("network, " + ModelRunner.boxFlips() + " flips (box masks" + (int8 ? ", 8-bit)" : ")")),
					flipsFloat = new Stage("network, " + ModelRunner.boxFlips() + " flips, float"), djlStage = new Stage("network, 1 pass, in DJL (tiles of " + djlTile + ")");
				out.append("network engine: " + one.network().engine() + " (compared: " + djl.network().engine() + ")\n");
				// the engine prepares its kernels for each new tile shape on first use: one untimed pass each
				for (Path f : files) {
					PlanarImage n = Normalise.percentiles(ImageFiles.read(f), model.header().normLow, model.header().normHigh);
					one.predictMaps(n, null);
					four.predictMaps(n, null);
					fourFloat.predictMaps(n, null);
					djl.predictMaps(n, null);
				}
				for (Path f : files) {
					long t = System.nanoTime();
					ImagePlus imp = ImageFiles.open(f);
					PlanarImage raw = ImageFiles.planes(imp, 1, 1);
					double mp = raw.width * (double) raw.height / 1e6;
					read.add(t, mp);
					t = System.nanoTime();
					PlanarImage n = Normalise.percentiles(raw, model.header().normLow, model.header().normHigh);
					norm.add(t, mp);
					t = System.nanoTime();
					float[][] maps = one.predictMaps(n, null);
					net.add(t, mp);
					t = System.nanoTime();
					fourFloat.predictMaps(n, null);
					flipsFloat.add(t, mp);
					t = System.nanoTime();
					djl.predictMaps(n, null);
					djlStage.add(t, mp);
					t = System.nanoTime();
					float[] p4 = four.predictMaps(n, null)[0];
					flips.add(t, mp);
					t = System.nanoTime();
					BoxMasks.make(p4, raw.width, raw.height, boxed.get(f), BoxMasks.Options.DEFAULTS);
					fit.add(t, mp);
					t = System.nanoTime();
					ImageMasks.Result res = ImageMasks.make(maps[0], model.instanceMap(maps), raw.width, raw.height, model.header().objectSize, ImageMasks.THRESHOLD,
						ImageMasks.PROMINENCE);
					inst.add(t, mp);
					// its two main steps, timed alone on the same maps: the seeds (maxima of the instance map, or of
					// the distance map without one) and the flooding from them
					boolean[] mask = new boolean[maps[0].length];
					ByteProcessor bin = new ByteProcessor(raw.width, raw.height);
					for (int i = 0; i < mask.length; i++) {
						mask[i] = maps[0][i] >= ImageMasks.THRESHOLD;
						if (mask[i]) bin.set(i, 255);
					}
					t = System.nanoTime();
					ImageMasks.Seeds seeds = ImageMasks.seeds(mask, bin, model.instanceMap(maps), raw.width, raw.height, ImageMasks.PROMINENCE * model.header().objectSize);
					seedStage.add(t, mp);
					t = System.nanoTime();
					SeededWatershed.flood(seeds.landscape(), mask, seeds.labels(), raw.width, raw.height);
					floodStage.add(t, mp);
					t = System.nanoTime();
					var rois = RoiSets.outlines(res.labels(), raw.width, raw.height, res.count(), null);
					outl.add(t, mp);
					t = System.nanoTime();
					String base = f.getFileName().toString().replaceAll("\\.[^.]*$", "");
					RoiSets.writeZip(OutputNames.outlines(tmp, base), java.util.Arrays.stream(rois).filter(r -> r != null).toList());
					ImageFiles.saveTiff(ImageFiles.labelImage(base, new int[][] {res.labels()}, raw.width, raw.height, imp.getCalibration()), OutputNames.labels(tmp, base));
					write.add(t, mp);
				}
				out.append(String.format(Locale.ROOT, "%d image(s), %.2f MP, network %,d FLOP per pixel%n", files.size(), read.megapixels, flops));
				out.append(String.format(Locale.ROOT, "%-34s %9s %9s%n", "stage", "seconds", "MP/s"));
				for (Stage s : List.of(read, norm, net, djlStage, flips, flipsFloat, fit, inst, seedStage, floodStage, outl, write))
					out.append(String.format(Locale.ROOT, "%-34s %9.3f %9.3f%n", s.name, s.seconds, s.megapixels / s.seconds));
				double gf = flops * net.megapixels * 1e6 / net.seconds / 1e9;
				out.append(String.format(Locale.ROOT, "network: %.1f GFLOP/s = %.0f %% of the matrix product (image pixels only; tile context not counted)%n", gf, 100 * gf / gemm));

				// end to end, the real jobs: every output written, as a user runs them
				long t = System.nanoTime();
				Jobs.maskImages(files, model, tmp.resolve("mask-image"), 0, false, null, l -> {});
				double e1 = (System.nanoTime() - t) / 1e9;
				t = System.nanoTime();
				Jobs.maskBoxes(sorted(boxed), boxFile, model, BoxMasks.Options.DEFAULTS, Share.ALL, tmp.resolve("mask-boxes"), null, l -> {});
				double e2 = (System.nanoTime() - t) / 1e9;
				out.append(String.format(Locale.ROOT, "end to end: mask-image %.3f MP/s (%.2f s); mask-boxes without adaptation %.3f MP/s (%.2f s)%n", read.megapixels / e1, e1,
					read.megapixels / e2, e2));
			} finally {
				deleteTree(tmp);
			}
		} catch (IOException e) {
			throw new CorralException("benchmark --speed: " + e.getMessage(), e);
		}
		out.append(String.format(Locale.ROOT, "peak memory (resident): %.0f MiB%n", Benchmark.peakMemoryBytes() / 1048576.0));
		return out.toString();
	}

	/** Best of five 1024x1024 fp32 matrix products through the same engine, in GFLOP/s. */
	static double gemmGflops() {
		int n = 1024;
		try (NDManager m = NDManager.newBaseManager()) {
			NDArray a = m.randomUniform(-1, 1, new Shape(n, n)), b = m.randomUniform(-1, 1, new Shape(n, n));
			a.matMul(b).close(); // warm-up
			double best = Double.MAX_VALUE;
			for (int k = 0; k < 5; k++) {
				long t = System.nanoTime();
				NDArray c = a.matMul(b);
				c.getFloat(0, 0); // forces the product
				best = Math.min(best, (System.nanoTime() - t) / 1e9);
				c.close();
			}
			return 2.0 * n * n * n / best / 1e9;
		}
	}

	private static Map<Path, List<Box>> sorted(Map<Path, List<Box>> m) {
		Map<Path, List<Box>> s = new LinkedHashMap<>();
		m.keySet().stream().sorted().forEach(k -> s.put(k, m.get(k)));
		return s;
	}

	private static void deleteTree(Path dir) throws IOException {
		try (var w = Files.walk(dir)) {
			for (Path p : w.sorted(java.util.Comparator.reverseOrder()).toList()) Files.deleteIfExists(p);
		}
	}
}
