package org.corral.predict;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDManager;

import java.nio.FloatBuffer;
import java.util.List;

import org.corral.image.PlanarImage;
import org.corral.net.UNet;
import org.junit.jupiter.api.Test;

/**
 * The 8-bit network: its ranges come from the images given, ONNX Runtime runs it in integers, and
 * its maps stay close to the float network's, closer than with ranges that clip.
 */
class Int8NetworkTest {
	/** A field of smooth blobs on a faint, uneven background, as normalised images look. */
	static PlanarImage field(int w, int h, int seed) {
		float[] v = new float[w * h];
		java.util.Random rnd = new java.util.Random(seed);
		double[][] blobs = new double[12][];
		for (int b = 0; b < blobs.length; b++) blobs[b] = new double[] {rnd.nextDouble() * w, rnd.nextDouble() * h, 4 + 6 * rnd.nextDouble()};
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				double s = 0.05 * Math.sin(x * 0.05) + 0.02 * rnd.nextGaussian();
				for (double[] b : blobs) s += Math.exp(-((x - b[0]) * (x - b[0]) + (y - b[1]) * (y - b[1])) / (2 * b[2] * b[2]));
				v[y * w + x] = (float) s;
			}
		return new PlanarImage(w, h, new float[][] {v});
	}

	/**
	 * A random network whose activations keep their scale from layer to layer (He's rule for the
	 * filters, batch statistics near identity), so that its probabilities are not all 0 or 1.
	 */
	static UNet network(NDManager m) {
		UNet net = new UNet(1, 16, 4, 2);
		net.initialize(m, ai.djl.ndarray.types.DataType.FLOAT32, new ai.djl.ndarray.types.Shape(1, 1, 32, 32));
		java.util.Random rnd = new java.util.Random(3);
		for (var pair : net.getParameters()) {
			ai.djl.ndarray.NDArray a = pair.getValue().getArray();
			String n = pair.getKey();
			long[] shape = a.getShape().getShape();
			double fanIn = shape.length == 4 ? shape[1] * shape[2] * shape[3] : 1;
			float[] v = new float[(int) a.size()];
			for (int i = 0; i < v.length; i++)
				v[i] = (float) (n.endsWith("runningVar") ? 0.8 + 0.4 * rnd.nextDouble() : n.endsWith("gamma") ? 0.8 + 0.4 * rnd.nextDouble()
					: n.endsWith("runningMean") || n.endsWith("beta") || n.endsWith("bias") ? 0.1 * rnd.nextGaussian() : Math.sqrt(2 / fanIn) * rnd.nextGaussian());
			a.set(v);
		}
		return net;
	}

	private static double meanDiff(float[] a, float[] b) {
		double d = 0;
		for (int i = 0; i < a.length; i++) d += Math.abs(a[i] - b[i]);
		return d / a.length;
	}

	private static float[][] maps(UNet net, NDManager m, float[] ranges, PlanarImage im, String[] engine) {
		try (TiledPredictor p = new TiledPredictor(net, m, 96, 32).optEngine(TiledPredictor.Engine.ONNX).optActivationRanges(ranges)) {
			engine[0] = p.network().engine();
			return p.predictMaps(im, null);
		}
	}

	@Test
	void closeToFloatWithMeasuredRanges() {
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = network(m);
			float[] ranges = ActivationRanges.measure(net, m, List.of(field(128, 96, 1)));
			assertNotNull(ranges, "ONNX Runtime loads on this machine");
			assertEquals(14, ranges.length, "one range per 3x3 convolution of the 4-level network");
			for (float r : ranges) assertTrue(r > 0, "every activation has a positive range: " + java.util.Arrays.toString(ranges));
			PlanarImage other = field(160, 120, 2); // not the image the ranges came from
			String[] e = new String[1];
			float[][] f = maps(net, m, null, other, e);
			assertFalse(e[0].contains("8-bit"), e[0]);
			float[][] q = maps(net, m, ranges, other, e);
			assertTrue(e[0].endsWith("8-bit"), "the integer network runs: " + e[0]);
			float[] clipped = ranges.clone();
			for (int k = 0; k < clipped.length; k++) clipped[k] /= 8;
			float[][] c = maps(net, m, clipped, other, e);
			for (int o = 0; o < 2; o++) {
				double dq = meanDiff(f[o], q[o]), dc = meanDiff(f[o], c[o]);
				assertTrue(dq > 0, "8 bits are not float: the comparison sees the integer network");
				assertTrue(dq < 0.01, "map " + o + ": 8-bit within 0.01 of float on average, got " + dq);
				assertTrue(dc > 2 * dq, "map " + o + ": ranges cut to an eighth clip and do worse (" + dc + " against " + dq + ")");
			}
			System.setProperty(TiledPredictor.PRECISION_PROPERTY, "fp32");
			try {
				float[][] back = maps(net, m, ranges, other, e);
				assertFalse(e[0].contains("8-bit"), "fp32 asked for: " + e[0]);
				assertEquals(0, meanDiff(f[0], back[0]), 0);
			} finally {
				System.clearProperty(TiledPredictor.PRECISION_PROPERTY);
			}
		}
	}

	@Test
	void quantileFromHistogram() {
		float[] v = new float[10000];
		for (int i = 0; i < v.length; i++) v[i] = i + 1; // 1 .. 10000
		float step = 10000f / 4096;
		assertEquals(5000, ActivationRanges.quantile(FloatBuffer.wrap(v), 0.5), step);
		assertEquals(9999, ActivationRanges.quantile(FloatBuffer.wrap(v), 0.9999), step);
		float[] mostlyZero = new float[1000];
		mostlyZero[999] = 7;
		assertEquals(0, ActivationRanges.quantile(FloatBuffer.wrap(mostlyZero), 0.99), step, "zeros count below every bin");
		assertEquals(0, ActivationRanges.quantile(FloatBuffer.wrap(new float[5]), 0.9999));
	}
}
