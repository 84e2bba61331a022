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
	private static final int FLOAT = 1, ATTR_STRING = 3, ATTR_INT = 2, ATTR_INTS = 7;

	private OnnxGraph() {
	}

	/** The serialised model. */
	public static byte[] of(FoldedNetwork net) {
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
		FoldedNetwork.Convolution head = net.head();
		graph.message(5, tensor("head_w", head.weight(), head.shape()));
		graph.message(5, tensor("head_b", head.bias(), head.outputs()));
		graph.message(1, node("Conv", "logits", new String[] {h, "head_w", "head_b"}, ints("kernel_shape", 1, 1)));
		graph.message(1, node("Sigmoid", OUTPUT, new String[] {"logits"}));
		graph.message(11, valueInfo(INPUT, net.inChannels()));
		graph.message(12, valueInfo(OUTPUT, head.outputs()));
		return new Message().int64(1, 7).string(2, "Corral").message(7, graph).message(8, new Message().string(1, "").int64(2, 13)).bytes();
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
