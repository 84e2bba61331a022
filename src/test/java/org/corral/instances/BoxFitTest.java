package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.corral.boxes.Box;
import org.junit.jupiter.api.Test;

/** The per-box fit: masks obey their tight box after thresholding. */
class BoxFitTest {
	/** A disc of radius 10 whose core is sure (0.9) and whose rim (the outer 3 px) the network is unsure of (0.3). */
	static float[] paleRim(int w, int h, double cx, double cy) {
		float[] p = new float[w * h];
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				double r = Math.hypot(x + 0.5 - cx, y + 0.5 - cy);
				p[y * w + x] = r <= 7 ? 0.9f : r <= 10 ? 0.3f : 0.02f;
			}
		return p;
	}

	@Test
	void aPaleRimIsKeptSoTheMaskCrossesEveryRowAndColumnOfItsTightBox() {
		int w = 40, h = 40;
		float[] p = paleRim(w, h, 20, 20);
		List<Box> box = List.of(new Box(1, 10, 10, 20, 20)); // tight around the radius-10 disc
		BoxMasks.Result plain = BoxMasks.make(p, w, h, box, 0.5);
		BoxMasks.Result fitted = BoxMasks.make(p, w, h, box, BoxMasks.Options.DEFAULTS);
		BoxMasks.Fit f0 = plain.fits().get(0), f1 = fitted.fits().get(0);
		assertTrue(f0.rowsCrossed() < 0.8, "the plain threshold drops the rim: rows crossed " + f0.rowsCrossed());
		assertEquals(1.0, f1.rowsCrossed(), 1e-9);
		assertEquals(1.0, f1.columnsCrossed(), 1e-9);
		assertTrue(f1.priorMet());
		assertFalse(f0.priorMet(), "the table says when the prior is not met");
		// the fitted mask is the disc: area of a radius-10 disc, not the whole box
		assertEquals(Math.PI * 100, f1.area(), 20);
	}

	@Test
	void theSizeBoundKeepsAMaskFromFillingItsBox() {
		int w = 30, h = 30;
		float[] p = new float[w * h];
		java.util.Arrays.fill(p, 0.3f); // nothing sure: every threshold below 0.3 fills the whole box
		for (int y = 10; y < 20; y++) for (int x = 10; x < 20; x++) p[y * w + x] = 0.9f;
		BoxMasks.Fit f = BoxMasks.make(p, w, h, List.of(new Box(1, 5, 5, 20, 20)), BoxMasks.Options.DEFAULTS).fits().get(0);
		assertTrue(f.fill() <= 0.95, "fill " + f.fill());
	}

	@Test
	void marginLinesOfALooseBoxNeedNotBeCrossed() {
		int w = 40, h = 40;
		float[] p = paleRim(w, h, 20, 20);
		List<Box> loose = List.of(new Box(1, 7, 7, 26, 26)); // 3 px too large on each side
		BoxMasks.Fit strict = BoxMasks.make(p, w, h, loose, BoxMasks.Options.DEFAULTS).fits().get(0);
		BoxMasks.Fit withMargin = BoxMasks.make(p, w, h, loose, BoxMasks.Options.DEFAULTS.withMargin(3)).fits().get(0);
		assertTrue(withMargin.priorMet(), "with the margin, the disc meets the prior");
		assertEquals(Math.PI * 100, withMargin.area(), 20);
		assertTrue(strict.area() >= withMargin.area(), "without it, the mask is pushed to the loose sides");
	}
}
