package org.corral.loss;

import ai.djl.ndarray.NDArray;

/**
 * Constants for the loss graph as arrays of the array's own manager. DJL's {@code x.mul(Number)}
 * (and {@code div}, {@code maximum}, ...) wraps the number in an array that it closes at once, while
 * PyTorch's autograd keeps that array for the backward pass: once the garbage collector frees its
 * buffer, the gradient reads freed memory (learning then differed from run to run, and sometimes
 * diverged). An array made here lives as long as the manager of the batch, past the backward pass.
 */
final class Scalars {
	private Scalars() {}

	/** {@code v} as a float scalar array of {@code like}'s manager (a float: a double would promote the graph). */
	static NDArray of(NDArray like, double v) {
		return like.getManager().create((float) v);
	}
}
