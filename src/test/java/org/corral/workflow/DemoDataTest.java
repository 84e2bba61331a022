package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.IJ;
import ij.ImagePlus;

import java.nio.file.Files;
import java.nio.file.Path;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The bundled demo folders are what the generator writes, and the demo fields look as the README says. */
class DemoDataTest {
	@TempDir
	Path dir;

	@Test
	void bundledSetsAreRegeneratedExactly() throws Exception {
		check(DemoData.TILES, Path.of("test-images"), dir.resolve("tiles"));
		check(DemoData.FIELDS, Path.of("test-images", "fields"), dir.resolve("fields"));
	}

	private static void check(DemoData.Layout l, Path bundled, Path fresh) throws Exception {
		DemoData.write(fresh, DemoData.SEED, l);
		assertEquals(Files.readString(bundled.resolve("boxes.csv")), Files.readString(fresh.resolve("boxes.csv")));
		for (int n = 1; n <= l.images(); n++) {
			String name = String.format("%s-%02d.tif", l.prefix(), n);
			for (String sub : new String[] {"images", "reference"})
				assertArrayEquals((short[]) open(bundled.resolve(sub).resolve(name)).getProcessor().getPixels(),
					(short[]) open(fresh.resolve(sub).resolve(name)).getProcessor().getPixels(), sub + "/" + name);
		}
	}

	/** 60-100 nuclei per field, and a good share of them touching another (8-connected contact). */
	@Test
	void demoFieldsAreCrowdedAndSomeNucleiTouch() {
		for (int n = 1; n <= DemoData.FIELDS.images(); n++) {
			ImagePlus ref = open(Path.of("test-images", "fields", "reference", String.format("seedcoat-field-%02d.tif", n)));
			int w = ref.getWidth(), h = ref.getHeight();
			assertEquals(512, w);
			assertEquals(512, h);
			short[] px = (short[]) ref.getProcessor().getPixels();
			int objects = 0;
			java.util.Set<Integer> touching = new java.util.HashSet<>();
			for (int y = 0; y < h; y++)
				for (int x = 0; x < w; x++) {
					int a = px[y * w + x];
					objects = Math.max(objects, a);
					if (a == 0) continue;
					for (int dy = 0; dy <= 1; dy++)
						for (int dx = -1; dx <= 1; dx++) {
							int xx = x + dx, yy = y + dy;
							if ((dy == 0 && dx <= 0) || xx < 0 || xx >= w || yy >= h) continue;
							int b = px[yy * w + xx];
							if (b != 0 && b != a) {
								touching.add(a);
								touching.add(b);
							}
						}
				}
			assertTrue(objects >= 60 && objects <= 100, objects + " nuclei");
			assertTrue(touching.size() >= objects / 5, touching.size() + " of " + objects + " nuclei touch another");
		}
	}

	private static ImagePlus open(Path p) {
		ImagePlus imp = IJ.openImage(p.toString());
		if (imp == null) throw new AssertionError("cannot open " + p);
		return imp;
	}
}
