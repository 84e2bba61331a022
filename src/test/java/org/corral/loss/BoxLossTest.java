package org.corral.loss;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.Shape;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.corral.boxes.Box;
import org.corral.supervision.Constraint;
import org.corral.supervision.Supervision;
import org.junit.jupiter.api.Test;

class BoxLossTest {
	static final List<LossTerm> TERMS = BoxLoss.terms(LossWeights.defaults(), false, false, 0);

	static Batch batch(NDManager m, int h, int w, float[] background, float[] pairH, float[] pairV) {
		CropTargets t = new CropTargets(List.of()).optPlane(BackgroundTerm.PLANE, background, 1, h, w).optPlane(PairwiseTerm.HORIZONTAL, pairH, 1, h, w - 1)
			.optPlane(PairwiseTerm.VERTICAL, pairV, 1, h - 1, w);
		return new Batch(m, List.of(t));
	}

	/** The integral-image sums of the loss must equal the plain sums over each rectangle. */
	@Test
	void constraintValuesMatchPlainSums() {
		int b = 2, h = 24, w = 20;
		SplittableRandom r = new SplittableRandom(3);
		float[] logits = new float[b * h * w];
		for (int i = 0; i < logits.length; i++) logits[i] = (float) r.nextDouble(-3, 3);
		List<List<Constraint>> per = new ArrayList<>();
		per.add(Supervision.builder(w, h).optBand(3).build(List.of(new Box(1, 0, 0, 7, 9), new Box(2, 12, 15, 8, 9))).constraints);
		per.add(Supervision.builder(w, h).optBand(4).build(List.of(new Box(1, 3, 5, 10, 10))).constraints);
		try (NDManager m = NDManager.newBaseManager()) {
			NDArray x = m.create(logits, new Shape(b, 1, h, w));
			NDArray s = new Outputs(x, false, 0).probability();
			float[] z = ConstraintTerm.z(s, ConstraintTerm.arrays(m, per, s.getShape(), LossWeights.defaults())).toFloatArray();
			int k = 0;
			for (int bi = 0; bi < b; bi++) {
				float[] prob = new float[h * w];
				for (int i = 0; i < prob.length; i++) prob[i] = (float) (1 / (1 + Math.exp(-logits[bi * h * w + i])));
				for (Constraint c : per.get(bi)) assertEquals(c.z(prob, w), z[k++], 2e-4, "constraint " + c);
			}
			assertEquals(k, z.length);
		}
	}

	@Test
	void backgroundTermIsMeanNegativeLogOfOneMinusP() {
		int h = 4, w = 4;
		float[] bg = new float[h * w];
		bg[0] = 1;
		bg[5] = 1;
		float[] logits = new float[h * w];
		logits[0] = 0; // p = 0.5 -> log 2
		logits[5] = 2; // p = 0.8808 -> -log(0.1192)
		try (NDManager m = NDManager.newBaseManager()) {
			Batch batch = batch(m, h, w, bg, new float[h * (w - 1)], new float[(h - 1) * w]);
			float v = BoxLoss.compute(TERMS, new Outputs(m.create(logits, new Shape(1, 1, h, w)), false, 0), batch, 5).part(BackgroundTerm.NAME);
			double expected = (Math.log(2) + Math.log(1 + Math.exp(2))) / 2;
			assertEquals(expected, v, 1e-5);
		}
	}

	@Test
	void pairwiseTermPrefersAgreement() {
		int h = 1, w = 2;
		try (NDManager m = NDManager.newBaseManager()) {
			Batch batch = batch(m, h, w, new float[2], new float[] {1}, new float[0]);
			float agree = BoxLoss.compute(TERMS, new Outputs(m.create(new float[] {4, 4}, new Shape(1, 1, h, w)), false, 0), batch, 5).part(PairwiseTerm.NAME);
			float differ = BoxLoss.compute(TERMS, new Outputs(m.create(new float[] {4, -4}, new Shape(1, 1, h, w)), false, 0), batch, 5).part(PairwiseTerm.NAME);
			assertTrue(agree < 0.05 && differ > 3, agree + " vs " + differ);
		}
	}

	/** The total is the weighted sum of the registered terms, and every term and figure is reported by name. */
	@Test
	void totalIsTheWeightedSumOfTheTermsByName() {
		int h = 6, w = 6;
		SplittableRandom r = new SplittableRandom(5);
		float[] logits = new float[h * w], bg = new float[h * w], ph = new float[h * (w - 1)], pv = new float[(h - 1) * w];
		for (int i = 0; i < logits.length; i++) logits[i] = (float) r.nextDouble(-2, 2);
		for (int i = 0; i < w; i++) bg[i] = 1; // top row known background
		java.util.Arrays.fill(ph, 1);
		LossWeights weights = new LossWeights(1, 1, 0.5, 1);
		List<LossTerm> terms = BoxLoss.terms(weights, false, false, 0);
		try (NDManager m = NDManager.newBaseManager()) {
			CropTargets t = new CropTargets(Supervision.builder(w, h).optBand(2).build(List.of(new Box(1, 1, 2, 4, 3))).constraints)
				.optPlane(BackgroundTerm.PLANE, bg, 1, h, w).optPlane(PairwiseTerm.HORIZONTAL, ph, 1, h, w - 1).optPlane(PairwiseTerm.VERTICAL, pv, 1, h - 1, w);
			BoxLoss.Value v = BoxLoss.compute(terms, new Outputs(m.create(logits, new Shape(1, 1, h, w)), false, 0), new Batch(m, List.of(t)), 5);
			assertEquals(List.of("background", "pairwise", "constraints", "met"), List.copyOf(v.parts().keySet()));
			double expected = v.part("background") + 0.5 * v.part("pairwise") + v.part("constraints");
			assertEquals(expected, v.total().getFloat(), 1e-5);
			assertTrue(v.part("met") >= 0 && v.part("met") <= 1);
		}
	}

	/**
	 * The instance map's cross-entropy enters the total with the weight of {@link LossWeights#instance}
	 * (hand-worked: logits 0 and ln 3 against targets 1 and 0.75 give ln 2 and ln 4 - 0.75 ln 3).
	 */
	@Test
	void theInstanceMapTermCarriesItsWeight() {
		int h = 1, w = 2;
		try (NDManager m = NDManager.newBaseManager()) {
			CropTargets t = new CropTargets(List.of()).optPlane(BackgroundTerm.PLANE, new float[2], 1, h, w).optPlane(PairwiseTerm.HORIZONTAL, new float[1], 1, h, w - 1)
				.optPlane(PairwiseTerm.VERTICAL, new float[0], 1, h - 1, w)
				.optPlane(CrossEntropyTerm.INSTANCE_MAP.target(), new float[] {1, 0.75f}, 1, h, w).optPlane(CrossEntropyTerm.INSTANCE_MAP.known(), new float[] {1, 1}, 1, h, w);
			float[] logits = {0, 0, 0, (float) Math.log(3)}; // object plane, then instance plane
			double expected = (Math.log(2) + Math.log(4) - 0.75 * Math.log(3)) / 2;
			for (double weight : new double[] {1, 5}) {
				List<LossTerm> terms = BoxLoss.terms(new LossWeights(1, 1, 1, weight), false, true, 0);
				BoxLoss.Value v = BoxLoss.compute(terms, new Outputs(m.create(logits, new Shape(1, 2, h, w)), true, 0), new Batch(m, List.of(t)), 5);
				assertEquals(expected, v.part("instance"), 1e-5);
				assertEquals(v.part("background") + v.part("pairwise") + v.part("constraints") + weight * expected, v.total().getFloat(), 1e-5);
			}
			assertEquals(LossWeights.INSTANCE, LossWeights.defaults().instance());
		}
	}

	/** Before the instance map has targets from the box masks, a heavier instance weight is held to 1. */
	@Test
	void theWarmUpHoldsTheInstanceWeightToOne() {
		LossWeights heavy = new LossWeights(2, 3, 4, 5), light = new LossWeights(2, 3, 4, 0.5);
		assertEquals(new LossWeights(2, 3, 4, 1), heavy.warmUp());
		assertEquals(light, light.warmUp());
		assertEquals(Math.min(LossWeights.INSTANCE, LossWeights.WARM_UP_INSTANCE), LossWeights.defaults().warmUp().instance());
	}

	/** A new term (DEVELOPERS.md's example) joins the sum and the reports by its registration alone. */
	@Test
	void anAddedTermIsSummedAndReportedByName() {
		int h = 1, w = 2;
		try (NDManager m = NDManager.newBaseManager()) {
			CropTargets t = new CropTargets(List.of()).optPlane(BackgroundTerm.PLANE, new float[2], 1, h, w).optPlane(PairwiseTerm.HORIZONTAL, new float[1], 1, h, w - 1)
				.optPlane(PairwiseTerm.VERTICAL, new float[0], 1, h - 1, w).optPlane(EntropyTerm.PLANE, new float[] {1, 0}, 1, h, w);
			List<LossTerm> terms = new ArrayList<>(TERMS);
			terms.add(new EntropyTerm(2));
			BoxLoss.Value v = BoxLoss.compute(terms, new Outputs(m.create(new float[] {0, 3}, new Shape(1, 1, h, w)), false, 0), new Batch(m, List.of(t)), 5);
			assertEquals(Math.log(2), v.part(EntropyTerm.NAME), 1e-5, "p = 0.5 in the one boxed pixel: entropy ln 2");
			assertEquals(v.part("background") + v.part("pairwise") + v.part("constraints") + 2 * Math.log(2), v.total().getFloat(), 1e-5);
		}
	}

	/**
	 * The gradient must not depend on the garbage collector: constants of the graph must outlive the
	 * backward pass (see Scalars). Collecting and overwriting freed native memory between the loss and
	 * its backward pass once gave NaN or other gradients.
	 */
	@Test
	void gradientSurvivesACollectionBeforeTheBackwardPass() throws InterruptedException {
		float[] plain = gradient(false), collected = gradient(true);
		for (int i = 0; i < plain.length; i++) assertTrue(Float.isFinite(collected[i]), "finite gradient at " + i);
		org.junit.jupiter.api.Assertions.assertArrayEquals(plain, collected);
	}

	static float[] gradient(boolean collect) throws InterruptedException {
		int h = 16, w = 16;
		SplittableRandom r = new SplittableRandom(9);
		float[] logits = new float[h * w], bg = new float[h * w], ph = new float[h * (w - 1)], pv = new float[(h - 1) * w];
		for (int i = 0; i < logits.length; i++) logits[i] = (float) r.nextDouble(-3, 3);
		for (int i = 0; i < w; i++) bg[i] = 1;
		java.util.Arrays.fill(ph, 1);
		java.util.Arrays.fill(pv, 1);
		List<LossTerm> terms = BoxLoss.terms(new LossWeights(0.7, 0.3, 0.5, 1), false, false, 0);
		try (NDManager m = NDManager.newBaseManager(); ai.djl.training.GradientCollector gc = ai.djl.engine.Engine.getInstance().newGradientCollector()) {
			NDArray x = m.create(logits, new Shape(1, 1, h, w));
			x.setRequiresGradient(true);
			CropTargets t = new CropTargets(Supervision.builder(w, h).optBand(3).build(List.of(new Box(1, 2, 3, 9, 8))).constraints)
				.optPlane(BackgroundTerm.PLANE, bg, 1, h, w).optPlane(PairwiseTerm.HORIZONTAL, ph, 1, h, w - 1).optPlane(PairwiseTerm.VERTICAL, pv, 1, h - 1, w);
			BoxLoss.Value v = BoxLoss.compute(terms, new Outputs(x, false, 0), new Batch(m, List.of(t)), 5);
			if (collect) {
				List<java.nio.ByteBuffer> junk = new ArrayList<>();
				for (int k = 0; k < 3; k++) {
					System.gc();
					Thread.sleep(50);
				}
				for (int k = 0; k < 20000; k++) { // reuse whatever was freed, filled with NaN
					java.nio.ByteBuffer b = java.nio.ByteBuffer.allocateDirect(4).order(java.nio.ByteOrder.nativeOrder());
					b.putFloat(0, Float.NaN);
					junk.add(b);
				}
				gc.backward(v.total());
				junk.clear();
			} else gc.backward(v.total());
			return x.getGradient().toFloatArray();
		}
	}
}
