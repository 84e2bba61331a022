package org.corral.io;

import java.awt.image.BufferedImage;

import org.corral.image.Normalise;
import org.corral.image.PlanarImage;

/** A picture of label outlines over an image, for a quick look at results. */
public final class Overlays {
	private Overlays() {}

	/**
	 * A colour for label k: hues a golden angle apart so neighbours differ, bright and fully
	 * saturated so they read on grey and on stained tissue. Our own categorical scheme.
	 */
	public static int colour(int k) {
		float hue = (float) ((k * 0.381966) % 1.0);
		return java.awt.Color.HSBtoRGB(hue, 0.85f, 1f) & 0xffffff;
	}

	/** Read in bands of rows, so that a huge image is never held as float. */
	public static BufferedImage outlines(org.corral.image.RowReader raw, int[] labels) {
		int w = raw.width(), h = raw.height();
		float[][] b = Normalise.bounds(raw, 0.5, 99.5); // the whole image's bounds, each band normalised with them
		BufferedImage img = new BufferedImage(w, h, BufferedImage.TYPE_INT_RGB);
		int[] line = new int[w];
		for (int y0 = 0; y0 < h; y0 += BAND_ROWS) {
			PlanarImage band = Normalise.with(raw.rows(y0, Math.min(h, y0 + BAND_ROWS)), b);
			for (int y = y0; y < y0 + band.height; y++) {
				for (int x = 0; x < w; x++) {
					int i = y * w + x, j = (y - y0) * w + x;
					int l = labels[i];
					boolean edge = l > 0 && (x == 0 || y == 0 || x == w - 1 || y == h - 1
						|| labels[i - 1] != l || labels[i + 1] != l || labels[i - w] != l || labels[i + w] != l);
					int rgb;
					if (edge) rgb = colour(l);
					else if (band.nChannels() >= 3) rgb = (g(band, 0, j) << 16) | (g(band, 1, j) << 8) | g(band, 2, j);
					else {
						int v = g(band, 0, j);
						rgb = (v << 16) | (v << 8) | v;
					}
					line[x] = rgb;
				}
				img.setRGB(0, y, w, 1, line, 0, w);
			}
		}
		return img;
	}

	private static final int BAND_ROWS = 256;

	private static int g(PlanarImage n, int c, int i) {
		return (int) Math.max(0, Math.min(255, n.channels[c][i] * 255));
	}
}
