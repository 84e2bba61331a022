package org.corral.boxes;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.corral.instances.BoxMasks;
import org.junit.jupiter.api.Test;

/** Each awkward kind of box has a defined behaviour (see {@link BoxChecks} and {@link BoxMasks}). */
class BoxChecksTest {

	@Test
	void learningIgnoresOutsideBoxesUsesDuplicatesOnceAndClipsBorderBoxes() {
		List<Box> boxes = List.of(new Box(1, 2, 2, 5, 5), new Box(2, 2, 2, 5, 5), new Box(3, 100, 100, 4, 4), new Box(4, -2, 10, 6, 6),
			new Box(5, 20, 20, 1, 2), new Box(6, 3, 3, 2, 2));
		BoxChecks.Checked c = BoxChecks.forLearning(boxes, 40, 30, "a.tif");
		assertEquals(List.of(1, 4, 5, 6), c.usable().stream().map(Box::index).toList(), "duplicate and outside dropped; border, tiny and nested kept");
		assertEquals(3, c.notes().size());
		assertTrue(c.notes().get(0).contains("a.tif: box 2") && c.notes().get(0).contains("duplicates box 1"), c.notes().get(0));
		assertTrue(c.notes().get(1).contains("box 3") && c.notes().get(1).contains("outside the 40x30 image"), c.notes().get(1));
		assertTrue(c.notes().get(2).contains("box 4") && c.notes().get(2).contains("clipped"), c.notes().get(2));
	}

	@Test
	void maskingGivesDuplicatesNoPixelsAndNestedBoxesTheirCentre() {
		int w = 40, h = 30;
		float[] p = new float[w * h];
		for (int y = 5; y < 25; y++) for (int x = 5; x < 35; x++) p[y * w + x] = 0.9f;
		List<Box> boxes = List.of(new Box(1, 5, 5, 30, 20), new Box(2, 5, 5, 30, 20), new Box(3, 8, 8, 8, 6), new Box(4, 0, 0, 2, 3));
		BoxMasks.Result r = BoxMasks.make(p, w, h, boxes, 0.5);
		assertEquals(List.of("duplicate-of-1"), r.fits().get(1).flags());
		assertEquals(0, r.fits().get(1).area());
		assertEquals(3, r.labels()[11 * w + 12], "the nested box wins the pixels at its centre");
		assertEquals(1, r.labels()[6 * w + 6], "the outer box keeps the rest");
		assertTrue(r.fits().get(3).flags().contains("tiny"));
		assertTrue(r.fits().get(3).flags().contains("touches-border"));
	}
}
