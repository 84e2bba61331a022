package org.corral.cli;

import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.CancellationException;
import java.util.concurrent.atomic.AtomicBoolean;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.predict.ModelRunner;
import org.corral.supervision.Supervision;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.workflow.Benchmark;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Demo;
import org.corral.workflow.Jobs;

/** The headless command line: {@code corral <job> [--option value ...]}. */
public final class Main {
	static final String USAGE = """
		Corral: masks for boxed objects, learned on the CPU from the boxes alone.

		usage: corral <job> [options]     (corral <job> --help for the options of a job)

		jobs:
		  learn       a folder of images + their boxes -> a model file
		  mask-boxes  images + boxes + model -> one mask per box (label TIFF, ROI zip, CSV, PNG)
		  mask-image  images + model -> every object masked, no boxes needed (and --propose boxes)
		  score       label images vs reference label images -> score table
		  demo        the whole job on the bundled demo images
		  benchmark   learn on half of a reference set, mask the other half, print figures
		  tour        on a display: box ten demo objects in the ROI Manager, learn, mask, take screenshots
		""";

	static final String LEARN_HELP = """
		corral learn --images DIR --model FILE [--boxes FILE.csv] [options]
		  --images DIR     folder of images (TIFF, PNG, ...)
		  --boxes FILE     box CSV (header row; columns image,x,y,width,height); without it each
		                   image's ROI set NAME.zip / NAME.rois.zip / NAME.roi is read
		  --model FILE     model file to write (written only when learning completes)
		  --steps N        learning steps (default 400); same steps + seed + threads = same model
		  --minutes M      time cap (default 5); a run that would take longer is shortened to fit,
		                   and is then no longer reproducible (the model header says so)
		  --seed S         random seed (default 1)
		  --band W         band width w of the tightness prior (default 5)
		  --margin PX      lines skipped at each box side, for loosely drawn boxes (default 0)
		  --width C        network width, channels at full resolution (default 16)
		  --all-boxed      every object of every image is boxed: all pixels outside the boxes are
		                   background (default: only a ring around each box, safe when some objects
		                   are not boxed)
		  --threads N      CPU threads (default: all)
		""";

	public static void main(String[] argv) {
		int code;
		try {
			code = run(argv);
		} catch (CorralException e) {
			System.err.println("corral: error: " + e.getMessage());
			code = 2;
		} catch (CancellationException e) {
			System.err.println("corral: " + e.getMessage() + "; nothing written");
			code = 130;
		}
		System.exit(code);
	}

	public static int run(String[] argv) {
		if (argv.length == 0 || argv[0].equals("--help") || argv[0].equals("-h")) {
			System.out.print(USAGE);
			return argv.length == 0 ? 1 : 0;
		}
		String job = argv[0];
		boolean help = List.of(argv).contains("--help");
		switch (job) {
			case "learn" -> {
				if (help) return print(LEARN_HELP);
				Args a = new Args(job, argv, 1, Set.of("partial", "all-boxed"));
				threads(a);
				Path images = a.path("images", true), model = a.path("model", true), boxes = a.path("boxes", false);
				LearnSettings s = settings(a);
				a.checkAllUsed();
				Map<Path, List<Box>> boxed = BoxedImages.find(images, boxes);
				AtomicBoolean stop = cancelOnInterrupt();
				System.out.println(s.background == Supervision.BackgroundMode.FULL ? "background: every pixel outside the boxes (--all-boxed)"
					: "background: a ring around each box, as some objects may be unboxed (give --all-boxed when every object is boxed)");
				Learner.Result r = Jobs.learn(boxed, s, model, printer(stop), note -> System.out.println("note: " + note));
				System.out.printf(Locale.ROOT, "model written to %s (%s steps, %.3f s/step, constraints met %.3f)%n", model, r.header().counts.get("steps"),
					r.header().counts.get("secondsPerStep"), r.header().scores.getOrDefault("constraintsMet", Double.NaN));
				r.close();
				return 0;
			}
			case "mask-boxes" -> {
				if (help) return print("""
					corral mask-boxes --images DIR --model FILE --out DIR [--boxes FILE.csv] [--threads N]
					  writes OUT/NAME.tif (label k = mask of the k-th box of NAME), OUT/NAME.rois.zip,
					  OUT/NAME.objects.csv (one row per box, with fit figures and flags), OUT/NAME.overlay.png
					""");
				Args a = new Args(job, argv, 1, Set.of());
				threads(a);
				Path images = a.path("images", true), model = a.path("model", true), out = a.path("out", true), boxes = a.path("boxes", false);
				a.checkAllUsed();
				Map<Path, List<Box>> boxed = BoxedImages.find(images, boxes);
				if (boxed.isEmpty()) throw new CorralException("No boxes found for the images in " + images);
				try (ModelRunner m = ModelRunner.open(model)) {
					Jobs.maskBoxes(boxed, m, out, System.out::println);
				}
				return 0;
			}
			case "mask-image" -> {
				if (help) return print("""
					corral mask-image --images DIR --model FILE --out DIR [--object-size PX] [--propose] [--threads N]
					  masks every object of every image, no boxes needed: OUT/NAME.tif (one id per object),
					  OUT/NAME.rois.zip, OUT/NAME.objects.csv (area, mean probability, confidence, flags),
					  OUT/NAME.overlay.png. Resumable: images already done are skipped.
					  --object-size PX  typical object side in these images (default: measured in a first pass)
					  --propose         also write the objects as boxes: OUT/boxes.csv (learner's form) and
					                    OUT/NAME.boxes.zip, to correct and learn again
					""");
				Args a = new Args(job, argv, 1, Set.of("propose"));
				threads(a);
				Path images = a.path("images", true), model = a.path("model", true), out = a.path("out", true);
				double size = a.number("object-size", 0);
				boolean propose = a.has("propose");
				a.checkAllUsed();
				List<Path> files = BoxedImages.images(images);
				if (files.isEmpty()) throw new CorralException("No images in " + images);
				AtomicBoolean stop = cancelOnInterrupt();
				Jobs.FolderReport rep;
				try (ModelRunner m = ModelRunner.open(model)) {
					rep = Jobs.maskImages(files, m, out, size, propose, stop::get, System.out::println);
				}
				System.out.printf(Locale.ROOT, "%d written, %d skipped (already done), %d failed%n", rep.written(), rep.skipped(), rep.failed().size());
				return rep.failed().isEmpty() ? 0 : 3;
			}
			case "score" -> {
				if (help) return print("""
					corral score --labels DIR --reference DIR [--out FILE.csv]
					  per image and overall (ALL): per-object Dice and IoU, pixel Dice, precision / recall / F1
					  at IoU 0.5, mean AP over IoU 0.5:0.05:0.95 (2018 Data Science Bowl form)
					""");
				Args a = new Args(job, argv, 1, Set.of());
				Path labels = a.path("labels", true), ref = a.path("reference", true), out = a.path("out", false);
				a.checkAllUsed();
				System.out.print(Jobs.score(labels, ref, out));
				return 0;
			}
			case "demo" -> {
				if (help) return print("corral demo [--out DIR] [--steps N] [learn options]\n  learns from the boxes of test-images/ (default 150 steps), masks them, scores them against\n  test-images/reference (default out: corral-demo-output)\n");
				Args a = new Args(job, argv, 1, Set.of("partial", "all-boxed"));
				threads(a);
				Path out = Path.of(a.str("out", "corral-demo-output"));
				LearnSettings s = settings(a, DEMO_STEPS);
				a.checkAllUsed();
				Demo.run(Path.of("test-images"), out, s, printer(cancelOnInterrupt()), System.out::println);
				return 0;
			}
			case "benchmark" -> {
				if (help) return print("corral benchmark --data DIR [--data2 DIR] [--grow 0,2,4,8] [learn options]\n  each DIR is a reference set (images/, labels/, boxes.csv): learn on the first 5 images, mask the other 5;\n  prints the figures of Corral, the box itself and Otsu in the box; with boxes (tight) and without (whole image).\n  --grow LIST  instead: per-object Dice with every box enlarged by each amount, without and with --margin\n");
				Args a = new Args(job, argv, 1, Set.of("partial", "all-boxed"));
				threads(a);
				List<Path> sets = new java.util.ArrayList<>();
				sets.add(a.path("data", true));
				if (a.has("data2")) sets.add(a.path("data2", true));
				LearnSettings s = settings(a);
				int nLearn = a.integer("learn-images", 5);
				String grow = a.str("grow", null);
				a.checkAllUsed();
				if (grow != null) { // the loose-box sensitivity table instead
					int[] g = java.util.Arrays.stream(grow.split(",")).map(String::trim).mapToInt(Integer::parseInt).toArray();
					StringBuilder t = new StringBuilder();
					for (Path set : sets) t.append(Benchmark.sensitivity(set, s, nLearn, g, System.out::println));
					System.out.print("\n" + t);
					return 0;
				}
				StringBuilder all = new StringBuilder();
				for (Path set : sets) {
					System.out.println("== " + set);
					var rows = Benchmark.run(set, s, nLearn, System.out::println);
					String t = Benchmark.table(set.getFileName().toString(), rows);
					System.out.print(t);
					all.append(t);
				}
				System.out.print("\n" + all);
				System.out.printf(Locale.ROOT, "peak memory (resident): %.0f MiB%n", Benchmark.peakMemoryBytes() / 1048576.0);
				return 0;
			}
			case "tour" -> {
				if (help) return print("corral tour [--out DIR] [--steps N]\n  on a display (xvfb-run -a on a server): boxes ten demo objects in the ROI Manager, learns, masks,\n  and saves screenshots of the learning plot, the outlines and the windows (default out: corral-tour)\n");
				Args a = new Args(job, argv, 1, Set.of());
				Path out = Path.of(a.str("out", "corral-tour"));
				int steps = a.integer("steps", DEMO_STEPS);
				a.checkAllUsed();
				try {
					org.corral.fiji.Tour.run(Path.of("test-images"), out, steps);
				} catch (CorralException e) {
					throw e;
				} catch (Exception e) {
					throw new CorralException("tour failed: " + e, e);
				}
				System.out.println("screenshots in " + out.toAbsolutePath() + ": learning-plot.png, outlines-over-image.png, screen.png; table boxes-table.csv");
				return 0;
			}
			default -> throw new CorralException("unknown job '" + job + "'\n" + USAGE);
		}
	}

	static final int DEMO_STEPS = 150;

	static LearnSettings settings(Args a) {
		return settings(a, new LearnSettings().steps);
	}

	static LearnSettings settings(Args a, int defaultSteps) {
		LearnSettings s = new LearnSettings();
		s.steps = defaultSteps;
		s.minutes = a.number("minutes", s.minutes);
		s.steps = a.integer("steps", s.steps);
		s.seed = a.integer("seed", (int) s.seed);
		s.band = a.integer("band", s.band);
		s.margin = a.integer("margin", s.margin);
		s.base = a.integer("width", s.base);
		s.crop = a.integer("crop", s.crop);
		s.batch = a.integer("batch", s.batch);
		s.learningRate = a.number("lr", s.learningRate);
		s.tMax = a.number("tmax", s.tMax);
		s.fillMin = a.number("fill-min", s.fillMin);
		s.fillMax = a.number("fill-max", s.fillMax);
		s.pairTolerance = a.number("pair-tolerance", s.pairTolerance);
		s.weights = new org.corral.loss.LossWeights(a.number("w-band", s.weights.band()), a.number("w-fill", s.weights.fill()),
			a.number("w-pair", s.weights.pairwise()));
		if (a.has("all-boxed")) s.background = Supervision.BackgroundMode.FULL;
		if (a.has("partial")) s.background = Supervision.BackgroundMode.RING; // the default, named for scripts
		s.validate();
		return s;
	}

	static void threads(Args a) {
		int n = a.integer("threads", 0);
		if (n > 0) {
			System.setProperty("ai.djl.pytorch.num_threads", String.valueOf(n));
			System.setProperty("ai.djl.pytorch.num_interop_threads", "1");
		}
	}

	static Progress printer(AtomicBoolean stop) {
		return new Progress() {
			@Override
			public void report(Report r) {
				System.out.printf(Locale.ROOT, "step %4d/%d  loss %.4f (background %.4f, box constraints %.4f, pairwise %.4f)  met %.3f  t %.1f  %.2f s/step  %.0f s left%n",
					r.step(), r.total(), r.loss(), r.background(), r.constraints(), r.pairwise(), r.met(), r.t(), r.secondsPerStep(), r.secondsLeft());
			}

			@Override
			public boolean cancelled() {
				return stop.get();
			}
		};
	}

	/** Ctrl-C asks learning to stop between steps; the model file is then not written. */
	static AtomicBoolean cancelOnInterrupt() {
		AtomicBoolean stop = new AtomicBoolean();
		try {
			sun.misc.Signal.handle(new sun.misc.Signal("INT"), sig -> {
				if (stop.getAndSet(true)) Runtime.getRuntime().halt(130);
				System.err.println("corral: stopping after this step (Ctrl-C again to quit at once)");
			});
		} catch (Throwable e) {
			// no signal support: Ctrl-C ends the JVM; atomic writes still leave no partial file
		}
		return stop;
	}

	private static int print(String s) {
		System.out.print(s);
		return 0;
	}
}
