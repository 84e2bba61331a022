package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.nn.Activation;

import java.util.Set;
import java.util.function.Function;

/**
 * Binary cross-entropy of one output map against a target plane, averaged over the pixels where the
 * target is known (plane {@code known}: 1 = known, 0 = unknown). Two terms have this form; see
 * {@link #OUTLINES} and {@link #INSTANCE_MAP}.
 */
public record CrossEntropyTerm(String name, String target, String known, Function<Outputs, NDArray> logits, double weight) implements LossTerm {
	/**
	 * Pixels known from outlines (corrections), averaged over the outlined pixels alone, so that a
	 * few corrections weigh as much as all the known background, however many boxes surround them
	 * (ours; the form of full supervision). Target 1 = object, 0 = background.
	 */
	public static final CrossEntropyTerm OUTLINES = new CrossEntropyTerm("outlines", "outline", "outlineWeight", Outputs::object, 1);

	/**
	 * The instance map with soft targets in [0, 1]: the regression of a normalised distance map after
	 * "Segmentation of Nuclei in Histopathology Images by Deep Regression of the Distance Map" (IEEE
	 * TMI 2019), on targets from the network's own box masks (ours). Weight 1 here; learning uses
	 * {@link LossWeights#instance} ({@link #withWeight}).
	 */
	public static final CrossEntropyTerm INSTANCE_MAP = new CrossEntropyTerm("instance", "instance", "instanceWeight", Outputs::instanceMap, 1);

	/** The same term with another weight in the total. */
	public CrossEntropyTerm withWeight(double w) {
		return new CrossEntropyTerm(name, target, known, logits, w);
	}

	@Override
	public Set<String> needs() {
		return Set.of(target, known);
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		return crossEntropy(logits.apply(out), batch.plane(target), batch.plane(known));
	}

	/** softplus(x) - x t for logits x and targets t in [0, 1], stable for large x, averaged where w is 1. */
	static NDArray crossEntropy(NDArray x, NDArray t, NDArray w) {
		return Activation.softPlus(x).sub(x.mul(t)).mul(w).sum().div(w.sum().maximum(1f));
	}
}
