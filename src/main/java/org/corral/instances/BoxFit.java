package org.corral.instances;

import org.corral.boxes.Box;

/**
 * The mask of one box, made to obey its box after thresholding. A tight box says that its object
 * crosses every row and every column of the box (the tightness prior of "Image segmentation with a
 * bounding box prior", ICCV 2009) and is not larger than the box. Inside each box this picks, among
 * the masks the network's probabilities allow (the heaviest connected piece above a threshold,
 * holes filled, for thresholds from {@code start} down), the one that satisfies those constraints
 * and agrees best with the probabilities.
 */
public final class BoxFit {
	private BoxFit() {}

	/** Lowest threshold tried; thresholds go down in steps of {@value #STEP}. */
	public static final double LOWEST = 0.05, STEP = 0.025;

	/** A box mask (box coordinates) and whether it met the prior. */
	public record Fitted(boolean[] mask, boolean priorMet, double threshold) {}

	/**
	 * @param p probabilities of the box's pixels (box coordinates, row-major, bw x bh)
	 * @param margin lines at each side of the box that need not be crossed (loose boxes)
	 * @param fillMax the largest fraction of the box the object may fill
	 */
	public static Fitted fit(float[] p0, int bw, int bh, double start, int margin, double fillMax, String variant) {
		float[] p = p0;
		if (variant.startsWith("blend")) { // a shape prior: the inscribed ellipse, weighted alpha
			double alpha = Integer.parseInt(variant.replaceAll("[^0-9]", "")) / 100.0;
			p = new float[p0.length];
			for (int y = 0; y < bh; y++)
				for (int x = 0; x < bw; x++) {
					double dx = (x + 0.5 - bw / 2.0) / (bw / 2.0), dy = (y + 0.5 - bh / 2.0) / (bh / 2.0);
					double e = dx * dx + dy * dy <= 1 ? 1 : 0;
					p[y * bw + x] = (float) ((1 - alpha) * p0[y * bw + x] + alpha * e);
				}
			variant = variant.contains("soft") ? "soft" : "tight";
		}
		final float[] q = p;
		double bestScore = Double.NEGATIVE_INFINITY;
		Fitted best = null;
		Fitted first = null;
		double softArea = 0;
		for (float v : p) softArea += v;
		for (double t = start; t >= LOWEST - 1e-9; t -= STEP) {
			boolean[] m = new boolean[bw * bh];
			boolean any = false;
			for (int i = 0; i < m.length; i++) if (p[i] >= t) m[i] = any = true;
			if (!any) continue;
			boolean[] c = BoxMasks.largest(m, bw, bh, i -> q[i]);
			Components.fillHoles(c, bw, bh);
			long area = 0;
			for (boolean b : c) if (b) area++;
			double crossed = crossed(c, bw, bh, margin);
			boolean ok = crossed >= 1 && area <= fillMax * bw * bh;
			if (first == null) first = new Fitted(c, ok, t);
			if (variant.equals("none")) return first;
			if (variant.equals("tight")) {
				if (ok) return new Fitted(c, true, t);
				double score = crossed - (area > fillMax * bw * bh ? 1 : 0);
				if (score > bestScore + 1e-9) {
					bestScore = score;
					best = new Fitted(c, false, t);
				}
				continue;
			}
			if (variant.equals("soft")) { // the area closest to the expected area, among those that cross
				double score = -Math.abs(area - softArea) + (ok ? 1e9 : crossed * 1e6);
				if (score > bestScore) {
					bestScore = score;
					best = new Fitted(c, ok, t);
				}
			}
		}
		if (best != null) return best;
		return first != null ? first : new Fitted(new boolean[bw * bh], false, start);
	}

	/** The smaller of the fractions of rows and of columns (margin lines excepted) the mask crosses. */
	static double crossed(boolean[] m, int bw, int bh, int margin) {
		int mx = Math.min(margin, (bw - 1) / 2), my = Math.min(margin, (bh - 1) / 2);
		boolean[] rows = new boolean[bh], cols = new boolean[bw];
		for (int y = 0; y < bh; y++)
			for (int x = 0; x < bw; x++)
				if (m[y * bw + x]) {
					rows[y] = true;
					cols[x] = true;
				}
		int r = 0, c = 0;
		for (int y = my; y < bh - my; y++) if (rows[y]) r++;
		for (int x = mx; x < bw - mx; x++) if (cols[x]) c++;
		return Math.min(r / (double) (bh - 2 * my), c / (double) (bw - 2 * mx));
	}

	static double ellipse(int x, int y, Box b) {
		double dx = (x + 0.5 - b.width() / 2.0) / (b.width() / 2.0), dy = (y + 0.5 - b.height() / 2.0) / (b.height() / 2.0);
		return dx * dx + dy * dy;
	}
}
