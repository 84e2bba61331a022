package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.index.NDIndex;

import java.util.Set;

/**
 * Neighbouring pixels of similar intensity, one of them in a box, should get the same label:
 * -log(p_a p_b + (1 - p_a)(1 - p_b)), the pairwise affinity loss of "BoxInst: High-Performance
 * Instance Segmentation with Box Annotations" (CVPR 2021). Reads the planes {@value #HORIZONTAL}
 * ([1, H, W-1]) and {@value #VERTICAL} ([1, H-1, W]): 1 = a pair to agree.
 */
public record PairwiseTerm(double weight) implements LossTerm {
	public static final String NAME = "pairwise", HORIZONTAL = "pairH", VERTICAL = "pairV";

	@Override
	public String name() {
		return NAME;
	}

	@Override
	public Set<String> needs() {
		return Set.of(HORIZONTAL, VERTICAL);
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		NDArray s = out.probability(), ph = batch.plane(HORIZONTAL), pv = batch.plane(VERTICAL);
		NDArray left = s.get(new NDIndex(":, :, :, :-1")), right = s.get(new NDIndex(":, :, :, 1:"));
		NDArray top = s.get(new NDIndex(":, :, :-1, :")), bottom = s.get(new NDIndex(":, :, 1:, :"));
		NDArray count = ph.sum().add(pv.sum()).maximum(1f);
		return same(left, right).mul(ph).sum().add(same(top, bottom).mul(pv).sum()).div(count);
	}

	private static NDArray same(NDArray a, NDArray b) {
		NDArray p = a.mul(b).add(a.neg().add(1f).mul(b.neg().add(1f)));
		return p.maximum(Scalars.of(p, 1e-6)).log().neg(); // an array: see Scalars
	}
}
