package org.corral.image;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

class ResampleTest {
	@Test
	void bilinearKeepsConstantsAndLinearRampsAtPixelCentres() {
		int w = 20, h = 10;
		float[] ramp = new float[w * h], flat = new float[w * h];
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				ramp[y * w + x] = 3 * x + 2 * y;
				flat[y * w + x] = 4.5f;
			}
		int nw = 40, nh = 20;
		float[] up = Resample.bilinear(ramp, w, h, nw, nh), f = Resample.bilinear(flat, w, h, nw, nh);
		for (float v : f) assertEquals(4.5f, v, 1e-5);
		// away from the clamped border, output pixel centre (x + 0.5) / 2 - 0.5 in input pixels
		for (int y = 2; y < nh - 2; y++)
			for (int x = 2; x < nw - 2; x++)
				assertEquals(3 * ((x + 0.5) / 2 - 0.5) + 2 * ((y + 0.5) / 2 - 0.5), up[y * nw + x], 1e-4, "at " + x + "," + y);
		// halving averages pairs of pixels
		float[] down = Resample.bilinear(ramp, w, h, w / 2, h / 2);
		assertEquals((ramp[0] + ramp[1] + ramp[w] + ramp[w + 1]) / 4, down[0], 1e-5);
		assertEquals(w / 2, Resample.bilinear(new PlanarImage(w, h, new float[][] {ramp}), w / 2, h / 2).width);
	}

	@Test
	void meanOfThreeByThreeIsTheMeanOfEachNeighbourhoodWithEdgesRepeated() {
		int w = 12, h = 9;
		float[] v = new float[w * h];
		java.util.SplittableRandom r = new java.util.SplittableRandom(3);
		for (int i = 0; i < v.length; i++) v[i] = (float) r.nextDouble(0, 100);
		float[] mean = Resample.mean3(new PlanarImage(w, h, new float[][] {v, v})).channels[1];
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				double s = 0;
				for (int dy = -1; dy <= 1; dy++)
					for (int dx = -1; dx <= 1; dx++) s += v[Math.max(0, Math.min(h - 1, y + dy)) * w + Math.max(0, Math.min(w - 1, x + dx))];
				assertEquals(s / 9, mean[y * w + x], 1e-3, "at " + x + "," + y);
			}
	}
}
