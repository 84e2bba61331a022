package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.nn.Activation;

import java.util.Set;

/**
 * Outside the boxes is background: the mean of -log(1 - p) over known-background pixels ("Bounding
 * boxes for weakly supervised segmentation: Global constraints get close to full supervision", MIDL
 * 2020), here a weighted mean. Reads the plane {@value #PLANE} of weights: 1 = known background, a
 * small weight on unknown ground outside every box (LearnSettings.unknownGround), 0 inside boxes.
 */
public record BackgroundTerm() implements LossTerm {
	public static final String NAME = "background", PLANE = "background";

	@Override
	public String name() {
		return NAME;
	}

	@Override
	public Set<String> needs() {
		return Set.of(PLANE);
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		NDArray known = batch.plane(PLANE);
		// -log(1 - sigmoid(x)) = softplus(x), stable for large x
		return Activation.softPlus(out.object()).mul(known).sum().div(known.sum().maximum(1f));
	}
}
