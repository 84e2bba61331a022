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
	 * The instance map's default weight, 5, acting only once the map learns from the network's own
	 * box masks and, when learning from scratch, not before step 240
	 * ({@link org.corral.train.LearnSettings#heavyInstanceFrom}); before that it is 1 ({@link #warmUp}).
	 * With 1 throughout the learned map stays a plateau at about 0.66 of its targets' peak inside
	 * each nucleus (developer histology, median over objects), and touching nuclei meet without a
	 * valley deep enough to part them. Measured at 400 steps on the cross-collection protocol (README,
	 * "How the defaults were chosen"): box masks within 0.0013 of weight 1; whole images of the
	 * developer histology without boxes F1 / mean AP 0.749 / 0.299 to 0.775 / 0.317 (seed 2: 0.664 /
	 * 0.255 to 0.724 / 0.287), adapted whole images up on every pair. Weight 5 from the first step
	 * cost the box masks up to 0.0068 there and up to 0.033 in runs of 100-200 steps.
	 */
	public static final double INSTANCE = 5.0;

	public static LossWeights defaults() {
		return new LossWeights(1.0, 1.0, 1.0, INSTANCE);
	}

	/**
	 * The weights before the instance map has targets from the network's own masks: its
	 * inscribed-ellipse warm-up is held to weight at most 1, so a heavier instance weight acts only
	 * once the box masks have been learned.
	 */
	public LossWeights warmUp() {
		return new LossWeights(band, fill, pairwise, Math.min(instance, WARM_UP_INSTANCE));
	}

	/** The most the instance map's weight is during the warm-up ({@link #warmUp}). */
	public static final double WARM_UP_INSTANCE = 1.0;
}
