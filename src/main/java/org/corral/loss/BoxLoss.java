package org.corral.loss;

import ai.djl.ndarray.NDArray;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The learning loss: the weighted sum of its {@link LossTerm}s. The box loss proper is the method of
 * "Bounding boxes for weakly supervised segmentation: Global constraints get close to full
 * supervision" (MIDL 2020): known background ({@link BackgroundTerm}) and the box constraints
 * through the log-barrier extension ({@link ConstraintTerm}); the other terms are named in their
 * classes.
 */
public final class BoxLoss {
	private BoxLoss() {}

	/**
	 * The terms of one learning run, in the order they are summed and reported; the registration of
	 * a new term is one line here.
	 *
	 * @param outlines    some boxes are outlined objects (corrections)
	 * @param instanceMap the network has an instance-map output
	 * @param classes     number of classes (0 = one kind of object)
	 */
	public static List<LossTerm> terms(LossWeights weights, boolean outlines, boolean instanceMap, int classes) {
		List<LossTerm> terms = new ArrayList<>();
		terms.add(new BackgroundTerm());
		terms.add(new PairwiseTerm(weights.pairwise()));
		if (outlines) terms.add(CrossEntropyTerm.OUTLINES);
		terms.add(new ConstraintTerm(weights));
		if (instanceMap) terms.add(CrossEntropyTerm.INSTANCE_MAP.withWeight(weights.instance()));
		if (classes > 0) terms.add(new ClassTerm());
		return terms;
	}

	/**
	 * The total (it carries the gradient) and, by name, each term's value followed by the figures the
	 * terms reported; all scalars.
	 */
	public record Value(NDArray total, Map<String, NDArray> parts) {
		public float part(String name) {
			NDArray v = parts.get(name);
			if (v == null) throw new IllegalArgumentException("no loss part '" + name + "' (there are " + parts.keySet() + ")");
			return v.getFloat();
		}
	}

	public static Value compute(List<LossTerm> terms, Outputs out, Batch batch, double t) {
		Map<String, NDArray> values = new LinkedHashMap<>(), reported = new LinkedHashMap<>();
		LossTerm.Context context = new LossTerm.Context() {
			@Override
			public double t() {
				return t;
			}

			@Override
			public void report(String name, NDArray value) {
				reported.put(name, value);
			}
		};
		NDArray total = null;
		for (LossTerm term : terms) {
			NDArray v = term.compute(out, batch, context);
			if (values.put(term.name(), v) != null) throw new IllegalArgumentException("two loss terms are named '" + term.name() + "'");
			NDArray weighted = v.mul(Scalars.of(v, term.weight())); // an array: see Scalars
			total = total == null ? weighted : total.add(weighted);
		}
		if (total == null) throw new IllegalArgumentException("no loss terms");
		for (var e : reported.entrySet())
			if (values.putIfAbsent(e.getKey(), e.getValue()) != null) throw new IllegalArgumentException("a reported figure is named like a loss term: " + e.getKey());
		return new Value(total, values);
	}
}
