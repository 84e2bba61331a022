package org.corral.io;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;
import ij.process.ShortProcessor;

import java.awt.image.BufferedImage;
import java.nio.file.Path;

import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.RowReader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The overlay picture, computed row by row as the PNG encoder asks, is the outlines over the normalised image. */
class OverlaysTest {
	@Test
	void pngHoldsOutlinesOverTheImageAcrossBands(@TempDir Path dir) throws Exception {
		int w = 41, h = 600; // more rows than one band of the picture, so rows come from several bands
		short[] px = new short[w * h];
		for (int i = 0; i < px.length; i++) px[i] = (short) ((i * 37) % 4000);
		ImagePlus imp = new ImagePlus("g", new ShortProcessor(w, h, px, null));
		int[] labels = new int[w * h];
		for (int y = 240; y < 280; y++) // an object across the first band seam (row 256), one at the image's edge
			for (int x = 5; x < 30; x++) labels[y * w + x] = 7;
		for (int y = 560; y < 600; y++)
			for (int x = 30; x < 41; x++) labels[y * w + x] = 300;
		RowReader raw = ImageFiles.rowReader(imp, 1, 1);
		Path png = dir.resolve("g.overlay.png");
		ImageFiles.savePng(Overlays.outlines(raw, labels), png);
		BufferedImage read = javax.imageio.ImageIO.read(png.toFile());
		assertEquals(w, read.getWidth());
		assertEquals(h, read.getHeight());
		PlanarImage norm = Normalise.with(raw.all(), Normalise.bounds(raw, 0.5, 99.5));
		int edges = 0;
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				int i = y * w + x, l = labels[i];
				boolean edge = l > 0 && (x == 0 || y == h - 1 || x == w - 1 || labels[i - 1] != l || labels[i + 1] != l || labels[i - w] != l || labels[i + w] != l);
				int v = (int) Math.max(0, Math.min(255, norm.channels[0][i] * 255));
				int expected = edge ? Overlays.colour(l) : (v << 16) | (v << 8) | v;
				if (edge) edges++;
				assertEquals(expected, read.getRGB(x, y) & 0xffffff, "pixel " + x + "," + y);
			}
		assertTrue(edges > 100, "both outlines drawn: " + edges);
		// rows asked for out of order, as another encoder might, give the same pixels
		var pic = Overlays.outlines(raw, labels);
		var late = pic.getData(new java.awt.Rectangle(3, 590, 20, 5));
		var early = pic.getData(new java.awt.Rectangle(3, 250, 20, 10));
		assertEquals(read.getRGB(4, 591) & 0xffffff, late.getDataElements(4, 591, null) instanceof int[] a ? a[0] & 0xffffff : -1);
		assertEquals(read.getRGB(10, 255) & 0xffffff, early.getDataElements(10, 255, null) instanceof int[] b ? b[0] & 0xffffff : -1);
	}
}
