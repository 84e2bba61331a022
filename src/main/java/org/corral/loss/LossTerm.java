package org.corral.loss;

import ai.djl.ndarray.NDArray;

import java.util.Set;

/**
 * One term of the learning loss. The total is the weighted sum of the registered terms
 * ({@link BoxLoss#terms}); reports, the progress printer, the live plot and the model header list
 * every term by its name. A new term is one class plus one line in {@link BoxLoss#terms}
 * (DEVELOPERS.md has a worked example).
 */
public interface LossTerm {
	/** Its name in reports and in the model header (lower case, one word). */
	String name();

	/** Its weight in the total (1 unless the term is given one). */
	default double weight() {
		return 1;
	}

	/** The crop planes it reads ({@link CropTargets}); the crop sampler must provide them. */
	Set<String> needs();

	/** Its value on a batch: a scalar that carries the gradient (keep every scalar a float). */
	NDArray compute(Outputs out, Batch batch, Context context);

	/** What a term may know of the run besides the batch, and where it reports figures of its own. */
	interface Context {
		/** The log-barrier t of this step. */
		double t();

		/** Reports a figure other than the term's value (a scalar), by name. */
		void report(String name, NDArray value);
	}
}
