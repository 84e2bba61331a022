package org.corral.boxes;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.gui.OvalRoi;
import ij.gui.PolygonRoi;
import ij.gui.Roi;
import ij.plugin.frame.RoiManager;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.corral.io.RoiSets;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Rectangles and outlines from ROIs: which outlines are corrections, and which rectangle each replaces. */
class RoiBoxesTest {
	@TempDir
	Path dir;

	/** Two objects (labels 1, 2) as Corral writes them: outlines named after boxes box-a and box-b. */
	static Roi[] corralOutlines() {
		int w = 40, h = 20;
		int[] lab = new int[w * h];
		for (int y = 4; y < 14; y++)
			for (int x = 3; x < 13; x++) lab[y * w + x] = 1;
		for (int y = 5; y < 15; y++)
			for (int x = 22; x < 35; x++) if ((x - 28) * (x - 28) + (y - 10) * (y - 10) < 30) lab[y * w + x] = 2;
		return RoiSets.outlines(lab, w, h, 2, new String[] {"mask-0001-of-box-a", "mask-0002-of-box-b"});
	}

	@Test
	void uneditedOutlinesArePassedOverAndEditedOnesReplaceTheirBoxes() throws Exception {
		Roi[] outlines = corralOutlines();
		Roi a = new Roi(2, 3, 12, 12), b = new Roi(21, 4, 15, 12);
		a.setName("box-a");
		b.setName("box-b");
		// nothing edited: the two rectangles, no outline
		RoiBoxes.Read read = RoiBoxes.of(new Roi[] {a, b, outlines[0], outlines[1]}, false);
		assertEquals(List.of("box-a", "box-b"), read.boxes().stream().map(Box::name).toList());
		assertTrue(read.boxes().stream().noneMatch(Box::isExact));

		// the user moves one vertex of the second outline: it becomes a correction and replaces box-b
		Roi edited = new PolygonRoi(outlines[1].getFloatPolygon(), Roi.POLYGON);
		edited.setName(outlines[1].getName());
		edited.setProperty(RoiBoxes.FINGERPRINT, outlines[1].getProperty(RoiBoxes.FINGERPRINT));
		java.awt.Polygon p = edited.getPolygon();
		int[] xs = p.xpoints.clone();
		xs[0] += 3;
		Roi moved = new PolygonRoi(xs, p.ypoints, p.npoints, Roi.POLYGON);
		moved.setName(edited.getName());
		moved.setProperty(RoiBoxes.FINGERPRINT, edited.getProperty(RoiBoxes.FINGERPRINT));
		read = RoiBoxes.of(new Roi[] {a, b, outlines[0], moved}, false);
		assertEquals(2, read.boxes().size());
		assertEquals("box-a", read.boxes().get(0).name());
		Box corrected = read.boxes().get(1);
		assertTrue(corrected.isExact());
		assertEquals(2, corrected.index(), "numbered in order");
		java.awt.Rectangle r = moved.getBounds();
		assertEquals(r.x, corrected.x());
		int inside = 0;
		for (byte v : corrected.mask()) inside += v;
		assertEquals(moved.getStatistics().pixelCount, inside, "the outline's pixels");
	}

	@Test
	void uneditedOutlinesStandForTheirBoxesWhenTheBoxesAreGone() {
		int w = 40, h = 20;
		int[] lab = new int[w * h];
		for (int y = 4; y < 14; y++)
			for (int x = 3; x < 13; x++) lab[y * w + x] = 1;
		for (int y = 5; y < 15; y++)
			for (int x = 22; x < 33; x++) lab[y * w + x] = 2;
		List<Box> drawn = List.of(new Box(1, 2, 3, 12, 12, 0, "box-a"), new Box(2, 21, 4, 13, 12, 0, "box-b"));
		List<Roi> outlines = org.corral.workflow.Jobs.boxOutlines(new int[][] {lab}, w, h, drawn);
		RoiBoxes.Read read = RoiBoxes.of(outlines.toArray(new Roi[0]), false);
		assertEquals(List.of("box-a", "box-b"), read.boxes().stream().map(Box::name).toList());
		assertEquals(21, read.boxes().get(1).x());
		assertEquals(13, read.boxes().get(1).width(), "the box as drawn, not the mask's bounds");
		assertFalse(read.boxes().get(1).isExact());
	}

	@Test
	void aDrawnOutlineReplacesTheRectangleAroundTheSameObjectOnly() {
		Roi box = new Roi(10, 10, 20, 20), other = new Roi(40, 10, 20, 20);
		box.setName("nucleus 1");
		other.setName("nucleus 2");
		Roi oval = new OvalRoi(12, 11, 17, 18); // drawn by hand around nucleus 1
		RoiBoxes.Read read = RoiBoxes.of(new Roi[] {box, other, oval}, false);
		assertEquals(List.of("nucleus 2", "outline-2"), read.boxes().stream().map(Box::name).toList());
		assertFalse(read.boxes().get(0).isExact());
		assertTrue(read.boxes().get(1).isExact());
		assertNull(read.boxes().get(0).mask());
	}

	@Test
	void aBoxClassIsItsRoiGroupsName() {
		Roi a = new Roi(1, 1, 10, 10), b = new Roi(20, 1, 10, 10), c = new Roi(40, 1, 10, 10);
		a.setGroup(3);
		b.setGroup(4);
		String before = Roi.getGroupName(3);
		Roi.setGroupName(3, "spore");
		try {
			List<Box> read = RoiBoxes.of(new Roi[] {a, b, c}, false).boxes();
			assertEquals("spore", read.get(0).className(), "the group's name");
			assertEquals("group-4", read.get(1).className(), "a group without a name");
			assertNull(read.get(2).className(), "no group, no class");
		} finally {
			Roi.setGroupName(3, before);
		}
	}

	@Test
	void fingerprintsSurviveROISetFilesAndTheRoiManager() throws Exception {
		Roi[] outlines = corralOutlines();
		Path zip = dir.resolve("set.zip");
		List<Roi> all = new ArrayList<>(List.of(outlines));
		Roi box = new Roi(2, 3, 12, 12);
		box.setName("box-a");
		all.add(box);
		RoiSets.writeZip(zip, all);
		assertTrue(Files.size(zip) > 0);
		List<Box> read = BoxFiles.readRoiZip(zip);
		assertEquals(List.of("box-a"), read.stream().map(Box::name).toList(), "unedited outlines read back from a file are passed over");
		if (!java.awt.GraphicsEnvironment.isHeadless()) {
			RoiManager rm = new RoiManager(true); // not shown
			for (Roi o : outlines) rm.addRoi(o);
			for (Roi o : rm.getRoisAsArray()) assertTrue(RoiBoxes.isUneditedOutline(o), "the ROI Manager keeps the fingerprint of " + o.getName());
			rm.close();
		}
	}
}
