package org.corral.instances;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;

/**
 * One mask per box from a probability map: inside each box the connected piece with the most
 * probability mass above a threshold, holes filled, the threshold fitted per box so that the mask
 * obeys its box ({@link BoxFit}; without fitting, the given threshold, and lower ones down to
 * {@link #MIN_THRESHOLD} when a box yields nothing). Pixels claimed by
 * two boxes go to the box whose centre is nearer, measured in units of each box's half-sides, and
 * each object then keeps its largest piece, so no pixel belongs to two objects. An exact duplicate of
 * an earlier box gets no pixels and the flag {@code duplicate-of-k}; a box wholly outside the image
 * keeps its row with the flag {@code outside-image}; a nested box wins the pixels near its centre.
 * Label value k is the mask of the k-th box of the list (k = 1..n).
 */
public final class BoxMasks {
	public static final double MIN_THRESHOLD = 0.2;

	private BoxMasks() {}

	/**
	 * How box masks are made: the threshold, whether each mask is fitted to its box ({@link BoxFit}),
	 * the lines of slack at each side (a loose box's margin) and the box-size bound.
	 */
	public record Options(double threshold, boolean fit, int margin, double fillMax) {
		public static final Options DEFAULTS = new Options(ImageMasks.THRESHOLD, true, 0, 0.95);

		public Options withMargin(int m) {
			return new Options(threshold, fit, m, fillMax);
		}
	}

	/** Box masks without fitting: the pixels at or above the threshold (the baselines use this). */
	public static Result make(float[] prob, int w, int h, List<Box> boxes, double threshold) {
		return make(prob, w, h, boxes, new Options(threshold, false, 0, 1));
	}


	/** Per-box quality figures, computed against the box the mask was made for. */
	public record Fit(int index, Box box, long area, double fill, double rowsCrossed, double columnsCrossed,
		double meanProbability, boolean priorMet, List<String> flags) {
		/** A box that got no mask at all (outside the image, duplicate, no such stack position). */
		public static Fit none(int index, Box box, String flag) {
			return new Fit(index, box, 0, 0, 0, 0, 0, false, List.of(flag));
		}

		public Fit renumbered(int newIndex) {
			return new Fit(newIndex, box, area, fill, rowsCrossed, columnsCrossed, meanProbability, priorMet, flags);
		}
	}

	public record Result(int[] labels, List<Fit> fits) {}

	public static Result make(float[] prob, int w, int h, List<Box> boxes, Options opt) {
		int n = boxes.size();
		int[] owner = new int[w * h];
		double[] ownerDist = new double[w * h];
		int[] duplicateOf = new int[n + 1];
		java.util.Map<String, Integer> seen = new java.util.HashMap<>();
		for (int k = 1; k <= n; k++) {
			Box b = boxes.get(k - 1);
			Integer first = seen.putIfAbsent(b.x() + "," + b.y() + "," + b.width() + "," + b.height(), k);
			if (first != null) duplicateOf[k] = first; // the object has its mask already: no pixel twice
		}
		for (int k = 1; k <= n; k++) {
			Box b = boxes.get(k - 1).clip(w, h);
			if (b == null || duplicateOf[k] > 0) continue;
			boolean[] m;
			if (b.isExact()) { // an outlined object (a correction) is its outline
				m = new boolean[b.width() * b.height()];
				for (int y = 0; y < b.height(); y++)
					for (int x = 0; x < b.width(); x++) m[y * b.width() + x] = b.inMask(x + b.x(), y + b.y());
			} else if (b.isRotated()) { // fitted in the box's own frame, where it is a plain tight box
				Box.Frame f = b.frame();
				int lw = frameSide(f.length()), bh = frameSide(f.breadth());
				float[] p = new float[lw * bh];
				for (int j = 0; j < bh; j++)
					for (int i = 0; i < lw; i++) {
						double[] at = f.toImage(i + 0.5 - lw / 2.0, j + 0.5 - bh / 2.0);
						p[j * lw + i] = bilinear(prob, w, h, at[0] - 0.5, at[1] - 0.5);
					}
				boolean[] fm = opt.fit() ? BoxFit.fit(p, lw, bh, opt.threshold(), opt.margin(), opt.fillMax()).mask() : threshold(p, opt.threshold());
				m = new boolean[b.width() * b.height()];
				for (int y = 0; y < b.height(); y++)
					for (int x = 0; x < b.width(); x++) {
						int[] ij = frameCell(f, x + b.x(), y + b.y(), lw, bh);
						m[y * b.width() + x] = ij != null && fm[ij[1] * lw + ij[0]];
					}
			} else if (opt.fit()) {
				float[] p = new float[b.width() * b.height()];
				for (int y = 0; y < b.height(); y++)
					for (int x = 0; x < b.width(); x++) p[y * b.width() + x] = prob[(y + b.y()) * w + x + b.x()];
				m = BoxFit.fit(p, b.width(), b.height(), opt.threshold(), opt.margin(), opt.fillMax()).mask();
			} else m = boxMask(prob, w, b, opt.threshold());
			double cx = boxes.get(k - 1).centreX() - 0.5, cy = boxes.get(k - 1).centreY() - 0.5;
			double rx = boxes.get(k - 1).width() / 2.0, ry = boxes.get(k - 1).height() / 2.0;
			Box.Frame fr = boxes.get(k - 1).frame();
			for (int y = 0; y < b.height(); y++)
				for (int x = 0; x < b.width(); x++) {
					if (!m[y * b.width() + x]) continue;
					int i = (y + b.y()) * w + x + b.x();
					double dx = (x + b.x() - cx) / rx, dy = (y + b.y() - cy) / ry;
					if (fr != null) { // distance in the rotated box's own frame
						double[] uv = fr.toFrame(x + b.x() + 0.5, y + b.y() + 0.5);
						dx = uv[0] / (fr.length() / 2);
						dy = uv[1] / (fr.breadth() / 2);
					}
					double d = dx * dx + dy * dy;
					if (owner[i] == 0 || d < ownerDist[i]) {
						owner[i] = k;
						ownerDist[i] = d;
					}
				}
		}
		// after contested pixels were shared out, an object may be split: keep its largest piece
		int[] labels = new int[w * h];
		List<Fit> fits = new ArrayList<>();
		for (int k = 1; k <= n; k++) {
			Box orig = boxes.get(k - 1);
			Box b = orig.clip(w, h);
			if (b == null) {
				fits.add(Fit.none(k, orig, "outside-image"));
				continue;
			}
			if (duplicateOf[k] > 0) {
				fits.add(Fit.none(k, orig, "duplicate-of-" + duplicateOf[k]));
				continue;
			}
			int bw = b.width(), bh = b.height();
			boolean[] m = new boolean[bw * bh];
			for (int y = 0; y < bh; y++)
				for (int x = 0; x < bw; x++) m[y * bw + x] = owner[(y + b.y()) * w + x + b.x()] == k;
			m = largest(m, bw, bh, null);
			long area = 0;
			double psum = 0;
			boolean[] rows = new boolean[bh], cols = new boolean[bw];
			for (int y = 0; y < bh; y++)
				for (int x = 0; x < bw; x++)
					if (m[y * bw + x]) {
						int i = (y + b.y()) * w + x + b.x();
						labels[i] = k;
						area++;
						psum += prob[i];
						rows[y] = true;
						cols[x] = true;
					}
			double rf = count(rows) / (double) bh, cf = count(cols) / (double) bw;
			double fill = area / (double) b.area();
			List<String> flags = new ArrayList<>();
			if (area == 0) flags.add("empty");
			else {
				if (fill < 0.25) flags.add("low-fill");
				if (rf < 0.9 || cf < 0.9) flags.add("misses-sides");
			}
			if (b.width() != orig.width() || b.height() != orig.height()) flags.add("clipped");
			if (orig.touchesBorder(w, h)) flags.add("touches-border");
			if (Math.min(orig.width(), orig.height()) < 4) flags.add("tiny");
			// the prior after fitting and sharing: every line crossed (margin lines excepted), not larger than allowed
			boolean priorMet = area > 0 && BoxFit.crossed(m, bw, bh, opt.margin()) >= 1 && fill <= opt.fillMax() + 1e-9;
			if (orig.isRotated()) { // the figures of a rotated box in its own frame
				Box.Frame f = orig.frame();
				int lw = frameSide(f.length()), fh = frameSide(f.breadth());
				boolean[] fm = new boolean[lw * fh];
				for (int y = 0; y < bh; y++)
					for (int x = 0; x < bw; x++)
						if (m[y * bw + x]) {
							int[] ij = frameCell(f, x + b.x(), y + b.y(), lw, fh);
							if (ij != null) fm[ij[1] * lw + ij[0]] = true;
						}
				boolean[] fr2 = new boolean[fh], fc2 = new boolean[lw];
				for (int j = 0; j < fh; j++)
					for (int i = 0; i < lw; i++) if (fm[j * lw + i]) { fr2[j] = true; fc2[i] = true; }
				rf = count(fr2) / (double) fh;
				cf = count(fc2) / (double) lw;
				fill = area / (f.length() * f.breadth());
				flags.remove("misses-sides");
				flags.remove("low-fill");
				if (area > 0 && fill < 0.25) flags.add("low-fill");
				if (area > 0 && (rf < 0.9 || cf < 0.9)) flags.add("misses-sides");
				priorMet = area > 0 && BoxFit.crossed(fm, lw, fh, opt.margin()) >= 1 && fill <= opt.fillMax() + 1e-9;
			}
			fits.add(new Fit(k, orig, area, fill, rf, cf, area > 0 ? psum / area : 0, priorMet, flags));
		}
		return new Result(labels, fits);
	}

	/** Pixels of a rotated box's frame grid along one side. */
	static int frameSide(double side) {
		return Math.max(1, (int) Math.round(side));
	}

	/** The frame grid cell (i along the length, j across) of image pixel (x, y), or null outside the frame. */
	static int[] frameCell(Box.Frame f, int x, int y, int lw, int bh) {
		double[] uv = f.toFrame(x + 0.5, y + 0.5);
		int i = (int) Math.floor(uv[0] + lw / 2.0), j = (int) Math.floor(uv[1] + bh / 2.0);
		return i < 0 || j < 0 || i >= lw || j >= bh ? null : new int[] {i, j};
	}

	static boolean[] threshold(float[] p, double t) {
		boolean[] m = new boolean[p.length];
		for (int i = 0; i < p.length; i++) m[i] = p[i] >= t;
		return m;
	}

	/** Bilinear value at (x, y) in pixel-centre coordinates, clamped to the image. */
	static float bilinear(float[] v, int w, int h, double x, double y) {
		x = Math.max(0, Math.min(w - 1, x));
		y = Math.max(0, Math.min(h - 1, y));
		int x0 = (int) Math.floor(x), y0 = (int) Math.floor(y), x1 = Math.min(w - 1, x0 + 1), y1 = Math.min(h - 1, y0 + 1);
		double fx = x - x0, fy = y - y0;
		return (float) ((v[y0 * w + x0] * (1 - fx) + v[y0 * w + x1] * fx) * (1 - fy) + (v[y1 * w + x0] * (1 - fx) + v[y1 * w + x1] * fx) * fy);
	}

	/** The mask of one box on its own: threshold, best component, holes filled (box coordinates). */
	static boolean[] boxMask(float[] prob, int w, Box b, double threshold) {
		int bw = b.width(), bh = b.height();
		for (double t = threshold; t >= MIN_THRESHOLD - 1e-9; t -= 0.1) {
			boolean[] m = new boolean[bw * bh];
			for (int y = 0; y < bh; y++)
				for (int x = 0; x < bw; x++) m[y * bw + x] = prob[(y + b.y()) * w + x + b.x()] >= t;
			if (!Components.any(m)) continue;
			boolean[] best = largest(m, bw, bh, (i) -> prob[(i / bw + b.y()) * w + i % bw + b.x()]);
			Components.fillHoles(best, bw, bh);
			return best;
		}
		return new boolean[bw * bh];
	}

	/** The component with the largest weight sum (pixel count when weight is null). */
	static boolean[] largest(boolean[] m, int w, int h, java.util.function.IntToDoubleFunction weight) {
		int[] cnt = new int[1];
		int[] lab = Components.label(m, w, h, cnt);
		if (cnt[0] <= 1) return m;
		double[] mass = new double[cnt[0] + 1];
		for (int i = 0; i < lab.length; i++) if (lab[i] > 0) mass[lab[i]] += weight == null ? 1 : weight.applyAsDouble(i);
		int best = 1;
		for (int l = 2; l <= cnt[0]; l++) if (mass[l] > mass[best]) best = l;
		return Components.only(lab, best);
	}

	private static int count(boolean[] v) {
		int n = 0;
		for (boolean b : v) if (b) n++;
		return n;
	}
}
