package org.corral.image;

import ij.process.FloatProcessor;

/**
 * Bilinear resampling at pixel centres, and a 3x3 mean. The resampling is ours: ImageJ's bilinear
 * {@code resize} samples at other positions when it shrinks (a ramp halved gives 0 at the first
 * pixel instead of the mean 2.5 of the four it covers; 20 to 13 pixels is up to 2.5 grey levels off
 * a linear ramp), which would shift the network's maps against the image by up to half a pixel when
 * they are scaled back.
 */
public final class Resample {
	private Resample() {}

	public static PlanarImage bilinear(PlanarImage im, int nw, int nh) {
		if (nw == im.width && nh == im.height) return im;
		float[][] out = new float[im.nChannels()][];
		for (int c = 0; c < im.nChannels(); c++) out[c] = bilinear(im.channels[c], im.width, im.height, nw, nh);
		return new PlanarImage(nw, nh, out);
	}

	public static float[] bilinear(float[] v, int w, int h, int nw, int nh) {
		float[] out = new float[nw * nh];
		double sx = (double) w / nw, sy = (double) h / nh;
		for (int y = 0; y < nh; y++) {
			double fy = Math.max(0, Math.min(h - 1, (y + 0.5) * sy - 0.5));
			int y0 = (int) fy, y1 = Math.min(h - 1, y0 + 1);
			double ay = fy - y0;
			for (int x = 0; x < nw; x++) {
				double fx = Math.max(0, Math.min(w - 1, (x + 0.5) * sx - 0.5));
				int x0 = (int) fx, x1 = Math.min(w - 1, x0 + 1);
				double ax = fx - x0;
				double top = v[y0 * w + x0] * (1 - ax) + v[y0 * w + x1] * ax;
				double bot = v[y1 * w + x0] * (1 - ax) + v[y1 * w + x1] * ax;
				out[y * nw + x] = (float) (top * (1 - ay) + bot * ay);
			}
		}
		return out;
	}

	/**
	 * 3x3 mean per channel: ImageJ's {@code smooth} (border pixels see their nearest edge pixel), a
	 * cheap denoiser for intensity comparisons.
	 */
	public static PlanarImage mean3(PlanarImage im) {
		float[][] out = new float[im.nChannels()][];
		for (int c = 0; c < im.nChannels(); c++) {
			FloatProcessor fp = new FloatProcessor(im.width, im.height, im.channels[c].clone());
			fp.smooth();
			out[c] = (float[]) fp.getPixels();
		}
		return new PlanarImage(im.width, im.height, out);
	}
}
