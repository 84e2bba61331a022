package org.corral.supervision;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;

/**
 * What the boxes of one image (or crop) tell the learner, as compact arrays: the pixels known to
 * be background and the rectangle constraints of every box. Pure Java, no DJL. Background outside
 * the boxes, tightness bands and the box-size bound follow "Bounding boxes for weakly supervised
 * segmentation: Global constraints get close to full supervision" (MIDL 2020); the tightness prior
 * is from "Image segmentation with a bounding box prior" (ICCV 2009). The ring background for
 * partly boxed images, the annotated region and the fill lower bound are ours. Build it through
 * {@link SupervisionSettings}, the one recipe learning and the preview share.
 */
public final class Supervision {
	public final int width, height;
	/** 1 where the pixel is known background, 0 where unknown (inside a box, or outside the region). */
	public final byte[] background;
	/** 1 inside any box (the pairwise term acts there). */
	public final byte[] inBox;
	public final List<Constraint> constraints;
	public final List<Box> boxes;
	/**
	 * Exactly outlined objects (corrections, {@link Box#isExact}): 1 where a pixel is known from an
	 * outline, as object ({@link #exactObject} 1) or as the rest of the outline's bounding box
	 * (background, unless another box claims it); null when no box is exact.
	 */
	public final byte[] exactKnown, exactObject;

	Supervision(int width, int height, byte[] background, byte[] inBox, List<Constraint> constraints, List<Box> boxes, byte[] exactKnown, byte[] exactObject) {
		this.width = width;
		this.height = height;
		this.background = background;
		this.inBox = inBox;
		this.constraints = constraints;
		this.boxes = boxes;
		this.exactKnown = exactKnown;
		this.exactObject = exactObject;
	}

	/** Number of exactly outlined objects. */
	public int exactCount() {
		int n = 0;
		for (Box b : boxes) if (b.isExact()) n++;
		return n;
	}

	/**
	 * Which pixels outside the boxes are known background. {@code FULL}: every object of the image is
	 * boxed (or of the region, when a region mask is given). {@code RING}: only some objects are boxed;
	 * just a ring around each box is taken as background, never inside another box.
	 */
	public enum BackgroundMode { FULL, RING }

	public static Builder builder(int width, int height) {
		return new Builder(width, height);
	}

	public int count(Constraint.Kind k) {
		int n = 0;
		for (Constraint c : constraints) if (c.kind() == k) n++;
		return n;
	}

	public long knownBackground() {
		long n = 0;
		for (byte b : background) n += b;
		return n;
	}

	/** DJL-style builder: settings first, then {@link #build(List)}. */
	public static final class Builder {
		private final int width, height;
		private int band = 5, margin = 0, ring = -1;
		private double fillMin = 0.3, fillMax = 1.0;
		private BackgroundMode mode = BackgroundMode.FULL;
		private byte[] region;

		Builder(int width, int height) {
			this.width = width;
			this.height = height;
		}

		/** Band width w of the tightness prior (lines per band). */
		public Builder optBand(int w) {
			if (w < 1) throw new IllegalArgumentException("band width must be at least 1, got " + w);
			this.band = w;
			return this;
		}

		/** Lines skipped at each side of a box, for boxes drawn loosely. */
		public Builder optMargin(int m) {
			if (m < 0) throw new IllegalArgumentException("margin must not be negative, got " + m);
			this.margin = m;
			return this;
		}

		public Builder optFill(double min, double max) {
			if (min < 0 || max > 1 || min > max) throw new IllegalArgumentException("fill bounds must satisfy 0 <= min <= max <= 1");
			this.fillMin = min;
			this.fillMax = max;
			return this;
		}

		public Builder optBackground(BackgroundMode m) {
			this.mode = m;
			return this;
		}

		/** Ring width for {@link BackgroundMode#RING}; default: a quarter of the box's mean side, at least 3. */
		public Builder optRing(int r) {
			this.ring = r;
			return this;
		}

		/** Annotated region (1 = inside): every object in it is boxed; outside it nothing is known. */
		public Builder optRegion(byte[] region) {
			if (region != null && region.length != width * height) throw new IllegalArgumentException("region size mismatch");
			this.region = region;
			return this;
		}

		/**
		 * Boxes are clipped to the image first; a box cut by the border keeps its band constraints,
		 * since every line of the visible part still crosses the (cut) object.
		 */
		public Supervision build(List<Box> boxes) {
			List<Box> clipped = new ArrayList<>();
			for (Box b : boxes) {
				Box c = b.clip(width, height);
				if (c != null) clipped.add(c);
			}
			byte[] inBox = new byte[width * height];
			for (Box b : clipped)
				for (int y = b.y(); y < b.y1(); y++)
					if (!b.isRotated()) java.util.Arrays.fill(inBox, y * width + b.x(), y * width + b.x1(), (byte) 1);
					else for (int x = b.x(); x < b.x1(); x++) if (b.holds(x, y)) inBox[y * width + x] = 1; // the corners outside the frame are not the box's
			byte[] bg = new byte[width * height];
			if (mode == BackgroundMode.FULL) {
				for (int i = 0; i < bg.length; i++) bg[i] = (byte) (inBox[i] == 0 && (region == null || region[i] != 0) ? 1 : 0);
			} else {
				for (Box b : clipped) {
					int r = ring >= 0 ? ring : Math.max(3, (b.width() + b.height()) / 8);
					for (int y = Math.max(0, b.y() - r); y < Math.min(height, b.y1() + r); y++)
						for (int x = Math.max(0, b.x() - r); x < Math.min(width, b.x1() + r); x++) {
							int i = y * width + x;
							if (inBox[i] == 0) bg[i] = 1;
						}
				}
				if (region != null) // inside a region every object is boxed
					for (int i = 0; i < bg.length; i++) if (region[i] != 0 && inBox[i] == 0) bg[i] = 1;
			}
			List<Constraint> cs = new ArrayList<>();
			// an outline needs no prior (its pixels are known); a rotated box gets its bands in crops
			// turned to its own frame (train.CropSampler)
			for (Box b : clipped) if (!b.isExact() && !b.isRotated()) addBox(cs, b);
			byte[][] exact = exact(clipped);
			return new Supervision(width, height, bg, inBox, cs, clipped, exact[0], exact[1]);
		}

		/**
		 * The pixels known from outlines: each outline's pixels are object, the rest of its bounding
		 * box background, except where a rectangle box reaches in (a touching object drawn as a box)
		 * or another outline claims the pixel.
		 */
		private byte[][] exact(List<Box> boxes) {
			if (boxes.stream().noneMatch(Box::isExact)) return new byte[2][];
			byte[] known = new byte[width * height], object = new byte[width * height];
			for (Box b : boxes)
				if (b.isExact())
					for (int y = b.y(); y < b.y1(); y++)
						for (int x = b.x(); x < b.x1(); x++) known[y * width + x] = 1;
			for (Box b : boxes)
				if (!b.isExact())
					for (int y = b.y(); y < b.y1(); y++)
						for (int x = b.x(); x < b.x1(); x++) known[y * width + x] = 0;
			for (Box b : boxes)
				if (b.isExact())
					for (int y = b.y(); y < b.y1(); y++)
						for (int x = b.x(); x < b.x1(); x++)
							if (b.inMask(x, y)) {
								known[y * width + x] = 1;
								object[y * width + x] = 1;
							}
			return new byte[][] {known, object};
		}

		private void addBox(List<Constraint> cs, Box b) {
			// rows: bands of `band` consecutive rows spanning the box's width; the last band may be
			// narrower when w does not divide the side, and then asks for fewer pixels
			int mY = Math.min(margin, (b.height() - 1) / 2), mX = Math.min(margin, (b.width() - 1) / 2);
			for (int y = b.y() + mY; y < b.y1() - mY; y += band) {
				int y1 = Math.min(y + band, b.y1() - mY);
				int lines = y1 - y;
				cs.add(Constraint.atLeast(Constraint.Kind.BAND, b.index(), b.x(), y, b.x1(), y1, lines, lines));
			}
			for (int x = b.x() + mX; x < b.x1() - mX; x += band) {
				int x1 = Math.min(x + band, b.x1() - mX);
				int lines = x1 - x;
				cs.add(Constraint.atLeast(Constraint.Kind.BAND, b.index(), x, b.y(), x1, b.y1(), lines, lines));
			}
			double area = b.area();
			if (fillMin > 0) cs.add(Constraint.atLeast(Constraint.Kind.FILL_MIN, b.index(), b.x(), b.y(), b.x1(), b.y1(), fillMin * area, area));
			cs.add(Constraint.atMost(Constraint.Kind.FILL_MAX, b.index(), b.x(), b.y(), b.x1(), b.y1(), fillMax * area, area));
		}
	}
}
