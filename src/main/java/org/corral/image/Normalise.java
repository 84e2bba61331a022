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
		float[][] out = new float[im.nChannels()][];
		for (int c = 0; c < im.nChannels(); c++) out[c] = channel(im.channels[c], low, high);
		return new PlanarImage(im.width, im.height, out);
	}

	public static PlanarImage percentiles(PlanarImage im) {
		return percentiles(im, LOW, HIGH);
	}

	/** The raw values that map to 0 and 1 in each channel. */
	public static float[][] bounds(PlanarImage im, double low, double high) {
		float[][] b = new float[2][im.nChannels()];
		for (int c = 0; c < im.nChannels(); c++) {
			float[] lh = bounds(im.channels[c], low, high);
			b[0][c] = lh[0];
			b[1][c] = lh[1];
		}
		return b;
	}

	/**
	 * As {@link #bounds(PlanarImage, double, double)} for an image read in bands of rows: the same
	 * strided sample, so the same bounds, without holding the image as float.
	 */
	public static float[][] bounds(RowReader im, double low, double high) {
		if (im instanceof PlanarImage p) return bounds(p, low, high);
		int w = im.width(), h = im.height(), nc = im.nChannels();
		long len = (long) w * h;
		int step = sampleStep(len);
		float[][] sample = new float[nc][(int) ((len + step - 1) / step)];
		int[] n = new int[nc];
		for (int y0 = 0; y0 < h; y0 += SAMPLE_ROWS) {
			int y1 = Math.min(h, y0 + SAMPLE_ROWS);
			PlanarImage band = im.rows(y0, y1);
			long first = (long) y0 * w, start = (first + step - 1) / step * step; // first sampled index in this band
			for (int c = 0; c < nc; c++)
				for (long i = start; i < (long) y1 * w; i += step) {
					float v = band.channels[c][(int) (i - first)];
					if (Float.isFinite(v)) sample[c][n[c]++] = v;
				}
		}
		float[][] b = new float[2][nc];
		for (int c = 0; c < nc; c++) {
			float[] lh = fromSample(sample[c], n[c], low, high);
			b[0][c] = lh[0];
			b[1][c] = lh[1];
		}
		return b;
	}

	private static final int SAMPLE_ROWS = 256;

	/** A strided sample of about a million pixels keeps this fast on huge images; percentiles barely move. */
	private static int sampleStep(long length) {
		return (int) Math.max(1, length / 1_000_000);
	}

	static float[] bounds(float[] v, double low, double high) {
		int step = sampleStep(v.length);
		float[] s = new float[(v.length + step - 1) / step];
		int n = 0;
		for (int i = 0; i < v.length; i += step) if (Float.isFinite(v[i])) s[n++] = v[i];
		return fromSample(s, n, low, high);
	}

	private static float[] fromSample(float[] s, int n, double low, double high) {
		float lo = 0, hi = 1;
		if (n > 0) {
			Arrays.sort(s, 0, n);
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

	static float[] channel(float[] v, double low, double high) {
		float[] lh = bounds(v, low, high);
		return apply(v, lh[0], lh[1]);
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
