package org.corral.score;

import java.util.HashMap;
import java.util.Map;

/**
 * Label image against reference label image. Definitions:
 * <ul>
 * <li>per-object Dice / IoU: each reference object against the predicted object that overlaps it
 * most (0 when none does), averaged over reference objects;</li>
 * <li>pixel Dice: foreground (label &gt; 0) of both images;</li>
 * <li>at an IoU threshold: a predicted and a reference object match when their IoU exceeds it
 * (one-to-one for thresholds &ge; 0.5); precision TP/(TP+FP), recall TP/(TP+FN), F1, and
 * TP/(TP+FP+FN) averaged over the thresholds 0.5:0.05:0.95 as mean AP, the form of "Nucleus
 * segmentation across imaging experiments: the 2018 Data Science Bowl" (Caicedo et al., Nature
 * Methods 2019).</li>
 * </ul>
 */
public final class Scores {
	private Scores() {}

	public static final double[] THRESHOLDS = {0.5, 0.55, 0.6, 0.65, 0.7, 0.75, 0.8, 0.85, 0.9, 0.95};

	/** Sums that can be pooled over images before forming ratios. */
	public static final class Tally {
		public double diceSum, iouSum;
		public long refObjects, predObjects;
		public long fgIntersection, fgRef, fgPred;
		public final long[] tp = new long[THRESHOLDS.length];
		/** Dice summed over the pairs matched at IoU &gt; 0.5, and their number. */
		public double matchedDiceSum;
		public long matched;

		public void add(Tally o) {
			diceSum += o.diceSum;
			iouSum += o.iouSum;
			refObjects += o.refObjects;
			predObjects += o.predObjects;
			fgIntersection += o.fgIntersection;
			fgRef += o.fgRef;
			fgPred += o.fgPred;
			for (int i = 0; i < tp.length; i++) tp[i] += o.tp[i];
			matchedDiceSum += o.matchedDiceSum;
			matched += o.matched;
		}

		/** Mean Dice of the objects matched at IoU &gt; 0.5 (how well found objects are outlined). */
		public double matchedDice() {
			return matched == 0 ? Double.NaN : matchedDiceSum / matched;
		}

		public double objectDice() {
			return refObjects == 0 ? Double.NaN : diceSum / refObjects;
		}

		public double objectIoU() {
			return refObjects == 0 ? Double.NaN : iouSum / refObjects;
		}

		public double pixelDice() {
			long d = fgRef + fgPred;
			return d == 0 ? 1 : 2.0 * fgIntersection / d;
		}

		int at(double thr) {
			for (int i = 0; i < THRESHOLDS.length; i++) if (Math.abs(THRESHOLDS[i] - thr) < 1e-9) return i;
			throw new IllegalArgumentException("threshold " + thr + " not tallied");
		}

		public double precision(double thr) {
			return predObjects == 0 ? (refObjects == 0 ? 1 : 0) : tp[at(thr)] / (double) predObjects;
		}

		public double recall(double thr) {
			return refObjects == 0 ? 1 : tp[at(thr)] / (double) refObjects;
		}

		public double f1(double thr) {
			long t = tp[at(thr)];
			long d = 2 * t + (predObjects - t) + (refObjects - t);
			return d == 0 ? 1 : 2.0 * t / d;
		}

		/** Mean over thresholds of TP/(TP+FP+FN). */
		public double meanAP() {
			double s = 0;
			for (int i = 0; i < THRESHOLDS.length; i++) {
				long t = tp[i];
				long d = t + (predObjects - t) + (refObjects - t);
				s += d == 0 ? 1 : t / (double) d;
			}
			return s / THRESHOLDS.length;
		}
	}

	public static Tally compare(int[] pred, int[] ref) {
		if (pred.length != ref.length) throw new IllegalArgumentException("label images differ in size");
		Map<Integer, Long> predArea = new HashMap<>(), refArea = new HashMap<>();
		Map<Long, Long> overlap = new HashMap<>();
		Tally t = new Tally();
		for (int i = 0; i < pred.length; i++) {
			int p = pred[i], r = ref[i];
			if (p > 0) predArea.merge(p, 1L, Long::sum);
			if (r > 0) refArea.merge(r, 1L, Long::sum);
			if (p > 0 && r > 0) {
				overlap.merge(((long) r << 32) | p, 1L, Long::sum);
				t.fgIntersection++;
			}
		}
		t.fgPred = predArea.values().stream().mapToLong(Long::longValue).sum();
		t.fgRef = refArea.values().stream().mapToLong(Long::longValue).sum();
		t.refObjects = refArea.size();
		t.predObjects = predArea.size();
		// best-overlapping predicted object per reference object
		Map<Integer, long[]> best = new HashMap<>(); // r -> {p, overlap}
		for (Map.Entry<Long, Long> e : overlap.entrySet()) {
			int r = (int) (e.getKey() >>> 32), p = (int) (long) e.getKey();
			long o = e.getValue();
			long[] b = best.get(r);
			if (b == null || o > b[1] || (o == b[1] && p < b[0])) best.put(r, new long[] {p, o});
			double iou = o / (double) (refArea.get(r) + predArea.get(p) - o);
			for (int k = 0; k < THRESHOLDS.length; k++) if (iou > THRESHOLDS[k]) t.tp[k]++;
			if (iou > 0.5) {
				t.matched++;
				t.matchedDiceSum += 2.0 * o / (refArea.get(r) + predArea.get(p));
			}
		}
		for (Map.Entry<Integer, Long> e : refArea.entrySet()) {
			long[] b = best.get(e.getKey());
			if (b == null) continue;
			long a = e.getValue(), pa = predArea.get((int) b[0]), o = b[1];
			t.diceSum += 2.0 * o / (a + pa);
			t.iouSum += o / (double) (a + pa - o);
		}
		return t;
	}
}
