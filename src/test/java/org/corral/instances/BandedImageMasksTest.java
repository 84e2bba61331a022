package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;

/** The banded instance stage against a run on the whole image, on maps with objects across every seam. */
class BandedImageMasksTest {
	static final int W = 300, H = 420;
	static final double SIZE = 18;

	/**
	 * A field of round objects of radius 5-11 (many touching or overlapping, which the watershed must
	 * split), with a pale streak that passes the threshold but is not sure, and specks: probability
	 * and an instance map rising from each object's edge to its centre, with a little noise.
	 */
	static float[][] field(long seed) {
		SplittableRandom rnd = new SplittableRandom(seed);
		float[] prob = new float[W * H], centre = new float[W * H];
		for (int i = 0; i < prob.length; i++) prob[i] = 0.03f + 0.04f * (float) rnd.nextDouble();
		for (int k = 0; k < 170; k++) {
			double cx = rnd.nextDouble(-5, W + 5), cy = rnd.nextDouble(-5, H + 5), r = rnd.nextDouble(5, 11);
			for (int y = (int) Math.max(0, cy - r - 1); y <= Math.min(H - 1, cy + r + 1); y++)
				for (int x = (int) Math.max(0, cx - r - 1); x <= Math.min(W - 1, cx + r + 1); x++) {
					double d = Math.hypot(x - cx, y - cy);
					if (d > r) continue;
					int i = y * W + x;
					prob[i] = Math.max(prob[i], 0.9f + 0.09f * (float) rnd.nextDouble());
					centre[i] = Math.max(centre[i], (float) (1 - d / r));
				}
		}
		for (int y = 200; y < 205; y++) for (int x = 20; x < 120; x++) { // a pale streak across a seam region
			prob[y * W + x] = 0.6f;
			centre[y * W + x] = Math.max(centre[y * W + x], 0.2f);
		}
		for (int i = 0; i < centre.length; i++) centre[i] = Math.min(1, centre[i] + 0.01f * (float) rnd.nextDouble());
		return new float[][] {prob, centre};
	}

	static BandedImageMasks.MapSource rowsOf(float[][] maps, boolean withCentre) {
		return (y0, y1) -> {
			float[][] out = new float[withCentre ? 2 : 1][];
			for (int m = 0; m < out.length; m++) out[m] = Arrays.copyOfRange(maps[m], y0 * W, y1 * W);
			return out;
		};
	}

	/** Objects whose rows span a seam between bands of {@code band} rows. */
	static int crossing(ImageMasks.Result r, int band) {
		int n = 0;
		for (ImageMasks.ObjectInfo o : r.objects()) if (o.y() / band != (o.y() + o.height() - 1) / band) n++;
		return n;
	}

	@Test
	void bandsGiveTheObjectsOfTheWholeImageRun() {
		for (boolean withCentre : new boolean[] {true, false}) {
			float[][] maps = field(3);
			ImageMasks.Result whole = ImageMasks.make(maps[0], withCentre ? maps[1] : null, W, H, SIZE, ImageMasks.THRESHOLD, ImageMasks.PROMINENCE);
			int band = 40, halo = BandedImageMasks.halo(SIZE);
			ImageMasks.Result banded = BandedImageMasks.make(rowsOf(maps, withCentre), W, H, SIZE, band, halo, null);
			String what = withCentre ? "instance map" : "distance watershed";
			assertTrue(whole.count() > 100, what + ": the field holds many objects, got " + whole.count());
			assertTrue(crossing(whole, band) > 30, what + ": many objects cross a seam, got " + crossing(whole, band));
			assertEquals(whole.count(), banded.count(), what + ": object count");
			assertArrayEquals(whole.labels(), banded.labels(), what + ": label image");
			assertEquals(whole.objects(), banded.objects(), what + ": per-object figures and flags");
		}
	}

	@Test
	void oneBandIsTheWholeImageRun() {
		float[][] maps = field(5);
		ImageMasks.Result whole = ImageMasks.make(maps[0], maps[1], W, H, SIZE, ImageMasks.THRESHOLD, ImageMasks.PROMINENCE);
		ImageMasks.Result one = BandedImageMasks.make(rowsOf(maps, true), W, H, SIZE, H, 0, null);
		assertArrayEquals(whole.labels(), one.labels());
		assertEquals(whole.objects(), one.objects());
	}

	@Test
	void withoutHaloSeamsCutObjectsApart() {
		// the halo is what makes bands agree: with none, an object across a seam is found twice, cut
		float[][] maps = field(3);
		ImageMasks.Result whole = ImageMasks.make(maps[0], maps[1], W, H, SIZE, ImageMasks.THRESHOLD, ImageMasks.PROMINENCE);
		ImageMasks.Result cut = BandedImageMasks.make(rowsOf(maps, true), W, H, SIZE, 40, 0, null);
		assertTrue(!Arrays.equals(whole.labels(), cut.labels()), "bands without context differ from the whole-image run");
	}

	@Test
	void objectsAreNumberedByTheirFirstPixel() {
		float[][] maps = field(3);
		ImageMasks.Result r = BandedImageMasks.make(rowsOf(maps, true), W, H, SIZE, 40, BandedImageMasks.halo(SIZE), null);
		int next = 1;
		boolean[] seen = new boolean[r.count() + 1];
		for (int l : r.labels())
			if (l > 0 && !seen[l]) {
				assertEquals(next++, l, "labels appear in raster order");
				seen[l] = true;
			}
		assertEquals(r.count() + 1, next);
	}

	@Test
	void cancellingStopsBetweenBands() {
		float[][] maps = field(3);
		int[] calls = {0};
		BandedImageMasks.MapSource src = (y0, y1) -> {
			calls[0]++;
			return rowsOf(maps, true).rows(y0, y1);
		};
		try {
			BandedImageMasks.make(src, W, H, SIZE, 40, 64, () -> calls[0] >= 2);
			throw new AssertionError("not cancelled");
		} catch (java.util.concurrent.CancellationException expected) {
			assertEquals(2, calls[0], "no band is read after the cancel");
		}
	}
}
