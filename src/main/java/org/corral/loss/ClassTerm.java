package org.corral.loss;

import ai.djl.ndarray.NDArray;

import java.util.Set;

/**
 * Classes: cross-entropy of the class maps (softmax over the classes) on the pixels of boxes of a
 * known class. The object map stays one for all classes, so every class shares the box loss and the
 * known background (ours). Reads {@value #ONE_HOT} ([K, H, W]) and {@value #WEIGHT} (1 where a
 * class is known; 0 outside boxes, where boxes of two classes overlap, and for boxes without one).
 */
public record ClassTerm() implements LossTerm {
	public static final String NAME = "classes", ONE_HOT = "classes", WEIGHT = "classWeight";

	@Override
	public String name() {
		return NAME;
	}

	@Override
	public Set<String> needs() {
		return Set.of(ONE_HOT, WEIGHT);
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		NDArray oneHot = batch.plane(ONE_HOT), w = batch.plane(WEIGHT);
		NDArray logp = out.classes().logSoftmax(1);
		return logp.mul(oneHot).sum(new int[] {1}, true).mul(w).sum().neg().div(w.sum().maximum(1f));
	}
}
