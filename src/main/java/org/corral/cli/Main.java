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
import org.corral.supervision.SupervisionSettings;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.workflow.Benchmark;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Adaptation;
import org.corral.workflow.Demo;
import org.corral.workflow.FolderMerge;
import org.corral.workflow.FolderRun;
import org.corral.workflow.Share;
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
		  cluster-script  a mask-image / mask-boxes folder run as a SLURM job array + merge job
		  merge       joins the tables of a folder run done in shares (--part) into the whole run's
		  demo        the whole job on the bundled demo images
		  benchmark   learn on half of a reference set, mask the other half, print figures
		  tour        on a display: box ten demo objects in the ROI Manager, learn, mask, take screenshots
		""";

	static final String LEARN_HELP = String.format(java.util.Locale.ROOT, """
		corral learn --images DIR --model FILE [--boxes FILE.csv] [options]
		  --images DIR     folder of images (TIFF, PNG, ...)
		  --boxes FILE     box CSV (header row; columns image,x,y,width,height); without it each
		                   image's ROI set NAME.zip / NAME.rois.zip / NAME.roi is read
		  --model FILE     model file to write (written only when learning completes)
		  --steps N        learning steps (default %d); same steps + seed + threads = same model
		  --minutes M      time cap (default 5); a run that would take longer is shortened to fit,
		                   and is then no longer reproducible (the model header says so)
		  --seed S         random seed (default %d)
		  --band W         band width w of the tightness prior (default %d)
		  --margin PX      lines skipped at each box side, for loosely drawn boxes (default 0)
		  --width C        network width, channels at full resolution (default 16)
		  --all-boxed      every object of every image is boxed: all pixels outside the boxes are
		                   background (default: only a ring around each box, safe when some objects
		                   are not boxed)
		  --instance-map on|off  also learn each object's distance to its edge, from the network's own
		                   box masks, to split touching objects in whole images (default on)
		  --w-instance W   weight of the instance map in the loss once it learns from the network's
		                   own box masks: from 60 %% of the run, and from scratch not before step 240
		                   (before: at most 1) (default %s)
		  --augment on|off stain, gamma, blur and noise jitter of the crops (default off)
		  --scale-jitter J also learn each image resized by 1/(1+J) and 1+J (default 0.3; 0 = off)
		  --unknown-ground W  weight with which ground neither boxed nor next to a box is learned
		                   as background (default 0.1; 0 = left unknown; known background weighs 1)
		  --threads N      CPU threads (default: all)
		""", LearnSettings.DEFAULT_STEPS, LearnSettings.DEFAULT_SEED, SupervisionSettings.DEFAULT_BAND, org.corral.loss.LossWeights.INSTANCE);

	public static void main(String[] argv) {
		System.exit(exitCode(() -> run(argv), System.err));
	}

	/**
	 * Runs a job and turns its outcome into the process's exit code: 0 done, 2 refused with a
	 * message, 130 cancelled, 1 an internal error (its stack trace printed). The process always
	 * ends: an uncaught error would otherwise leave the engines' worker threads holding it open,
	 * and a batch script waiting for ever.
	 */
	static int exitCode(java.util.concurrent.Callable<Integer> job, java.io.PrintStream err) {
		try {
			return job.call();
		} catch (CorralException e) {
			err.println("corral: error: " + e.getMessage());
			return 2;
		} catch (CancellationException e) {
			err.println("corral: " + e.getMessage() + "; nothing written");
			return 130;
		} catch (Exception | Error e) {
			err.println("corral: internal error (please report it with the lines below)");
			e.printStackTrace(err);
			return 1;
		}
	}

	public static int run(String[] argv) {
		if (argv.length == 0 || argv[0].equals("--help") || argv[0].equals("-h")) {
			System.out.print(USAGE);
			return argv.length == 0 ? 1 : 0;
		}
		String job = argv[0];
		boolean help = List.of(argv).contains("--help");
		return switch (job) {
			case "learn" -> learnJob(job, argv, help);
			case "mask-boxes" -> maskBoxesJob(job, argv, help);
			case "mask-image" -> maskImageJob(job, argv, help);
			case "merge" -> mergeJob(job, argv, help);
			case "cluster-script" -> clusterScriptJob(job, argv, help);
			case "score" -> scoreJob(job, argv, help);
			case "demo" -> demoJob(job, argv, help);
			case "benchmark" -> benchmarkJob(job, argv, help);
			case "tour" -> tourJob(job, argv, help);
			default -> throw new CorralException("unknown job '" + job + "'\n" + USAGE);
		};
	}

	/** Learns a model from the boxes of a folder. */
	private static int learnJob(String job, String[] argv, boolean help) {
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
		Learner.Result r = Jobs.learn(boxed, boxes, s, model, printer(stop), note -> System.out.println("note: " + note));
		System.out.printf(Locale.ROOT, "model written to %s (%s steps, %.3f s/step, constraints met %.3f)%n", model, r.header().counts.steps,
			r.header().counts.secondsPerStep, r.header().scores.constraintsMet);
		System.out.printf(Locale.ROOT, "whole images will be masked at probability %.2f with %d test-time flip(s)%n", r.header().imageThreshold, r.header().imageFlips);
		r.close();
		return 0;
	}

	/** Masks every box of a folder, adapting the model to those boxes first (by default). */
	private static int maskBoxesJob(String job, String[] argv, boolean help) {
		if (help) return print(String.format(Locale.ROOT, """
			corral mask-boxes --images DIR --out DIR [--model FILE] [--boxes FILE.csv] [options]
			  writes OUT/NAME.labels.tif (label k = mask of the k-th box of NAME), OUT/NAME.outlines.zip,
			  OUT/NAME.objects.csv (one row per box, with fit figures and flags), OUT/NAME.overlay.png,
			  and OUT/corral-run.json (the model used). OUT must not be the image folder. Resumable:
			  images already done are skipped; a failing image is listed in OUT/corral-failures.csv
			  and the others go on (exit code 3).
			  By default the model first continues learning on the boxes being masked (one step per
			  box, %d to %d steps; without --model it learns from scratch on them), then each mask is
			  fitted to its box (it crosses every row and column of the box, and fills at most %.0f %%%%).
			  --model FILE         model to start from (optional)
			  --no-adapt           mask with the model as it is
			  --adapt-steps N      steps of that learning (default: the rule above)
			  --save-adapted FILE  also save the adapted model
			  --margin PX          boxes may be up to PX too large on each side
			  --part K/N           only share K of N of the images (sorted by name, every N-th from
			                       the K-th); adaptation then learns from that share's boxes only
			  --seed S, --band W, --all-boxed, --threads N   as for learn
			""", Adaptation.MIN_STEPS, Adaptation.MAX_STEPS, 100 * SupervisionSettings.DEFAULT_FILL_MAX).replace("%%", "%"));
		Args a = new Args(job, argv, 1, Set.of("no-adapt", "partial", "all-boxed"));
		threads(a);
		Path images = a.path("images", true), model = a.path("model", false), out = a.path("out", true), boxes = a.path("boxes", false);
		boolean adapt = !a.has("no-adapt");
		int steps = a.integer("adapt-steps", 0, 1, 1_000_000);
		Path save = a.path("save-adapted", false);
		Share share = Share.parse(a.str("part", null));
		LearnSettings s = settings(a);
		a.checkAllUsed();
		if (!adapt && model == null) throw new CorralException("mask-boxes: --no-adapt needs --model FILE");
		Map<Path, List<Box>> boxed = BoxedImages.find(images, boxes);
		if (boxed.isEmpty()) throw new CorralException("No boxes found for the images in " + images);
		AtomicBoolean stop = cancelOnInterrupt();
		return report(Jobs.maskBoxes(boxed, boxes, model, new Jobs.AdaptPlan(adapt, steps, save, s), share, out, stop::get, printer(stop), System.out::println));
	}

	/** Masks every object of a folder's images, no boxes needed. */
	private static int maskImageJob(String job, String[] argv, boolean help) {
		if (help) return print("""
			corral mask-image --images DIR --model FILE --out DIR [--object-size PX] [--propose] [--threads N]
			corral mask-image --images DIR [--model FILE] --boxes FILE.csv --out DIR [options]
			  masks every object of every image, no boxes needed: OUT/NAME.labels.tif (one id per object),
			  OUT/NAME.outlines.zip, OUT/NAME.objects.csv (area, mean probability, confidence, flags),
			  OUT/NAME.overlay.png. OUT must not be the image folder. Resumable: images already done
			  are skipped; a failing image is listed in OUT/corral-failures.csv, the others go on (exit 3).
			  --object-size PX  typical object side in these images (default: measured in a first pass)
			  --propose         also write the objects as boxes: OUT/corral-proposed-boxes.csv (learner's
			                    form) and OUT/NAME.proposed-boxes.zip, to correct and learn again
			  --part K/N        only share K of N of the images (sorted by name, every N-th from the K-th);
			                    folder-level files get the share's name (corral-failures.part-K-of-N.csv),
			                    and corral merge joins them; cluster-script writes the whole SLURM job
			  --boxes FILE.csv  boxes drawn on some of these images (a few images of a new look): the
			                    model first continues learning on them as mask-boxes does (without --model
			                    it learns from them alone), then masks every object of every image;
			                    OUT/corral-run.json records the model used. Not with --part (adapt once
			                    with mask-boxes --save-adapted FILE and give the shares that model)
			  --adapt-steps N, --save-adapted FILE, --seed S, --band W, --margin PX, --all-boxed
			                    with --boxes, as for mask-boxes
			  OUT/corral-objects.csv: every image's objects under one header (also written by merge)
			""");
		Args a = new Args(job, argv, 1, Set.of("propose", "all-boxed", "partial"));
		threads(a);
		Path images = a.path("images", true), boxes = a.path("boxes", false), model = a.path("model", boxes == null), out = a.path("out", true);
		double size = a.number("object-size", 0, 0, 1e6);
		boolean propose = a.has("propose");
		Share share = Share.parse(a.str("part", null));
		int steps = a.integer("adapt-steps", 0, 1, 1_000_000);
		Path save = a.path("save-adapted", false);
		LearnSettings s = boxes == null ? null : settings(a); // learning options only mean something with boxes to learn from
		a.checkAllUsed();
		if (boxes == null && (steps > 0 || save != null))
			throw new CorralException("mask-image: --adapt-steps and --save-adapted need --boxes FILE.csv (the boxes to learn from)");
		if (boxes != null && !share.isAll())
			throw new CorralException("mask-image: --boxes with --part would repeat the same learning in every share; adapt once with mask-boxes --save-adapted FILE, then give --model FILE to the shares");
		List<Path> files = BoxedImages.images(images);
		if (files.isEmpty()) throw new CorralException("No images in " + images);
		AtomicBoolean stop = cancelOnInterrupt();
		if (boxes != null) {
			Map<Path, List<Box>> boxed = BoxedImages.find(images, boxes);
			return report(Jobs.maskImages(files, boxed, boxes, model, new Jobs.AdaptPlan(true, steps, save, s), out, size, propose, stop::get, printer(stop),
				System.out::println));
		}
		FolderRun.Report rep;
		try (ModelRunner m = ModelRunner.open(model)) {
			System.out.println(m.wholeImageSettings());
			rep = Jobs.maskImages(files, share, m, out, size, propose, stop::get, System.out::println);
		}
		return report(rep);
	}

	/** Joins the outputs of a folder run done in shares. */
	private static int mergeJob(String job, String[] argv, boolean help) {
		if (help) return print("""
			corral merge --out DIR [--images DIR [--job mask-image|mask-boxes] [--boxes FILE.csv]]
			  after a folder run in shares (--part K/N): joins the shares' failure lists and proposed
			  boxes into OUT/corral-failures.csv and OUT/corral-proposed-boxes.csv, and writes
			  OUT/corral-objects.csv (every image's objects, image name first). With --images, images
			  neither done nor failed are listed as not run yet (for mask-boxes, images with boxes).
			  Exit code 3 when an image failed or was not run.
			""");
		Args a = new Args(job, argv, 1, Set.of());
		Path out = a.path("out", true), images = a.path("images", false), boxes = a.path("boxes", false);
		String kind = a.str("job", "mask-image");
		a.checkAllUsed();
		if (!org.corral.cluster.SlurmScript.JOBS.contains(kind)) throw new CorralException("merge: --job must be mask-image or mask-boxes, got '" + kind + "'");
		List<Path> expected = images == null ? null
			: kind.equals("mask-boxes") ? List.copyOf(BoxedImages.find(images, boxes).keySet()) : BoxedImages.images(images);
		FolderMerge.Report r = FolderMerge.merge(out, expected);
		System.out.println(r.summary());
		return r.complete() ? 0 : 3;
	}

	/** Writes the SLURM job array of a folder run. */
	private static int clusterScriptJob(String job, String[] argv, boolean help) {
		if (help) return print("""
			corral cluster-script --parts N [--time T] [--mem M] [--partition P] [--threads C] [--launcher CMD] -- JOB
			  writes a SLURM job array for a folder run, JOB being a mask-image or mask-boxes command line
			  (for example: -- mask-image --images DIR --model FILE --out DIR): task i runs share i+1 of N
			  (--part), then a merge job (corral merge) joins the shares' tables. The scripts go to
			  OUT/corral-slurm/ (array.sbatch, merge.sbatch, logs/); the sbatch command is printed, not run.
			  --parts N      shares = array tasks (required)
			  --time T       time limit per task (default 01:00:00)
			  --mem M        memory per task (default 4G; Java gets 60 %, the rest is for the engine)
			  --partition P  partition (default: the cluster's default)
			  --threads C    cores per task (default 2)
			  --launcher CMD the command that runs Corral on the nodes (default: this ./corral)
			  Same model, same images, same --threads: the merged outputs are byte for byte those of one
			  run of the whole folder. mask-boxes adapts per share unless --no-adapt is given.
			""");
		int dash = List.of(argv).indexOf("--");
		if (dash < 0) throw new CorralException("cluster-script: give the folder job after --, for example: -- mask-image --images DIR --model FILE --out DIR");
		String[] own = java.util.Arrays.copyOfRange(argv, 0, dash);
		List<String> jobArgs = List.of(argv).subList(dash + 1, argv.length);
		Args a = new Args(job, own, 1, Set.of());
		int parts = a.integer("parts", 0, 1, 100_000);
		if (parts == 0) throw new CorralException("cluster-script: --parts N is required");
		String launcher = a.str("launcher", null);
		var settings = new org.corral.cluster.SlurmScript.Settings(jobArgs, parts, a.str("time", "01:00:00"), a.str("mem", "4G"), a.str("partition", null),
			a.integer("threads", 2, 1, 4096), launcher == null ? org.corral.cluster.SlurmScript.defaultLauncher() : List.of(launcher), Path.of(""));
		a.checkAllUsed();
		var sc = org.corral.cluster.SlurmScript.write(settings);
		System.out.println("wrote " + sc.array() + " (" + parts + " array tasks) and " + sc.merge() + "; logs go to " + sc.logs());
		if (jobArgs.get(0).equals("mask-boxes") && !jobArgs.contains("--no-adapt"))
			System.out.println("note: each share adapts the model to its own boxes; for one model across shares, adapt once (mask-boxes --save-adapted, or learn) and give --no-adapt");
		System.out.println("submit with:\n  " + sc.submit());
		return 0;
	}

	/** Scores label images against reference labels. */
	private static int scoreJob(String job, String[] argv, boolean help) {
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

	/** Learns, masks and scores the bundled demo images. */
	private static int demoJob(String job, String[] argv, boolean help) {
		if (help) return print("corral demo [--out DIR] [--steps N] [learn options]\n  learns from the boxes of test-images/fields/ (3 fields of 512x512, 240 nuclei; default " + LearnSettings.QUICK_STEPS + " steps), masks them, scores them against\n  their reference masks (default out: corral-demo-output)\n");
		Args a = new Args(job, argv, 1, Set.of("partial", "all-boxed"));
		threads(a);
		Path out = Path.of(a.str("out", "corral-demo-output"));
		LearnSettings s = settings(a, LearnSettings.QUICK_STEPS);
		a.checkAllUsed();
		Demo.run(Path.of("test-images", "fields"), out, s, printer(cancelOnInterrupt()), System.out::println);
		return 0;
	}

	/** The benchmarks: split, cross-collection, corrections, speed. */
	private static int benchmarkJob(String job, String[] argv, boolean help) {
		if (help) return print("corral benchmark --data DIR [--data2 DIR] [--grow 0,2,4,8] [learn options]\n  each DIR is a reference set (images/, labels/, boxes.csv): learn on the first 5 images, mask the other 5;\n  prints the figures of Corral, the box itself and Otsu in the box; with boxes (tight) and without (whole image).\n  --grow LIST  instead: per-object Dice with every box enlarged by each amount, without and with --margin\n"
			+ "corral benchmark --learn A --mask B[,C...] [--cache DIR] [--adapt-steps N]\n  the cross-collection protocol (README); --adapt-steps: steps of every adaptation (default: the rule of mask-boxes)\n"
			+ "corral benchmark --corrections SET [--rounds N] [--fraction F]\n  outlines as corrections: per round, the worst-masked F (default 0.1) of the learning images' objects\n  get their reference outlines and learning starts again; per-object Dice of corrected, neighbours, held-out\n"
			+ "corral benchmark --speed [--images DIR [--boxes FILE.csv]] [--model FILE] [--steps N]\n  where the time goes: learning s/step (" + SPEED_STEPS
			+ " steps unless --model), then each stage of masking the folder (default test-images/) in MP/s,\n  the network's GFLOP/s against a matrix product measured in the same run, end-to-end rates and peak memory\n");
		Args a = new Args(job, argv, 1, Set.of("partial", "all-boxed", "speed"));
		threads(a);
		Path corrections = a.path("corrections", false);
		if (corrections != null) return correctionsBenchmark(a, corrections);
		if (a.has("speed")) return speedBenchmark(a);
		if (a.has("learn")) return crossBenchmark(a);
		return splitBenchmark(a);
	}

	/** Outlines as corrections, round by round. */
	private static int correctionsBenchmark(Args a, Path corrections) {
		int rounds = a.integer("rounds", 2, 1, 100);
		double fraction = a.number("fraction", 0.1, 0.001, 1);
		LearnSettings s = settings(a);
		a.checkAllUsed();
		System.out.printf(Locale.ROOT, "%s: learn on the first 5 images; each round outlines the worst-masked %.0f %% of their objects and learns again%n",
			corrections, 100 * fraction);
		org.corral.workflow.CorrectionRounds.run(corrections, 5, rounds, fraction, s, System.out::println);
		return 0;
	}

	/** Where the time goes, stage by stage. */
	private static int speedBenchmark(Args a) {
		Path images = a.path("images", false);
		Path boxes = a.path("boxes", false);
		Path model = a.path("model", false);
		LearnSettings s = settings(a, SPEED_STEPS);
		a.checkAllUsed();
		if (images == null) {
			images = Path.of("test-images", "images");
			if (boxes == null) boxes = Path.of("test-images", "boxes.csv");
		}
		System.out.print(org.corral.workflow.SpeedBenchmark.run(images, boxes, model, s, System.out::println));
		return 0;
	}

	/** The cross-collection protocol: learn on A, mask B. */
	private static int crossBenchmark(Args a) {
		Path learnSet = a.path("learn", true);
		List<Path> maskSets = new java.util.ArrayList<>();
		for (String m : a.str("mask", "").split(",")) if (!m.isBlank()) maskSets.add(Path.of(m.trim()));
		if (maskSets.isEmpty()) throw new CorralException("benchmark: --learn needs --mask SET[,SET...]");
		LearnSettings s = settings(a);
		int nLearn = a.integer("learn-images", 5, 1, 1000);
		int adaptSteps = a.integer("adapt-steps", 0, 1, 1_000_000);
		Path cache = a.path("cache", false);
		a.checkAllUsed();
		StringBuilder all = new StringBuilder();
		for (Path m : maskSets) {
			System.out.println("== learn " + learnSet.getFileName() + ", mask " + m.getFileName());
			String t = org.corral.workflow.CrossBenchmark.table(learnSet.getFileName().toString(), m.getFileName().toString(),
				org.corral.workflow.CrossBenchmark.run(learnSet, m, s, nLearn, adaptSteps, cache, System.out::println));
			System.out.print(t);
			all.append(t);
		}
		System.out.print("\n" + all);
		System.out.printf(Locale.ROOT, "peak memory (resident): %.0f MiB%n", Benchmark.peakMemoryBytes() / 1048576.0);
		return 0;
	}

	/** Learn on the first images of each set, mask the others; or the loose-box table (--grow). */
	private static int splitBenchmark(Args a) {
		List<Path> sets = new java.util.ArrayList<>();
		sets.add(a.path("data", true));
		if (a.has("data2")) sets.add(a.path("data2", true));
		LearnSettings s = settings(a);
		int nLearn = a.integer("learn-images", 5, 1, 1000);
		int[] g = a.integers("grow", 0, 100);
		a.checkAllUsed();
		if (g != null) { // the loose-box sensitivity table instead
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

	/** The on-screen tour with screenshots. */
	private static int tourJob(String job, String[] argv, boolean help) {
		if (help) return print("corral tour [--out DIR] [--steps N]\n  on a display (xvfb-run -a on a server): boxes ten demo objects in the ROI Manager, learns, masks,\n  and saves screenshots of the learning plot, the outlines and the windows (default out: corral-tour)\n");
		Args a = new Args(job, argv, 1, Set.of());
		Path out = Path.of(a.str("out", "corral-tour"));
		int steps = a.integer("steps", LearnSettings.QUICK_STEPS, 1, 1_000_000);
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

	/** Prints a folder run's summary; exit code 3 when some image failed. */
	static int report(FolderRun.Report rep) {
		System.out.println(rep.summary());
		return rep.failed().isEmpty() ? 0 : 3;
	}

	/** Steps learned by {@code benchmark --speed} without a model: enough for a steady step time. */
	static final int SPEED_STEPS = 30;

	static LearnSettings settings(Args a) {
		return settings(a, new LearnSettings().steps);
	}

	static LearnSettings settings(Args a, int defaultSteps) {
		LearnSettings s = new LearnSettings();
		s.steps = defaultSteps;
		final double any = Double.MAX_VALUE;
		s.minutes = a.number("minutes", s.minutes, 0, any);
		s.steps = a.integer("steps", s.steps, 1, 10_000_000);
		s.seed = a.whole("seed", s.seed, Long.MIN_VALUE, Long.MAX_VALUE);
		s.band = a.integer("band", s.band, 1, 10_000);
		s.margin = a.integer("margin", s.margin, 0, 10_000);
		s.base = a.integer("width", s.base, 4, 128);
		s.crop = a.integer("crop", s.crop, 32, 4096);
		s.batch = a.integer("batch", s.batch, 1, 1024);
		s.learningRate = a.number("lr", s.learningRate, 1e-9, 10);
		s.tMax = a.number("tmax", s.tMax, s.tStart, any);
		s.fillMin = a.number("fill-min", s.fillMin, 0, 1);
		s.fillMax = a.number("fill-max", s.fillMax, 0, 1);
		s.pairTolerance = a.number("pair-tolerance", s.pairTolerance, 0, any);
		s.scaleJitter = a.number("scale-jitter", s.scaleJitter, 0, 1);
		s.unknownGround = a.number("unknown-ground", s.unknownGround, 0, 1);
		s.weights = new org.corral.loss.LossWeights(a.number("w-band", s.weights.band(), 0, any), a.number("w-fill", s.weights.fill(), 0, any),
			a.number("w-pair", s.weights.pairwise(), 0, any), a.number("w-instance", s.weights.instance(), 0, any));
		if (a.has("all-boxed")) s.background = Supervision.BackgroundMode.FULL;
		if (a.has("partial")) s.background = Supervision.BackgroundMode.RING; // the default, named for scripts
		String cen = a.str("instance-map", null);
		if (cen != null) {
			if (!cen.equals("on") && !cen.equals("off")) throw new CorralException(a.job() + ": --instance-map must be on or off, got '" + cen + "'");
			s.instanceMap = cen.equals("on");
		}
		String aug = a.str("augment", null);
		if (aug != null) {
			if (!aug.equals("on") && !aug.equals("off")) throw new CorralException(a.job() + ": --augment must be on or off, got '" + aug + "'");
			s.augment = aug.equals("on");
		}
		s.validate();
		return s;
	}

	static void threads(Args a) {
		int n = a.integer("threads", 0, 1, 4096);
		if (n > 0) {
			System.setProperty("ai.djl.pytorch.num_threads", String.valueOf(n));
			System.setProperty("ai.djl.pytorch.num_interop_threads", "1");
		}
	}

	static Progress printer(AtomicBoolean stop) {
		return new Progress() {
			@Override
			public void report(Report r) {
				System.out.printf(Locale.ROOT, "step %4d/%d  loss %.4f (%s)  t %.1f  %.2f s/step  %.0f s left%n", r.step(), r.total(), r.loss(), r.partsLine(), r.t(),
					r.secondsPerStep(), r.secondsLeft());
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
