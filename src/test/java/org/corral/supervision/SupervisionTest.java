package org.corral.supervision;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.corral.boxes.Box;
import org.junit.jupiter.api.Test;

class SupervisionTest {

	@Test
	void anOutlinedObjectGivesKnownPixelsAndNoConstraints() {
		// a 6x6 outline (a 4x4 square inside it) touching a rectangle box that reaches into its corner
		byte[] m = new byte[36];
		for (int y = 1; y < 5; y++)
			for (int x = 1; x < 5; x++) m[y * 6 + x] = 1;
		Box outline = new Box(1, 10, 10, 6, 6, 0, "outline", m), rect = new Box(2, 14, 14, 8, 8);
		Supervision s = Supervision.builder(40, 40).optBand(3).build(List.of(outline, rect));
		assertEquals(1, s.exactCount());
		assertTrue(s.constraints.stream().allMatch(c -> c.box() == 2), "constraints only for the rectangle");
		int w = 40;
		assertEquals(1, s.exactObject[12 * w + 12], "inside the outline: object");
		assertEquals(1, s.exactKnown[12 * w + 12]);
		assertEquals(1, s.exactKnown[10 * w + 10], "the outline's box corner: known background");
		assertEquals(0, s.exactObject[10 * w + 10]);
		assertEquals(0, s.exactKnown[15 * w + 15], "where the rectangle reaches in, nothing is known from the outline");
		int known = 0, object = 0;
		for (int i = 0; i < s.exactKnown.length; i++) {
			known += s.exactKnown[i];
			object += s.exactObject[i];
		}
		assertEquals(16, object);
		assertEquals(36 - 4 + 1, known, "the outline's box less the rectangle's 2x2 corner, but its own pixel (14,14) there stays object");
		assertEquals(null, Supervision.builder(40, 40).build(List.of(rect)).exactKnown, "no outline, no arrays");
	}

	@Test
	void bandsCoverTheBoxWhenWDividesTheSide() {
		Supervision s = Supervision.builder(50, 50).optBand(5).build(List.of(new Box(1, 10, 20, 10, 15)));
		List<Constraint> b = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.BAND).toList();
		assertEquals(3 + 2, b.size()); // 15 rows -> 3 bands, 10 columns -> 2 bands
		Constraint first = b.get(0);
		assertEquals(10, first.x0());
		assertEquals(20, first.x1());
		assertEquals(20, first.y0());
		assertEquals(25, first.y1());
		assertEquals(5f, first.target());
		assertEquals(-1f, first.sign());
	}

	@Test
	void lastBandIsNarrowerWhenWDoesNotDivideTheSide() {
		Supervision s = Supervision.builder(50, 50).optBand(4).build(List.of(new Box(1, 0, 0, 7, 9)));
		List<Constraint> b = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.BAND).toList();
		// rows 0-3, 4-7, 8 ; columns 0-3, 4-6
		assertEquals(5, b.size());
		Constraint lastRow = b.get(2);
		assertEquals(8, lastRow.y0());
		assertEquals(9, lastRow.y1());
		assertEquals(1f, lastRow.target(), "a band of 1 line asks for 1 pixel");
		Constraint lastCol = b.get(4);
		assertEquals(4, lastCol.x0());
		assertEquals(7, lastCol.x1());
		assertEquals(3f, lastCol.target());
	}

	@Test
	void marginSkipsOuterLines() {
		Supervision s = Supervision.builder(50, 50).optBand(5).optMargin(2).build(List.of(new Box(1, 10, 10, 14, 14)));
		List<Constraint> b = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.BAND).toList();
		// 14 - 2*2 = 10 inner lines per axis -> 2 bands each
		assertEquals(4, b.size());
		assertEquals(12, b.get(0).y0());
		assertEquals(22, b.get(1).y1());
		assertEquals(10, b.get(0).x0(), "a row band still spans the whole box width");
		assertEquals(24, b.get(0).x1());
	}

	@Test
	void marginNeverEatsATinyBox() {
		Supervision s = Supervision.builder(20, 20).optBand(5).optMargin(4).build(List.of(new Box(1, 5, 5, 3, 2)));
		long bands = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.BAND).count();
		assertEquals(2, bands, "one band per axis remains (the middle line(s))");
	}

	@Test
	void borderTouchingBoxIsClippedAndKeepsItsBands() {
		// box reaches 3 px beyond the left and top border
		Supervision s = Supervision.builder(30, 30).optBand(5).build(List.of(new Box(1, -3, -3, 13, 8)));
		Box c = s.boxes.get(0);
		assertEquals(0, c.x());
		assertEquals(0, c.y());
		assertEquals(10, c.width());
		assertEquals(5, c.height());
		List<Constraint> b = s.constraints.stream().filter(k -> k.kind() == Constraint.Kind.BAND).toList();
		assertEquals(1 + 2, b.size());
		for (Constraint k : b) assertTrue(k.x0() >= 0 && k.y0() >= 0 && k.x1() <= 30 && k.y1() <= 30);
	}

	@Test
	void boxWhollyOutsideTheImageIsDropped() {
		Supervision s = Supervision.builder(30, 30).build(List.of(new Box(1, 40, 40, 5, 5), new Box(2, 2, 2, 5, 5)));
		assertEquals(1, s.boxes.size());
		assertEquals(2, s.boxes.get(0).index());
	}

	@Test
	void fullBackgroundIsEverythingOutsideTheBoxes() {
		Supervision s = Supervision.builder(10, 10).build(List.of(new Box(1, 2, 2, 3, 3)));
		assertEquals(100 - 9, s.knownBackground());
		assertEquals(0, s.background[3 * 10 + 3]);
		assertEquals(1, s.background[0]);
	}

	@Test
	void ringBackgroundAvoidsOtherBoxesAndFarPixels() {
		Supervision s = Supervision.builder(40, 40).optBackground(Supervision.BackgroundMode.RING).optRing(2)
			.build(List.of(new Box(1, 10, 10, 5, 5), new Box(2, 16, 10, 5, 5)));
		assertEquals(1, s.background[9 * 40 + 12], "just above box 1");
		assertEquals(0, s.background[30 * 40 + 30], "far away: unknown");
		assertEquals(0, s.background[12 * 40 + 17], "inside box 2: never background");
		assertEquals(1, s.background[12 * 40 + 15], "the gap between the boxes");
	}

	@Test
	void regionLimitsKnownBackground() {
		byte[] region = new byte[100];
		for (int i = 0; i < 50; i++) region[i] = 1; // top half annotated
		Supervision s = Supervision.builder(10, 10).optRegion(region).build(List.of(new Box(1, 1, 1, 2, 2)));
		assertEquals(50 - 4, s.knownBackground());
	}

	@Test
	void fillBoundsAreRelativeToTheBoxArea() {
		Supervision s = Supervision.builder(50, 50).optFill(0.4, 0.9).build(List.of(new Box(1, 0, 0, 10, 5)));
		Constraint lo = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.FILL_MIN).findFirst().orElseThrow();
		Constraint hi = s.constraints.stream().filter(c -> c.kind() == Constraint.Kind.FILL_MAX).findFirst().orElseThrow();
		assertEquals(20f, lo.target(), 1e-6);
		assertEquals(45f, hi.target(), 1e-6);
		float[] half = new float[2500];
		for (int y = 0; y < 5; y++) for (int x = 0; x < 5; x++) half[y * 50 + x] = 1; // fill 0.5
		assertTrue(lo.z(half, 50) < 0 && hi.z(half, 50) < 0);
		float[] full = new float[2500];
		for (int y = 0; y < 5; y++) for (int x = 0; x < 10; x++) full[y * 50 + x] = 1;
		assertTrue(hi.z(full, 50) > 0, "a mask filling the whole box breaks the size bound");
	}
}
