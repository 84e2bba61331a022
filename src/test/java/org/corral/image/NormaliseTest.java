package org.corral.image;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
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

	/** A field of {@code w x h} at {@code background} with Gaussian noise of {@code sigma}, and discs of {@code height} above it. */
	static PlanarImage field(int w, int h, float background, float sigma, float height, int discs, long seed) {
		java.util.Random r = new java.util.Random(seed);
		float[] v = new float[w * h];
		for (int i = 0; i < v.length; i++) v[i] = background + (float) (sigma * r.nextGaussian());
		for (int k = 0; k < discs; k++) {
			int cx = 12 + (k * 37) % (w - 24), cy = 12 + (k * 37 / (w - 24)) * 25 % (h - 24);
			for (int y = cy - 10; y <= cy + 10; y++)
				for (int x = cx - 10; x <= cx + 10; x++)
					if ((x - cx) * (x - cx) + (y - cy) * (y - cy) <= 100) v[y * w + x] += height;
		}
		return new PlanarImage(w, h, new float[][] {v});
	}

	@Test
	void noiseIsMeasuredFromNeighboursNotFromTheObjects() {
		PlanarImage dense = field(300, 200, 100, 5, 400, 60, 1);
		assertEquals(5, Normalise.noise(dense)[0], 0.3, "white noise of 5 under 60 bright discs");
		// quantised, mostly flat: the mean of the differences stands in for their median of 0
		float[] q = new float[10000];
		for (int i = 0; i < q.length; i++) q[i] = i % 7 == 0 ? 11 : 10;
		assertTrue(Normalise.noise(new PlanarImage(100, 100, new float[][] {q}))[0] > 0);
	}

	@Test
	void anEmptyFieldIsNotStretchedBeyondTheNoiseTheModelLearnedWith() {
		PlanarImage empty = field(300, 200, 100, 5, 0, 0, 2);
		assertTrue(Normalise.sparse(empty));
		float[][] plain = Normalise.bounds(empty, Normalise.LOW, Normalise.HIGH);
		assertTrue(plain[1][0] - plain[0][0] < 30, "percentiles alone span only the noise: " + (plain[1][0] - plain[0][0]));
		float[][] b = Normalise.bounds(empty, Normalise.LOW, Normalise.HIGH, 0.01, new float[] {0.03f});
		assertEquals(5 / 0.01, b[1][0] - b[0][0], 30, "the range is the noise over the learned noise level");
		PlanarImage n = Normalise.with(empty, b);
		assertEquals(0.01, Normalise.noise(n)[0], 0.001, "normalised noise as learned");
		assertEquals(0.03, Normalise.medians(n)[0], 0.002, "the background where the learning images had it");
		// without a learned noise level (models of earlier versions): the percentiles as they are
		float[][] old = Normalise.bounds(empty, Normalise.LOW, Normalise.HIGH, 0, new float[] {0.03f});
		assertEquals(plain[0][0], old[0][0]);
		assertEquals(plain[1][0], old[1][0]);
	}

	@Test
	void aBrightBackgroundStaysBright() {
		PlanarImage empty = field(300, 200, 220, 3, 0, 0, 3); // brightfield: white background, dark objects
		float[][] b = Normalise.bounds(empty, Normalise.LOW, Normalise.HIGH, 0.02, new float[] {0.9f});
		assertEquals(3 / 0.02, b[1][0] - b[0][0], 10);
		assertEquals(0.9, Normalise.medians(Normalise.with(empty, b))[0], 0.01);
	}

	@Test
	void aFieldWithObjectsKeepsItsPercentilesAndAFewObjectsDoNot() {
		PlanarImage dense = field(300, 200, 100, 5, 400, 60, 4); // about 28 % objects
		assertFalse(Normalise.sparse(dense));
		float[][] plain = Normalise.bounds(dense, Normalise.LOW, Normalise.HIGH), b = Normalise.bounds(dense, Normalise.LOW, Normalise.HIGH, 0.01, new float[] {0.03f});
		assertEquals(plain[0][0], b[0][0]);
		assertEquals(plain[1][0], b[1][0]);
		PlanarImage two = field(300, 200, 100, 5, 400, 2, 5); // under 1.5 % objects: the high percentile falls in their rims
		assertTrue(Normalise.sparse(two));
		float[][] t = Normalise.bounds(two, Normalise.LOW, Normalise.HIGH, 0.01, new float[] {0.03f});
		assertTrue(t[1][0] - t[0][0] >= 5 / 0.01 * 0.9, "widened to the learned noise: " + (t[1][0] - t[0][0]));
	}

	/**
	 * Every image of the four reference sets (../shared/reference-data, each with its SOURCE.md) has
	 * objects enough: none is normalised otherwise than by its percentiles, so no reference figure moves.
	 */
	@Test
	void noReferenceImageIsSparse() throws java.io.IOException {
		int n = 0;
		for (String set : new String[] {"bbbc039-u2os-nuclei", "bbbc038-dsb2018-histology", "bbbc038-dsb2018-histology-other-look", "sbsst265-fluorescence-nuclei"})
			try (var files = java.nio.file.Files.list(org.corral.ReferenceData.set(set).resolve("images"))) {
				for (java.nio.file.Path f : files.sorted().toList()) {
					assertFalse(Normalise.sparse(org.corral.io.ImageFiles.read(f)), f + " taken for a nearly empty field");
					n++;
				}
			}
		assertEquals(36, n, "the four sets hold 10 + 10 + 6 + 10 images");
	}

	@Test
	void wholeNumbersAreSortedByCountingAsAComparisonSortWould() {
		java.util.Random r = new java.util.Random(7);
		float[] ints = new float[5000], mixed = new float[5000];
		for (int i = 0; i < ints.length; i++) {
			ints[i] = r.nextInt(65536);
			mixed[i] = i == 100 ? 0.5f : r.nextInt(300) - (i % 2 == 0 ? 0 : 40); // a fraction and negatives: compared
		}
		for (float[] v : new float[][] {ints, mixed}) {
			float[] want = v.clone();
			java.util.Arrays.sort(want, 0, 4000);
			Normalise.sort(v, 4000);
			org.junit.jupiter.api.Assertions.assertArrayEquals(want, v, "the first 4000 sorted, the rest untouched");
		}
	}
}
