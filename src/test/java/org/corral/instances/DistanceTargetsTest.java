package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class DistanceTargetsTest {
	static final int W = 60, H = 30;

	@Test
	void everyObjectRisesFromItsEdgeToOneAndTouchingObjectsArePartedByAValley() {
		int[] lab = new int[W * H];
		// two 20x20 squares side by side, touching along x = 25|26, and a small one apart
		for (int y = 5; y < 25; y++)
			for (int x = 6; x < 46; x++) lab[y * W + x] = x < 26 ? 1 : 2;
		for (int y = 10; y < 14; y++)
			for (int x = 50; x < 54; x++) lab[y * W + x] = 3;
		float[] d = DistanceTargets.of(lab, W, H);
		float[] max = new float[4];
		for (int i = 0; i < d.length; i++) {
			assertTrue(d[i] >= 0 && d[i] <= 1, "in [0, 1]");
			if (lab[i] == 0) assertEquals(0f, d[i], "background is 0");
			else max[lab[i]] = Math.max(max[lab[i]], d[i]);
		}
		for (int l = 1; l <= 3; l++) assertEquals(1f, max[l], 1e-6, "object " + l + " peaks at 1");
		int row = 15 * W;
		// the seam pixels are edge pixels of both objects: far below either core
		assertTrue(d[row + 25] < 0.2 && d[row + 26] < 0.2, "valley at the seam: " + d[row + 25] + ", " + d[row + 26]);
		assertTrue(d[row + 15] > 0.9 && d[row + 36] > 0.9, "cores near 1: " + d[row + 15] + ", " + d[row + 36]);
		// monotone from the seam into each core
		for (int x = 15; x < 25; x++) assertTrue(d[row + x] >= d[row + x + 1], "falls towards the seam at x=" + x);
	}
}
