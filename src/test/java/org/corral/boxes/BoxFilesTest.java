package org.corral.boxes;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.gui.OvalRoi;
import ij.gui.Roi;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import org.corral.CorralException;
import org.corral.io.RoiSets;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class BoxFilesTest {
	@TempDir
	Path dir;

	Path csv(String text) throws Exception {
		Path p = dir.resolve("boxes.csv");
		Files.writeString(p, text);
		return p;
	}

	@Test
	void readsBoxesPerImageInFileOrderAndIgnoresOtherColumns() throws Exception {
		Map<String, List<Box>> m = BoxFiles.readCsv(csv("note,image,x,y,width,height\nhi,a.tif,1,2,3,4\n,b.tif,5,6,7,8\n,a.tif,10,20,30,40\n"));
		assertEquals(List.of("a.tif", "b.tif"), List.copyOf(m.keySet()));
		assertEquals(2, m.get("a.tif").size());
		Box second = m.get("a.tif").get(1);
		assertEquals(2, second.index());
		assertEquals(10, second.x());
		assertEquals(40, second.height());
	}

	@Test
	void errorsNameTheFileLineAndColumn() throws Exception {
		CorralException e = assertThrows(CorralException.class, () -> BoxFiles.readCsv(csv("image,x,y,width\na.tif,1,2,3\n")));
		assertTrue(e.getMessage().contains("height"), e.getMessage());
		e = assertThrows(CorralException.class, () -> BoxFiles.readCsv(csv("image,x,y,width,height\na.tif,1,2,3,4\na.tif,one,2,3,4\n")));
		assertTrue(e.getMessage().contains("line 3") && e.getMessage().contains("'one'"), e.getMessage());
		e = assertThrows(CorralException.class, () -> BoxFiles.readCsv(csv("image,x,y,width,height\na.tif,1,2,-3,4\n")));
		assertTrue(e.getMessage().contains("line 2") && e.getMessage().contains("positive"), e.getMessage());
	}

	@Test
	void roiZipRoundTripOutlinesAsExactObjectsRegionsRefused() {
		Roi r1 = new Roi(3, 4, 10, 12);
		r1.setName("first");
		Roi r2 = new Roi(30, 40, 5, 6);
		r2.setName("second");
		Path zip = dir.resolve("a.zip");
		RoiSets.writeZip(zip, List.of(r1, r2));
		List<Box> b = BoxFiles.readRoiZip(zip);
		assertEquals(2, b.size());
		assertEquals("first", b.get(0).name());
		assertEquals(30, b.get(1).x());
		assertEquals(6, b.get(1).height());

		Roi oval = new OvalRoi(1, 1, 5, 5);
		oval.setName("round");
		Path z2 = dir.resolve("b.zip");
		RoiSets.writeZip(z2, List.of(oval));
		List<Box> ob = BoxFiles.readRoiZip(z2);
		assertEquals(1, ob.size());
		assertTrue(ob.get(0).isExact(), "an outline in a ROI set is an exact object");
		int inside = 0;
		for (byte v : ob.get(0).mask()) inside += v;
		assertTrue(inside > 12 && inside < 25, "an oval of 5 x 5: " + inside);

		Roi region = new OvalRoi(1, 1, 50, 50);
		region.setName("region 1");
		Path z3 = dir.resolve("c.zip");
		RoiSets.writeZip(z3, List.of(region));
		CorralException e = assertThrows(CorralException.class, () -> BoxFiles.readRoiZip(z3));
		assertTrue(e.getMessage().contains("region 1") && e.getMessage().contains("ROI Manager"), e.getMessage());
	}

	@Test
	void csvMaskColumnGivesExactObjects() throws Exception {
		ij.process.ShortProcessor lab = new ij.process.ShortProcessor(30, 20);
		for (int y = 2; y < 8; y++)
			for (int x = 2; x < 9; x++) lab.set(x, y, 7);
		for (int y = 5; y < 9; y++) lab.set(9, y, 3); // a neighbour's pixels reach into the box
		ij.IJ.saveAsTiff(new ij.ImagePlus("m", lab), dir.resolve("masks.tif").toString());
		Map<String, List<Box>> m = BoxFiles.readCsv(csv("image,x,y,width,height,mask\na.tif,2,2,8,7,masks.tif\na.tif,20,2,5,5,\n"));
		Box exact = m.get("a.tif").get(0), rect = m.get("a.tif").get(1);
		assertTrue(exact.isExact());
		assertFalse(rect.isExact(), "an empty mask cell is a rectangle");
		int inside = 0;
		for (byte v : exact.mask()) inside += v;
		assertEquals(6 * 7, inside, "the box's most frequent label only");
		CorralException e = assertThrows(CorralException.class, () -> BoxFiles.readCsv(csv("image,x,y,width,height,mask\na.tif,20,10,5,5,masks.tif\n")));
		assertTrue(e.getMessage().contains("line 2") && e.getMessage().contains("no object inside"), e.getMessage());
		e = assertThrows(CorralException.class, () -> BoxFiles.readCsv(csv("image,x,y,width,height,mask\na.tif,2,2,5,5,gone.tif\n")));
		assertTrue(e.getMessage().contains("gone.tif") && e.getMessage().contains("does not exist"), e.getMessage());
	}
}
