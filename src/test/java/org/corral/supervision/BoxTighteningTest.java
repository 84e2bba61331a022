package org.corral.supervision;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.junit.jupiter.api.Test;

class BoxTighteningTest {
	static PlanarImage disc(int w, int h, double cx, double cy, double r, float inside, float outside) {
		float[] v = new float[w * h];
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) v[y * w + x] = Math.hypot(x - cx, y - cy) <= r ? inside : outside;
		return new PlanarImage(w, h, new float[][] {v});
	}

	@Test
	void looseBoxShrinksToTheObjectForBrightAndDarkObjects() {
		// disc of radius 6 at (20, 20): tight box 14..26 in both axes (13 px)
		for (float[] io : new float[][] {{1f, 0.1f}, {0.1f, 1f}}) {
			PlanarImage im = disc(40, 40, 20, 20, 6, io[0], io[1]);
			Box t = BoxTightening.tighten(im, List.of(new Box(1, 10, 10, 21, 21)), 5).get(0);
			assertEquals(14, t.x());
			assertEquals(14, t.y());
			assertEquals(13, t.width());
			assertEquals(13, t.height());
		}
	}

	@Test
	void eachSideMovesAtMostTheMarginAndNoMarginChangesNothing() {
		PlanarImage im = disc(40, 40, 20, 20, 6, 1f, 0f);
		Box loose = new Box(3, 6, 10, 25, 21);
		Box t = BoxTightening.tighten(im, List.of(loose), 2).get(0);
		assertEquals(8, t.x(), "left side moved by the margin only");
		assertEquals(12, t.y());
		assertEquals(3, t.index());
		assertEquals(List.of(loose), BoxTightening.tighten(im, List.of(loose), 0));
	}
}
