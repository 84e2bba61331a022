package org.corral.instances;

import ij.process.ByteProcessor;
import ij.process.FloodFiller;

/** Connected components and hole filling on binary masks of a rectangle (pure Java). */
public final class Components {
	private Components() {}

	/**
	 * Labels the 4-connected components of {@code mask} (w x h); returns the label array and writes
	 * the number of components to {@code count[0]}.
	 */
	public static int[] label(boolean[] mask, int w, int h, int[] count) {
		int[] lab = new int[w * h];
		int[] stack = new int[w * h];
		int n = 0;
		for (int i = 0; i < lab.length; i++) {
			if (!mask[i] || lab[i] != 0) continue;
			n++;
			int sp = 0;
			stack[sp++] = i;
			lab[i] = n;
			while (sp > 0) {
				int p = stack[--sp];
				int x = p % w, y = p / w;
				if (x > 0 && mask[p - 1] && lab[p - 1] == 0) { lab[p - 1] = n; stack[sp++] = p - 1; }
				if (x < w - 1 && mask[p + 1] && lab[p + 1] == 0) { lab[p + 1] = n; stack[sp++] = p + 1; }
				if (y > 0 && mask[p - w] && lab[p - w] == 0) { lab[p - w] = n; stack[sp++] = p - w; }
				if (y < h - 1 && mask[p + w] && lab[p + w] == 0) { lab[p + w] = n; stack[sp++] = p + w; }
			}
		}
		if (count != null) count[0] = n;
		return lab;
	}

	/**
	 * Sets to true every false pixel that the background cannot reach from the rectangle's border
	 * (4-connected), with ImageJ's scan-line {@link FloodFiller}: the background is flooded from
	 * every border pixel, and what it did not reach is a hole.
	 */
	public static void fillHoles(boolean[] mask, int w, int h) {
		final int object = 255, reached = 127;
		ByteProcessor bp = new ByteProcessor(w, h);
		byte[] px = (byte[]) bp.getPixels();
		for (int i = 0; i < mask.length; i++) if (mask[i]) px[i] = (byte) object;
		bp.setValue(reached);
		FloodFiller ff = new FloodFiller(bp);
		for (int x = 0; x < w; x++) {
			if (bp.get(x, 0) == 0) ff.fill(x, 0);
			if (bp.get(x, h - 1) == 0) ff.fill(x, h - 1);
		}
		for (int y = 0; y < h; y++) {
			if (bp.get(0, y) == 0) ff.fill(0, y);
			if (bp.get(w - 1, y) == 0) ff.fill(w - 1, y);
		}
		for (int i = 0; i < mask.length; i++) if (px[i] == 0) mask[i] = true;
	}

	/** Keeps only component {@code keep} of a label array, as a mask. */
	public static boolean[] only(int[] lab, int keep) {
		boolean[] m = new boolean[lab.length];
		for (int i = 0; i < lab.length; i++) m[i] = lab[i] == keep && keep > 0;
		return m;
	}

	/** Number of pixels of each label 0..n. */
	public static long[] sizes(int[] lab, int n) {
		long[] s = new long[n + 1];
		for (int l : lab) if (l >= 0 && l <= n) s[l]++;
		return s;
	}

	static boolean any(boolean[] m) {
		for (boolean b : m) if (b) return true;
		return false;
	}

}
