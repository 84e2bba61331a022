package org.corral.predict;

import ai.djl.ndarray.NDManager;

import java.nio.FloatBuffer;
import java.util.List;

import org.corral.image.PlanarImage;
import org.corral.net.UNet;

/**
 * The range of each activation of a learned network, for its 8-bit form ({@link OnnxGraph#int8}):
 * measured when learning ends, on the images it learned from as it saw them (normalised, at the
 * learned object size), so that a model file masks every image alike, whatever else a run holds.
 * Per activation, the largest over the tiles of the 0.9999 quantile of its values: a few extreme
 * values are clipped instead of coarsening all the others (common practice for post-training
 * quantisation; the first pixels of 8-bit are worth more than the last outliers).
 */
public final class ActivationRanges {
	static final double QUANTILE = 0.9999;
	private static final int BINS = 4096;

	private ActivationRanges() {
	}

	/**
	 * The ranges of {@code net}'s activations on {@code images} (already normalised); null when ONNX
	 * Runtime cannot load here (the model then masks in float).
	 */
	public static float[] measure(UNet net, NDManager manager, List<PlanarImage> images) {
		try (NDManager m = manager.newSubManager(); FoldedNetwork folded = new FoldedNetwork(net, m)) {
			OnnxNetwork withActivations;
			try {
				withActivations = OnnxNetwork.withActivations(folded, Integer.getInteger("ai.djl.pytorch.num_threads", 0));
			} catch (ai.onnxruntime.OrtException | LinkageError e) {
				return null;
			}
			float[] ranges = new float[folded.layers().size()];
			TileNetwork recorder = new TileNetwork() {
				@Override
				public float[] probabilities(float[] inputs, int n, int h, int w) {
					return withActivations.run(inputs, n, h, w, (name, values) -> {
						int k = Integer.parseInt(name.substring("relu".length()));
						ranges[k] = Math.max(ranges[k], quantile(values, QUANTILE));
					});
				}

				@Override
				public String engine() {
					return withActivations.engine();
				}

				@Override
				public void close() {
					withActivations.close();
				}
			};
			try (TiledPredictor p = new TiledPredictor(net, m).useNetwork(recorder)) {
				for (PlanarImage im : images) p.predictMaps(im, null);
			}
			return ranges;
		}
	}

	/** The {@code q} quantile of the values (upper edge of its bin in a histogram of 4,096 bins over [0, max]); 0 when none is positive. */
	static float quantile(FloatBuffer values, double q) {
		int n = values.remaining(), at = values.position();
		float max = 0;
		for (int i = 0; i < n; i++) max = Math.max(max, values.get(at + i));
		if (max <= 0) return 0;
		int[] h = new int[BINS];
		long below = 0;
		for (int i = 0; i < n; i++) {
			float v = values.get(at + i);
			if (v > 0) h[Math.min(BINS - 1, (int) (v / max * BINS))]++;
			else below++;
		}
		long need = (long) Math.ceil(q * n);
		for (int k = 0; k < BINS; k++) {
			below += h[k];
			if (below >= need) return (k + 1) * max / BINS;
		}
		return max;
	}
}
