package org.corral.train;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.loss.BackgroundTerm;
import org.corral.loss.ClassTerm;
import org.corral.loss.CropTargets;
import org.corral.loss.CrossEntropyTerm;
import org.corral.loss.PairwiseTerm;
import org.corral.supervision.Constraint;
import org.corral.supervision.Supervision;

/**
 * Draws square training crops centred near a random box, with a random flip/90-degree turn and an
 * intensity jitter, and the crop's supervision: known background cropped from the image's, the
 * constraints of the boxes that lie wholly inside the crop, and the pairwise weights. Pixels beyond
 * the image border are mirrored and count as unknown.
 */
final class CropSampler {
	/** One prepared image: normalised pixels, a smoothed copy for the pairwise term, supervision. */
	record Prepared(String name, PlanarImage image, PlanarImage guide, Supervision sup, float[][] bounds, int[] classes) {
		Prepared(String name, PlanarImage image, PlanarImage guide, Supervision sup, float[][] bounds) {
			this(name, image, guide, sup, bounds, null);
		}
	}

	/** One crop: its pixels and what the loss knows of it. */
	record Crop(float[][] channels, CropTargets targets) {}

	/** How much more often crops centre on an outlined object than on a box (measured: README, corrections). */
	static final int EXACT_OVERSAMPLE = 4;

	private final List<Prepared> images;
	private final int[] boxImage, boxIndex;
	private final int size;
	private final LearnSettings settings;
	private final org.corral.supervision.SupervisionSettings recipe;
	private final SplittableRandom rnd;
	private final int nClasses;
	/** Per image: the instance output's target and weight from the network's own box masks, or null (ellipses). */
	private final float[][] maskTarget, maskWeight;
	/** Continued learning: until mask targets exist, the instance output learns nothing (weight 0). */
	private boolean keepInstanceMap;

	/**
	 * @param nClasses number of classes when the images' {@link Prepared#classes} are given, else 0
	 */
	CropSampler(List<Prepared> images, LearnSettings settings, SplittableRandom rnd, int nClasses) {
		this.images = images;
		this.nClasses = nClasses;
		this.size = settings.crop;
		this.settings = settings;
		this.recipe = settings.supervision();
		this.rnd = rnd;
		this.maskTarget = new float[images.size()][];
		this.maskWeight = new float[images.size()][];
		// crops are centred on boxes drawn at random; an outlined object (a correction) is drawn
		// EXACT_OVERSAMPLE times as often, so that a few corrections count
		int n = 0;
		for (Prepared p : images)
			for (Box b : p.sup().boxes) n += b.isExact() ? EXACT_OVERSAMPLE : 1;
		boxImage = new int[n];
		boxIndex = new int[n];
		int k = 0;
		for (int i = 0; i < images.size(); i++)
			for (int b = 0; b < images.get(i).sup().boxes.size(); b++)
				for (int r = 0; r < (images.get(i).sup().boxes.get(b).isExact() ? EXACT_OVERSAMPLE : 1); r++) {
					boxImage[k] = i;
					boxIndex[k++] = b;
				}
	}

	/** From now on the instance output of image {@code i} learns these targets (weight 0 = unknown). */
	void useMaskTargets(int i, float[] target, float[] weight) {
		maskTarget[i] = target;
		maskWeight[i] = weight;
	}

	/** Leave the instance output as it was learned until {@link #useMaskTargets} gives targets. */
	void keepInstanceMap() {
		keepInstanceMap = true;
	}

	Crop next() {
		int pick = rnd.nextInt(boxImage.length);
		int img = boxImage[pick];
		Prepared p = images.get(img);
		Box centre = p.sup().boxes.get(boxIndex[pick]);
		int s = size;
		int ox = (int) Math.round(centre.centreX() - s / 2.0) + rnd.nextInt(-s / 4, s / 4 + 1);
		int oy = (int) Math.round(centre.centreY() - s / 2.0) + rnd.nextInt(-s / 4, s / 4 + 1);
		int d = rnd.nextInt(8);
		int w = p.image().width, h = p.image().height;
		int nc = p.image().nChannels();

		float[][] ch = new float[nc][s * s];
		float[][] guide = new float[nc][s * s];
		float[] bg = new float[s * s], ex = new float[s * s], exw = new float[s * s];
		byte[] inBox = new byte[s * s];
		byte[] known = p.sup().exactKnown, object = p.sup().exactObject;
		int[] cls = p.classes() == null ? null : new int[s * s];
		if (cls != null) java.util.Arrays.fill(cls, -1);
		// a rotated box is learned in crops turned to its own frame, where it is a plain tight box
		Box.Frame turn = centre.isRotated() ? centre.frame() : null;
		int jx = ox - (int) Math.round(centre.centreX() - s / 2.0), jy = oy - (int) Math.round(centre.centreY() - s / 2.0);
		int[] srcOf = new int[s * s]; // (transformed) crop pixel -> image pixel, -1 beyond the image
		for (int y = 0; y < s; y++)
			for (int x = 0; x < s; x++) {
				int ix, iy;
				int dst = target(d, x, y, s);
				if (turn == null) {
					ix = ox + x;
					iy = oy + y;
					int src = PlanarImage.mirror(iy, h) * w + PlanarImage.mirror(ix, w);
					for (int c = 0; c < nc; c++) {
						ch[c][dst] = p.image().channels[c][src];
						guide[c][dst] = p.guide().channels[c][src];
					}
				} else {
					double[] at = turn.toImage(x + 0.5 - s / 2.0 + jx, y + 0.5 - s / 2.0 + jy);
					ix = (int) Math.floor(at[0]);
					iy = (int) Math.floor(at[1]);
					for (int c = 0; c < nc; c++) {
						ch[c][dst] = bilinear(p.image().channels[c], w, h, at[0] - 0.5, at[1] - 0.5);
						guide[c][dst] = bilinear(p.guide().channels[c], w, h, at[0] - 0.5, at[1] - 0.5);
					}
				}
				boolean inside = ix >= 0 && iy >= 0 && ix < w && iy < h;
				int src = iy * w + ix;
				srcOf[dst] = inside ? src : -1;
				if (inside) {
					inBox[dst] = p.sup().inBox[src];
					// unknown ground outside every box: weakly background (LearnSettings.unknownGround)
					bg[dst] = p.sup().background[src] != 0 ? 1 : inBox[dst] == 0 && (known == null || known[src] == 0) ? (float) settings.unknownGround : 0;
					if (cls != null) cls[dst] = p.classes()[src];
					if (known != null && known[src] != 0) {
						exw[dst] = 1;
						ex[dst] = object[src];
					}
				}
			}
		if (settings.augment) Appearance.jitter(ch, p.bounds()[0], p.bounds()[1], s, rnd);
		else for (int c = 0; c < nc; c++) { // intensity jitter only: gain and offset per channel
			float gain = (float) Math.exp(rnd.nextDouble(-0.2, 0.2)), off = (float) rnd.nextDouble(-0.1, 0.1);
			for (int i = 0; i < ch[c].length; i++) ch[c][i] = ch[c][i] * gain + off;
		}
		List<Box> inCrop = new ArrayList<>();
		Box turned = turn == null ? null : inTurnedCrop(centre, jx, jy, s);
		if (turned != null) inCrop.add(transform(d, turned, s)); // only the centre box is upright here
		if (turn == null) for (Box b : p.sup().boxes) {
			if (b.isExact() || b.isRotated()) continue; // outlines: pixels known (ex, exw); rotated boxes: in their own crops
			int x0 = b.x() - ox, y0 = b.y() - oy;
			if (x0 < 0 || y0 < 0 || x0 + b.width() > s || y0 + b.height() > s) continue;
			inCrop.add(transform(d, new Box(b.index(), x0, y0, b.width(), b.height()), s));
		}
		List<Constraint> cons = recipe.forCrop(s, inCrop);
		float[] ph = new float[s * (s - 1)], pv = new float[(s - 1) * s];
		double tol2 = settings.pairTolerance * settings.pairTolerance * nc;
		for (int y = 0; y < s; y++)
			for (int x = 0; x < s; x++) {
				int i = y * s + x;
				if (x + 1 < s && (inBox[i] != 0 || inBox[i + 1] != 0) && dist2(guide, i, i + 1) < tol2) ph[y * (s - 1) + x] = 1;
				if (y + 1 < s && (inBox[i] != 0 || inBox[i + s] != 0) && dist2(guide, i, i + s) < tol2) pv[y * s + x] = 1;
			}
		float[] cen = new float[s * s], cw = new float[s * s];
		if (maskTarget[img] != null) {
			float[] mt = maskTarget[img], mw = maskWeight[img];
			for (int i = 0; i < srcOf.length; i++)
				if (srcOf[i] >= 0) {
					cen[i] = mt[srcOf[i]];
					cw[i] = mw[srcOf[i]];
				}
			return crop(ch, bg, ph, pv, cons, cen, cw, ex, exw, cls);
		}
		if (keepInstanceMap) return crop(ch, bg, ph, pv, cons, cen, cw, ex, exw, cls); // all weights 0
		// early in learning, the instance map of every box that reaches into the crop is the cone of its
		// inscribed ellipse (1 at the centre), in the crop's (transformed) frame
		for (int i = 0; i < cw.length; i++) cw[i] = bg[i] == 1 ? 1 : 0; // known background only
		List<Box> upright = new ArrayList<>();
		if (turn != null) {
			if (turned != null) upright.add(turned);
		} else for (Box b : p.sup().boxes) {
			if (b.isRotated() || b.x1() <= ox || b.y1() <= oy || b.x() >= ox + s || b.y() >= oy + s) continue;
			upright.add(new Box(b.index(), b.x() - ox, b.y() - oy, b.width(), b.height()));
		}
		for (Box u : upright) {
			Box t = transform(d, u, s);
			double cx = t.x() + t.width() / 2.0, cy = t.y() + t.height() / 2.0, rx = t.width() / 2.0, ry = t.height() / 2.0;
			for (int y = Math.max(0, t.y()); y < Math.min(s, t.y1()); y++)
				for (int x = Math.max(0, t.x()); x < Math.min(s, t.x1()); x++) {
					double dx = (x + 0.5 - cx) / rx, dy = (y + 0.5 - cy) / ry;
					float v = (float) Math.max(0, 1 - Math.sqrt(dx * dx + dy * dy));
					int i = y * s + x;
					cen[i] = Math.max(cen[i], v);
					cw[i] = 1;
				}
		}
		return crop(ch, bg, ph, pv, cons, cen, cw, ex, exw, cls);
	}

	/** The crop's planes under the names the loss terms read ({@link org.corral.loss.LossTerm#needs}). */
	private Crop crop(float[][] ch, float[] bg, float[] ph, float[] pv, List<Constraint> cons, float[] cen, float[] cw, float[] ex, float[] exw, int[] cls) {
		int s = size;
		CropTargets t = new CropTargets(cons)
			.optPlane(BackgroundTerm.PLANE, bg, 1, s, s)
			.optPlane(PairwiseTerm.HORIZONTAL, ph, 1, s, s - 1)
			.optPlane(PairwiseTerm.VERTICAL, pv, 1, s - 1, s)
			.optPlane(CrossEntropyTerm.INSTANCE_MAP.target(), cen, 1, s, s)
			.optPlane(CrossEntropyTerm.INSTANCE_MAP.known(), cw, 1, s, s)
			.optPlane(CrossEntropyTerm.OUTLINES.target(), ex, 1, s, s)
			.optPlane(CrossEntropyTerm.OUTLINES.known(), exw, 1, s, s);
		if (cls != null) { // the class of each pixel as one-hot planes, and where it is known
			float[] oneHot = new float[nClasses * s * s], known = new float[s * s];
			for (int q = 0; q < cls.length; q++)
				if (cls[q] >= 0) {
					oneHot[cls[q] * s * s + q] = 1;
					known[q] = 1;
				}
			t.optPlane(ClassTerm.ONE_HOT, oneHot, nClasses, s, s).optPlane(ClassTerm.WEIGHT, known, 1, s, s);
		}
		return new Crop(ch, t);
	}

	/**
	 * The rotated centre box as an upright box of the turned crop (before the flip/turn), when it
	 * lies wholly inside: the crop pixels whose centres fall in its frame.
	 */
	static Box inTurnedCrop(Box b, int jx, int jy, int s) {
		Box.Frame f = b.frame();
		int x0 = (int) Math.ceil(s / 2.0 - jx - f.length() / 2 - 0.5), x1 = (int) Math.floor(s / 2.0 - jx + f.length() / 2 - 0.5);
		int y0 = (int) Math.ceil(s / 2.0 - jy - f.breadth() / 2 - 0.5), y1 = (int) Math.floor(s / 2.0 - jy + f.breadth() / 2 - 0.5);
		if (x0 < 0 || y0 < 0 || x1 >= s || y1 >= s || x1 < x0 || y1 < y0) return null;
		return new Box(b.index(), x0, y0, x1 - x0 + 1, y1 - y0 + 1);
	}

	/** Bilinear value at (x, y) in pixel-centre coordinates, the image mirrored at its borders. */
	static float bilinear(float[] v, int w, int h, double x, double y) {
		int x0 = (int) Math.floor(x), y0 = (int) Math.floor(y);
		double fx = x - x0, fy = y - y0;
		int xa = PlanarImage.mirror(x0, w), xb = PlanarImage.mirror(x0 + 1, w), ya = PlanarImage.mirror(y0, h), yb = PlanarImage.mirror(y0 + 1, h);
		return (float) ((v[ya * w + xa] * (1 - fx) + v[ya * w + xb] * fx) * (1 - fy) + (v[yb * w + xa] * (1 - fx) + v[yb * w + xb] * fx) * fy);
	}

	private static double dist2(float[][] g, int i, int j) {
		double s = 0;
		for (float[] c : g) {
			double d = c[i] - c[j];
			s += d * d;
		}
		return s;
	}

	/** Index in the transformed crop of pixel (x, y): transpose (bit 2), then flip x (bit 0), flip y (bit 1). */
	static int target(int d, int x, int y, int s) {
		int tx = x, ty = y;
		if ((d & 4) != 0) {
			tx = y;
			ty = x;
		}
		if ((d & 1) != 0) tx = s - 1 - tx;
		if ((d & 2) != 0) ty = s - 1 - ty;
		return ty * s + tx;
	}

	/** The same transform as {@link #target} applied to a box. */
	static Box transform(int d, Box b, int s) {
		int x0 = b.x(), y0 = b.y(), x1 = b.x1(), y1 = b.y1();
		if ((d & 4) != 0) {
			int t = x0; x0 = y0; y0 = t;
			t = x1; x1 = y1; y1 = t;
		}
		if ((d & 1) != 0) {
			int t = x0; x0 = s - x1; x1 = s - t;
		}
		if ((d & 2) != 0) {
			int t = y0; y0 = s - y1; y1 = s - t;
		}
		return new Box(b.index(), x0, y0, x1 - x0, y1 - y0);
	}
}
