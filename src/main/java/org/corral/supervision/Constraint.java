package org.corral.supervision;

/**
 * A linear inequality on the sum of object probabilities over a rectangle [x0,x1) x [y0,y1):
 * {@code z = sign * (sum - target) / norm <= 0}. Every box prior of Corral has this form, so the
 * loss evaluates them all from one integral image ("Summed-area tables for texture mapping",
 * SIGGRAPH 1984).
 */
public record Constraint(Kind kind, int box, int x0, int y0, int x1, int y1, float target, float sign, float norm) {

	public enum Kind {
		/**
		 * Tightness prior ("Image segmentation with a bounding box prior", ICCV 2009) in the band form of
		 * "Bounding boxes for weakly supervised segmentation: Global constraints get close to full
		 * supervision" (MIDL 2020): a band of w lines of a tight box holds at least w object pixels.
		 */
		BAND,
		/** Lower bound on the fraction of the box the object fills (ours). */
		FILL_MIN,
		/** Box-size bound: the object is not larger than a fraction of its box. */
		FILL_MAX
	}

	/** "the sum over the rectangle is at least target" */
	public static Constraint atLeast(Kind k, int box, int x0, int y0, int x1, int y1, double target, double norm) {
		return new Constraint(k, box, x0, y0, x1, y1, (float) target, -1f, (float) norm);
	}

	/** "the sum over the rectangle is at most target" */
	public static Constraint atMost(Kind k, int box, int x0, int y0, int x1, int y1, double target, double norm) {
		return new Constraint(k, box, x0, y0, x1, y1, (float) target, 1f, (float) norm);
	}

	public long area() {
		return (long) (x1 - x0) * (y1 - y0);
	}

	/** z for a given probability map (width w), in plain Java: for tests and diagnostics. */
	public double z(float[] prob, int w) {
		double s = 0;
		for (int y = y0; y < y1; y++)
			for (int x = x0; x < x1; x++) s += prob[y * w + x];
		return sign * (s - target) / norm;
	}

}
