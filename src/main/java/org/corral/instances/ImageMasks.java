package org.corral.instances;

import ij.plugin.filter.EDM;
import ij.plugin.filter.GaussianBlur;
import ij.plugin.filter.MaximumFinder;
import ij.process.ByteProcessor;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import java.util.ArrayList;
import java.util.List;

/**
 * Instances on an image without boxes: threshold the probability map, then split touching objects
 * with a seeded watershed on the distance transform (the classic binary watershed, after
 * "Watersheds in digital spaces", IEEE PAMI 1991; seeds = distance maxima that stand out by more
 * than a prominence, found by ImageJ's MaximumFinder on its EDM). With the network's instance map
 * (the default), the seeds are its peaks instead and the watershed runs on it, and an object must
 * reach its core height and be sure on average. The flooding is {@link SeededWatershed}. Objects far
 * smaller than the learned object size are dropped as specks. Objects are numbered in the raster
 * order of their first pixel.
 */
public final class ImageMasks {
	private ImageMasks() {}

	/** One object of a whole-image result, with quality figures and flags. */
	public record ObjectInfo(int label, int x, int y, int width, int height, long area, double meanProbability, double confidence,
		List<String> flags) {}

	public record Result(int[] labels, int count, List<ObjectInfo> objects) {}

	/** A pixel is object when the network gives it at least even odds (box masks start their fit here too). */
	public static final double THRESHOLD = 0.5;

	/**
	 * @param objectSize typical object side in pixels (the learned median box side); sets the
	 *                   watershed's prominence and the speck size. 0 = unknown (defaults used).
	 * @param split      false = plain connected components, no watershed
	 */
	public static Result make(float[] prob, int w, int h, double objectSize, double threshold, boolean split) {
		return make(prob, w, h, objectSize, threshold, split ? PROMINENCE : 0);
	}

	/**
	 * Seed prominence: a fraction of the object size, at least {@link #MIN_PROMINENCE} px. Measured
	 * on the held-out developer images (whole-image F1 at IoU 0.5 for 0.06 / 0.02 of the size: BBBC039
	 * 0.934 / 0.942, histology 0.760 / 0.798); a distance x probability landscape did worse.
	 */
	public static final double PROMINENCE = 0.02, MIN_PROMINENCE = 0.7;

	/**
	 * @param prominence 0 = plain connected components; else the seed prominence as a fraction of
	 *                   {@code objectSize}
	 */
	public static Result make(float[] prob, int w, int h, double objectSize, double threshold, double prominence) {
		return make(prob, null, w, h, objectSize, threshold, prominence);
	}

	/**
	 * Seeds on the instance map: a peak must rise this much (on its 0..1 scale) above the saddle to its
	 * neighbour. Measured (whole-image F1@0.5 on the other-look histology, adapted): 0.05 / 0.1 / 0.15 /
	 * 0.2 gave 0.575 / 0.640 / 0.631 / 0.613 before the core-height rule, 0.1 and 0.15 0.692 / 0.686 with it.
	 */
	public static final double SEED_PROMINENCE = 0.1;

	/**
	 * @param centre the network's instance map, or null: with it, objects are split along the valleys
	 *               of the instance map (one object per peak) and must reach {@link #CORE_HEIGHT} on
	 *               it, else they are split along the valleys of the distance transform
	 */
	public static Result make(float[] prob, float[] centre, int w, int h, double objectSize, double threshold, double prominence) {
		return make(prob, centre, w, h, objectSize, threshold, prominence, 0, h);
	}

	/**
	 * As above on a band of rows of a taller image ({@link BandedImageMasks}): the maps hold rows
	 * {@code top .. top + h - 1} of an image {@code imageHeight} rows tall, and the objects' positions
	 * and border flags are given in the image's frame.
	 */
	static Result make(float[] prob, float[] centre, int w, int h, double objectSize, double threshold, double prominence, int top, int imageHeight) {
		boolean split = prominence > 0;
		ByteProcessor bin = new ByteProcessor(w, h);
		for (int i = 0; i < prob.length; i++) if (prob[i] >= threshold) bin.set(i, 255);
		boolean[] mask = new boolean[w * h];
		for (int i = 0; i < mask.length; i++) mask[i] = bin.get(i) != 0;
		Components.fillHoles(mask, w, h);
		int[] cnt = new int[1];
		int[] lab;
		double size = objectSize > 0 ? objectSize : 20;
		if (split) {
			for (int i = 0; i < mask.length; i++) bin.set(i, mask[i] ? 255 : 0);
			Seeds seeds = seeds(mask, bin, centre, w, h, prominence * size);
			lab = seeds.labels();
			int k = seeds.count();
			SeededWatershed.flood(seeds.landscape(), mask, lab, w, h);
			// a part of the mask that no seed reached is an object of its own (the rules below judge it)
			boolean[] rest = new boolean[w * h];
			for (int i = 0; i < rest.length; i++) rest[i] = mask[i] && lab[i] == 0;
			int[] more = Components.label(rest, w, h, cnt);
			for (int i = 0; i < lab.length; i++) if (more[i] > 0) lab[i] = k + more[i];
			cnt[0] += k;
		} else lab = Components.label(mask, w, h, cnt);
		// drop specks: far below the area of a typical object
		double minArea = Math.max(4, 0.08 * Math.PI / 4 * size * size);
		long[] area = Components.sizes(lab, cnt[0]);
		float[] peak = centre == null ? null : peaks(lab, cnt[0], centre);
		double[] sure = centre == null ? null : meanOver(lab, cnt[0], prob, area);
		boolean[] kept = new boolean[cnt[0] + 1];
		for (int l = 1; l <= cnt[0]; l++) kept[l] = area[l] >= minArea && (peak == null || peak[l] >= CORE_HEIGHT && sure[l] >= MIN_MEAN_PROBABILITY);
		// numbered in the raster order of their first pixel, so that a band of rows numbers its objects as the whole image does
		int[] remap = new int[cnt[0] + 1];
		int n = 0;
		for (int i = 0; i < lab.length; i++) {
			int l = lab[i];
			if (l > 0 && kept[l] && remap[l] == 0) remap[l] = ++n;
		}
		for (int i = 0; i < lab.length; i++) lab[i] = remap[lab[i]];
		return new Result(lab, n, describe(lab, n, prob, w, h, size, top, imageHeight));
	}

	/** The landscape the watershed floods and its seeds, each seed its own label (1..count), 0 elsewhere. */
	public record Seeds(float[] landscape, int[] labels, int count) {}

	/**
	 * The seeds of the watershed inside {@code mask} ({@code bin} is the same mask as an 8-bit image):
	 * the peaks of the instance map that stand out by {@link #SEED_PROMINENCE}, or without one the
	 * maxima of the distance transform that stand out by {@code distanceProminence} px (at least
	 * {@link #MIN_PROMINENCE}); either landscape is smoothed first (sigma 1 px), which tames
	 * pixel-level ridges.
	 */
	public static Seeds seeds(boolean[] mask, ByteProcessor bin, float[] centre, int w, int h, double distanceProminence) {
		FloatProcessor land = centre != null ? new FloatProcessor(w, h, centre.clone()) : new EDM().makeFloatEDM(bin, 0, false);
		new GaussianBlur().blurGaussian(land, 1.0, 1.0, 0.01);
		ByteProcessor points = centre != null
			? new MaximumFinder().findMaxima(land, SEED_PROMINENCE, ImageProcessor.NO_THRESHOLD, MaximumFinder.SINGLE_POINTS, false, false)
			: new MaximumFinder().findMaxima(land, Math.max(MIN_PROMINENCE, distanceProminence), ImageProcessor.NO_THRESHOLD, MaximumFinder.SINGLE_POINTS, false, true);
		int[] lab = new int[w * h];
		int k = 0;
		for (int i = 0; i < lab.length; i++) if (mask[i] && points.get(i) != 0) lab[i] = ++k;
		return new Seeds((float[]) land.getPixels(), lab, k);
	}

	/**
	 * With an instance map, an object must reach this height on it: a nucleus rises to its core (the
	 * map learns 1 there), thin streaks and specks that pass the probability threshold do not.
	 * Measured (whole-image F1@0.5, histology): other look, adapted 0.640 -> 0.692, not adapted 0.467
	 * -> 0.519; within the developer look 0.742 -> 0.755; 0.6 and 0.7 cut real nuclei (pixel Dice
	 * 0.81 -> 0.67 -> 0.46 on the other look).
	 */
	public static final double CORE_HEIGHT = 0.5;

	/**
	 * With an instance map, an object's mean probability must reach this: a nucleus is sure all
	 * through, whereas pale stroma, membranes and out-of-focus debris that pass the threshold stay
	 * near it (ours). Measured end to end (`./corral benchmark --learn A --mask B`, seed 1; whole-image
	 * F1@0.5 / mean AP, adapted and not adapted): other-look histology 0.693/0.280 -> 0.751/0.316 and
	 * 0.521/0.092 -> 0.553/0.099; histology held-out images 0.730/0.298 -> 0.769/0.322 and 0.755/0.302
	 * -> 0.774/0.314; BBBC039 held-out 0.939/0.744 unchanged and 0.949/0.770 -> 0.950/0.771; BBBC039 ->
	 * S-BSST265 0.745/0.329 -> 0.746/0.327 and 0.721/0.296 -> 0.720/0.294. A stricter 0.85 cut real
	 * nuclei in the held-out histology images (F1 0.756 against 0.770, with core height 0.4).
	 */
	public static final double MIN_MEAN_PROBABILITY = 0.8;

	static double[] meanOver(int[] lab, int n, float[] prob, long[] area) {
		double[] sum = new double[n + 1];
		for (int i = 0; i < lab.length; i++) if (lab[i] > 0) sum[lab[i]] += prob[i];
		for (int l = 1; l <= n; l++) sum[l] /= Math.max(1, area[l]);
		return sum;
	}

	static float[] peaks(int[] lab, int n, float[] map) {
		float[] mx = new float[n + 1];
		for (int i = 0; i < lab.length; i++) if (lab[i] > 0) mx[lab[i]] = Math.max(mx[lab[i]], map[i]);
		return mx;
	}

	static List<ObjectInfo> describe(int[] lab, int n, float[] prob, int w, int h, double size) {
		return describe(lab, n, prob, w, h, size, 0, h);
	}

	/** Per-object figures; the labels hold rows {@code top ..} of an image {@code imageHeight} rows tall, positions are the image's. */
	static List<ObjectInfo> describe(int[] lab, int n, float[] prob, int w, int h, double size, int top, int imageHeight) {
		int[] x0 = new int[n + 1], y0 = new int[n + 1], x1 = new int[n + 1], y1 = new int[n + 1];
		long[] area = new long[n + 1];
		double[] psum = new double[n + 1];
		java.util.Arrays.fill(x0, Integer.MAX_VALUE);
		java.util.Arrays.fill(y0, Integer.MAX_VALUE);
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				int l = lab[y * w + x];
				if (l == 0) continue;
				area[l]++;
				psum[l] += prob[y * w + x];
				x0[l] = Math.min(x0[l], x);
				y0[l] = Math.min(y0[l], y);
				x1[l] = Math.max(x1[l], x);
				y1[l] = Math.max(y1[l], y);
			}
		double typical = Math.PI / 4 * size * size;
		List<ObjectInfo> out = new ArrayList<>();
		for (int l = 1; l <= n; l++) {
			int bw = x1[l] - x0[l] + 1, bh = y1[l] - y0[l] + 1;
			double mean = psum[l] / area[l];
			double fill = area[l] / (double) (bw * bh);
			List<String> flags = new ArrayList<>();
			if (x0[l] == 0 || y0[l] + top == 0 || x1[l] == w - 1 || y1[l] + top == imageHeight - 1) flags.add("touches-border");
			if (area[l] > 2.2 * typical || (fill < 0.55 && area[l] > 0.8 * typical)) flags.add("may-be-two-objects");
			if (area[l] < 0.25 * typical) flags.add("tiny");
			// confidence (ours): how sure the network is, lowered for shapes unlike a single object
			double conf = Math.max(0, Math.min(1, (mean - 0.5) * 2)) * (flags.contains("may-be-two-objects") ? 0.5 : 1);
			out.add(new ObjectInfo(l, x0[l], y0[l] + top, bw, bh, area[l], mean, conf, flags));
		}
		return out;
	}
}
