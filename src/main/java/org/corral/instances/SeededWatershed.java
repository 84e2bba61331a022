package org.corral.instances;

/**
 * Seeded watershed by priority flooding ("Topographic distance and watershed lines", Meyer, Signal
 * Processing 1994): every seed grows into the mask, the highest pixel next to a labelled one first,
 * so that neighbouring objects meet along the valleys of the landscape. It works on the float
 * values themselves, with ties broken by raster position, so that a band of rows floods its objects
 * exactly as the whole image does ({@link BandedImageMasks}); ImageJ's own segmentation rescales the
 * landscape to 8 bits by its minimum and maximum, which differ from band to band. No lines are
 * drawn: every reachable mask pixel gets a label.
 */
public final class SeededWatershed {
	private SeededWatershed() {}

	/**
	 * @param height the landscape (higher = nearer an object's centre); finite, at least 0
	 * @param mask   where objects may grow
	 * @param labels the seeds (their label, 0 elsewhere) on input; the flooded labels on output
	 */
	public static void flood(float[] height, boolean[] mask, int[] labels, int w, int h) {
		LongHeap heap = new LongHeap();
		for (int i = 0; i < labels.length; i++) if (labels[i] > 0) heap.add(key(height[i], i));
		while (heap.size() > 0) {
			int p = (int) (heap.poll() & 0xffffffffL);
			int x = p % w, y = p / w, l = labels[p];
			if (x > 0) grow(p - 1, l, height, mask, labels, heap);
			if (x < w - 1) grow(p + 1, l, height, mask, labels, heap);
			if (y > 0) grow(p - w, l, height, mask, labels, heap);
			if (y < h - 1) grow(p + w, l, height, mask, labels, heap);
		}
	}

	private static void grow(int q, int l, float[] height, boolean[] mask, int[] labels, LongHeap heap) {
		if (!mask[q] || labels[q] != 0) return;
		labels[q] = l;
		heap.add(key(height[q], q));
	}

	/** Smallest key first: higher pixels first, then lower raster index. The bits of a float >= 0 sort as the float. */
	static long key(float v, int index) {
		int bits = Float.floatToIntBits(Math.max(0f, v) + 0f); // -0 and negatives to +0
		return ((long) (Integer.MAX_VALUE - bits) << 32) | (index & 0xffffffffL);
	}

	/** A binary min-heap of longs, without boxing (the flood pushes every mask pixel once). */
	static final class LongHeap {
		private long[] a = new long[1024];
		private int n;

		int size() {
			return n;
		}

		void add(long v) {
			if (n == a.length) a = java.util.Arrays.copyOf(a, 2 * n);
			int i = n++;
			while (i > 0) {
				int parent = (i - 1) >>> 1;
				if (a[parent] <= v) break;
				a[i] = a[parent];
				i = parent;
			}
			a[i] = v;
		}

		long poll() {
			long top = a[0], v = a[--n];
			int i = 0;
			while (true) {
				int c = 2 * i + 1;
				if (c >= n) break;
				if (c + 1 < n && a[c + 1] < a[c]) c++;
				if (a[c] >= v) break;
				a[i] = a[c];
				i = c;
			}
			a[i] = v;
			return top;
		}
	}
}
