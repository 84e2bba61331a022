package org.corral.loss;

import ai.djl.ndarray.NDArray;

import java.util.Set;

/**
 * The instance map: binary cross-entropy with soft targets, the regression of a normalised distance
 * map after "Segmentation of Nuclei in Histopathology Images by Deep Regression of the Distance Map"
 * (IEEE TMI 2019), on targets from the network's own box masks (ours). Reads {@value #TARGET} in
 * [0, 1] and {@value #WEIGHT} (0 = unknown).
 */
public record InstanceMapTerm() implements LossTerm {
	public static final String NAME = "instance", TARGET = "instance", WEIGHT = "instanceWeight";

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
		return OutlineTerm.crossEntropy(out.instanceMap(), batch.plane(TARGET), batch.plane(WEIGHT));
	}
}
