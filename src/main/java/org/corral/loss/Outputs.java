package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.index.NDIndex;
import ai.djl.nn.Activation;

/**
 * The network's outputs on a batch, [B, outputs, H, W]: the object logits first, then the instance
 * map when the model has one, then one map per class. The object probability is computed once and
 * shared by the terms that read it.
 */
public final class Outputs {
	private final NDArray all;
	private final boolean instanceMap;
	private final int classes;
	private NDArray object, probability;

	public Outputs(NDArray all, boolean instanceMap, int classes) {
		long n = all.getShape().get(1);
		if (n != 1 + (instanceMap ? 1 : 0) + classes)
			throw new IllegalArgumentException(n + " outputs for " + (instanceMap ? "an instance map and " : "") + classes + " classes");
		this.all = all;
		this.instanceMap = instanceMap;
		this.classes = classes;
	}

	/** Object logits, [B, 1, H, W]. */
	public NDArray object() {
		if (object == null) object = all.getShape().get(1) == 1 ? all : all.get(new NDIndex(":, 0:1"));
		return object;
	}

	/** Object probability (sigmoid of the logits), [B, 1, H, W]. */
	public NDArray probability() {
		if (probability == null) probability = Activation.sigmoid(object());
		return probability;
	}

	/** Instance-map logits, [B, 1, H, W]. */
	public NDArray instanceMap() {
		if (!instanceMap) throw new IllegalStateException("this network has no instance map");
		return all.get(new NDIndex(":, 1:2"));
	}

	/** Class logits, [B, K, H, W]. */
	public NDArray classes() {
		if (classes == 0) throw new IllegalStateException("this network has no class maps");
		return all.get(new NDIndex(":, " + (all.getShape().get(1) - classes) + ":"));
	}
}
