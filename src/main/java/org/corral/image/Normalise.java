package org.corral.image;

import java.util.Arrays;

/**
 * Per-image, per-channel percentile normalisation: the low percentile maps to 0 and the high one
 * to 1 (common practice for microscopy networks, so that exposure and bit depth do not matter).
 * NaN and infinite pixels are replaced by the low percentile so they cannot poison the network.
 */
public final class Normalise {
	public static final double LOW = 1.0, HIGH = 99.8;

	private Normalise() {}

	public static PlanarImage percentiles(PlanarImage im, double low, double high) {
		return with(im, bounds(im, low, high));
	}

	public static PlanarImage percentiles(PlanarImage im) {
		return percentiles(im, LOW, HIGH);
	}

	/** The raw values that map to 0 and 1 in each channel. */
	public static float[][] bounds(PlanarImage im, double low, double high) {
		return bounds((RowReader) im, low, high);
	}

	/**
	 * As {@link #bounds(PlanarImage, double, double)} for an image read in bands of rows: the same
	 * strided sample, so the same bounds, without holding the image as float.
	 */
	public static float[][] bounds(RowReader im, double low, double high) {
		return bounds(scan(im, false).samples(), low, high);
	}

	private static float[][] bounds(Sample[] sample, double low, double high) {
		float[][] b = new float[2][sample.length];
		for (int c = 0; c < sample.length; c++) {
			float[] lh = fromSorted(sample[c].v(), sample[c].n(), low, high);
			b[0][c] = lh[0];
			b[1][c] = lh[1];
		}
		return b;
	}

	/**
	 * As {@link #bounds(RowReader, double, double)}, except on a field that is empty or nearly so.
	 * Percentiles assume that objects fill at least the top fraction they cut off; on a field with a
	 * few objects or none, the high percentile falls in the objects' dim edges or in the background's
	 * noise, and the background then comes out brighter and far noisier than the model ever saw
	 * (README, "Empty and nearly empty fields"). A field is sparse when in every channel less than
	 * {@value #SPARSE} of the pixels stand out from the background (the median) by more than
	 * {@value #STANDS_OUT} noise deviations ({@link #noise}). There, a channel whose noise would
	 * come out above {@code noiseLevel} (the noise of the noisiest image the model learned from) is
	 * mapped as the model's learning images were: its range widened until its noise is
	 * {@code noiseLevel} of it, and placed so that its median (the background) lands at
	 * {@code background[c]}, the learning images' median there (low for fluorescence, high for
	 * brightfield). {@code noiseLevel} 0 or less: the percentile bounds as they are.
	 */
	public static float[][] bounds(RowReader im, double low, double high, double noiseLevel, float[] background) {
		return range(im, low, high, noiseLevel, background).bounds();
	}

	/** Bounds per channel ({@code [0]} low, {@code [1]} high), and whether a channel was widened as a nearly empty field's. */
	public record Range(float[][] bounds, boolean nearlyEmpty) {}

	/** As {@link #bounds(RowReader, double, double, double, float[])}, saying whether the field counted as nearly empty. */
	public static Range range(RowReader im, double low, double high, double noiseLevel, float[] background) {
		if (!(noiseLevel > 0) || background == null || background.length != im.nChannels()) return new Range(bounds(im, low, high), false);
		Scan scan = scan(im, true);
		Sample[] sample = scan.samples();
		float[] sigma = scan.sigma();
		float[][] b = bounds(sample, low, high);
		if (!sparse(sample, sigma, b)) return new Range(b, false);
		boolean widened = false;
		for (int c = 0; c < sample.length; c++) {
			double least = sigma[c] / noiseLevel, med = sample[c].at(50);
			if (b[1][c] - b[0][c] >= least) continue;
			b[0][c] = (float) (med - background[c] * least);
			b[1][c] = (float) (b[0][c] + least);
			widened = true;
		}
		return new Range(b, widened);
	}

	/** The median of each channel (of the same strided sample as the bounds). */
	public static float[] medians(RowReader im) {
		Sample[] sample = scan(im, false).samples();
		float[] m = new float[sample.length];
		for (int c = 0; c < m.length; c++) m[c] = sample[c].n() == 0 ? 0 : sample[c].at(50);
		return m;
	}

	/** True when no channel has {@value #SPARSE} of its pixels standing out from its background. */
	public static boolean sparse(RowReader im) {
		Scan scan = scan(im, true);
		return sparse(scan.samples(), scan.sigma(), bounds(scan.samples(), LOW, HIGH));
	}

	private static boolean sparse(Sample[] sample, float[] sigma, float[][] b) {
		for (int c = 0; c < sample.length; c++) {
			Sample sm = sample[c];
			if (sm.n() == 0) continue;
			float med = sm.at(50);
			double cut = STANDS_OUT * sigma[c];
			boolean dark = med - b[0][c] <= b[1][c] - med;
			if ((dark ? sm.above(med + cut) : sm.below(med - cut)) >= SPARSE) return false;
		}
		return true;
	}

	/**
	 * Fraction of pixels standing out from the background below which a field is sparse. On the
	 * reference images (every channel of the four sets) 3.5 % to 44 % stand out in the weakest
	 * channel, and at least 14.5 % in the strongest.
	 */
	static final double SPARSE = 0.05;
	/** Noise deviations by which a pixel stands out from the background: noise alone hardly ever does (6e-16 for a Gaussian). */
	static final double STANDS_OUT = 8;

	/** A channel's finite values at a stride, sorted: the first {@code n} of {@code v}. */
	private record Sample(float[] v, int n) {
		Sample {
			sort(v, n);
		}

		float at(double percent) {
			return v[(int) Math.min(n - 1, Math.floor(percent / 100 * (n - 1)))];
		}

		/** Fraction of the values above {@code t}. */
		double above(double t) {
			int lo = 0, hi = n;
			while (lo < hi) {
				int mid = (lo + hi) >>> 1;
				if (v[mid] <= t) lo = mid + 1;
				else hi = mid;
			}
			return (n - lo) / (double) n;
		}

		/** Fraction of the values below {@code t}. */
		double below(double t) {
			int lo = 0, hi = n;
			while (lo < hi) {
				int mid = (lo + hi) >>> 1;
				if (v[mid] < t) lo = mid + 1;
				else hi = mid;
			}
			return lo / (double) n;
		}
	}

	/** The sorted samples of each channel and, when asked, each channel's {@link #noise} (else null). */
	private record Scan(Sample[] samples, float[] sigma) {}

	/** One pass over the image (band by band unless it is held whole): the samples, and the noise when asked. */
	private static Scan scan(RowReader im, boolean noise) {
		int w = im.width(), h = im.height(), nc = im.nChannels();
		long len = (long) w * h, pairs = (long) (w - 1) * h;
		int step = sampleStep(len), pairStep = (int) Math.max(1, pairs / NOISE_PAIRS);
		float[][] sample = new float[nc][(int) ((len + step - 1) / step)];
		float[][] diff = noise ? new float[nc][(int) (pairs / pairStep + 1)] : null;
		int[] n = new int[nc], nd = new int[nc];
		boolean whole = im instanceof PlanarImage; // read in place, not copied band by band
		long k = 0; // pairs of neighbours before the current row, over the whole image
		for (int y0 = 0; y0 < h; y0 += whole ? h : SAMPLE_ROWS) {
			int y1 = whole ? h : Math.min(h, y0 + SAMPLE_ROWS);
			PlanarImage band = whole ? (PlanarImage) im : im.rows(y0, y1);
			long first = (long) y0 * w, start = (first + step - 1) / step * step; // first sampled index in this band
			for (int c = 0; c < nc; c++) {
				float[] v = band.channels[c];
				for (long i = start; i < (long) y1 * w; i += step) {
					float x = v[(int) (i - first)];
					if (Float.isFinite(x)) sample[c][n[c]++] = x;
				}
			}
			if (noise)
				for (int y = y0; y < y1; y++, k += w - 1)
					for (long q = (k + pairStep - 1) / pairStep * pairStep; q < k + w - 1; q += pairStep) {
						int i = (y - y0) * w + (int) (q - k);
						for (int c = 0; c < nc; c++) {
							float a = band.channels[c][i], b = band.channels[c][i + 1];
							if (Float.isFinite(a) && Float.isFinite(b) && nd[c] < diff[c].length) diff[c][nd[c]++] = Math.abs(a - b);
						}
					}
		}
		Sample[] out = new Sample[nc];
		for (int c = 0; c < nc; c++) out[c] = new Sample(sample[c], n[c]);
		float[] sigma = null;
		if (noise) {
			sigma = new float[nc];
			for (int c = 0; c < nc; c++) sigma[c] = sigmaOfDifferences(diff[c], nd[c]);
		}
		return new Scan(out, sigma);
	}

	/**
	 * Noise of each channel, in the channel's own units: the median absolute difference of
	 * horizontally neighbouring pixels, scaled to a Gaussian's standard deviation (1.4826 / sqrt 2;
	 * a difference-based estimate, common practice), so that objects and texture, which change
	 * slowly from one pixel to the next, barely count. When half or more of the differences are 0
	 * (flat 8-bit background), their mean is used instead (sqrt(pi) / 2 of it, for a Gaussian).
	 */
	public static float[] noise(RowReader im) {
		return scan(im, true).sigma();
	}

	/** Pairs of pixels {@link #noise} looks at, at most: their median moves by well under 1 %. */
	private static final long NOISE_PAIRS = 100_000;

	static float sigmaOfDifferences(float[] d, int n) {
		if (n == 0) return 0;
		sort(d, n);
		float med = d[n / 2];
		if (med > 0) return (float) (1.4826 * med / Math.sqrt(2));
		double sum = 0;
		for (int i = 0; i < n; i++) sum += d[i];
		return (float) (sum / n * Math.sqrt(Math.PI) / 2);
	}

	/**
	 * Sorts the first {@code n} values. Images of 8 or 16 bits hold whole numbers from 0 to 65535:
	 * those are counted instead of compared, in one pass and one of the counts (the same order,
	 * several times faster than a comparison sort of a million values).
	 */
	static void sort(float[] v, int n) {
		for (int i = 0; i < n; i++) {
			float x = v[i];
			if (!(x >= 0 && x <= 65535 && x == (int) x)) {
				Arrays.sort(v, 0, n);
				return;
			}
		}
		int[] count = new int[65536];
		for (int i = 0; i < n; i++) count[(int) v[i]]++;
		int k = 0;
		for (int x = 0; x < count.length; x++)
			for (int c = count[x]; c > 0; c--) v[k++] = x;
	}

	private static final int SAMPLE_ROWS = 256;

	/** A strided sample of about a million pixels keeps this fast on huge images; percentiles barely move. */
	private static int sampleStep(long length) {
		return (int) Math.max(1, length / 1_000_000);
	}

	private static float[] fromSorted(float[] s, int n, double low, double high) {
		float lo = 0, hi = 1;
		if (n > 0) {
			lo = s[(int) Math.min(n - 1, Math.floor(low / 100 * (n - 1)))];
			hi = s[(int) Math.min(n - 1, Math.ceil(high / 100 * (n - 1)))];
			if (hi <= lo) { // flat image, or a sparse one: fall back to the full range
				lo = s[0];
				hi = s[n - 1];
			}
		}
		return new float[] {lo, hi};
	}

	/**
	 * A part of an image (a band of rows) normalised as the whole image is: with the whole image's
	 * raw bounds ({@link #bounds(PlanarImage, double, double)}), not the part's own percentiles.
	 */
	public static PlanarImage with(PlanarImage im, float[][] bounds) {
		float[][] out = new float[im.nChannels()][];
		for (int c = 0; c < im.nChannels(); c++) out[c] = apply(im.channels[c], bounds[0][c], bounds[1][c]);
		return new PlanarImage(im.width, im.height, out);
	}

	private static float[] apply(float[] v, float lo, float hi) {
		float scale = hi > lo ? 1f / (hi - lo) : 0f;
		float[] out = new float[v.length];
		for (int i = 0; i < v.length; i++) {
			float x = v[i];
			out[i] = Float.isFinite(x) ? (x - lo) * scale : 0f;
		}
		return out;
	}
}
