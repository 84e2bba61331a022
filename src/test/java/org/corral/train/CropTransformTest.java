package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.HashSet;
import java.util.Set;

import org.corral.boxes.Box;
import org.junit.jupiter.api.Test;

/** The crop sampler moves pixels and constraints with two functions; they must agree for all 8 flips/turns. */
class CropTransformTest {
	@Test
	void pixelsAndBoxesMoveAlikeUnderEveryFlipAndTurn() {
		int s = 16;
		Box[] boxes = {new Box(1, 2, 3, 5, 4), new Box(2, 0, 0, 16, 1), new Box(3, 11, 9, 5, 7), new Box(4, 7, 7, 1, 1)};
		Set<Integer> seen = new HashSet<>();
		for (int d = 0; d < 8; d++)
			for (Box b : boxes) {
				Set<Integer> moved = new HashSet<>();
				for (int y = b.y(); y < b.y1(); y++)
					for (int x = b.x(); x < b.x1(); x++) moved.add(CropSampler.target(d, x, y, s));
				Box t = CropSampler.transform(d, b, s);
				Set<Integer> boxed = new HashSet<>();
				for (int y = t.y(); y < t.y1(); y++)
					for (int x = t.x(); x < t.x1(); x++) boxed.add(y * s + x);
				assertEquals(boxed, moved, "transform " + d + " of box " + b.index());
				if (b.index() == 1) seen.add(t.x() * 1000 + t.y() * 100 + t.width() * 10 + t.height());
			}
		assertEquals(8, seen.size(), "the 8 transforms are 8 different placements of an asymmetric box");
	}
}
