package org.corral.predict;

import com.google.protobuf.CodedOutputStream;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.util.ArrayList;
import java.util.List;

/**
 * A {@link FoldedNetwork} written as an ONNX model (the open standard's {@code onnx.proto}, IR
 * version 7, operator set 13), in memory, for {@link OnnxNetwork}: Conv, Relu, MaxPool, nearest
 * Resize by 2 (floor of x/2: the same repetition as the learned network's upsampling), Concat, and a
 * Sigmoid on the logits. Input "x" [N, C, H, W], output "p" [N, outputs, H, W]; N, H and W are free.
 * The messages are encoded with protobuf-java's wire writer; only the fields used here are written.
 */
public final class OnnxGraph {
	public static final String INPUT = "x", OUTPUT = "p";
	// field numbers and enum values of onnx.proto
	private static final int FLOAT = 1, UINT8 = 2, INT8 = 3, INT32 = 6, ATTR_STRING = 3, ATTR_INT = 2, ATTR_INTS = 7;

	private OnnxGraph() {
	}

	/** The serialised model. */
	public static byte[] of(FoldedNetwork net) {
		return of(net, false);
	}

	/** With {@code activations}, each 3x3 convolution's ReLU output "relu"k is an output too (for calibration). */
	static byte[] of(FoldedNetwork net, boolean activations) {
		int levels = net.levels();
		List<FoldedNetwork.Convolution> convs = net.layers();
		Message graph = new Message().string(2, "corral-unet");
		List<String> skips = new ArrayList<>();
		String h = INPUT;
		for (int i = 0; i < levels; i++) {
			h = layer(graph, layer(graph, h, convs, 2 * i), convs, 2 * i + 1);
			if (i < levels - 1) {
				skips.add(h);
				String p = "pool" + i;
				graph.message(1, node("MaxPool", p, new String[] {h}, ints("kernel_shape", 2, 2), ints("strides", 2, 2)));
				h = p;
			}
		}
		graph.message(5, tensor("up_scales", new float[] {1, 1, 2, 2}, 4));
		for (int i = levels - 2; i >= 0; i--) {
			String up = "up" + i, cat = "cat" + i;
			graph.message(1, node("Resize", up, new String[] {h, "", "up_scales"}, string("mode", "nearest"), string("coordinate_transformation_mode", "asymmetric"),
				string("nearest_mode", "floor")));
			graph.message(1, node("Concat", cat, new String[] {skips.get(i), up}, new Message().string(1, "axis").int64(20, ATTR_INT).int64(3, 1)));
			h = layer(graph, layer(graph, cat, convs, 2 * levels + 2 * i), convs, 2 * levels + 2 * i + 1);
		}
		if (activations) for (int k = 0; k < convs.size(); k++) graph.message(12, valueInfo("relu" + k, convs.get(k).outputs()));
		return finish(graph, net, h);
	}

	/** The 1x1 head (float), the sigmoid, the graph's input and output, and the model around the graph. */
	private static byte[] finish(Message graph, FoldedNetwork net, String h) {
		FoldedNetwork.Convolution head = net.head();
		graph.message(5, tensor("head_w", head.weight(), head.shape()));
		graph.message(5, tensor("head_b", head.bias(), head.outputs()));
		graph.message(1, node("Conv", "logits", new String[] {h, "head_w", "head_b"}, ints("kernel_shape", 1, 1)));
		graph.message(1, node("Sigmoid", OUTPUT, new String[] {"logits"}));
		graph.message(11, valueInfo(INPUT, net.inChannels()));
		graph.message(12, valueInfo(OUTPUT, head.outputs()));
		return new Message().int64(1, 7).string(2, "Corral").message(7, graph).message(8, new Message().string(1, "").int64(2, 13)).bytes();
	}

	/**
	 * The same network with 8-bit activations and weights, in the standard's quantise/dequantise form
	 * (QuantizeLinear and DequantizeLinear around each operator), which ONNX Runtime's optimiser fuses
	 * into integer convolutions (QLinearConv), pooling, upsampling and concatenation on uint8 tensors.
	 * Weights are int8 with one scale per output channel, activations uint8 with one scale per tensor
	 * from {@code ranges} ({@link ActivationRanges}: the largest value kept after 3x3 convolution k and its
	 * ReLU, at k). The first convolution (1 input channel per image channel: under 1 % of the work)
	 * and the 1x1 head stay in float: quantising the normalised input to 8 bits turned faint
	 * background into objects (on 5 BBBC039 fields, pixel Dice 0.970 to 0.769), which float input avoids.
	 */
	public static byte[] int8(FoldedNetwork net, float[] ranges) {
		int levels = net.levels();
		List<FoldedNetwork.Convolution> convs = net.layers();
		if (ranges.length != convs.size()) throw new IllegalArgumentException(ranges.length + " activation ranges for " + convs.size() + " convolutions");
		Message graph = new Message().string(2, "corral-unet-int8");
		graph.message(5, bytesTensor("zp0", UINT8, new byte[] {0}));
		List<String> skips = new ArrayList<>();
		List<Float> skipScales = new ArrayList<>();
		String h = quantise(graph, layer(graph, INPUT, convs, 0), scale(ranges, 0));
		float s = scale(ranges, 0);
		for (int i = 0; i < levels; i++) {
			if (i > 0) {
				h = qlayer(graph, h, s, scale(ranges, 2 * i), convs, 2 * i);
				s = scale(ranges, 2 * i);
			}
			h = qlayer(graph, h, s, scale(ranges, 2 * i + 1), convs, 2 * i + 1);
			s = scale(ranges, 2 * i + 1);
			if (i < levels - 1) {
				skips.add(h);
				skipScales.add(s);
				// max-pooling and nearest upsampling keep the scale: ONNX Runtime runs them on the uint8 values
				h = requant(graph, node("MaxPool", "pool" + i, new String[] {h}, ints("kernel_shape", 2, 2), ints("strides", 2, 2)), "pool" + i, s);
			}
		}
		graph.message(5, tensor("up_scales", new float[] {1, 1, 2, 2}, 4));
		for (int i = levels - 2; i >= 0; i--) {
			String up = "up" + i, cat = "cat" + i;
			h = requant(graph, node("Resize", up, new String[] {h, "", "up_scales"}, string("mode", "nearest"), string("coordinate_transformation_mode", "asymmetric"),
				string("nearest_mode", "floor")), up, s);
			float sc = Math.max(s, skipScales.get(i));
			h = requant(graph, node("Concat", cat, new String[] {skips.get(i), h}, new Message().string(1, "axis").int64(20, ATTR_INT).int64(3, 1)), cat, sc);
			int d = 2 * levels + 2 * i;
			h = qlayer(graph, qlayer(graph, h, sc, scale(ranges, d), convs, d), scale(ranges, d), scale(ranges, d + 1), convs, d + 1);
			s = scale(ranges, d + 1);
		}
		return finish(graph, net, h);
	}

	/** The uint8 step of activation k: its range over 255 levels (ReLU outputs are never negative). */
	private static float scale(float[] ranges, int k) {
		return Math.max(ranges[k], 1e-6f) / 255f;
	}

	/** Quantises {@code name} to uint8 at scale {@code s} and back; returns the dequantised name. */
	private static String quantise(Message graph, String name, float s) {
		graph.message(5, tensor("s_" + name, new float[] {s}));
		graph.message(1, node("QuantizeLinear", name + "_q", new String[] {name, "s_" + name, "zp0"}));
		graph.message(1, node("DequantizeLinear", name + "_d", new String[] {name + "_q", "s_" + name, "zp0"}));
		return name + "_d";
	}

	/** Adds {@code op} (whose output is named {@code name}) and quantises its output to uint8 at scale {@code s}; returns the dequantised name. */
	private static String requant(Message graph, Message op, String name, float s) {
		graph.message(1, op);
		return quantise(graph, name, s);
	}

	/** A 3x3 convolution with int8 filters (one scale per output channel) and int32 bias, its ReLU, and uint8 output at scale {@code sOut}. */
	private static String qlayer(Message graph, String in, float sIn, float sOut, List<FoldedNetwork.Convolution> convs, int k) {
		FoldedNetwork.Convolution c = convs.get(k);
		int outs = c.outputs(), per = c.weight().length / outs;
		byte[] wq = new byte[c.weight().length];
		float[] sw = new float[outs], sb = new float[outs];
		int[] bq = new int[outs];
		for (int o = 0; o < outs; o++) {
			float m = 0;
			for (int j = o * per; j < (o + 1) * per; j++) m = Math.max(m, Math.abs(c.weight()[j]));
			sw[o] = m > 0 ? m / 127f : 1f;
			for (int j = o * per; j < (o + 1) * per; j++) wq[j] = (byte) Math.max(-127, Math.min(127, Math.round(c.weight()[j] / sw[o])));
			sb[o] = sIn * sw[o];
			bq[o] = (int) Math.round(c.bias()[o] / sb[o]);
		}
		String w = "w" + k, b = "b" + k, conv = "conv" + k, relu = "relu" + k;
		graph.message(5, bytesTensor(w + "_q", INT8, wq, c.shape()));
		graph.message(5, tensor(w + "_s", sw, outs));
		graph.message(5, bytesTensor(w + "_z", INT8, new byte[outs], outs));
		graph.message(1, node("DequantizeLinear", w, new String[] {w + "_q", w + "_s", w + "_z"}, new Message().string(1, "axis").int64(20, ATTR_INT).int64(3, 0)));
		ByteBuffer braw = ByteBuffer.allocate(4 * outs).order(ByteOrder.LITTLE_ENDIAN);
		braw.asIntBuffer().put(bq);
		graph.message(5, bytesTensor(b + "_q", INT32, braw.array(), outs));
		graph.message(5, tensor(b + "_s", sb, outs));
		graph.message(5, bytesTensor(b + "_z", INT32, new byte[4 * outs], outs));
		graph.message(1, node("DequantizeLinear", b, new String[] {b + "_q", b + "_s", b + "_z"}, new Message().string(1, "axis").int64(20, ATTR_INT).int64(3, 0)));
		graph.message(1, node("Conv", conv, new String[] {in, w, b}, ints("kernel_shape", 3, 3), ints("pads", 1, 1, 1, 1)));
		return requant(graph, node("Relu", relu, new String[] {conv}), relu, sOut);
	}

	private static Message bytesTensor(String name, int type, byte[] raw, long... dims) {
		Message t = new Message();
		for (long d : dims) t.int64(1, d);
		return t.int64(2, type).string(8, name).bytes(9, raw);
	}

	private static String layer(Message graph, String in, List<FoldedNetwork.Convolution> convs, int k) {
		FoldedNetwork.Convolution c = convs.get(k);
		String w = "w" + k, b = "b" + k, conv = "conv" + k, out = "relu" + k;
		graph.message(5, tensor(w, c.weight(), c.shape()));
		graph.message(5, tensor(b, c.bias(), c.outputs()));
		graph.message(1, node("Conv", conv, new String[] {in, w, b}, ints("kernel_shape", 3, 3), ints("pads", 1, 1, 1, 1)));
		graph.message(1, node("Relu", out, new String[] {conv}));
		return out;
	}

	private static Message node(String op, String output, String[] inputs, Message... attributes) {
		Message n = new Message();
		for (String in : inputs) n.string(1, in);
		n.string(2, output).string(3, output).string(4, op);
		for (Message a : attributes) n.message(5, a);
		return n;
	}

	private static Message ints(String name, long... values) {
		Message a = new Message().string(1, name).int64(20, ATTR_INTS);
		for (long v : values) a.int64(8, v);
		return a;
	}

	private static Message string(String name, String value) {
		return new Message().string(1, name).int64(20, ATTR_STRING).string(4, value);
	}

	private static Message tensor(String name, float[] values, long... dims) {
		Message t = new Message();
		for (long d : dims) t.int64(1, d);
		ByteBuffer raw = ByteBuffer.allocate(4 * values.length).order(ByteOrder.LITTLE_ENDIAN); // raw_data is little-endian by the standard
		raw.asFloatBuffer().put(values);
		return t.int64(2, FLOAT).string(8, name).bytes(9, raw.array());
	}

	/** A float tensor [N, channels, H, W] with symbolic N, H and W. */
	private static Message valueInfo(String name, long channels) {
		Message shape = new Message().message(1, new Message().string(2, "n")).message(1, new Message().int64(1, channels)).message(1, new Message().string(2, "h"))
			.message(1, new Message().string(2, "w"));
		return new Message().string(1, name).message(2, new Message().message(1, new Message().int64(1, FLOAT).message(2, shape)));
	}

	/** One protobuf message being written. */
	private static final class Message {
		private final ByteArrayOutputStream buffer = new ByteArrayOutputStream();
		private final CodedOutputStream out = CodedOutputStream.newInstance(buffer);

		/** One write to the in-memory stream, which cannot fail for I/O reasons. */
		private interface Write {
			void to(CodedOutputStream out) throws IOException;
		}

		private Message put(Write w) {
			try {
				w.to(out);
			} catch (IOException e) {
				throw new UncheckedIOException(e);
			}
			return this;
		}

		Message int64(int field, long v) {
			return put(o -> o.writeInt64(field, v));
		}

		Message string(int field, String v) {
			return put(o -> o.writeString(field, v));
		}

		Message bytes(int field, byte[] v) {
			return put(o -> o.writeByteArray(field, v));
		}

		Message message(int field, Message m) {
			return bytes(field, m.bytes());
		}

		byte[] bytes() {
			put(CodedOutputStream::flush);
			return buffer.toByteArray();
		}
	}
}
