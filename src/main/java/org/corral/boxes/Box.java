package org.corral.boxes;

/**
 * One rectangle around one object, in ImageJ's pixel convention: (x, y) is the top-left pixel,
 * width and height count pixels. {@code index} is the 1-based order of the box within its image
 * (it becomes the label value of its mask); {@code slice} is the 1-based stack position, 0 = any.
 * {@code mask} is null for a box drawn as a rectangle (the tight-box prior applies); for an object
 * whose outline is known exactly (a drawn or corrected outline) it holds width x height values,
 * row by row, 1 = object and 0 = background: the rectangle is then the outline's bounding box.
 * {@code className} is the object's class when the user gave one (ROI group, CSV column), else null.
 */
public record Box(int index, int x, int y, int width, int height, int slice, String name, byte[] mask, String className, Frame frame) {
	/**
	 * A rotated box: centre, side along its long axis ({@code length}), side across it
	 * ({@code breadth}), and the long axis's angle from the image's x axis in degrees (towards +y,
	 * that is clockwise on screen). A point's frame coordinates: u along the length, v across.
	 */
	public record Frame(double cx, double cy, double length, double breadth, double angle) {
		public double cos() {
			return Math.cos(Math.toRadians(angle));
		}

		public double sin() {
			return Math.sin(Math.toRadians(angle));
		}

		/** Image position of frame point (u, v), both measured from the centre. */
		public double[] toImage(double u, double v) {
			return new double[] {cx + u * cos() - v * sin(), cy + u * sin() + v * cos()};
		}

		/** Frame coordinates (u, v) of image point (x, y). */
		public double[] toFrame(double x, double y) {
			double dx = x - cx, dy = y - cy;
			return new double[] {dx * cos() + dy * sin(), -dx * sin() + dy * cos()};
		}

		/** True when the centre of pixel (px, py) lies in the rotated box. */
		public boolean holds(int px, int py) {
			double[] f = toFrame(px + 0.5, py + 0.5);
			return Math.abs(f[0]) <= length / 2 && Math.abs(f[1]) <= breadth / 2;
		}
	}

	/** A rotated box; its x, y, width, height are the pixels its corners span. */
	public static Box rotated(int index, Frame f, int slice, String name, String className) {
		double minX = Double.MAX_VALUE, minY = Double.MAX_VALUE, maxX = -Double.MAX_VALUE, maxY = -Double.MAX_VALUE;
		for (int cu = -1; cu <= 1; cu += 2)
			for (int cv = -1; cv <= 1; cv += 2) {
				double[] c = f.toImage(cu * f.length() / 2, cv * f.breadth() / 2);
				minX = Math.min(minX, c[0]);
				minY = Math.min(minY, c[1]);
				maxX = Math.max(maxX, c[0]);
				maxY = Math.max(maxY, c[1]);
			}
		int x0 = (int) Math.floor(minX), y0 = (int) Math.floor(minY);
		return new Box(index, x0, y0, Math.max(1, (int) Math.ceil(maxX) - x0), Math.max(1, (int) Math.ceil(maxY) - y0), slice, name, null, className, f);
	}

	public Box {
		if (mask != null && mask.length != width * height)
			throw new IllegalArgumentException("mask of " + mask.length + " values for a " + width + "x" + height + " box");
		if (className != null && className.isBlank()) className = null;
	}

	public Box(int index, int x, int y, int width, int height, int slice, String name, byte[] mask, String className) {
		this(index, x, y, width, height, slice, name, mask, className, null);
	}

	public Box(int index, int x, int y, int width, int height, int slice, String name, byte[] mask) {
		this(index, x, y, width, height, slice, name, mask, null, null);
	}

	public Box(int index, int x, int y, int width, int height, int slice, String name) {
		this(index, x, y, width, height, slice, name, null, null, null);
	}

	/** Mean of the box's two sides (a rotated box: its own sides, not the rectangle its corners span). */
	public double meanSide() {
		return frame != null ? (frame.length() + frame.breadth()) / 2 : (width + height) / 2.0;
	}

	/** True for a rotated box ({@link #frame}). */
	public boolean isRotated() {
		return frame != null;
	}

	/** True when pixel (px, py) lies in the box: its rectangle, or its rotated frame. */
	public boolean holds(int px, int py) {
		if (px < x || py < y || px >= x1() || py >= y1()) return false;
		return frame == null || frame.holds(px, py);
	}

	public Box(int index, int x, int y, int width, int height) {
		this(index, x, y, width, height, 0, "box-" + index);
	}

	/** True for an exactly outlined object (a correction), false for a rectangle. */
	public boolean isExact() {
		return mask != null;
	}

	/** 1 when pixel (px, py) of the image lies in this exact object (false outside the box, and for rectangles). */
	public boolean inMask(int px, int py) {
		int lx = px - x, ly = py - y;
		return mask != null && lx >= 0 && ly >= 0 && lx < width && ly < height && mask[ly * width + lx] != 0;
	}

	/** The part of the mask inside the rectangle (nx, ny, nw, nh) of the image; null for a rectangle. */
	private byte[] maskIn(int nx, int ny, int nw, int nh) {
		if (mask == null) return null;
		byte[] m = new byte[nw * nh];
		for (int yy = 0; yy < nh; yy++)
			for (int xx = 0; xx < nw; xx++) m[yy * nw + xx] = (byte) (inMask(nx + xx, ny + yy) ? 1 : 0);
		return m;
	}

	public int x1() {
		return x + width;
	}

	public int y1() {
		return y + height;
	}

	public long area() {
		return (long) width * height;
	}

	public double centreX() {
		return x + width / 2.0;
	}

	public double centreY() {
		return y + height / 2.0;
	}

	/** The part of this box inside a width x height image, or null when nothing is left. */
	public Box clip(int imageWidth, int imageHeight) {
		int nx = Math.max(0, x), ny = Math.max(0, y);
		int nx1 = Math.min(imageWidth, x1()), ny1 = Math.min(imageHeight, y1());
		if (nx1 <= nx || ny1 <= ny) return null;
		if (nx == x && ny == y && nx1 == x1() && ny1 == y1()) return this;
		return new Box(index, nx, ny, nx1 - nx, ny1 - ny, slice, name, maskIn(nx, ny, nx1 - nx, ny1 - ny), className, frame);
	}

	/** True when the box touches the image border (the object may be cut by it). */
	public boolean touchesBorder(int imageWidth, int imageHeight) {
		return x <= 0 || y <= 0 || x1() >= imageWidth || y1() >= imageHeight;
	}

	public Box scaled(double s) {
		int nx = (int) Math.floor(x * s), ny = (int) Math.floor(y * s);
		int nx1 = (int) Math.ceil(x1() * s), ny1 = (int) Math.ceil(y1() * s);
		int nw = Math.max(1, nx1 - nx), nh = Math.max(1, ny1 - ny);
		byte[] m = null;
		if (mask != null) { // nearest neighbour: the pixel whose centre maps to the new pixel's centre
			m = new byte[nw * nh];
			for (int yy = 0; yy < nh; yy++)
				for (int xx = 0; xx < nw; xx++)
					m[yy * nw + xx] = (byte) (inMask((int) Math.floor((nx + xx + 0.5) / s), (int) Math.floor((ny + yy + 0.5) / s)) ? 1 : 0);
		}
		if (frame != null) return rotated(index, new Frame(frame.cx() * s, frame.cy() * s, frame.length() * s, frame.breadth() * s, frame.angle()), slice, name, className);
		return new Box(index, nx, ny, nw, nh, slice, name, m, className, null);
	}

	public Box grown(int by) {
		if (frame != null)
			return rotated(index, new Frame(frame.cx(), frame.cy(), frame.length() + 2 * by, frame.breadth() + 2 * by, frame.angle()), slice, name, className);
		return new Box(index, x - by, y - by, width + 2 * by, height + 2 * by, slice, name, maskIn(x - by, y - by, width + 2 * by, height + 2 * by), className, null);
	}
}
