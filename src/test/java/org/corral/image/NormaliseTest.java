package org.corral.image;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

class NormaliseTest {
	static PlanarImage ramp(int n) {
		float[] v = new float[n];
		for (int i = 0; i < n; i++) v[i] = 100 + 2 * i;
		return new PlanarImage(n, 1, new float[][] {v});
	}

	@Test
	void lowPercentileMapsToZeroAndHighToOne() {
		PlanarImage im = ramp(1001); // values 100, 102, ..., 2100
		float[][] b = Normalise.bounds(im, Normalise.LOW, Normalise.HIGH);
		assertEquals(100 + 2 * 10, b[0][0], 1e-3, "1st percentile of 1001 values is the 11th");
		assertEquals(100 + 2 * 998, b[1][0], 1e-3, "99.8th percentile");
		PlanarImage n = Normalise.percentiles(im);
		assertEquals(0f, n.channels[0][10], 1e-6);
		assertEquals(1f, n.channels[0][998], 1e-6);
		assertEquals(0.5f, n.channels[0][504], 1e-6, "linear in between");
	}

	@Test
	void channelsAreNormalisedApartAndNonFiniteBecomesTheLowEnd() {
		PlanarImage im = new PlanarImage(4, 1, new float[][] {{0, 10, 20, Float.NaN}, {5, 5, 1000, Float.POSITIVE_INFINITY}});
		PlanarImage n = Normalise.percentiles(im, 0, 100);
		assertEquals(0f, n.channels[0][0]);
		assertEquals(1f, n.channels[0][2]);
		assertEquals(0f, n.channels[0][3], "NaN");
		assertEquals(1f, n.channels[1][2]);
		assertEquals(0f, n.channels[1][3], "infinity");
	}

	@Test
	void aMostlyEmptyImageStillSpreadsItsFewObjects() {
		// 99.9 % background at 10, a few bright pixels: the percentiles coincide, the full range is used
		float[] v = new float[10000];
		java.util.Arrays.fill(v, 10);
		for (int i = 0; i < 10; i++) v[i] = 500;
		PlanarImage n = Normalise.percentiles(new PlanarImage(100, 100, new float[][] {v}));
		assertEquals(0f, n.channels[0][5000]);
		assertEquals(1f, n.channels[0][0], 1e-6);
		for (float x : n.channels[0]) assertTrue(Float.isFinite(x));
	}

	@Test
	void aFlatImageGivesZerosNotNumbersThatAreNot() {
		float[] v = new float[100];
		java.util.Arrays.fill(v, 7);
		for (float x : Normalise.percentiles(new PlanarImage(10, 10, new float[][] {v})).channels[0]) assertEquals(0f, x);
	}
}
