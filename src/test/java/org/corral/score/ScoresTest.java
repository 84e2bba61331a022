package org.corral.score;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** Hand-worked examples on 1-row images. */
class ScoresTest {

	@Test
	void perfectMatch() {
		int[] a = {0, 1, 1, 0, 2, 2, 2};
		Scores.Tally t = Scores.compare(a, a);
		assertEquals(1, t.objectDice(), 1e-12);
		assertEquals(1, t.pixelDice(), 1e-12);
		assertEquals(1, t.f1(0.5), 1e-12);
		assertEquals(1, t.meanAP(), 1e-12);
	}

	@Test
	void handWorkedPartialOverlap() {
		// reference: object 1 = pixels 0..3 (4 px), object 2 = pixels 6..7 (2 px)
		// predicted: object 5 = pixels 1..3 (3 px), object 9 = pixel 9 (1 px, false positive)
		int[] ref = {1, 1, 1, 1, 0, 0, 2, 2, 0, 0};
		int[] pred = {0, 5, 5, 5, 0, 0, 0, 0, 0, 9};
		Scores.Tally t = Scores.compare(pred, ref);
		// object 1: overlap 3, Dice 2*3/(4+3) = 6/7, IoU 3/4; object 2: no overlap, 0
		assertEquals((6.0 / 7) / 2, t.objectDice(), 1e-12);
		assertEquals(0.75 / 2, t.objectIoU(), 1e-12);
		// pixels: |R|=6, |P|=4, overlap 3 -> 6/10
		assertEquals(0.6, t.pixelDice(), 1e-12);
		// IoU 0.75 > 0.5: TP=1, FP=1, FN=1 -> P = R = F1 = 0.5
		assertEquals(0.5, t.precision(0.5), 1e-12);
		assertEquals(0.5, t.recall(0.5), 1e-12);
		assertEquals(0.5, t.f1(0.5), 1e-12);
		// TP/(TP+FP+FN): 1/3 for thresholds 0.5..0.70 (5 of them, IoU 0.75 is not > 0.75), 0 after
		assertEquals(5 * (1.0 / 3) / 10, t.meanAP(), 1e-12);
	}

	@Test
	void emptyPredictionScoresZero() {
		int[] ref = {1, 1, 0, 2};
		Scores.Tally t = Scores.compare(new int[4], ref);
		assertEquals(0, t.objectDice(), 1e-12);
		assertEquals(0, t.f1(0.5), 1e-12);
		assertEquals(0, t.meanAP(), 1e-12);
		assertEquals(0, t.precision(0.5), 1e-12);
	}

	@Test
	void pooledTallyIsNotAMeanOfRatios() {
		Scores.Tally a = Scores.compare(new int[] {1, 1}, new int[] {1, 1});
		Scores.Tally b = Scores.compare(new int[] {0, 0, 0}, new int[] {1, 2, 3});
		a.add(b);
		assertEquals(0.25, a.objectDice(), 1e-12); // (1 + 0 + 0 + 0) / 4 reference objects
		assertEquals(2.0 * 1 / (2 * 1 + 0 + 3), a.f1(0.5), 1e-12);
	}
}
