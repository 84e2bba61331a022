package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.index.NDIndex;
import ai.djl.ndarray.types.Shape;
import ai.djl.nn.Activation;

import java.util.List;

import org.corral.supervision.Constraint;

/**
 * The box loss on a batch of crops. Tightness bands, box-size bound and known background trained
 * together through the log-barrier extension are the method of "Bounding boxes for weakly supervised
 * segmentation: Global constraints get close to full supervision" (MIDL 2020); the tightness prior
 * itself is from "Image segmentation with a bounding box prior" (ICCV 2009); the log-barrier
 * extension from "Constrained deep networks: Lagrangian optimization via log-barrier extensions"
 * (arXiv:1904.04205, 2019). The fill lower bound is ours.
 * <ul>
 * <li>background: mean of -log(1 - s) over known-background pixels;</li>
 * <li>every {@link Constraint} (tightness bands, box-size bound, fill lower bound) through the
 * log-barrier extension with one shared t ({@link LogBarrier}); band and fill constraints are
 * averaged per kind, so the weights do not depend on how many boxes a crop holds;</li>
 * <li>pairwise: neighbouring pixels of similar intensity, one of them in a box, should get the same
 * label: -log(s_p s_q + (1-s_p)(1-s_q)) (the pairwise affinity loss of "BoxInst: High-Performance
 * Instance Segmentation with Box Annotations", CVPR 2021).</li>
 * </ul>
 * All constraint sums come from one integral image of s (a summed-area table, "Summed-area tables
 * for texture mapping", SIGGRAPH 1984), so their cost does not grow with box size.
 */
public final class BoxLoss {

	/** The loss and its parts, as scalar NDArrays (the first one carries the gradient). */
	public record Parts(NDArray total, NDArray background, NDArray constraints, NDArray pairwise, NDArray met, NDArray z, NDArray instance, NDArray exact,
		NDArray classes) {}

	/** Supervision of a batch as arrays; built once per step in plain Java. */
	public static final class Targets {
		final NDArray background, pairH, pairV, corners, target, sign, norm, weight;
		final int nConstraints;
		NDArray instance, instanceWeight, exact, exactWeight, classes, classWeight;

		/**
		 * The class of each pixel inside a box of a known class, as one-hot [B,K,H,W], and 1 where
		 * a class is known ([B,1,H,W]; 0 outside boxes, where boxes of two classes overlap, and for
		 * boxes without a class).
		 */
		public Targets optClasses(NDManager m, int b, int k, int h, int w, float[] oneHot, float[] weight) {
			this.classes = m.create(oneHot, new Shape(b, k, h, w));
			this.classWeight = m.create(weight, new Shape(b, 1, h, w));
			return this;
		}

		/**
		 * Pixels known from outlines (corrections) as [B,1,H,W]: 1 = object, 0 = background where
		 * {@code weight} is 1; weight 0 = not known from an outline.
		 */
		public Targets optExact(NDManager m, int b, int h, int w, float[] target, float[] weight) {
			this.exact = m.create(target, new Shape(b, 1, h, w));
			this.exactWeight = m.create(weight, new Shape(b, 1, h, w));
			return this;
		}

		/**
		 * The instance map's targets ([B,1,H,W]) in [0, 1] and their weights (0 = unknown): each
		 * object's normalised distance to its edge from the network's own box masks, or early in
		 * learning each box's inscribed-ellipse cone; 0 on known background ({@code train.CropSampler}).
		 */
		public Targets optInstanceMap(NDManager m, int b, int h, int w, float[] target, float[] weight) {
			this.instance = m.create(target, new Shape(b, 1, h, w));
			this.instanceWeight = m.create(weight, new Shape(b, 1, h, w));
			return this;
		}

		/**
		 * @param background [B,1,H,W] 1 = known background
		 * @param pairH      [B,1,H,W-1] weights of horizontal pairs
		 * @param pairV      [B,1,H-1,W] weights of vertical pairs
		 * @param perCrop    constraints of each crop, in crop coordinates
		 */
		public Targets(NDManager m, int b, int h, int w, float[] background, float[] pairH, float[] pairV,
			List<List<Constraint>> perCrop, LossWeights weights) {
			this.background = m.create(background, new Shape(b, 1, h, w));
			this.pairH = m.create(pairH, new Shape(b, 1, h, w - 1));
			this.pairV = m.create(pairV, new Shape(b, 1, h - 1, w));
			int n = 0;
			int nBand = 0, nFill = 0;
			for (List<Constraint> l : perCrop)
				for (Constraint c : l) {
					n++;
					if (c.kind() == Constraint.Kind.BAND) nBand++;
					else nFill++;
				}
			nConstraints = n;
			long[] idx = new long[4 * Math.max(1, n)];
			float[] tg = new float[Math.max(1, n)], sg = new float[Math.max(1, n)], nm = new float[Math.max(1, n)], wt = new float[Math.max(1, n)];
			java.util.Arrays.fill(nm, 1f);
			int k = 0;
			long stride = (long) (h + 1) * (w + 1);
			for (int bi = 0; bi < perCrop.size(); bi++)
				for (Constraint c : perCrop.get(bi)) {
					long base = bi * stride;
					idx[4 * k] = base + (long) c.y1() * (w + 1) + c.x1();
					idx[4 * k + 1] = base + (long) c.y0() * (w + 1) + c.x1();
					idx[4 * k + 2] = base + (long) c.y1() * (w + 1) + c.x0();
					idx[4 * k + 3] = base + (long) c.y0() * (w + 1) + c.x0();
					tg[k] = c.target();
					sg[k] = c.sign();
					nm[k] = c.norm();
					wt[k] = (float) (c.kind() == Constraint.Kind.BAND ? weights.band() / nBand : weights.fill() / nFill);
					k++;
				}
			corners = m.create(idx, new Shape(Math.max(1, n), 4));
			target = m.create(tg);
			sign = m.create(sg);
			norm = m.create(nm);
			weight = m.create(wt);
		}
	}

	private BoxLoss() {}

	/**
	 * Weight of the instance-map term: binary cross-entropy with soft targets, the regression of a
	 * normalised distance map after "Segmentation of Nuclei in Histopathology Images by Deep Regression
	 * of the Distance Map" (IEEE TMI 2019), on targets from the network's own box masks (ours).
	 */
	public static final double INSTANCE_WEIGHT = 1;

	/**
	 * Weight of the pixel term of outlined objects (corrections): cross-entropy averaged over the
	 * outlined pixels alone, so that a few corrections weigh as much as all the known background,
	 * however many boxes surround them (ours; the form of full supervision).
	 */
	public static final double EXACT_WEIGHT = 1;

	/**
	 * Weight of the class term: cross-entropy of the class maps on the pixels of boxes of a known
	 * class. The object map stays one for all classes, so every class shares the box loss and the
	 * known background (ours).
	 */
	public static final double CLASS_WEIGHT = 1;

	public static Parts compute(NDArray all, Targets tg, double t, LossWeights weights) {
		NDArray logits = all.getShape().get(1) == 1 ? all : all.get(new NDIndex(":, 0:1")), instance = null;
		NDArray classLoss = null;
		if (tg.classes != null) { // cross-entropy of the class maps (softmax over classes) where a box gives the class
			long k = tg.classes.getShape().get(1), first = all.getShape().get(1) - k;
			NDArray logp = all.get(new NDIndex(":, " + first + ":")).logSoftmax(1);
			classLoss = logp.mul(tg.classes).sum(new int[] {1}, true).mul(tg.classWeight).sum().neg().div(tg.classWeight.sum().maximum(1f));
		}
		if (tg.instance != null) {
			logits = all.get(new NDIndex(":, 0:1"));
			NDArray c = all.get(new NDIndex(":, 1:2"));
			// binary cross-entropy with soft targets: softplus(x) - x t, where the target is known
			NDArray n = tg.instanceWeight.sum().maximum(1f);
			instance = Activation.softPlus(c).sub(c.mul(tg.instance)).mul(tg.instanceWeight).sum().div(n);
		}
		NDArray s = Activation.sigmoid(logits);
		// background: -log(1 - sigmoid(x)) = softplus(x), stable for large x
		NDArray bgCount = tg.background.sum().maximum(1f);
		NDArray bg = Activation.softPlus(logits).mul(tg.background).sum().div(bgCount);

		// pairwise agreement of similar neighbours
		NDArray left = s.get(new NDIndex(":, :, :, :-1")), right = s.get(new NDIndex(":, :, :, 1:"));
		NDArray top = s.get(new NDIndex(":, :, :-1, :")), bottom = s.get(new NDIndex(":, :, 1:, :"));
		NDArray pairCount = tg.pairH.sum().add(tg.pairV.sum()).maximum(1f);
		NDArray pair = same(left, right).mul(tg.pairH).sum().add(same(top, bottom).mul(tg.pairV).sum()).div(pairCount);

		NDArray total = bg.add(pair.mul((float) weights.pairwise()));
		NDArray exact;
		if (tg.exact != null) { // cross-entropy with the outlines: softplus(x) - x t
			exact = Activation.softPlus(logits).sub(logits.mul(tg.exact)).mul(tg.exactWeight).sum().div(tg.exactWeight.sum().maximum(1f));
			total = total.add(exact.mul((float) EXACT_WEIGHT));
		} else exact = bg.zerosLike();
		NDArray cons, met, z;
		if (tg.nConstraints > 0) {
			Shape sh = s.getShape();
			long b = sh.get(0), h = sh.get(2), w = sh.get(3);
			NDArray integral = s.reshape(b, h, w).cumSum(1).cumSum(2).pad(new Shape(1, 0, 1, 0), 0);
			// a zero row on top and a zero column on the left (pad lists the last axis first)
			NDArray flat = integral.reshape(-1);
			NDArray v = flat.take(tg.corners.reshape(-1)).reshape(-1, 4);
			NDArray sums = v.get(new NDIndex(":, 0")).sub(v.get(new NDIndex(":, 1"))).sub(v.get(new NDIndex(":, 2"))).add(v.get(new NDIndex(":, 3")));
			z = sums.sub(tg.target).mul(tg.sign).div(tg.norm);
			cons = LogBarrier.value(z, t).mul(tg.weight).sum();
			met = z.lte(0f).toType(ai.djl.ndarray.types.DataType.FLOAT32, false).mean();
			total = total.add(cons);
		} else {
			cons = bg.zerosLike();
			met = bg.onesLike();
			z = null;
		}
		if (instance != null) total = total.add(instance.mul((float) INSTANCE_WEIGHT));
		else instance = bg.zerosLike();
		if (classLoss != null) total = total.add(classLoss.mul((float) CLASS_WEIGHT));
		else classLoss = bg.zerosLike();
		return new Parts(total, bg, cons, pair, met, z, instance, exact, classLoss);
	}

	private static NDArray same(NDArray a, NDArray b) {
		NDArray p = a.mul(b).add(a.neg().add(1f).mul(b.neg().add(1f)));
		return p.maximum(1e-6f).log().neg();
	}
}
