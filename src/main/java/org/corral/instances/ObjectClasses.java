package org.corral.instances;

/**
 * The class of each object of a label image: the class whose map is highest on average over the
 * object's pixels, and that class's share of the averages as its confidence. Pure Java.
 */
public final class ObjectClasses {
	private ObjectClasses() {}

	/** Class index (-1 for an empty label or without class maps) and confidence of labels 1..n. */
	public record Assigned(int[] index, double[] confidence) {}

	public static Assigned of(int[] labels, int n, float[][] classMaps) {
		int[] idx = new int[n + 1];
		double[] conf = new double[n + 1];
		java.util.Arrays.fill(idx, -1);
		int k = classMaps.length;
		if (k == 0) return new Assigned(idx, conf);
		double[][] sum = new double[n + 1][k];
		for (int i = 0; i < labels.length; i++) {
			int l = labels[i];
			if (l <= 0 || l > n) continue;
			for (int c = 0; c < k; c++) sum[l][c] += classMaps[c][i];
		}
		for (int l = 1; l <= n; l++) {
			double total = 0, best = -1;
			for (int c = 0; c < k; c++) {
				total += sum[l][c];
				if (sum[l][c] > best) {
					best = sum[l][c];
					idx[l] = c;
				}
			}
			if (total <= 0) idx[l] = -1;
			else conf[l] = best / total;
		}
		return new Assigned(idx, conf);
	}

	/** The share of class {@code c} among the class averages of label {@code l} (for a class given by the user). */
	public static double share(int[] labels, int l, float[][] classMaps, int c) {
		double mine = 0, total = 0;
		for (int i = 0; i < labels.length; i++) {
			if (labels[i] != l) continue;
			for (int q = 0; q < classMaps.length; q++) total += classMaps[q][i];
			mine += classMaps[c][i];
		}
		return total <= 0 ? Double.NaN : mine / total;
	}
}
