package org.corral.workflow;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.function.Consumer;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.train.TrainingImage;

/**
 * Outlines as corrections, measured on a reference set: learn from the boxes of the first
 * {@code nLearn} images, mask them, then in each round replace the boxes of the worst-masked
 * {@code fraction} of the objects by their reference outlines (as a user who fixes the worst masks
 * would) and learn again, from scratch with the same seed. Each round reports per-object Dice of
 * the corrected objects, of their neighbours (the other objects of the learning images, never
 * corrected) and of the objects of the held-out images. Prints numbers; asserts nothing.
 */
public final class CorrectionRounds {
	private CorrectionRounds() {}

	/** One round's figures: mean per-object Dice of each group, and the objects outlined so far. */
	public record Round(int round, int outlines, double correctedBefore, double corrected, double neighbours, double heldOut, double seconds) {
		public String line() {
			return String.format(Locale.ROOT, "round %d  outlines %4d  corrected objects %.4f (round 0: %.4f)  neighbours %.4f  held-out images %.4f  (%.0f s)", round,
				outlines, corrected, correctedBefore, neighbours, heldOut, seconds);
		}
	}

	/**
	 * The reference object of a box: the one whose bounding box is the box (reference sets give each
	 * object's bounding box as its box), else the one that holds most of the box.
	 */
	static int objectOf(Box b, int[] ref, int w, int h) {
		int x0 = Math.max(0, b.x()), y0 = Math.max(0, b.y()), x1 = Math.min(w, b.x1()), y1 = Math.min(h, b.y1());
		java.util.Set<Integer> seen = new java.util.HashSet<>();
		for (int y = y0; y < y1; y++)
			for (int x = x0; x < x1; x++) {
				int l = ref[y * w + x];
				if (l > 0 && seen.add(l) && boundsOf(ref, w, h, l, x0, y0, x1, y1)) return l;
			}
		return dominant(ref, w, h, b);
	}

	/** True when label l lies wholly inside [x0,x1) x [y0,y1) and touches all four sides. */
	private static boolean boundsOf(int[] ref, int w, int h, int l, int x0, int y0, int x1, int y1) {
		int bx0 = Integer.MAX_VALUE, by0 = Integer.MAX_VALUE, bx1 = -1, by1 = -1;
		for (int y = Math.max(0, y0 - 1); y < Math.min(h, y1 + 1); y++)
			for (int x = Math.max(0, x0 - 1); x < Math.min(w, x1 + 1); x++)
				if (ref[y * w + x] == l) {
					bx0 = Math.min(bx0, x);
					by0 = Math.min(by0, y);
					bx1 = Math.max(bx1, x);
					by1 = Math.max(by1, y);
				}
		return bx0 == x0 && by0 == y0 && bx1 == x1 - 1 && by1 == y1 - 1;
	}

	/** Reference outline of a box: the pixels of its reference object ({@link #objectOf}) inside the box. */
	static Box outlined(Box b, int[] ref, int w, int h) {
		int label = objectOf(b, ref, w, h);
		if (label == 0) return b;
		byte[] m = new byte[b.width() * b.height()];
		for (int y = 0; y < b.height(); y++)
			for (int x = 0; x < b.width(); x++) {
				int ix = b.x() + x, iy = b.y() + y;
				if (ix >= 0 && iy >= 0 && ix < w && iy < h && ref[iy * w + ix] == label) m[y * b.width() + x] = 1;
			}
		return new Box(b.index(), b.x(), b.y(), b.width(), b.height(), b.slice(), b.name(), m);
	}

	static int dominant(int[] ref, int w, int h, Box b) {
		Map<Integer, Integer> count = new java.util.HashMap<>();
		for (int y = Math.max(0, b.y()); y < Math.min(h, b.y1()); y++)
			for (int x = Math.max(0, b.x()); x < Math.min(w, b.x1()); x++) if (ref[y * w + x] > 0) count.merge(ref[y * w + x], 1, Integer::sum);
		return count.isEmpty() ? 0 : java.util.Collections.max(count.entrySet(), Map.Entry.comparingByValue()).getKey();
	}

	/** Per-object Dice of box k's mask (label k+1) against the reference object that dominates its box. */
	static double[] dice(int[] labels, int[] ref, int w, int h, List<Box> boxes) {
		double[] d = new double[boxes.size()];
		for (int k = 0; k < boxes.size(); k++) {
			int r = objectOf(boxes.get(k), ref, w, h);
			long a = 0, bb = 0, both = 0;
			for (int i = 0; i < labels.length; i++) {
				boolean p = labels[i] == k + 1, q = r > 0 && ref[i] == r;
				if (p) a++;
				if (q) bb++;
				if (p && q) both++;
			}
			d[k] = a + bb == 0 ? 1 : 2.0 * both / (a + bb);
		}
		return d;
	}

	public static List<Round> run(Path set, int nLearn, int rounds, double fraction, LearnSettings s, Consumer<String> log) {
		Map<Path, List<Box>> all = CrossBenchmark.load(set);
		Map<Path, List<Box>> learn = new LinkedHashMap<>(), held = new LinkedHashMap<>();
		int i = 0;
		for (var e : all.entrySet()) (i++ < nLearn ? learn : held).put(e.getKey(), e.getValue());
		Map<Path, int[]> refs = new LinkedHashMap<>();
		for (Path p : all.keySet()) refs.put(p, ImageFiles.readLabels(set.resolve("labels").resolve(p.getFileName()), null));
		Map<Path, boolean[]> corrected = new LinkedHashMap<>();
		for (var e : learn.entrySet()) corrected.put(e.getKey(), new boolean[e.getValue().size()]);
		int total = learn.values().stream().mapToInt(List::size).sum(), perRound = Math.max(1, (int) Math.round(fraction * total));
		List<Round> out = new ArrayList<>();
		Map<Path, double[]> first = new LinkedHashMap<>(); // round-0 Dice of every learning object
		for (int r = 0; r <= rounds; r++) {
			long t0 = System.nanoTime();
			Map<Path, List<Box>> supervision = new LinkedHashMap<>();
			int outlines = 0;
			for (var e : learn.entrySet()) {
				PlanarImage im = ImageFiles.read(e.getKey());
				List<Box> bs = new ArrayList<>();
				for (int k = 0; k < e.getValue().size(); k++) {
					Box b = e.getValue().get(k);
					boolean c = corrected.get(e.getKey())[k];
					bs.add(c ? outlined(b, refs.get(e.getKey()), im.width, im.height) : b);
					if (c) outlines++;
				}
				supervision.put(e.getKey(), bs);
			}
			List<TrainingImage> images = Jobs.trainingImages(supervision);
			double[] sums = new double[4];
			int[] counts = new int[4];
			List<double[]> worst = new ArrayList<>(); // {image index, box index, dice}
			Progress.Report[] last = new Progress.Report[1];
			Progress keep = new Progress() {
				@Override
				public void report(Report rep) {
					last[0] = rep;
				}
			};
			try (Learner.Result lr = new Learner(s).learn(images, keep);
				ModelRunner m = new ModelRunner(lr.header(), lr.net(), lr.manager())) {
				int img = 0;
				for (var e : all.entrySet()) {
					boolean learned = learn.containsKey(e.getKey());
					PlanarImage im = ImageFiles.read(e.getKey());
					List<Box> bs = e.getValue(); // masked as rectangles: the figures are the network's, not the outlines given
					float[] prob = m.probability(im, m.scaleFor(ModelRunner.medianSide(bs)), null, ModelRunner.boxFlips());
					int[] lab = BoxMasks.make(prob, im.width, im.height, bs, BoxMasks.Options.DEFAULTS.withMargin(s.margin)).labels();
					double[] d = dice(lab, refs.get(e.getKey()), im.width, im.height, bs);
					if (learned && r == 0) first.put(e.getKey(), d);
					for (int k = 0; k < d.length; k++) {
						int group = !learned ? 2 : corrected.get(e.getKey())[k] ? 0 : 1;
						sums[group] += d[k];
						counts[group]++;
						if (group == 0) {
							sums[3] += first.get(e.getKey())[k];
							counts[3]++;
						}
						if (group == 1) worst.add(new double[] {img, k, d[k]});
					}
					img++;
				}
			}
			Round round = new Round(r, outlines, counts[3] == 0 ? Double.NaN : sums[3] / counts[3], counts[0] == 0 ? Double.NaN : sums[0] / counts[0], sums[1] / Math.max(1, counts[1]), sums[2] / Math.max(1, counts[2]),
				(System.nanoTime() - t0) / 1e9);
			out.add(round);
			log.accept(round.line() + String.format(Locale.ROOT, "  [learning: loss %.3f, constraints met %.3f]", last[0].loss(), last[0].met()));
			// the next round: outlines for the worst-masked objects not outlined yet
			worst.sort(java.util.Comparator.comparingDouble(v -> v[2]));
			List<Path> keys = new ArrayList<>(all.keySet());
			for (int k = 0; k < Math.min(perRound, worst.size()); k++) corrected.get(keys.get((int) worst.get(k)[0]))[(int) worst.get(k)[1]] = true;
		}
		return out;
	}
}
