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
			BoxLoss.Targets tg = new BoxLoss.Targets(m, b, h, w, new float[b * h * w], new float[b * h * (w - 1)], new float[b * (h - 1) * w], per, LossWeights.defaults());
			NDArray x = m.create(logits, new Shape(b, 1, h, w));
			float[] z = BoxLoss.compute(x, tg, 5, LossWeights.defaults()).z().toFloatArray();
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
			BoxLoss.Targets tg = new BoxLoss.Targets(m, 1, h, w, bg, new float[h * (w - 1)], new float[(h - 1) * w], List.of(List.of()), LossWeights.defaults());
			float v = BoxLoss.compute(m.create(logits, new Shape(1, 1, h, w)), tg, 5, LossWeights.defaults()).background().getFloat();
			double expected = (Math.log(2) + Math.log(1 + Math.exp(2))) / 2;
			assertEquals(expected, v, 1e-5);
		}
	}

	@Test
	void pairwiseTermPrefersAgreement() {
		int h = 1, w = 2;
		try (NDManager m = NDManager.newBaseManager()) {
			BoxLoss.Targets tg = new BoxLoss.Targets(m, 1, h, w, new float[2], new float[] {1}, new float[0], List.of(List.of()), LossWeights.defaults());
			float agree = BoxLoss.compute(m.create(new float[] {4, 4}, new Shape(1, 1, h, w)), tg, 5, LossWeights.defaults()).pairwise().getFloat();
			float differ = BoxLoss.compute(m.create(new float[] {4, -4}, new Shape(1, 1, h, w)), tg, 5, LossWeights.defaults()).pairwise().getFloat();
			assertTrue(agree < 0.05 && differ > 3, agree + " vs " + differ);
		}
	}
}
