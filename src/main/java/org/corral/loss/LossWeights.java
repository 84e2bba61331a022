package org.corral.loss;

/**
 * Weights of the loss terms. Defaults were chosen by measurement on the developer reference sets
 * (see README, "How the defaults were chosen").
 *
 * @param band     tightness prior (band form), weight of the mean barrier over all bands
 * @param fill     fill-fraction bounds (box-size bound and our lower bound), weight of their mean barrier
 * @param pairwise pairwise term ("BoxInst: High-Performance Instance Segmentation with Box Annotations", CVPR 2021), weight
 * @param instance the instance map's cross-entropy ({@link CrossEntropyTerm#INSTANCE_MAP}), weight
 */
public record LossWeights(double band, double fill, double pairwise, double instance) {
	/**
	 * The instance map's default weight. With weight 1 the learned map stayed a plateau at about 0.66
	 * of its targets' peak inside each nucleus (developer histology, median over objects), so that
	 * touching nuclei met without a valley deep enough to part them; with 5 it reaches 0.77 and
	 * fewer are kept together, for whole-image F1 / mean AP up by about 0.01-0.02 on most pairs of the
	 * cross-collection protocol and box masks down by 0.001 adapted, 0.003 not (README, "How the
	 * defaults were chosen"); 15 fits no better.
	 */
	public static final double INSTANCE = 5.0;

	public static LossWeights defaults() {
		return new LossWeights(1.0, 1.0, 1.0, INSTANCE);
	}
}
