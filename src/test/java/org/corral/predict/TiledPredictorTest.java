package org.corral.predict;

import static org.junit.jupiter.api.Assertions.assertEquals;

import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;
import ai.djl.nn.Parameter;
import ai.djl.training.initializer.NormalInitializer;

import org.corral.image.PlanarImage;
import org.corral.net.UNet;
import org.junit.jupiter.api.Test;

class TiledPredictorTest {

	/** Small tiles with enough context must give the same map as one big tile: no seams. */
	@Test
	void tilesDoNotShow() {
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = seeded(new UNet(1, 16, 3), m, 7); // the default width: narrower networks were seen to give NaN in this engine
			int w = 150, h = 97;
			float[] v = new float[w * h];
			for (int i = 0; i < v.length; i++) v[i] = (float) Math.sin(i * 0.37) * 0.5f + (i % w) / (float) w;
			PlanarImage im = new PlanarImage(w, h, new float[][] {v});
			float[] whole = new TiledPredictor(net, m, 1024, 32).predict(im, null);
			float[] tiled = new TiledPredictor(net, m, 40, 32).predict(im, null);
			assertEquals(w * h, tiled.length);
			double lo = 1, hi = 0;
			for (float q : whole) {
				lo = Math.min(lo, q);
				hi = Math.max(hi, q);
			}
			org.junit.jupiter.api.Assertions.assertTrue(hi - lo > 0.05, "the map varies (weights at 0.2 saturated it to one value, which hid any seam): " + lo + ".." + hi);
			double maxDiff = 0;
			for (int i = 0; i < whole.length; i++) maxDiff = Math.max(maxDiff, Math.abs(whole[i] - tiled[i]));
			// the receptive field of 3 levels is under 32 px, so the context covers it (batch norm in
			// inference mode is per pixel); only float rounding differs
			assertEquals(0, maxDiff, 1e-4);
		}
	}

	/**
	 * Eight flips average the network over every turn and mirror image, so the maps of a transposed
	 * image are the transposed maps (a wrong turn back breaks this), which four flips do not give.
	 */
	@Test
	void eightFlipsAreAlikeForATransposedImage() {
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = seeded(new UNet(1, 16, 3), m, 11);
			int w = 150, h = 97;
			float[] v = new float[w * h], t = new float[w * h];
			for (int i = 0; i < v.length; i++) v[i] = (float) Math.sin(i * 0.37) * 0.5f + (i % w) / (float) w;
			TiledPredictor.transpose(v, 0, t, 0, w, h);
			PlanarImage im = new PlanarImage(w, h, new float[][] {v}), tr = new PlanarImage(h, w, new float[][] {t});
			for (int flips : new int[] {8, 4}) {
				float[] p = new TiledPredictor(net, m, 1024, 32).optFlips(flips).predict(im, null);
				float[] q = new TiledPredictor(net, m, 1024, 32).optFlips(flips).predict(tr, null);
				float[] back = new float[w * h];
				TiledPredictor.transpose(q, 0, back, 0, h, w);
				double maxDiff = 0;
				for (int i = 0; i < p.length; i++) maxDiff = Math.max(maxDiff, Math.abs(p[i] - back[i]));
				if (flips == 8) assertEquals(0, maxDiff, 1e-4, "eight flips: the transposed image gives the transposed map");
				else org.junit.jupiter.api.Assertions.assertTrue(maxDiff > 1e-3, "four flips are not symmetric under transposition (max difference " + maxDiff + ")");
			}
		}
	}

	/** Eight flips for box masks are a run's choice (-Dcorral.boxFlips=8); anything but 4 or 8 is refused by name. */
	@Test
	void boxFlipsComeFromTheRunsSetting() {
		String before = System.getProperty("corral.boxFlips");
		try {
			System.clearProperty("corral.boxFlips");
			assertEquals(ModelRunner.BOX_FLIPS, ModelRunner.boxFlips());
			System.setProperty("corral.boxFlips", "8");
			assertEquals(8, ModelRunner.boxFlips());
			System.setProperty("corral.boxFlips", "5");
			org.corral.CorralException e = org.junit.jupiter.api.Assertions.assertThrows(org.corral.CorralException.class, ModelRunner::boxFlips);
			org.junit.jupiter.api.Assertions.assertTrue(e.getMessage().contains("corral.boxFlips must be 4 or 8"), e.getMessage());
		} finally {
			if (before == null) System.clearProperty("corral.boxFlips");
			else System.setProperty("corral.boxFlips", before);
		}
	}

	/**
	 * The network with every parameter set from a seeded generator, so that it is the same whatever
	 * ran before in this JVM (the engine's own initialisation was seen to leave NaN in a suite run);
	 * weights at about the scale of He initialisation for 3x3x16 inputs, so that the maps do not
	 * saturate (at 0.2 they were one value everywhere, which hides any seam).
	 */
	static UNet seeded(UNet net, NDManager m, long seed) {
		net.initialize(m, DataType.FLOAT32, new Shape(1, net.inChannels(), 16, 16));
		java.util.Random rnd = new java.util.Random(seed);
		for (var pair : net.getParameters()) {
			ai.djl.ndarray.NDArray a = pair.getValue().getArray();
			String n = pair.getKey();
			float[] v = new float[(int) a.size()];
			for (int i = 0; i < v.length; i++)
				v[i] = n.endsWith("runningVar") || n.endsWith("gamma") ? 1f : n.endsWith("runningMean") || n.endsWith("beta") ? 0f : (float) (0.1 * rnd.nextGaussian());
			a.set(v);
		}
		return net;
	}

	@Test
	void defaultTilesKeepTheWidestBufferWithin32MiB() {
		UNet net = new UNet(1, 16, 4);
		int t = TiledPredictor.tileFor(net, 32, TiledPredictor.REUSED_BUFFER_BYTES);
		assertEquals(352, t, "default network: 48 channels at full resolution");
		assertEquals(0, t % net.multiple());
		long bytes = 4L * 48 * (t + 64) * (t + 64), next = 4L * 48 * (t + 8 + 64) * (t + 8 + 64);
		assertEquals(true, bytes <= 32L << 20 && next > 32L << 20, bytes + " bytes fit, one grid step more would not");
		// width 128: 384 channels, sqrt(32 MiB / (4 x 384)) - 64 = 83.8, down to the pooling grid of 8
		assertEquals(80, TiledPredictor.tileFor(new UNet(1, 128, 4), 32, TiledPredictor.REUSED_BUFFER_BYTES));
		assertEquals(64, TiledPredictor.tileFor(new UNet(1, 128, 6), 32, TiledPredictor.REUSED_BUFFER_BYTES), "never below 64, however wide");
	}

	@Test
	void mirrorIndexStaysInside() {
		assertEquals(1, PlanarImage.mirror(-1, 5));
		assertEquals(3, PlanarImage.mirror(5, 5));
		assertEquals(0, PlanarImage.mirror(8, 5));
		assertEquals(0, PlanarImage.mirror(-7, 1));
	}

	/** The tile read through ImgLib2's mirrored view equals the mirror rule, far past every border too. */
	@Test
	void tileContextIsTheMirroredImage() {
		int[][] sizes = {{7, 5}, {1, 4}, {2, 1}, {1, 1}};
		for (int[] wh : sizes) {
			int w = wh[0], h = wh[1];
			float[][] ch = new float[2][w * h];
			for (int i = 0; i < w * h; i++) {
				ch[0][i] = i;
				ch[1][i] = 100 + 3 * i;
			}
			PlanarImage im = new PlanarImage(w, h, ch);
			int ox = -13, oy = -9, iw = 40, ih = 24;
			float[] t = TiledPredictor.tileWithContext(im, ox, oy, iw, ih);
			for (int c = 0; c < 2; c++)
				for (int y = 0; y < ih; y++)
					for (int x = 0; x < iw; x++)
						assertEquals(ch[c][PlanarImage.mirror(oy + y, h) * w + PlanarImage.mirror(ox + x, w)], t[(c * ih + y) * iw + x],
							w + "x" + h + " channel " + c + " at " + x + "," + y);
		}
	}
}
