package org.corral.instances;

import ij.plugin.filter.EDM;
import ij.process.ByteProcessor;
import ij.process.FloatProcessor;

/**
 * Targets for the instance output, from masks of boxed objects: each object's distance to its own
 * edge (touching objects count as each other's edge), divided by the object's largest distance, so
 * every object rises from 0 at its outline to 1 at its core and touching objects are parted by a
 * valley. Regressing such a normalised distance map is the nuclei method of "Segmentation of Nuclei
 * in Histopathology Images by Deep Regression of the Distance Map" (IEEE TMI 2019); here the masks
 * are the network's own box masks, fitted to their boxes, not drawn outlines.
 */
public final class DistanceTargets {
	private DistanceTargets() {}

	/** @param labels one label per object (0 = background), raster order */
	public static float[] of(int[] labels, int w, int h) {
		ByteProcessor bin = new ByteProcessor(w, h);
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				int i = y * w + x, l = labels[i];
				if (l == 0) continue;
				// a pixel next to another object is that object's edge, as a background pixel would be
				boolean edge = x > 0 && labels[i - 1] != l && labels[i - 1] != 0 || x < w - 1 && labels[i + 1] != l && labels[i + 1] != 0
					|| y > 0 && labels[i - w] != l && labels[i - w] != 0 || y < h - 1 && labels[i + w] != l && labels[i + w] != 0;
				if (!edge) bin.set(i, 255);
			}
		FloatProcessor edm = new EDM().makeFloatEDM(bin, 0, false);
		float[] d = (float[]) edm.getPixels();
		int n = 0;
		for (int l : labels) n = Math.max(n, l);
		float[] max = new float[n + 1];
		for (int i = 0; i < d.length; i++) if (labels[i] > 0) max[labels[i]] = Math.max(max[labels[i]], d[i]);
		float[] out = new float[w * h];
		for (int i = 0; i < d.length; i++) {
			int l = labels[i];
			if (l > 0 && max[l] > 0) out[i] = d[i] / max[l];
		}
		return out;
	}
}
