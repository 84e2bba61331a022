package org.corral.instances;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.score.Scores;

/**
 * How a model masks whole images, chosen on its own boxed images when learning ends: the probability
 * threshold and the number of test-time flips. The box masks of those images (fitted to their boxes,
 * four flips, as in {@code mask-boxes} but in float) stand in for outlines, and each candidate's
 * whole-image objects are scored against them by mean AP over IoU 0.5:0.95; objects mostly outside
 * the boxes are not judged (an unboxed object is not an error). Why: a look the network is unsure of
 * leaves the rim of its objects below 0.5 and single passes noisy, which splits and shrinks objects;
 * a look it knows does best at 0.5 in one pass. Measured on the reference sets (README, "Masks for
 * whole images").
 */
public final class WholeImageSettings {
	private WholeImageSettings() {}

	/** The candidate thresholds, the default first (it wins ties). */
	public static final double[] THRESHOLDS = {0.5, 0.45, 0.4, 0.35};

	/**
	 * Four flips cost four network passes: they are chosen only when their best mean AP against the
	 * box masks beats one pass's best by this much (ours; in the adapted models of the reference
	 * sets the flips gained 0.016 and 0.006 on the two fluorescence pairs, too little for 4x the
	 * time, and 0.023 and 0.030 on the two histology pairs).
	 */
	public static final double FLIPS_GAIN = 0.02;

	/**
	 * With the flips chosen, a threshold other than 0.5 is chosen only when its mean AP beats 0.5's by
	 * this much (ours; on BBBC039 the four thresholds lay within 0.002 of each other, and 0.35 then
	 * cost 0.005 F1 against the reference outlines).
	 */
	public static final double THRESHOLD_GAIN = 0.005;

	/**
	 * One boxed image: its maps from one pass and from four flips ([0] probability, [1] the instance
	 * map or absent), its boxes and their box masks (labels, 0 = none).
	 */
	public record Sample(float[][] onePass, float[][] fourFlips, int width, int height, List<Box> boxes, int[] boxMasks) {}

	/** The choice and the mean AP of every candidate against the box masks ({@link #THRESHOLDS} order). */
	public record Choice(double threshold, int flips, double[] onePass, double[] fourFlips) {}

	/** @param objectSize the typical object side in these images' pixels */
	public static Choice choose(List<Sample> samples, double objectSize) {
		int n = THRESHOLDS.length;
		Scores.Tally[] one = new Scores.Tally[n], four = new Scores.Tally[n];
		for (int k = 0; k < n; k++) {
			one[k] = new Scores.Tally();
			four[k] = new Scores.Tally();
		}
		for (Sample s : samples) {
			boolean[] inBox = inBoxes(s.boxes(), s.width(), s.height());
			for (int k = 0; k < n; k++) {
				one[k].add(Scores.compare(judged(objects(s.onePass(), s, objectSize, THRESHOLDS[k]), inBox), s.boxMasks()));
				four[k].add(Scores.compare(judged(objects(s.fourFlips(), s, objectSize, THRESHOLDS[k]), inBox), s.boxMasks()));
			}
		}
		double[] a1 = new double[n], a4 = new double[n];
		for (int k = 0; k < n; k++) {
			a1[k] = one[k].meanAP();
			a4[k] = four[k].meanAP();
		}
		boolean flips = a4[best(a4)] >= a1[best(a1)] + FLIPS_GAIN;
		double[] a = flips ? a4 : a1;
		int b = best(a);
		// a threshold other than 0.5 must earn its place: gains below THRESHOLD_GAIN are noise
		if (!(a[b] >= a[0] + THRESHOLD_GAIN)) b = 0;
		return new Choice(THRESHOLDS[b], flips ? 4 : 1, a1, a4);
	}

	private static int[] objects(float[][] maps, Sample s, double objectSize, double threshold) {
		return ImageMasks.make(maps[0], maps.length > 1 ? maps[1] : null, s.width(), s.height(), objectSize, threshold, ImageMasks.PROMINENCE).labels();
	}

	/** First of the highest (NaN, no objects at all, never wins). */
	private static int best(double[] a) {
		int b = 0;
		for (int k = 1; k < a.length; k++) if (a[k] > a[b] || Double.isNaN(a[b]) && !Double.isNaN(a[k])) b = k;
		return b;
	}

	static boolean[] inBoxes(List<Box> boxes, int w, int h) {
		boolean[] in = new boolean[w * h];
		for (Box b : boxes)
			for (int y = Math.max(0, b.y()); y < Math.min(h, b.y() + b.height()); y++)
				for (int x = Math.max(0, b.x()); x < Math.min(w, b.x() + b.width()); x++) in[y * w + x] = true;
		return in;
	}

	/** The objects with at least half their area inside the boxes; the others are not judged. */
	static int[] judged(int[] labels, boolean[] inBox) {
		int n = 0;
		for (int l : labels) n = Math.max(n, l);
		long[] all = new long[n + 1], in = new long[n + 1];
		for (int i = 0; i < labels.length; i++)
			if (labels[i] > 0) {
				all[labels[i]]++;
				if (inBox[i]) in[labels[i]]++;
			}
		int[] out = new int[labels.length];
		for (int i = 0; i < labels.length; i++) if (labels[i] > 0 && 2 * in[labels[i]] >= all[labels[i]]) out[i] = labels[i];
		return out;
	}
}
