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
		List<TrainingImage> out = new ArrayList<>();
		for (Map.Entry<Path, List<Box>> e : boxed.entrySet()) {
			ImagePlus imp = ImageFiles.open(e.getKey());
			int n = ImageFiles.positions(imp);
			for (int p = 1; p <= n; p++) {
				List<Box> bs = boxesAt(e.getValue(), p, n);
				if (bs.isEmpty()) continue;
				int[] zt = ImageFiles.zt(imp, p);
				String name = e.getKey().getFileName() + (n > 1 ? " position " + p : "");
				out.add(new TrainingImage(name, ImageFiles.planes(imp, zt[0], zt[1]), bs));
			}
		}
		return out;
	}

	/** Learns and writes the model file atomically; returns the learning result's header figures. */
	public static Learner.Result learn(Map<Path, List<Box>> boxed, LearnSettings settings, Path modelFile, Progress progress) {
		List<TrainingImage> images = trainingImages(boxed);
		int nb = images.stream().mapToInt(t -> t.boxes().size()).sum();
		if (nb == 0) throw new CorralException("No boxes to learn from: give a box file or ROI sets with at least one rectangle");
		Learner.Result r = new Learner(settings).learn(images, progress);
		ModelFile.write(modelFile, r.header(), r.net());
		return r;
	}

	/** Masks the boxes of every image; writes label TIFF, ROI zip, per-box CSV and overlay PNG. */
	public static void maskBoxes(Map<Path, List<Box>> boxed, ModelRunner model, Path outDir, Consumer<String> log) {
		mkdirs(outDir);
		for (Map.Entry<Path, List<Box>> e : boxed.entrySet()) {
			long t0 = System.nanoTime();
			ImagePlus imp = ImageFiles.open(e.getKey());
			int n = ImageFiles.positions(imp);
			int w = imp.getWidth(), h = imp.getHeight();
			List<Box> all = e.getValue();
			int[][] labels = new int[n][];
			BoxMasks.Fit[] fits = new BoxMasks.Fit[all.size()];
			PlanarImage first = null;
			for (int p = 1; p <= n; p++) {
				List<Box> bs = boxesAt(all, p, n);
				labels[p - 1] = new int[w * h];
				if (bs.isEmpty()) continue;
				int[] zt = ImageFiles.zt(imp, p);
				PlanarImage raw = ImageFiles.planes(imp, zt[0], zt[1]);
				if (first == null) first = raw;
				float[] prob = model.probability(raw, model.scaleFor(ModelRunner.medianSide(bs)), null);
				BoxMasks.Result r = BoxMasks.make(prob, w, h, bs, 0.5);
				for (int k = 0; k < bs.size(); k++) {
					int global = all.indexOf(bs.get(k)) + 1; // label value = position in the image's box list
					BoxMasks.Fit f = r.fits().get(k);
					fits[global - 1] = new BoxMasks.Fit(global, bs.get(k), f.area(), f.fill(), f.rowsCrossed(), f.columnsCrossed(), f.meanProbability(), f.flags());
				}
				int[] lab = r.labels();
				for (int i = 0; i < lab.length; i++) if (lab[i] > 0) labels[p - 1][i] = all.indexOf(bs.get(lab[i] - 1)) + 1;
			}
			String base = ImageFiles.baseName(e.getKey());
			writeOutputs(outDir, base, imp, labels, all, fits, first);
			log.accept(String.format(Locale.ROOT, "%s: %d boxes masked in %.2f s", e.getKey().getFileName(), all.size(), (System.nanoTime() - t0) / 1e9));
		}
	}

	static void writeOutputs(Path outDir, String base, ImagePlus imp, int[][] labels, List<Box> boxes, BoxMasks.Fit[] fits, PlanarImage shown) {
		int w = imp.getWidth(), h = imp.getHeight();
		List<Roi> rois = new ArrayList<>();
		String[] names = new String[boxes.size()];
		for (int k = 0; k < boxes.size(); k++) names[k] = String.format(Locale.ROOT, "mask-%04d-of-%s", k + 1, boxes.get(k).name());
		for (int p = 0; p < labels.length; p++) {
			Roi[] r = RoiSets.outlines(labels[p], w, h, boxes.size(), names);
			for (Roi roi : r) if (roi != null) {
				if (labels.length > 1) roi.setPosition(p + 1);
				rois.add(roi);
			}
		}
		StringBuilder csv = new StringBuilder("box,name,x,y,width,height,slice,area,fill,rows_crossed,columns_crossed,mean_probability,flags\n");
		for (int k = 0; k < boxes.size(); k++) {
			Box b = boxes.get(k);
			BoxMasks.Fit f = fits[k];
			if (f == null) f = new BoxMasks.Fit(k + 1, b, 0, 0, 0, 0, 0, List.of("outside-image"));
			csv.append(String.format(Locale.ROOT, "%d,%s,%d,%d,%d,%d,%d,%d,%.4f,%.4f,%.4f,%.4f,%s%n", k + 1, b.name(), b.x(), b.y(), b.width(), b.height(),
				b.slice(), f.area(), f.fill(), f.rowsCrossed(), f.columnsCrossed(), f.meanProbability(), String.join(";", f.flags())));
		}
		ImageFiles.saveTiff(ImageFiles.labelImage(base, labels, w, h, imp.getCalibration()), outDir.resolve(base + ".tif"));
		RoiSets.writeZip(outDir.resolve(base + ".rois.zip"), rois);
		AtomicFiles.writeString(outDir.resolve(base + ".objects.csv"), csv.toString());
		if (shown != null) ImageFiles.savePng(Overlays.outlines(shown, labels[0]), outDir.resolve(base + ".overlay.png"));
	}

	/** Per-image and pooled scores of label images against reference label images of the same names. */
	public static String score(Path labelsDir, Path referenceDir, Path csvOut) {
		List<Path> refs = BoxedImages.images(referenceDir);
		if (refs.isEmpty()) throw new CorralException("No reference label images in " + referenceDir);
		StringBuilder csv = new StringBuilder("image,reference_objects,predicted_objects,object_dice,object_iou,pixel_dice,precision_50,recall_50,f1_50,mean_ap\n");
		Scores.Tally all = new Scores.Tally();
		for (Path ref : refs) {
			Path pred = labelsDir.resolve(ref.getFileName());
			if (!Files.isRegularFile(pred)) pred = labelsDir.resolve(ImageFiles.baseName(ref) + ".tif");
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
}
