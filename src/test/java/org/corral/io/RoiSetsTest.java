package org.corral.io;

import static org.junit.jupiter.api.Assertions.assertEquals;

import ij.gui.Roi;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.zip.ZipEntry;
import java.util.zip.ZipFile;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class RoiSetsTest {
	/** Every ROI gets an entry of its own: a name met again is suffixed until it is new, in list order. */
	@Test
	void repeatedNamesGetEntriesOfTheirOwn(@TempDir Path dir) throws Exception {
		List<Roi> rois = new ArrayList<>();
		for (String n : new String[] {"a", "b", "a", "a", "a_"}) {
			Roi r = new Roi(1, 2, 3, 4);
			r.setName(n);
			rois.add(r);
		}
		rois.add(null); // skipped
		Path zip = dir.resolve("set.zip");
		RoiSets.writeZip(zip, rois);
		try (ZipFile z = new ZipFile(zip.toFile())) {
			List<String> names = Collections.list(z.entries()).stream().map(ZipEntry::getName).toList();
			assertEquals(List.of("a.roi", "b.roi", "a_.roi", "a__.roi", "a___.roi"), names);
		}
	}
}
