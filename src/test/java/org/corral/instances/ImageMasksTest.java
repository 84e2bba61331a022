package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class ImageMasksTest {
	static final int W = 80, H = 60;

	static void disc(float[] p, double cx, double cy, double r) {
		for (int y = 0; y < H; y++)
			for (int x = 0; x < W; x++)
				if ((x - cx) * (x - cx) + (y - cy) * (y - cy) <= r * r) p[y * W + x] = 0.9f;
	}

	@Test
	void twoTouchingDiscsBecomeTwoObjects() {
		float[] p = new float[W * H];
		disc(p, 30, 30, 10);
		disc(p, 47, 30, 10); // overlapping by 3 px: one blob with a waist
		ImageMasks.Result plain = ImageMasks.make(p, W, H, 20, 0.5, false);
		assertEquals(1, plain.count(), "connected components alone merge them");
		ImageMasks.Result r = ImageMasks.make(p, W, H, 20, 0.5, true);
		assertEquals(2, r.count());
		assertTrue(r.labels()[30 * W + 30] != r.labels()[30 * W + 47]);
		long covered = 0;
		for (int i = 0; i < p.length; i++) if (p[i] > 0.5 && r.labels()[i] > 0) covered++;
		long fg = 0;
		for (float v : p) if (v > 0.5) fg++;
		assertEquals(fg, covered, "watershed lines are given back to the objects");
	}

	@Test
	void aRingStaysOneObject() {
		float[] p = new float[W * H];
		for (int y = 0; y < H; y++)
			for (int x = 0; x < W; x++) {
				double d = Math.hypot(x - 40, y - 30);
				if (d <= 14 && d >= 8) p[y * W + x] = 0.9f;
			}
		ImageMasks.Result r = ImageMasks.make(p, W, H, 28, 0.5, true);
		assertEquals(1, r.count());
		assertEquals(1, r.labels()[30 * W + 40], "the hole is filled");
	}

	@Test
	void specksAreDroppedAndBorderObjectsFlagged() {
		float[] p = new float[W * H];
		disc(p, 5, 30, 8); // cut by the left border
		p[10 * W + 60] = 0.9f; // a 1-pixel speck
		ImageMasks.Result r = ImageMasks.make(p, W, H, 16, 0.5, true);
		assertEquals(1, r.count());
		assertTrue(r.objects().get(0).flags().contains("touches-border"));
	}

	@Test
	void withAnInstanceMapAPaleObjectIsDroppedAndASureOneKept() {
		float[] p = new float[W * H], map = new float[W * H];
		disc(p, 20, 30, 9); // sure: 0.9 all through
		for (int y = 0; y < H; y++) // pale: just above the threshold, as stroma that passes it
			for (int x = 0; x < W; x++)
				if ((x - 58) * (x - 58) + (y - 30) * (y - 30) <= 81) p[y * W + x] = 0.65f;
		for (int y = 0; y < H; y++) // both rise to their core on the instance map
			for (int x = 0; x < W; x++)
				map[y * W + x] = (float) Math.max(0, Math.max(1 - Math.hypot(x - 20, y - 30) / 9, 1 - Math.hypot(x - 58, y - 30) / 9));
		ImageMasks.Result r = ImageMasks.make(p, map, W, H, 18, 0.5, ImageMasks.PROMINENCE);
		assertEquals(1, r.count(), "only the sure object stays");
		assertTrue(r.labels()[30 * W + 20] > 0);
		assertEquals(0, r.labels()[30 * W + 58]);
		for (int i = 0; i < p.length; i++) if (p[i] > 0.6f && p[i] < 0.7f) p[i] = 0.85f;
		assertEquals(2, ImageMasks.make(p, map, W, H, 18, 0.5, ImageMasks.PROMINENCE).count(), "a sure second object is kept");
	}
}
