package org.corral.loss;

/**
 * The worked example of DEVELOPERS.md ("How to add a loss term"), kept here so that it compiles:
 * mean binary entropy of p inside boxes ("Semi-supervised learning by entropy minimization", NIPS
 * 2004). Not a term Corral uses.
 */
public record EntropyTerm(double weight) implements LossTerm {
	public static final String NAME = "entropy", PLANE = "inBox";

	public String name() { return NAME; }
	public java.util.Set<String> needs() { return java.util.Set.of(PLANE); }

	public ai.djl.ndarray.NDArray compute(Outputs out, Batch batch, Context context) {
		var p = out.probability().clip(1e-6f, 1 - 1e-6f);
		var inBox = batch.plane(PLANE);
		var h = p.mul(p.log()).add(p.neg().add(1f).mul(p.neg().add(1f).log())).neg();
		return h.mul(inBox).sum().div(inBox.sum().maximum(1f));
	}
}
