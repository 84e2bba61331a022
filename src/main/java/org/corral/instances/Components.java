package org.corral.instances;

import java.util.Arrays;

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

	/** Sets to true every false pixel that the background cannot reach from the rectangle's border. */
	public static void fillHoles(boolean[] mask, int w, int h) {
		boolean[] outside = new boolean[w * h];
		int[] stack = new int[w * h];
		int sp = 0;
		for (int x = 0; x < w; x++) {
			sp = seed(mask, outside, stack, sp, x);
			sp = seed(mask, outside, stack, sp, (h - 1) * w + x);
		}
		for (int y = 0; y < h; y++) {
			sp = seed(mask, outside, stack, sp, y * w);
			sp = seed(mask, outside, stack, sp, y * w + w - 1);
		}
		while (sp > 0) {
			int p = stack[--sp];
			int x = p % w, y = p / w;
			if (x > 0) sp = seed(mask, outside, stack, sp, p - 1);
			if (x < w - 1) sp = seed(mask, outside, stack, sp, p + 1);
			if (y > 0) sp = seed(mask, outside, stack, sp, p - w);
			if (y < h - 1) sp = seed(mask, outside, stack, sp, p + w);
		}
		for (int i = 0; i < mask.length; i++) if (!outside[i]) mask[i] = true;
	}

	private static int seed(boolean[] mask, boolean[] outside, int[] stack, int sp, int p) {
		if (!mask[p] && !outside[p]) {
			outside[p] = true;
			stack[sp++] = p;
		}
		return sp;
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
