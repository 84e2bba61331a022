package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.index.NDIndex;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;

import java.util.List;
import java.util.Set;

import org.corral.supervision.Constraint;

/**
 * Every box {@link Constraint} (tightness bands, box-size bound, fill lower bound) through the
 * log-barrier extension with one shared t ({@link LogBarrier}). The tightness prior is from "Image
 * segmentation with a bounding box prior" (ICCV 2009); its band form, the box-size bound and their
 * training through the log-barrier extension from "Bounding boxes for weakly supervised
 * segmentation: Global constraints get close to full supervision" (MIDL 2020); the extension itself
 * from "Constrained deep networks: Lagrangian optimization via log-barrier extensions"
 * (arXiv:1904.04205, 2019). The fill lower bound is ours. Band and fill constraints are averaged per
 * kind, so the weights do not depend on how many boxes a crop holds. All rectangle sums come from one
 * integral image of p (a summed-area table, "Summed-area tables for texture mapping", SIGGRAPH 1984),
 * so their cost does not grow with box size. Reports {@value #MET}: the fraction of constraints met. Its weight
 * in the total is 1: the band and fill weights are inside, per constraint.
 */
public record ConstraintTerm(LossWeights weights) implements LossTerm {
	public static final String NAME = "constraints", MET = "met";

	@Override
	public String name() {
		return NAME;
	}

	@Override
	public Set<String> needs() {
		return Set.of();
	}

	@Override
	public NDArray compute(Outputs out, Batch batch, Context context) {
		NDArray s = out.probability();
		Arrays a = arrays(batch.manager(), batch.constraints(), s.getShape(), weights);
		if (a == null) {
			context.report(MET, s.sum().zerosLike().add(1f));
			return s.sum().zerosLike();
		}
		NDArray z = z(s, a);
		context.report(MET, z.lte(0f).toType(DataType.FLOAT32, false).mean());
		return LogBarrier.value(z, context.t()).mul(a.weight).sum();
	}

	/** Each constraint's normalised violation z (met when z <= 0), in batch order. */
	static NDArray z(NDArray s, Arrays a) {
		Shape sh = s.getShape();
		long b = sh.get(0), h = sh.get(2), w = sh.get(3);
		// a zero row on top and a zero column on the left (pad lists the last axis first)
		NDArray integral = s.reshape(b, h, w).cumSum(1).cumSum(2).pad(new Shape(1, 0, 1, 0), 0);
		NDArray v = integral.reshape(-1).take(a.corners.reshape(-1)).reshape(-1, 4);
		NDArray sums = v.get(new NDIndex(":, 0")).sub(v.get(new NDIndex(":, 1"))).sub(v.get(new NDIndex(":, 2"))).add(v.get(new NDIndex(":, 3")));
		return sums.sub(a.target).mul(a.sign).div(a.norm);
	}

	/** The constraints of a batch as arrays: integral-image corners, target, sign, norm, weight. */
	record Arrays(NDArray corners, NDArray target, NDArray sign, NDArray norm, NDArray weight) {}

	/** Null when no crop holds a constraint. */
	static Arrays arrays(NDManager m, List<List<Constraint>> perCrop, Shape shape, LossWeights weights) {
		long h = shape.get(2), w = shape.get(3);
		int n = 0, nBand = 0, nFill = 0;
		for (List<Constraint> l : perCrop)
			for (Constraint c : l) {
				n++;
				if (c.kind() == Constraint.Kind.BAND) nBand++;
				else nFill++;
			}
		if (n == 0) return null;
		long[] idx = new long[4 * n];
		float[] tg = new float[n], sg = new float[n], nm = new float[n], wt = new float[n];
		int k = 0;
		long stride = (h + 1) * (w + 1);
		for (int bi = 0; bi < perCrop.size(); bi++)
			for (Constraint c : perCrop.get(bi)) {
				long base = bi * stride;
				idx[4 * k] = base + c.y1() * (w + 1) + c.x1();
				idx[4 * k + 1] = base + c.y0() * (w + 1) + c.x1();
				idx[4 * k + 2] = base + c.y1() * (w + 1) + c.x0();
				idx[4 * k + 3] = base + c.y0() * (w + 1) + c.x0();
				tg[k] = c.target();
				sg[k] = c.sign();
				nm[k] = c.norm();
				wt[k] = (float) (c.kind() == Constraint.Kind.BAND ? weights.band() / nBand : weights.fill() / nFill);
				k++;
			}
		return new Arrays(m.create(idx, new Shape(n, 4)), m.create(tg), m.create(sg), m.create(nm), m.create(wt));
	}
}
