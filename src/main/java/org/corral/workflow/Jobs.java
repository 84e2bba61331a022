package org.corral.workflow;

import ij.ImagePlus;
import ij.gui.Roi;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.boxes.BoxChecks;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.AtomicFiles;
import org.corral.io.ImageFiles;
import org.corral.io.Overlays;
import org.corral.io.RoiSets;
import org.corral.model.ModelFile;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.train.TrainingImage;

/** The jobs of the command line (and of the Fiji commands), on files and folders. */
public final class Jobs {
	private Jobs() {}

	/** Boxes of one stack position: those placed on it, and unplaced ones on a single-plane image. */
	static List<Box> boxesAt(List<Box> boxes, int position, int positions) {
		List<Box> out = new ArrayList<>();
		for (Box b : boxes) if (b.slice() == position || (b.slice() == 0 && (positions == 1 || position == 1))) out.add(b);
		return out;
	}

	public static List<TrainingImage> trainingImages(Map<Path, List<Box>> boxed) {
		return trainingImages(boxed, note -> {});
	}

	public static List<TrainingImage> trainingImages(Map<Path, List<Box>> boxed, Consumer<String> notes) {
		List<TrainingImage> out = new ArrayList<>();
		for (Map.Entry<Path, List<Box>> e : boxed.entrySet())
			out.addAll(trainingImages(ImageFiles.open(e.getKey()), e.getKey().getFileName().toString(), e.getValue(), null, notes));
		return out;
	}

	/**
	 * One training image per stack position that holds boxes; {@code region} = annotated region or
	 * null. Awkward boxes are handled as {@link BoxChecks} defines, and each case is noted.
	 */
	public static List<TrainingImage> trainingImages(ImagePlus imp, String name, List<Box> boxes, byte[] region, Consumer<String> notes) {
		BoxChecks.Checked checked = BoxChecks.forLearning(boxes, imp.getWidth(), imp.getHeight(), name);
		checked.notes().forEach(notes);
		List<TrainingImage> out = new ArrayList<>();
		int n = ImageFiles.positions(imp);
		for (int p = 1; p <= n; p++) {
			List<Box> bs = boxesAt(checked.usable(), p, n);
			if (bs.isEmpty()) continue;
			int[] zt = ImageFiles.zt(imp, p);
			out.add(new TrainingImage(name + (n > 1 ? " position " + p : ""), ImageFiles.planes(imp, zt[0], zt[1]), bs, region));
		}
		return out;
	}

	/** Learns and writes the model file atomically; returns the learning result's header figures. */
	public static Learner.Result learn(Map<Path, List<Box>> boxed, Path boxFile, LearnSettings settings, Path modelFile, Progress progress, Consumer<String> notes) {
		checkModelTarget(modelFile, boxed.keySet(), boxFile);
		List<TrainingImage> images = trainingImages(boxed, notes);
		int nb = images.stream().mapToInt(t -> t.boxes().size()).sum();
		int given = boxed.values().stream().mapToInt(List::size).sum();
		if (nb == 0 && given > 0) throw new CorralException("Nothing to learn from: none of the " + given + " box(es) lies inside its image");
		if (nb == 0) throw new CorralException("No boxes to learn from: give a box file or ROI sets with at least one rectangle");
		Learner.Result r = new Learner(settings).learn(images, progress);
		try {
			ModelFile.write(modelFile, r.header(), r.net());
		} catch (RuntimeException e) {
			r.close();
			throw e;
		}
		return r;
	}

	/**
	 * Refuses a model file that would replace an input: an image, the box file, or an image's ROI set
	 * (or any existing image file of an image folder).
	 */
	public static void checkModelTarget(Path modelFile, java.util.Collection<Path> images, Path boxFile) {
		List<Path> inputs = new ArrayList<>(images);
		java.util.Set<Path> folders = new java.util.LinkedHashSet<>();
		if (boxFile != null) inputs.add(boxFile);
		for (Path img : images) {
			Path dir = img.toAbsolutePath().normalize().getParent();
			folders.add(dir);
			for (String ending : BoxedImages.ROI_SET_ENDINGS) inputs.add(dir.resolve(ImageFiles.baseName(img) + ending));
		}
		OutputNames.checkOutputFile(modelFile, "Model file", inputs);
		OutputNames.checkNotInFolders(modelFile, "Model file", folders);
	}

	/** Label images (one per stack position), per-box fits, and the first masked plane for pictures. */
	public record BoxMaskOutcome(int[][] labels, BoxMasks.Fit[] fits, PlanarImage shown, String[] classes, double[] classConfidence) {
		public BoxMaskOutcome(int[][] labels, BoxMasks.Fit[] fits, PlanarImage shown) {
			this(labels, fits, shown, null, null);
		}
	}

	/** Masks the boxes of one image (all stack positions); label k = the k-th box of {@code all}. */
	public static BoxMaskOutcome maskBoxes(ImagePlus imp, List<Box> all, ModelRunner model) {
		return maskBoxes(imp, all, model, BoxMasks.Options.DEFAULTS);
	}

	/** As above, with the mask options (a loose box's margin, ...). */
	public static BoxMaskOutcome maskBoxes(ImagePlus imp, List<Box> all, ModelRunner model, BoxMasks.Options options) {
		int n = ImageFiles.positions(imp);
		int w = imp.getWidth(), h = imp.getHeight();
		int[][] labels = new int[n][];
		BoxMasks.Fit[] fits = new BoxMasks.Fit[all.size()];
		PlanarImage first = null;
		String[] classes = null;
		double[] classConfidence = null;
		for (int p = 1; p <= n; p++) {
			List<Box> bs = boxesAt(all, p, n);
			labels[p - 1] = new int[w * h];
			if (bs.isEmpty()) continue;
			int[] zt = ImageFiles.zt(imp, p);
			PlanarImage raw = ImageFiles.planes(imp, zt[0], zt[1]);
			if (first == null) first = raw;
			float[][] maps = model.boxMaps(raw, bs, model.scaleFor(ModelRunner.medianSide(bs)), null, ModelRunner.boxFlips());
			float[] prob = maps[0];
			float[][] classMaps = model.classMaps(maps);
			BoxMasks.Result r = BoxMasks.make(prob, w, h, bs, options);
			if (classMaps.length > 0) { // each box's class: the one given with it, else the class maps' choice
				if (classes == null) {
					classes = new String[all.size()];
					classConfidence = new double[all.size()];
					java.util.Arrays.fill(classConfidence, Double.NaN);
				}
				List<String> names = model.header().classes;
				var assigned = org.corral.instances.ObjectClasses.of(r.labels(), bs.size(), classMaps);
				for (int k = 0; k < bs.size(); k++) {
					int g = all.indexOf(bs.get(k));
					String given = bs.get(k).className();
					int c = given != null ? names.indexOf(given) : assigned.index()[k + 1];
					classes[g] = given != null ? given : c >= 0 ? names.get(c) : null;
					classConfidence[g] = c < 0 ? Double.NaN : given != null ? org.corral.instances.ObjectClasses.share(r.labels(), k + 1, classMaps, c) : assigned.confidence()[k + 1];
				}
			}
			int[] global = new int[bs.size()];
			for (int k = 0; k < bs.size(); k++) {
				global[k] = all.indexOf(bs.get(k)) + 1; // label value = position in the image's box list
				BoxMasks.Fit f = r.fits().get(k);
				fits[global[k] - 1] = f.renumbered(global[k]);
			}
			int[] lab = r.labels();
			for (int i = 0; i < lab.length; i++) if (lab[i] > 0) labels[p - 1][i] = global[lab[i] - 1];
		}
		for (int k = 0; k < fits.length; k++)
			if (fits[k] == null) fits[k] = BoxMasks.Fit.none(k + 1, all.get(k), "no-such-slice");
		return new BoxMaskOutcome(labels, fits, first, classes, classConfidence);
	}

	/**
	 * How the model for masking boxes is made: continue learning on the boxes being masked
	 * ({@code adapt}; from scratch when no model is given), for {@code steps} steps (0 = the rule of
	 * {@link Adaptation#steps}), optionally saving the adapted model; {@code settings} are the
	 * learning settings (band, margin, seed, ...).
	 */
	public record AdaptPlan(boolean adapt, int steps, Path saveTo, LearnSettings settings) {}

	/**
	 * Masks the boxes of every image of a folder run: first adapts the model to these images' boxes
	 * (see {@link AdaptPlan}), then writes {@code NAME.labels.tif}, {@code NAME.outlines.zip},
	 * {@code NAME.objects.csv} and {@code NAME.overlay.png} per image (see {@link OutputNames}) and
	 * {@code corral-run.json}, the record of the model used. Resumable, and a failing image is listed
	 * while the others go on ({@link FolderRun}).
	 */
	public static FolderRun.Report maskBoxes(Map<Path, List<Box>> boxed, Path boxFile, Path modelFile, AdaptPlan plan, Path outDir,
		java.util.function.BooleanSupplier cancelled, Progress progress, Consumer<String> log) {
		return maskBoxes(boxed, boxFile, modelFile, plan, Share.ALL, outDir, cancelled, progress, log);
	}

	/**
	 * As above for one share of the images ({@link Share}): only its images are adapted to and masked,
	 * and its run record and failure list carry the share's name; the whole folder's object table
	 * ({@link FolderMerge}) is written by a run of the whole folder, or by the merge after the shares.
	 */
	public static FolderRun.Report maskBoxes(Map<Path, List<Box>> allBoxed, Path boxFile, Path modelFile, AdaptPlan plan, Share share, Path outDir,
		java.util.function.BooleanSupplier cancelled, Progress progress, Consumer<String> log) {
		Map<Path, List<Box>> boxed = new java.util.LinkedHashMap<>();
		for (Path p : share.of(new ArrayList<>(allBoxed.keySet()))) boxed.put(p, allBoxed.get(p));
		java.util.Set<Path> folders = new java.util.LinkedHashSet<>();
		for (Path p : boxed.keySet()) folders.add(p.toAbsolutePath().normalize().getParent());
		OutputNames.checkOutputFolder(outDir, folders, boxFile == null ? List.of() : List.of(boxFile));
		if (plan.saveTo() != null) {
			checkModelTarget(plan.saveTo(), boxed.keySet(), boxFile);
			if (modelFile != null) OutputNames.checkOutputFile(plan.saveTo(), "Adapted model file", List.of(modelFile));
		}
		if (!plan.adapt() && modelFile == null) throw new CorralException("Give a model file, or let Corral learn from these boxes first (no --no-adapt)");
		ModelRunner base = modelFile == null ? null : ModelRunner.open(modelFile);
		try {
			RunRecord record = new RunRecord(modelFile, plan.adapt(), base == null);
			try (Learner.Result adapted = plan.adapt() ? adapt(base, boxed, plan, record, progress, log) : null) {
				ModelRunner own = adapted == null ? null : new ModelRunner(adapted.header(), adapted.net(), adapted.manager());
				try {
					FolderRun.Report r = maskBoxes(allBoxed, boxFile, own == null ? base : own, BoxMasks.Options.DEFAULTS.withMargin(plan.settings().margin), share, outDir,
						cancelled, log);
					AtomicFiles.writeString(outDir.resolve(share.fileName(OutputNames.RUN_RECORD)), record.json());
					return r;
				} finally {
					if (own != null) own.close();
				}
			}
		} finally {
			if (base != null) base.close();
		}
	}

	/**
	 * Continued learning on the boxes of {@code boxed} (from scratch when {@code base} is null) as
	 * {@code plan} says, noted in {@code record}; saves the model when the plan asks.
	 */
	static Learner.Result adapt(ModelRunner base, Map<Path, List<Box>> boxed, AdaptPlan plan, RunRecord record, Progress progress,
		Consumer<String> log) {
		List<TrainingImage> images = trainingImages(boxed, note -> log.accept("note: " + note));
		int nBoxes = images.stream().mapToInt(t -> t.boxes().size()).sum();
		if (nBoxes == 0) throw new CorralException("None of the boxes lies inside its image: nothing to learn from");
		LearnSettings s = base == null ? plan.settings().copy() : Adaptation.settings(plan.settings(), base, nBoxes, plan.steps());
		if (base == null && plan.steps() > 0) s.steps = plan.steps();
		log.accept(base == null ? "learning from the " + nBoxes + " boxes of these " + images.size() + " image(s), " + s.steps + " steps"
			: "adapting the model to the " + nBoxes + " boxes of these " + images.size() + " image(s), " + s.steps + " steps (--no-adapt to skip)");
		long t0 = System.nanoTime();
		Learner.Result adapted = Adaptation.adapt(base, images, s, progress);
		try {
			record.adapted(adapted.header(), s, (System.nanoTime() - t0) / 1e9);
			if (plan.saveTo() != null) {
				ModelFile.write(plan.saveTo(), adapted.header(), adapted.net());
				record.savedTo = plan.saveTo().toString();
			}
			return adapted;
		} catch (RuntimeException e) {
			adapted.close();
			throw e;
		}
	}

	/**
	 * Every object of every image, after continued learning on the boxes drawn on some of them
	 * ({@code boxed}: images of this folder with their boxes; boxes of a new look teach the model how
	 * that look's objects are outlined, and the other images are masked without boxes). Without
	 * {@code modelFile} the model is learned from these boxes alone. Writes what {@link #maskImages}
	 * writes, and {@code corral-run.json}, the record of the model used. All images at once only: the
	 * shares of a cluster run would each repeat the same learning, so they take a model adapted once
	 * ({@code mask-boxes --save-adapted}).
	 */
	public static FolderRun.Report maskImages(List<Path> images, Map<Path, List<Box>> boxed, Path boxFile, Path modelFile, AdaptPlan plan, Path outDir,
		double objectSize, boolean propose, java.util.function.BooleanSupplier cancelled, Progress progress, Consumer<String> log) {
		if (boxed.isEmpty()) throw new CorralException("No boxes found for the images to learn from");
		java.util.Set<Path> folders = new java.util.LinkedHashSet<>();
		for (Path p : images) folders.add(p.toAbsolutePath().normalize().getParent());
		OutputNames.checkOutputFolder(outDir, folders, boxFile == null ? List.of() : List.of(boxFile));
		if (plan.saveTo() != null) {
			checkModelTarget(plan.saveTo(), images, boxFile);
			if (modelFile != null) OutputNames.checkOutputFile(plan.saveTo(), "Adapted model file", List.of(modelFile));
		}
		java.util.Set<Path> withBoxes = new java.util.HashSet<>();
		for (Path p : boxed.keySet()) withBoxes.add(p.toAbsolutePath().normalize());
		long unboxed = images.stream().filter(p -> !withBoxes.contains(p.toAbsolutePath().normalize())).count();
		// measured on the reference sets, adapting helped the unboxed images of one new look and cost two others (README)
		if (unboxed > 0)
			log.accept("note: " + unboxed + " image(s) without boxes are masked with the model adapted to the others' boxes; check some of them: this helped where a new look's "
				+ "objects are outlined otherwise and cost 0.04-0.08 F1 where not; give --object-size for images whose objects are far larger or smaller than the boxed ones "
				+ "(README, \"whole images of a new look\")");
		ModelRunner base = modelFile == null ? null : ModelRunner.open(modelFile);
		try {
			RunRecord record = new RunRecord(modelFile, true, base == null);
			try (Learner.Result adapted = adapt(base, boxed, plan, record, progress, log);
				ModelRunner used = new ModelRunner(adapted.header(), adapted.net(), adapted.manager())) {
				log.accept(used.wholeImageSettings());
				FolderRun.Report r = maskImages(images, Share.ALL, used, outDir, objectSize, propose, cancelled, log);
				AtomicFiles.writeString(outDir.resolve(OutputNames.RUN_RECORD), record.json());
				return r;
			}
		} finally {
			if (base != null) base.close();
		}
	}

	/** Masks the boxes of every image with a model as it is (no adaptation); see the method above. */
	public static FolderRun.Report maskBoxes(Map<Path, List<Box>> boxed, Path boxFile, ModelRunner m, BoxMasks.Options options, Share share, Path outDir,
		java.util.function.BooleanSupplier cancelled, Consumer<String> log) {
		FolderRun.Report r = FolderRun.run(share.of(new ArrayList<>(boxed.keySet())), share, boxFile == null ? List.of() : List.of(boxFile), outDir, true, cancelled, log,
			(img, b) -> {
				long t0 = System.nanoTime();
				ImagePlus imp = ImageFiles.open(img);
				List<Box> boxes = boxed.get(img);
				BoxMaskOutcome o = maskBoxes(imp, boxes, m, options);
				writeOutputs(outDir, b, imp, o, boxes);
				return String.format(Locale.ROOT, "%s: %d boxes masked in %.2f s%s", img.getFileName(), boxes.size(), (System.nanoTime() - t0) / 1e9, nearlyEmptyNote(m));
			});
		if (share.isAll()) FolderMerge.writeObjects(outDir);
		return r;
	}

	/** What model masked the boxes of a folder run, for {@code corral-run.json}. */
	static final class RunRecord {
		final String model;
		final boolean adapt, fromScratch;
		String savedTo, adaptedCreated;
		Integer adaptSteps, adaptBoxes, adaptImages;
		Long seed;
		Double adaptSeconds, constraintsMet;

		RunRecord(Path model, boolean adapt, boolean fromScratch) {
			this.model = model == null ? null : model.toAbsolutePath().toString();
			this.adapt = adapt;
			this.fromScratch = fromScratch;
		}

		void adapted(org.corral.model.ModelHeader h, LearnSettings s, double seconds) {
			adaptedCreated = h.created;
			adaptSteps = h.counts.steps;
			adaptBoxes = h.counts.boxes;
			adaptImages = h.counts.images;
			seed = s.seed;
			adaptSeconds = seconds;
			constraintsMet = Double.isNaN(h.scores.constraintsMet) ? null : h.scores.constraintsMet;
		}

		String json() {
			return new com.google.gson.GsonBuilder().setPrettyPrinting().create().toJson(this) + "\n";
		}
	}

	/** Outline ROIs of box masks, named after their boxes so each leads back to its box. */
	public static List<Roi> boxOutlines(int[][] labels, int w, int h, List<Box> boxes) {
		return boxOutlines(labels, w, h, boxes, null);
	}

	/** As above; with {@code classes} (per box, or null), each outline is grouped and coloured by its class. */
	public static List<Roi> boxOutlines(int[][] labels, int w, int h, List<Box> boxes, String[] classes) {
		List<Roi> rois = new ArrayList<>();
		String[] names = new String[boxes.size()];
		for (int k = 0; k < boxes.size(); k++) names[k] = String.format(Locale.ROOT, "mask-%04d-of-%s", k + 1, boxes.get(k).name());
		for (int p = 0; p < labels.length; p++) {
			Roi[] outlines = RoiSets.outlines(labels[p], w, h, boxes.size(), names);
			for (int k = 0; k < outlines.length; k++) if (outlines[k] != null) {
				if (labels.length > 1) outlines[k].setPosition(p + 1);
				org.corral.boxes.RoiBoxes.setSourceBox(outlines[k], boxes.get(k)); // learning again after an edit finds the box
				if (classes != null) classify(outlines[k], classes[k], classNames(classes));
				rois.add(outlines[k]);
			}
		}
		return rois;
	}

	/** Distinct class names in order of first appearance. */
	static List<String> classNames(String[] classes) {
		List<String> out = new ArrayList<>();
		for (String c : classes) if (c != null && !out.contains(c)) out.add(c);
		return out;
	}

	/**
	 * Puts an outline in the ROI group of its class (1-based position in {@code names}), in that
	 * group's colour, and records the class name ({@link #CLASS_PROPERTY}) for the group's name.
	 */
	static void classify(Roi roi, String cls, List<String> names) {
		if (cls == null) return;
		int g = names.indexOf(cls) + 1;
		roi.setGroup(g);
		roi.setStrokeColor(new java.awt.Color(Overlays.colour(g)));
		roi.setProperty(CLASS_PROPERTY, cls);
	}

	/** ROI property holding an outline's class name. */
	public static final String CLASS_PROPERTY = "corral-class";

	/** The per-box table as CSV text ({@link ResultTables#boxes}, the columns of the Fiji table too). */
	public static String boxTable(List<Box> boxes, BoxMasks.Fit[] fits, String[] classes, double[] classConfidence) {
		return ResultTables.boxes(classes != null).csv(ResultTables.boxRows(boxes, fits, classes, classConfidence));
	}

	public static final List<String> BOX_COLUMNS = ResultTables.boxes(false).header();

	static void writeOutputs(Path outDir, String base, ImagePlus imp, BoxMaskOutcome o, List<Box> boxes) {
		int w = imp.getWidth(), h = imp.getHeight();
		int[][] labels = o.labels();
		RoiSets.writeZip(OutputNames.outlines(outDir, base), boxOutlines(labels, w, h, boxes, o.classes()));
		AtomicFiles.writeString(OutputNames.table(outDir, base), boxTable(boxes, o.fits(), o.classes(), o.classConfidence()));
		if (o.shown() != null) ImageFiles.savePng(Overlays.outlines(o.shown(), labels[0]), OutputNames.overlay(outDir, base));
		ImageFiles.saveTiff(ImageFiles.labelImage(base, labels, w, h, imp.getCalibration()), OutputNames.labels(outDir, base)); // last: marks done
	}

	/** Per-image and pooled scores of label images against reference label images of the same names. */
	public static String score(Path labelsDir, Path referenceDir, Path csvOut) {
		List<Path> refs = BoxedImages.images(referenceDir);
		if (refs.isEmpty()) throw new CorralException("No reference label images in " + referenceDir);
		if (csvOut != null) {
			List<Path> inputs = new ArrayList<>(refs);
			if (Files.isDirectory(labelsDir)) inputs.addAll(BoxedImages.images(labelsDir));
			OutputNames.checkOutputFile(csvOut, "Score table", inputs);
			OutputNames.checkNotInFolders(csvOut, "Score table", List.of(labelsDir, referenceDir));
		}
		StringBuilder csv = new StringBuilder("image,reference_objects,predicted_objects,object_dice,object_iou,pixel_dice,precision_50,recall_50,f1_50,mean_ap\n");
		Scores.Tally all = new Scores.Tally();
		for (Path ref : refs) {
			// Corral's own label image first, else a label image of the reference's own name
			Path pred = OutputNames.labels(labelsDir, ImageFiles.baseName(ref));
			if (!Files.isRegularFile(pred)) pred = labelsDir.resolve(ref.getFileName());
			if (!Files.isRegularFile(pred)) throw new CorralException("No label image for reference " + ref.getFileName() + " in " + labelsDir);
			int[] sp = new int[2], sr = new int[2];
			int[] p = ImageFiles.readLabels(pred, sp), r = ImageFiles.readLabels(ref, sr);
			if (sp[0] != sr[0] || sp[1] != sr[1])
				throw new CorralException("Label image " + pred + " is " + sp[0] + "x" + sp[1] + ", its reference " + sr[0] + "x" + sr[1]);
			Scores.Tally t = Scores.compare(p, r);
			all.add(t);
			csv.append(row(ref.getFileName().toString(), t));
		}
		csv.append(row("ALL", all));
		if (csvOut != null) AtomicFiles.writeString(csvOut, csv.toString());
		return csv.toString();
	}

	static String row(String name, Scores.Tally t) {
		return String.format(Locale.ROOT, "%s,%d,%d,%.4f,%.4f,%.4f,%.4f,%.4f,%.4f,%.4f%n", name, t.refObjects, t.predObjects, t.objectDice(), t.objectIoU(),
			t.pixelDice(), t.precision(0.5), t.recall(0.5), t.f1(0.5), t.meanAP());
	}

	static void mkdirs(Path dir) {
		try {
			Files.createDirectories(dir);
		} catch (java.io.IOException e) {
			throw new CorralException("Cannot create output folder " + dir + ": " + e.getMessage(), e);
		}
		if (!Files.isWritable(dir)) throw new CorralException("Output folder " + dir + " is not writable");
	}

	/**
	 * Masks every object of every image of a folder (no boxes). Resumable: an image whose label
	 * image exists is skipped; outputs are written atomically, the label image last, so an image only
	 * counts as done when it is complete. A failing image is reported and the others go on. With
	 * {@code propose}, the objects are also written as boxes ({@code OUT/corral-proposed-boxes.csv} in
	 * the form the learner reads, and {@code OUT/NAME.proposed-boxes.zip} rectangles) for the user to
	 * correct and learn again.
	 */
	public static FolderRun.Report maskImages(List<Path> images, ModelRunner model, Path outDir, double objectSize, boolean propose,
		java.util.function.BooleanSupplier cancelled, Consumer<String> log) {
		return maskImages(images, Share.ALL, model, outDir, objectSize, propose, cancelled, log);
	}

	/** As above for one share of the images ({@link Share}); see {@link #maskBoxes(Map, Path, Path, AdaptPlan, Share, Path, java.util.function.BooleanSupplier, Progress, Consumer)}. */
	public static FolderRun.Report maskImages(List<Path> allImages, Share share, ModelRunner model, Path outDir, double objectSize, boolean propose,
		java.util.function.BooleanSupplier cancelled, Consumer<String> log) {
		List<Path> images = share.of(allImages);
		StringBuilder proposals = new StringBuilder("image,x,y,width,height\n");
		// proposing rebuilds the box file from every image, so it processes them all again
		FolderRun.Report r = FolderRun.run(images, share, List.of(), outDir, !propose, cancelled, log, (img, base) -> {
			long t0 = System.nanoTime();
			ImagePlus imp = ImageFiles.open(img);
			WholeImageOutcome o = maskWhole(imp, model, objectSize);
			for (Roi roi : o.proposals()) {
				java.awt.Rectangle b = roi.getBounds();
				proposals.append(String.format(Locale.ROOT, "%s,%d,%d,%d,%d%n", img.getFileName(), b.x, b.y, b.width, b.height));
			}
			RoiSets.writeZip(OutputNames.outlines(outDir, base), o.outlines());
			AtomicFiles.writeString(OutputNames.table(outDir, base), o.table());
			if (propose) RoiSets.writeZip(OutputNames.proposedBoxes(outDir, base), o.proposals());
			if (o.shown() != null) ImageFiles.savePng(Overlays.outlines(o.shown(), o.labels()[0]), OutputNames.overlay(outDir, base));
			ImageFiles.saveTiff(ImageFiles.labelImage(base, o.labels(), imp.getWidth(), imp.getHeight(), imp.getCalibration()), OutputNames.labels(outDir, base));
			return String.format(Locale.ROOT, "%s: %d objects in %.2f s%s", img.getFileName(), o.count(), (System.nanoTime() - t0) / 1e9, nearlyEmptyNote(model));
		});
		if (propose) AtomicFiles.writeString(outDir.resolve(share.fileName(OutputNames.PROPOSED_CSV)), proposals.toString());
		if (share.isAll()) FolderMerge.writeObjects(outDir);
		return r;
	}

	/** Said in the log after an image that counted as a nearly empty field (README, "Empty and nearly empty fields"). */
	static String nearlyEmptyNote(ModelRunner model) {
		return model.lastNearlyEmpty() ? " (nearly empty field: normalised as the model's learning images were, not by its percentiles)" : "";
	}

	/** One object of a whole-image result: its id in the label image, its stack position and its figures. */
	public record ObjectRow(int id, int slice, org.corral.instances.ImageMasks.ObjectInfo info, String className, double classConfidence) {
		public ObjectRow(int id, int slice, org.corral.instances.ImageMasks.ObjectInfo info) {
			this(id, slice, info, null, Double.NaN);
		}
	}

	/** Whole-image result of one image: labels per stack position, outlines, proposed boxes, one row per object. */
	public record WholeImageOutcome(int[][] labels, int count, List<Roi> outlines, List<Roi> proposals, List<ObjectRow> objects, org.corral.image.RowReader shown, boolean classes) {
		/** The per-object table as written to {@code NAME.objects.csv} ({@link ResultTables#objects}). */
		public String table() {
			return ResultTables.objects(classes).csv(objects);
		}
	}

	public static final String OBJECT_HEADER = String.join(",", ResultTables.objects(false).header());

	public static WholeImageOutcome maskWhole(ImagePlus imp, ModelRunner model, double objectSize) {
		int n = ImageFiles.positions(imp), w = imp.getWidth(), h = imp.getHeight();
		int[][] labels = new int[n][];
		List<Roi> rois = new ArrayList<>(), rects = new ArrayList<>();
		List<ObjectRow> rows = new ArrayList<>();
		org.corral.image.RowReader first = null;
		int total = 0;
		for (int p = 1; p <= n; p++) {
			int[] zt = ImageFiles.zt(imp, p);
			org.corral.image.RowReader raw = ImageFiles.rowReader(imp, zt[0], zt[1]);
			if (first == null) first = raw;
			WholeImage.Outcome o = WholeImage.mask(model, raw, objectSize);
			int[] lab = o.result().labels();
			var assigned = org.corral.instances.ObjectClasses.of(lab, o.result().count(), o.classMaps());
			for (int i = 0; i < lab.length; i++) if (lab[i] > 0) lab[i] += total; // ids unique across the stack
			labels[p - 1] = lab;
			String[] names = new String[total + o.result().count()];
			for (org.corral.instances.ImageMasks.ObjectInfo oi : o.result().objects()) {
				int id = oi.label() + total;
				names[id - 1] = String.format(Locale.ROOT, "object-%04d", id);
				int c = assigned.index()[oi.label()];
				rows.add(new ObjectRow(id, p, oi, c >= 0 ? model.header().classes.get(c) : null, c >= 0 ? assigned.confidence()[oi.label()] : Double.NaN));
				Roi r = new Roi(oi.x(), oi.y(), oi.width(), oi.height());
				r.setName(String.format(Locale.ROOT, "proposed-%04d", id));
				if (n > 1) r.setPosition(p);
				rects.add(r);
			}
			Roi[] outlines = RoiSets.outlines(lab, w, h, names.length, names);
			for (int k = total; k < outlines.length; k++) if (outlines[k] != null) {
				if (n > 1) outlines[k].setPosition(p);
				int c = assigned.index()[k - total + 1];
				if (c >= 0) classify(outlines[k], model.header().classes.get(c), model.header().classes);
				rois.add(outlines[k]);
			}
			total += o.result().count();
		}
		return new WholeImageOutcome(labels, total, rois, rects, rows, first, model.header().classCount() > 0);
	}
}
