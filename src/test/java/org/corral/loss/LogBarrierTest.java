package org.corral.loss;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;

import org.junit.jupiter.api.Test;

/** Against the formula of "Constrained deep networks: Lagrangian optimization via log-barrier extensions" (arXiv:1904.04205, eq. for psi_t). */
class LogBarrierTest {

	@Test
	void valuesFollowThePublishedFormula() {
		double t = 5;
		// barrier side: z = -0.5 <= -1/25  ->  -(1/5) log(0.5)
		assertEquals(-Math.log(0.5) / 5, LogBarrier.value(-0.5, t), 1e-12);
		// linear side: z = 0.2  ->  5*0.2 - (1/5) log(1/25) + 1/5 = 1 + 0.2*log(25) + 0.2
		assertEquals(1 + 0.2 * Math.log(25) + 0.2, LogBarrier.value(0.2, t), 1e-12);
		// z = 0: t*0 - (1/t) log(1/t^2) + 1/t
		assertEquals(2 * Math.log(5) / 5 + 0.2, LogBarrier.value(0, t), 1e-12);
	}

	@Test
	void continuousWithContinuousSlopeAtTheKnee() {
		for (double t : new double[] {1, 5, 30, 200}) {
			double knee = -1 / (t * t), eps = 1e-9;
			assertEquals(LogBarrier.value(knee - eps, t), LogBarrier.value(knee + eps, t), 1e-6, "value at t=" + t);
			assertEquals(LogBarrier.slope(knee - eps, t), LogBarrier.slope(knee + eps, t), 1e-4 * t, "slope at t=" + t);
			assertEquals(t, LogBarrier.slope(knee, t), 1e-9);
		}
	}

	@Test
	void growsWithViolationAndRewardsSlack() {
		double t = 10;
		assertTrue(LogBarrier.value(0.5, t) > LogBarrier.value(0.1, t));
		assertTrue(LogBarrier.value(-0.9, t) < LogBarrier.value(-0.1, t));
	}

	@Test
	void ndArrayVersionMatchesScalarAndIsFinite() {
		try (NDManager m = NDManager.newBaseManager()) {
			float[] z = {-3f, -0.5f, -0.04f, -0.001f, 0f, 0.3f, 2f};
			for (double t : new double[] {5, 30}) {
				float[] v = LogBarrier.value(m.create(z), t).toFloatArray();
				for (int i = 0; i < z.length; i++) {
					assertTrue(Float.isFinite(v[i]));
					assertEquals(LogBarrier.value(z[i], t), v[i], 1e-4 * Math.max(1, Math.abs(v[i])), "z=" + z[i] + " t=" + t);
				}
			}
		}
	}

	@Test
	void gradientIsFiniteOnBothSides() {
		try (NDManager m = NDManager.newBaseManager()) {
			NDArray z = m.create(new float[] {-0.5f, 0.5f});
			z.setRequiresGradient(true);
			try (ai.djl.training.GradientCollector gc = ai.djl.engine.Engine.getInstance().newGradientCollector()) {
				gc.backward(LogBarrier.value(z, 5).sum());
			}
			float[] g = z.getGradient().toFloatArray();
			assertEquals(LogBarrier.slope(-0.5, 5), g[0], 1e-4);
			assertEquals(5, g[1], 1e-4);
		}
	}
}
