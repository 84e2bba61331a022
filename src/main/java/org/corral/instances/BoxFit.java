package org.corral.instances;

/**
 * The mask of one box, made to obey its box after thresholding. A tight box says that its object
 * crosses every row and every column of the box (the tightness prior of "Image segmentation with a
 * bounding box prior", ICCV 2009) and fills at most a given fraction of it (the box-size bound).
 * Inside each box this walks the threshold down from {@code start} in steps of {@value #STEP}: at
 * each threshold the candidate mask is the connected piece with the most probability mass, holes
 * filled; the first candidate that meets the prior is taken, so the mask keeps as much of the
 * network's confidence as the box allows. When no threshold meets it, the candidate that crosses
 * the most lines (within the size bound) is taken and the table says the prior was not met.
 *
 * <p>Chosen by measurement (README): on the other-look histology (model learned on the developer
 * histology set) per-object Dice 0.733 at a fixed 0.5, 0.881 with this fit; a graph cut with the
 * prior enforced by pinpointing (the method of the ICCV 2009 paper) gave 0.822, choosing the mask
 * whose area matches the summed probability 0.881, and blending in an ellipse prior 0.857-0.862.
 */
public final class BoxFit {
	private BoxFit() {}

	/** Lowest threshold tried; thresholds go down in steps of {@value #STEP}. */
	public static final double LOWEST = 0.05, STEP = 0.025;

	/** A box mask (box coordinates), whether it met the prior, and the threshold it was cut at. */
	public record Fitted(boolean[] mask, boolean priorMet, double threshold) {}

	/**
	 * @param p probabilities of the box's pixels (box coordinates, row-major, bw x bh)
	 * @param start the first threshold tried (the network's own, 0.5)
	 * @param margin lines at each side of the box that need not be crossed (loose boxes)
	 * @param fillMax the largest fraction of the box the object may fill
	 */
	public static Fitted fit(float[] p, int bw, int bh, double start, int margin, double fillMax) {
		double bestScore = Double.NEGATIVE_INFINITY;
		Fitted best = null;
		for (double t = start; t >= LOWEST - 1e-9; t -= STEP) {
			boolean[] m = new boolean[bw * bh];
			boolean any = false;
			for (int i = 0; i < m.length; i++) if (p[i] >= t) m[i] = any = true;
			if (!any) continue;
			boolean[] c = BoxMasks.largest(m, bw, bh, i -> p[i]);
			Components.fillHoles(c, bw, bh);
			long area = 0;
			for (boolean b : c) if (b) area++;
			double crossed = crossed(c, bw, bh, margin);
			boolean small = area <= fillMax * bw * bh;
			if (crossed >= 1 && small) return new Fitted(c, true, t);
			double score = crossed - (small ? 0 : 1);
			if (score > bestScore + 1e-9) {
				bestScore = score;
				best = new Fitted(c, false, t);
			}
		}
		return best != null ? best : new Fitted(new boolean[bw * bh], false, start);
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
}
