package org.corral.io;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.ColorProcessor;
import ij.process.ShortProcessor;

import java.util.SplittableRandom;

import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.RowReader;
import org.junit.jupiter.api.Test;

/** Reading an image a band of rows at a time gives what reading it whole gives. */
class RowReaderTest {
	static ImagePlus twoChannels(int w, int h) {
		SplittableRandom rnd = new SplittableRandom(4);
		ImageStack st = new ImageStack(w, h);
		for (int c = 0; c < 2; c++) {
			short[] px = new short[w * h];
			for (int i = 0; i < px.length; i++) px[i] = (short) rnd.nextInt(65536); // the upper half reads as unsigned
			st.addSlice(new ShortProcessor(w, h, px, null));
		}
		ImagePlus imp = new ImagePlus("two", st);
		imp.setDimensions(2, 1, 1);
		imp.getCalibration().pixelWidth = 0.65;
		imp.getCalibration().setUnit("micron");
		return imp;
	}

	@Test
	void bandsHoldImageJsFloatValuesAndTheCalibration() {
		ImagePlus imp = twoChannels(37, 53);
		RowReader r = ImageFiles.rowReader(imp, 1, 1);
		assertEquals(2, r.nChannels());
		PlanarImage band = r.rows(10, 29);
		for (int c = 0; c < 2; c++) { // ImageJ's own conversion of the plane, rows 10..28
			float[] all = (float[]) imp.getStack().getProcessor(c + 1).convertToFloatProcessor().getPixels();
			assertArrayEquals(java.util.Arrays.copyOfRange(all, 10 * 37, 29 * 37), band.channels[c]);
			assertArrayEquals(all, ImageFiles.planes(imp, 1, 1).channels[c], "the whole plane");
		}
		assertEquals(0.65, band.pixelWidth);
		assertEquals("micron", band.unit);

		int[] rgb = new int[20 * 9];
		for (int i = 0; i < rgb.length; i++) rgb[i] = (i * 7919) & 0xffffff;
		ImagePlus colour = new ImagePlus("rgb", new ColorProcessor(20, 9, rgb));
		PlanarImage cb = ImageFiles.rowReader(colour, 1, 1).rows(3, 7);
		assertEquals(3, cb.nChannels());
		for (int i = 0; i < 4 * 20; i++) {
			int p = rgb[3 * 20 + i];
			assertEquals((p >> 16) & 0xff, cb.channels[0][i]);
			assertEquals((p >> 8) & 0xff, cb.channels[1][i]);
			assertEquals(p & 0xff, cb.channels[2][i]);
		}
	}

	@Test
	void normalisationBoundsReadInBandsEqualThoseOfTheWholeImage() {
		ImagePlus imp = twoChannels(1500, 1400); // 2.1 MP: a strided sample, across band edges
		PlanarImage whole = ImageFiles.planes(imp, 1, 1);
		float[][] expected = Normalise.bounds(whole, Normalise.LOW, Normalise.HIGH);
		float[][] banded = Normalise.bounds(ImageFiles.rowReader(imp, 1, 1), Normalise.LOW, Normalise.HIGH);
		for (int k = 0; k < 2; k++) assertArrayEquals(expected[k], banded[k]);
	}
}
