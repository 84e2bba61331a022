package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDArrays;

/**
 * The log-barrier extension of "Constrained deep networks: Lagrangian optimization via log-barrier
 * extensions" (arXiv:1904.04205, 2019), for a constraint z <= 0:
 * <pre>
 *   psi_t(z) = -(1/t) log(-z)                       if z <= -1/t^2
 *            = t z - (1/t) log(1/t^2) + 1/t          otherwise
 * </pre>
 * It is a log barrier where the constraint is comfortably met and a linear penalty of slope t
 * beyond, continuous with a continuous slope at z = -1/t^2, and defined for any z.
 */
public final class LogBarrier {
	private LogBarrier() {}

	public static double value(double z, double t) {
		if (z <= -1 / (t * t)) return -Math.log(-z) / t;
		return t * z - Math.log(1 / (t * t)) / t + 1 / t;
	}

	public static double slope(double z, double t) {
		if (z <= -1 / (t * t)) return -1 / (t * z);
		return t;
	}

	/** Element-wise on an NDArray; the log's argument is clamped so the unused branch stays finite. */
	public static NDArray value(NDArray z, double t) {
		// float scalars: a double would promote the whole graph to float64
		float knee = (float) (-1 / (t * t));
		// constants as arrays that outlive the backward pass ({@link Scalars})
		NDArray barrier = z.neg().maximum(Scalars.of(z, 1 / (t * t))).log().div(Scalars.of(z, -t));
		NDArray linear = z.mul(Scalars.of(z, t)).add((float) (-Math.log(1 / (t * t)) / t + 1 / t));
		return NDArrays.where(z.lte(knee), barrier, linear);
	}
}
