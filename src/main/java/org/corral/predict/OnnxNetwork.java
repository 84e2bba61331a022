package org.corral.predict;

import ai.onnxruntime.OnnxTensor;
import ai.onnxruntime.OrtEnvironment;
import ai.onnxruntime.OrtException;
import ai.onnxruntime.OrtLoggingLevel;
import ai.onnxruntime.OrtSession;

import java.nio.FloatBuffer;
import java.util.Map;

import org.corral.CorralException;

/**
 * A {@link FoldedNetwork} run by ONNX Runtime (CPU): its graph optimiser fuses each convolution
 * with its ReLU and lays the tensors out in channel blocks for the CPU's vector width, which DJL's
 * PyTorch binding does not expose. Measured on these machines (2 cores, AVX-512), the default
 * network on a 416x416 tile: 3.5 MP/s against 0.6 with DJL, the probabilities equal to 1e-4.
 */
public final class OnnxNetwork implements TileNetwork {
	private final OrtEnvironment env;
	private final OrtSession session;
	private final int channels, outputs;
	private final boolean int8;

	private OnnxNetwork(OrtEnvironment env, OrtSession session, int channels, int outputs, boolean int8) {
		this.env = env;
		this.session = session;
		this.channels = channels;
		this.outputs = outputs;
		this.int8 = int8;
	}

	/**
	 * @param threads threads for one network pass (0: one per core)
	 * @throws OrtException when the runtime cannot load on this machine or refuses the graph
	 */
	public static OnnxNetwork of(FoldedNetwork net, int threads) throws OrtException {
		return of(OnnxGraph.of(net), net, threads, false);
	}

	/**
	 * The network in 8-bit integers ({@link OnnxGraph#int8}) with the activation ranges measured on
	 * the learning images ({@link ActivationRanges}).
	 */
	public static OnnxNetwork int8(FoldedNetwork net, float[] ranges, int threads) throws OrtException {
		return of(OnnxGraph.int8(net, ranges), net, threads, true);
	}

	/** The network with every ReLU output as an output too, for {@link ActivationRanges}. */
	static OnnxNetwork withActivations(FoldedNetwork net, int threads) throws OrtException {
		return of(OnnxGraph.of(net, true), net, threads, false);
	}

	private static OnnxNetwork of(byte[] graph, FoldedNetwork net, int threads, boolean int8) throws OrtException {
		OrtEnvironment env = OrtEnvironment.getEnvironment(OrtLoggingLevel.ORT_LOGGING_LEVEL_ERROR, "corral");
		try (OrtSession.SessionOptions o = new OrtSession.SessionOptions()) {
			o.setOptimizationLevel(OrtSession.SessionOptions.OptLevel.ALL_OPT);
			o.setIntraOpNumThreads(threads > 0 ? threads : Runtime.getRuntime().availableProcessors());
			o.setInterOpNumThreads(1);
			// the runtime's buffer pool stays on (without it a 8160x8192 image took 133 s instead of 66: fresh
			// pages fault); the per-shape memory plans are off: tiles come in several shapes, and each plan
			// held its own block (peak 3.68 GiB with them, 3.39 without, same time; measured on that image)
			o.setMemoryPatternOptimization(false);
			// idle threads sleep instead of spinning: the instance stage runs on the same cores right after
			// (no loss of network speed measured: 1.75-1.97 MP/s spinning, 1.78-2.44 not, same run)
			o.addConfigEntry("session.intra_op.allow_spinning", "0");
			return new OnnxNetwork(env, env.createSession(graph, o), net.inChannels(), net.head().outputs(), int8);
		}
	}

	@Override
	public float[] probabilities(float[] inputs, int n, int h, int w) {
		return run(inputs, n, h, w, null);
	}

	/** As {@link #probabilities}; each output named in {@code also} is handed to it (for {@link ActivationRanges}). */
	float[] run(float[] inputs, int n, int h, int w, java.util.function.BiConsumer<String, FloatBuffer> also) {
		if (inputs.length != (long) n * channels * h * w) throw new IllegalArgumentException("inputs hold " + inputs.length + " values, not " + n + "x" + channels + "x" + h + "x" + w);
		try (OnnxTensor x = OnnxTensor.createTensor(env, FloatBuffer.wrap(inputs), new long[] {n, channels, h, w});
			OrtSession.Result r = session.run(Map.of(OnnxGraph.INPUT, x))) {
			FloatBuffer p = ((OnnxTensor) r.get(OnnxGraph.OUTPUT).orElseThrow()).getFloatBuffer();
			float[] out = new float[n * outputs * h * w];
			p.get(out);
			if (also != null) for (var e : r) if (!e.getKey().equals(OnnxGraph.OUTPUT)) also.accept(e.getKey(), ((OnnxTensor) e.getValue()).getFloatBuffer());
			return out;
		} catch (OrtException e) {
			throw new CorralException("The network could not run on a tile of " + w + "x" + h + ": " + e.getMessage());
		}
	}

	@Override
	public String engine() {
		return "ONNX Runtime " + env.getVersion() + (int8 ? ", 8-bit" : "");
	}

	@Override
	public void close() {
		try {
			session.close();
		} catch (OrtException e) {
			throw new CorralException("Could not release the network: " + e.getMessage());
		}
	}
}
