package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.corral.boxes.Box;
import org.junit.jupiter.api.Test;

class BoxMasksTest {
	static final int W = 40, H = 30;

	static float[] disc(float[] p, double cx, double cy, double r, float v) {
		for (int y = 0; y < H; y++)
			for (int x = 0; x < W; x++)
				if ((x - cx) * (x - cx) + (y - cy) * (y - cy) <= r * r) p[y * W + x] = v;
		return p;
	}

	@Test
	void oneMaskPerBoxInBoxOrder() {
		float[] p = disc(disc(new float[W * H], 10, 10, 4, 0.9f), 30, 20, 5, 0.8f);
		BoxMasks.Result r = BoxMasks.make(p, W, H, List.of(new Box(1, 25, 15, 11, 11), new Box(2, 6, 6, 9, 9)), 0.5);
		assertEquals(1, r.labels()[20 * W + 30], "label 1 is the first box");
		assertEquals(2, r.labels()[10 * W + 10]);
		assertEquals(0, r.labels()[0]);
		assertEquals(2, r.fits().size());
		assertEquals(1.0, r.fits().get(0).rowsCrossed(), 1e-9);
	}

	@Test
	void keepsTheHeaviestComponentAndFillsHoles() {
		float[] p = new float[W * H];
		// a ring (hole in the middle) and a small speck in the same box
		for (int y = 0; y < H; y++)
			for (int x = 0; x < W; x++) {
				double d = Math.hypot(x - 15, y - 15);
				if (d <= 8 && d >= 3) p[y * W + x] = 0.9f;
			}
		p[7 * W + 7] = 0.95f;
		BoxMasks.Result r = BoxMasks.make(p, W, H, List.of(new Box(1, 6, 6, 19, 19)), 0.5);
		assertEquals(1, r.labels()[15 * W + 15], "hole filled");
		assertEquals(0, r.labels()[7 * W + 7], "speck dropped");
	}

	@Test
	void touchingBoxesShareNoPixel() {
		// one blob spanning two overlapping boxes
		float[] p = new float[W * H];
		for (int y = 5; y < 15; y++) for (int x = 5; x < 25; x++) p[y * W + x] = 0.9f;
		BoxMasks.Result r = BoxMasks.make(p, W, H, List.of(new Box(1, 5, 5, 12, 10), new Box(2, 13, 5, 12, 10)), 0.5);
		long a1 = 0, a2 = 0;
		for (int v : r.labels()) {
			if (v == 1) a1++;
			if (v == 2) a2++;
		}
		assertEquals(200, a1 + a2, "every blob pixel goes to exactly one box");
		assertEquals(r.fits().get(0).area(), a1);
		assertEquals(1, r.labels()[10 * W + 10]);
		assertEquals(2, r.labels()[10 * W + 20]);
		assertTrue(Math.abs(a1 - a2) <= 20, "the shared part is split near the middle");
	}

	@Test
	void faintObjectUsesALowerThresholdAndEmptyBoxIsFlagged() {
		float[] p = disc(new float[W * H], 10, 10, 4, 0.35f);
		BoxMasks.Result r = BoxMasks.make(p, W, H, List.of(new Box(1, 6, 6, 9, 9), new Box(2, 25, 15, 10, 10)), 0.5);
		assertTrue(r.fits().get(0).area() > 40);
		assertEquals(0, r.fits().get(1).area());
		assertTrue(r.fits().get(1).flags().contains("empty"));
	}

	@Test
	void boxOutsideTheImageKeepsItsRow() {
		BoxMasks.Result r = BoxMasks.make(new float[W * H], W, H, List.of(new Box(1, 100, 100, 5, 5)), 0.5);
		assertEquals(1, r.fits().size());
		assertTrue(r.fits().get(0).flags().contains("outside-image"));
	}
}
