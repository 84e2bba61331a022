package org.corral;

/** Helpers for the tests' own drawn scenes (objects painted into a label array and an image). */
public final class SyntheticObjects {
	private SyntheticObjects() {}

	/** Whether no pixel within {@code margin} of the rectangle [x0, x1] x [y0, y1] is labelled yet. */
	public static boolean free(int[] lab, int w, int h, int x0, int y0, int x1, int y1, int margin) {
		for (int y = Math.max(0, y0 - margin); y < Math.min(h, y1 + margin); y++)
			for (int x = Math.max(0, x0 - margin); x < Math.min(w, x1 + margin); x++)
				if (lab[y * w + x] != 0) return false;
		return true;
	}

	/** The tight box of the pixels painted so far. */
	public static final class Bounds {
		private int x0 = Integer.MAX_VALUE, y0 = Integer.MAX_VALUE, x1 = -1, y1 = -1;

		public void add(int x, int y) {
			x0 = Math.min(x0, x);
			y0 = Math.min(y0, y);
			x1 = Math.max(x1, x);
			y1 = Math.max(y1, y);
		}

		/** x, y, width, height. */
		public int[] box() {
			return new int[] {x0, y0, x1 - x0 + 1, y1 - y0 + 1};
		}

		/** "x,y,width,height" as in a box CSV. */
		public String csv() {
			return x0 + "," + y0 + "," + (x1 - x0 + 1) + "," + (y1 - y0 + 1);
		}
	}
}
