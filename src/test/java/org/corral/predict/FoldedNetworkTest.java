package org.corral.predict;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDList;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;
import ai.djl.training.ParameterStore;

import java.util.Random;

import org.corral.net.UNet;
import org.junit.jupiter.api.Test;

class FoldedNetworkTest {
	/** A network whose batch norms are far from the identity, so folding them is really exercised. */
	static UNet network(NDManager m, int in, int outputs) {
		UNet net = new UNet(in, 16, 4, outputs);
		net.initialize(m, DataType.FLOAT32, new Shape(1, in, 32, 32));
		Random rnd = new Random(11);
		for (var pair : net.getParameters()) {
			NDArray a = pair.getValue().getArray();
			String n = pair.getKey();
			float[] v = new float[(int) a.size()];
			for (int i = 0; i < v.length; i++)
				v[i] = (float) (n.endsWith("runningVar") ? 0.2 + 2 * rnd.nextDouble() : n.endsWith("gamma") ? 0.5 + rnd.nextDouble()
					: n.endsWith("runningMean") || n.endsWith("beta") ? 0.5 * rnd.nextGaussian() : 0.15 * rnd.nextGaussian());
			a.set(v);
		}
		return net;
	}

	@Test
	void foldedBatchNormGivesTheSameLogits() {
		try (NDManager m = NDManager.newBaseManager()) {
			for (int[] io : new int[][] {{1, 1}, {3, 2}}) {
				UNet net = network(m, io[0], io[1]);
				Random rnd = new Random(5);
				float[] px = new float[io[0] * 64 * 48];
				for (int i = 0; i < px.length; i++) px[i] = rnd.nextFloat();
				NDArray x = m.create(px, new Shape(1, io[0], 48, 64));
				float[] ref = net.forward(new ParameterStore(m, false), new NDList(x), false).singletonOrThrow().toFloatArray();
				try (FoldedNetwork f = new FoldedNetwork(net, m)) {
					float[] got = f.forward(x).toFloatArray();
					assertEquals(ref.length, got.length);
					double maxDiff = 0, scale = 0;
					for (int i = 0; i < ref.length; i++) {
						maxDiff = Math.max(maxDiff, Math.abs(ref[i] - got[i]));
						scale = Math.max(scale, Math.abs(ref[i]));
					}
					assertTrue(scale > 0.1, "the logits are not trivially zero: " + scale);
					assertEquals(0, maxDiff, 1e-4 * Math.max(1, scale), "folding is exact up to float rounding");
				}
			}
		}
	}
}
