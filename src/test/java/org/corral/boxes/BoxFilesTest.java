package org.corral.boxes;

import static org.junit.jupiter.api.Assertions.assertEquals;
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
	void roiZipRoundTripAndNonRectanglesRefused() {
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
		CorralException e = assertThrows(CorralException.class, () -> BoxFiles.readRoiZip(z2));
		assertTrue(e.getMessage().contains("round") && e.getMessage().contains("not a rectangle"), e.getMessage());
	}
}
