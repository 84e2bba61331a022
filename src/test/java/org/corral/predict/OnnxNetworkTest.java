package org.corral.predict;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDManager;

import java.util.Random;

import org.corral.image.PlanarImage;
import org.corral.net.UNet;
import org.junit.jupiter.api.Test;

/** The network exported to ONNX Runtime gives DJL's probabilities, so masks do not depend on the engine. */
class OnnxNetworkTest {
	private static double maxDiff(float[] a, float[] b) {
		assertEquals(a.length, b.length);
		double d = 0;
		for (int i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i] - b[i]));
		return d;
	}

	@Test
	void sameProbabilitiesAsDjl() throws Exception {
		try (NDManager m = NDManager.newBaseManager()) {
			for (int[] io : new int[][] {{1, 1}, {3, 2}}) {
				UNet net = FoldedNetworkTest.network(m, io[0], io[1]);
				Random rnd = new Random(5);
				int n = 2, h = 48, w = 72; // a batch of two, not square: the layout of every axis is exercised
				float[] px = new float[n * io[0] * h * w];
				for (int i = 0; i < px.length; i++) px[i] = rnd.nextFloat();
				try (FoldedNetwork f = new FoldedNetwork(net, m); OnnxNetwork onnx = OnnxNetwork.of(f, 0)) {
					float[] ref = f.probabilities(px, n, h, w), got = onnx.probabilities(px, n, h, w);
					double spread = 0;
					for (float v : ref) spread = Math.max(spread, Math.abs(v - ref[0]));
					assertTrue(spread > 0.2, "the probabilities vary across the batch: " + spread);
					assertEquals(0, maxDiff(ref, got), 1e-3, "engines agree up to float rounding (another summation order in every convolution)");
					assertTrue(onnx.engine().startsWith("ONNX Runtime"), onnx.engine());
				}
			}
		}
	}

	/** Four flips in ONNX Runtime give the maps DJL gives with the same flips, across tile seams. */
	@Test
	void tiledFlipsAgreeAcrossEngines() {
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = FoldedNetworkTest.network(m, 1, 2);
			int w = 150, h = 97;
			float[] v = new float[w * h];
			for (int i = 0; i < v.length; i++) v[i] = (float) Math.sin(i * 0.37) * 0.5f + (i % w) / (float) w;
			PlanarImage im = new PlanarImage(w, h, new float[][] {v});
			try (TiledPredictor djl = new TiledPredictor(net, m, 64, 32).optFlips(4).optEngine(TiledPredictor.Engine.DJL);
				TiledPredictor onnx = new TiledPredictor(net, m, 64, 32).optFlips(4).optEngine(TiledPredictor.Engine.ONNX);
				TiledPredictor oneFlip = new TiledPredictor(net, m, 64, 32).optEngine(TiledPredictor.Engine.ONNX)) {
				float[][] a = djl.predictMaps(im, null), b = onnx.predictMaps(im, null), c = oneFlip.predictMaps(im, null);
				assertTrue(onnx.network() instanceof OnnxNetwork, "the runtime loads on this machine");
				for (int o = 0; o < 2; o++) assertEquals(0, maxDiff(a[o], b[o]), 1e-3);
				double flipEffect = Math.max(maxDiff(a[0], c[0]), maxDiff(a[1], c[1]));
				assertTrue(flipEffect > 1e-2, "the flips change the maps, so the comparison above sees them: " + flipEffect);
			}
		}
	}

	@Test
	void mirrorIsItsOwnInverse() {
		float[] src = {1, 2, 3, 4, 5, 6}; // 3 wide, 2 high
		float[] lr = new float[6], tb = new float[6], both = new float[6], back = new float[6];
		TiledPredictor.mirror(src, 0, lr, 0, 3, 2, 1);
		TiledPredictor.mirror(src, 0, tb, 0, 3, 2, 2);
		TiledPredictor.mirror(src, 0, both, 0, 3, 2, 3);
		org.junit.jupiter.api.Assertions.assertArrayEquals(new float[] {3, 2, 1, 6, 5, 4}, lr);
		org.junit.jupiter.api.Assertions.assertArrayEquals(new float[] {4, 5, 6, 1, 2, 3}, tb);
		org.junit.jupiter.api.Assertions.assertArrayEquals(new float[] {6, 5, 4, 3, 2, 1}, both);
		TiledPredictor.mirror(both, 0, back, 0, 3, 2, 3);
		org.junit.jupiter.api.Assertions.assertArrayEquals(src, back);
	}
}
