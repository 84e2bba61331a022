package org.corral.workflow;

import ij.process.AutoThresholder;

import java.util.Arrays;
import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.instances.ImageMasks;

/** Classical masks made from the same boxes, to compare against: the box itself, Otsu in the box. */
public final class Baselines {
	private Baselines() {}

	public static int[] boxItself(PlanarImage im, List<Box> boxes) {
		float[] one = new float[im.width * im.height];
		Arrays.fill(one, 1f);
		return BoxMasks.make(one, im.width, im.height, boxes, ImageMasks.THRESHOLD).labels();
	}

	/** The ellipse inscribed in each box: a box-shaped guess that a mask must beat. */
	public static int[] ellipse(PlanarImage im, List<Box> boxes) {
		float[] e = new float[im.width * im.height];
		for (Box b0 : boxes) {
			Box b = b0.clip(im.width, im.height);
			if (b == null) continue;
			double cx = b0.x() + b0.width() / 2.0, cy = b0.y() + b0.height() / 2.0, rx = b0.width() / 2.0, ry = b0.height() / 2.0;
			for (int y = b.y(); y < b.y1(); y++)
				for (int x = b.x(); x < b.x1(); x++) {
					double dx = (x + 0.5 - cx) / rx, dy = (y + 0.5 - cy) / ry;
					if (dx * dx + dy * dy <= 1) e[y * im.width + x] = 1f;
				}
		}
		return BoxMasks.make(e, im.width, im.height, boxes, ImageMasks.THRESHOLD).labels();
	}

	/**
	 * Grey value for thresholding: the single channel, or 1 - luminance for colour images (stained
	 * nuclei are dark in brightfield; ITU-R BT.601 luma weights).
	 */
	public static float[] grey(PlanarImage im) {
		if (im.nChannels() == 1) return im.channels[0];
		float[] g = new float[im.width * im.height];
		for (int i = 0; i < g.length; i++)
			g[i] = 255f - (0.299f * im.channels[0][i] + 0.587f * im.channels[1][i] + 0.114f * im.channels[2 % im.nChannels()][i]);
		return g;
	}

	/** Otsu's threshold ("A threshold selection method from gray-level histograms", 1979) inside each box. */
	public static int[] otsuInBox(PlanarImage im, List<Box> boxes) {
		float[] g = grey(im);
		int w = im.width, h = im.height;
		float[] prob = new float[w * h];
		// each box writes its own decision; the mask rule then keeps the best component per box
		for (Box b0 : boxes) {
			Box b = b0.clip(w, h);
			if (b == null) continue;
			float lo = Float.MAX_VALUE, hi = -Float.MAX_VALUE;
			for (int y = b.y(); y < b.y1(); y++)
				for (int x = b.x(); x < b.x1(); x++) {
					lo = Math.min(lo, g[y * w + x]);
					hi = Math.max(hi, g[y * w + x]);
				}
			if (hi <= lo) continue;
			int[] hist = new int[256];
			for (int y = b.y(); y < b.y1(); y++)
				for (int x = b.x(); x < b.x1(); x++) hist[(int) ((g[y * w + x] - lo) / (hi - lo) * 255)]++;
			int t = new AutoThresholder().getThreshold(AutoThresholder.Method.Otsu, hist);
			for (int y = b.y(); y < b.y1(); y++)
				for (int x = b.x(); x < b.x1(); x++) {
					int bin = (int) ((g[y * w + x] - lo) / (hi - lo) * 255);
					if (bin > t) prob[y * w + x] = 1f;
				}
		}
		return BoxMasks.make(prob, w, h, boxes, ImageMasks.THRESHOLD).labels();
	}

	/** The classical whole-image baseline: global Otsu threshold, then the distance-transform watershed. */
	public static int[] otsuWatershed(PlanarImage im, double objectSize) {
		float[] g = grey(im);
		float lo = Float.MAX_VALUE, hi = -Float.MAX_VALUE;
		for (float v : g) {
			lo = Math.min(lo, v);
			hi = Math.max(hi, v);
		}
		float[] bin = new float[g.length];
		if (hi > lo) {
			int[] hist = new int[256];
			for (float v : g) hist[(int) ((v - lo) / (hi - lo) * 255)]++;
			int t = new AutoThresholder().getThreshold(AutoThresholder.Method.Otsu, hist);
			for (int i = 0; i < g.length; i++) bin[i] = (int) ((g[i] - lo) / (hi - lo) * 255) > t ? 1f : 0f;
		}
		return org.corral.instances.ImageMasks.make(bin, im.width, im.height, objectSize, ImageMasks.THRESHOLD, true).labels();
	}
}
