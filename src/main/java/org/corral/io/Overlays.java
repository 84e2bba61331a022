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

	public static BufferedImage outlines(PlanarImage raw, int[] labels) {
		int w = raw.width, h = raw.height;
		PlanarImage n = Normalise.percentiles(raw, 0.5, 99.5);
		BufferedImage img = new BufferedImage(w, h, BufferedImage.TYPE_INT_RGB);
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				int i = y * w + x;
				int l = labels[i];
				boolean edge = l > 0 && (x == 0 || y == 0 || x == w - 1 || y == h - 1
					|| labels[i - 1] != l || labels[i + 1] != l || labels[i - w] != l || labels[i + w] != l);
				int rgb;
				if (edge) rgb = colour(l);
				else if (n.nChannels() >= 3) rgb = (g(n, 0, i) << 16) | (g(n, 1, i) << 8) | g(n, 2, i);
				else {
					int v = g(n, 0, i);
					rgb = (v << 16) | (v << 8) | v;
				}
				img.setRGB(x, y, rgb);
			}
		return img;
	}

	private static int g(PlanarImage n, int c, int i) {
		return (int) Math.max(0, Math.min(255, n.channels[c][i] * 255));
	}
}
