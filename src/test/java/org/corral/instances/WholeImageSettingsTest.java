package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;
import org.junit.jupiter.api.Test;

/** The whole-image settings are the ones whose objects agree best with the box masks. */
class WholeImageSettingsTest {
	static final int W = 160, H = 120, R = 9;
	static final int[][] CENTRES = {{25, 25}, {70, 30}, {120, 28}, {30, 85}, {80, 90}, {130, 80}};

	/** Discs of radius {@link #R}: core probability {@code core}, a rim of 2 px at {@code rim}, ground 0.05. */
	static float[] map(double core, double rim, int skipEvery) {
		float[] p = new float[W * H];
		java.util.Arrays.fill(p, 0.05f);
		for (int k = 0; k < CENTRES.length; k++) {
			if (skipEvery > 0 && k % skipEvery == 0) continue;
			for (int y = 0; y < H; y++)
				for (int x = 0; x < W; x++) {
					double d = Math.hypot(x - CENTRES[k][0], y - CENTRES[k][1]);
					if (d <= R) p[y * W + x] = (float) (d <= R - 2 ? core : rim);
				}
		}
		return p;
	}

	static List<Box> boxes() {
		List<Box> b = new ArrayList<>();
		for (int k = 0; k < CENTRES.length; k++) b.add(new Box(k + 1, CENTRES[k][0] - R, CENTRES[k][1] - R, 2 * R + 1, 2 * R + 1));
		return b;
	}

	/** The box masks: the full discs. */
	static int[] discs() {
		int[] lab = new int[W * H];
		for (int k = 0; k < CENTRES.length; k++)
			for (int y = 0; y < H; y++)
				for (int x = 0; x < W; x++) if (Math.hypot(x - CENTRES[k][0], y - CENTRES[k][1]) <= R) lab[y * W + x] = k + 1;
		return lab;
	}

	static WholeImageSettings.Choice choose(float[] one, float[] four) {
		return WholeImageSettings.choose(List.of(new WholeImageSettings.Sample(new float[][] {one}, new float[][] {four}, W, H, boxes(), discs())), 2 * R);
	}

	@Test
	void aSureMapKeepsTheDefaults() {
		float[] p = map(0.95, 0.9, 0);
		WholeImageSettings.Choice c = choose(p, p);
		assertEquals(0.5, c.threshold());
		assertEquals(1, c.flips());
		assertTrue(c.onePass()[0] > 0.9, "full discs at 0.5 match the box masks: " + c.onePass()[0]);
	}

	@Test
	void aPaleRimLowersTheThreshold() {
		// the rim sits at 0.42: only thresholds of 0.4 and below keep it; the first such (0.4) wins the tie with 0.35
		float[] p = map(0.95, 0.42, 0);
		WholeImageSettings.Choice c = choose(p, p);
		assertEquals(0.4, c.threshold(), 1e-12);
		assertEquals(1, c.flips(), "four flips that add nothing are not worth four passes");
		assertTrue(c.onePass()[2] > c.onePass()[0] + WholeImageSettings.THRESHOLD_GAIN);
	}

	@Test
	void flipsAreChosenOnlyWhenTheyPay() {
		// one pass misses every other object; the four flips find them all
		WholeImageSettings.Choice c = choose(map(0.95, 0.9, 2), map(0.95, 0.9, 0));
		assertEquals(4, c.flips());
		assertEquals(0.5, c.threshold());
		assertTrue(c.fourFlips()[0] >= c.onePass()[0] + WholeImageSettings.FLIPS_GAIN);
	}

	@Test
	void objectsOutsideTheBoxesAreNotJudged() {
		float[] p = map(0.95, 0.9, 0), extra = p.clone();
		// an unboxed object between the boxes: a user who boxed only some objects did not say it is wrong
		for (int y = 50; y < 66; y++)
			for (int x = 100; x < 116; x++) extra[y * W + x] = 0.95f;
		assertEquals(choose(p, p).onePass()[0], choose(extra, extra).onePass()[0], 1e-12);
		// whereas an object of a box's own pixels that is missing does count
		assertTrue(choose(map(0.95, 0.9, 3), p).onePass()[0] < choose(p, p).onePass()[0] - 0.1);
	}
}
