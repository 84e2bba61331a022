package org.corral.train;

import java.util.SplittableRandom;

/**
 * Appearance jitter of a training crop, so that a model learned on one collection holds on images
 * of another look (another stain, exposure, focus or camera). Only the pixels change; the crop's
 * supervision does not. Applied to the normalised channels of a crop; {@code lo}/{@code hi} are the
 * image's normalisation bounds per channel, to get back to raw values for the stain jitter.
 */
final class Appearance {
	private Appearance() {}

	/**
	 * Stain vectors of haematoxylin, eosin and DAB in optical density (RGB), from "Quantification of
	 * histochemical staining by color deconvolution" (Anal Quant Cytol Histol 2001), values from
	 * memory, rows normalised below.
	 */
	static final double[][] STAINS = {{0.650, 0.704, 0.286}, {0.072, 0.990, 0.105}, {0.268, 0.570, 0.776}};
	static final double[][] TO_STAIN;
	static {
		for (double[] r : STAINS) {
			double n = Math.sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
			for (int i = 0; i < 3; i++) r[i] /= n;
		}
		TO_STAIN = invert(STAINS);
	}

	/** Jitters the crop in place. */
	static void jitter(float[][] ch, float[] lo, float[] hi, int size, SplittableRandom rnd) {
		if (ch.length == 3) stain(ch, lo, hi, rnd);
		for (float[] c : ch) { // brightness and contrast per channel (the jitter Corral always had)
			float gain = (float) Math.exp(rnd.nextDouble(-0.2, 0.2)), off = (float) rnd.nextDouble(-0.1, 0.1);
			for (int i = 0; i < c.length; i++) c[i] = c[i] * gain + off;
		}
		if (rnd.nextDouble() < 0.5) { // gamma, one for all channels
			double g = Math.exp(rnd.nextDouble(-0.35, 0.35));
			for (float[] c : ch)
				for (int i = 0; i < c.length; i++) if (c[i] > 0) c[i] = (float) Math.pow(c[i], g);
		}
		if (rnd.nextDouble() < 0.25) for (float[] c : ch) blur3(c, size); // slight defocus
		if (rnd.nextDouble() < 0.3) { // camera noise
			double sigma = rnd.nextDouble(0.01, 0.06);
			for (float[] c : ch)
				for (int i = 0; i < c.length; i++) c[i] += (float) (sigma * rnd.nextGaussian());
		}
	}

	/** Stain amounts scaled and shifted in optical-density space (brightfield RGB). */
	static void stain(float[][] ch, float[] lo, float[] hi, SplittableRandom rnd) {
		double[] scale = new double[3], shift = new double[3];
		for (int s = 0; s < 3; s++) {
			scale[s] = 1 + rnd.nextDouble(-0.25, 0.25);
			shift[s] = rnd.nextDouble(-0.05, 0.05);
		}
		int n = ch[0].length;
		double[] od = new double[3], st = new double[3];
		for (int i = 0; i < n; i++) {
			for (int c = 0; c < 3; c++) {
				double raw = lo[c] + ch[c][i] * (hi[c] - lo[c]);
				od[c] = -Math.log(Math.max(1, Math.min(255, raw) + 1) / 256.0);
			}
			for (int s = 0; s < 3; s++) st[s] = (od[0] * TO_STAIN[0][s] + od[1] * TO_STAIN[1][s] + od[2] * TO_STAIN[2][s]) * scale[s] + shift[s];
			for (int c = 0; c < 3; c++) {
				double o = st[0] * STAINS[0][c] + st[1] * STAINS[1][c] + st[2] * STAINS[2][c];
				double raw = 256 * Math.exp(-o) - 1;
				ch[c][i] = hi[c] > lo[c] ? (float) ((raw - lo[c]) / (hi[c] - lo[c])) : ch[c][i];
			}
		}
	}

	/** 3x3 mean, borders clamped. */
	static void blur3(float[] v, int s) {
		float[] t = new float[v.length];
		for (int y = 0; y < s; y++)
			for (int x = 0; x < s; x++) t[y * s + x] = (v[y * s + Math.max(0, x - 1)] + v[y * s + x] + v[y * s + Math.min(s - 1, x + 1)]) / 3f;
		for (int y = 0; y < s; y++)
			for (int x = 0; x < s; x++) v[y * s + x] = (t[Math.max(0, y - 1) * s + x] + t[y * s + x] + t[Math.min(s - 1, y + 1) * s + x]) / 3f;
	}

	/** Inverse of a 3x3 matrix (rows = stains), so that od = stains' amounts x STAINS. */
	static double[][] invert(double[][] m) {
		double a = m[0][0], b = m[0][1], c = m[0][2], d = m[1][0], e = m[1][1], f = m[1][2], g = m[2][0], h = m[2][1], k = m[2][2];
		double det = a * (e * k - f * h) - b * (d * k - f * g) + c * (d * h - e * g);
		return new double[][] {{(e * k - f * h) / det, (c * h - b * k) / det, (b * f - c * e) / det}, {(f * g - d * k) / det, (a * k - c * g) / det, (c * d - a * f) / det},
			{(d * h - e * g) / det, (b * g - a * h) / det, (a * e - b * d) / det}};
	}
}
