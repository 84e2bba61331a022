package org.corral.loss;

/**
 * Weights of the loss terms. Defaults were chosen by measurement on the developer reference sets
 * (see README, "How the defaults were chosen").
 *
 * @param band     tightness prior (band form), weight of the mean barrier over all bands
 * @param fill     fill-fraction bounds (box-size bound and our lower bound), weight of their mean barrier
 * @param pairwise pairwise term ("BoxInst: High-Performance Instance Segmentation with Box Annotations", CVPR 2021), weight
 */
public record LossWeights(double band, double fill, double pairwise) {
	public static LossWeights defaults() {
		return new LossWeights(1.0, 1.0, 1.0);
	}
}
