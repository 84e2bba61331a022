package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.nn.Activation;

import java.util.Set;

/**
 * Pixels known from outlines (corrections): cross-entropy averaged over the outlined pixels alone,
 * so that a few corrections weigh as much as all the known background, however many boxes surround
 * them (ours; the form of full supervision). Reads {@value #TARGET} (1 = object, 0 = background)
 * and {@value #WEIGHT} (1 = known from an outline).
 */
public record OutlineTerm() implements LossTerm {
	public static final String NAME = "outlines", TARGET = "outline", WEIGHT = "outlineWeight";

	@Override
	public String name() {
		return NAME;
	}

	@Override
	public double weight() {
		return 1;
	}

	@Override
	public Set<String> needs() {
		return Set.of(TARGET, WEIGHT);
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		return crossEntropy(out.object(), batch.plane(TARGET), batch.plane(WEIGHT));
	}

	/**
	 * Binary cross-entropy of logits x against targets t in [0, 1], averaged over the pixels of weight
	 * 1: softplus(x) - x t, stable for large x (also the instance map's term).
	 */
	static NDArray crossEntropy(NDArray x, NDArray t, NDArray w) {
		return Activation.softPlus(x).sub(x.mul(t)).mul(w).sum().div(w.sum().maximum(1f));
	}
}
