package org.corral.boxes;

/**
 * One rectangle around one object, in ImageJ's pixel convention: (x, y) is the top-left pixel,
 * width and height count pixels. {@code index} is the 1-based order of the box within its image
 * (it becomes the label value of its mask); {@code slice} is the 1-based stack position, 0 = any.
 */
public record Box(int index, int x, int y, int width, int height, int slice, String name) {

	public Box(int index, int x, int y, int width, int height) {
		this(index, x, y, width, height, 0, "box-" + index);
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
		return new Box(index, nx, ny, nx1 - nx, ny1 - ny, slice, name);
	}

	/** True when the box touches the image border (the object may be cut by it). */
	public boolean touchesBorder(int imageWidth, int imageHeight) {
		return x <= 0 || y <= 0 || x1() >= imageWidth || y1() >= imageHeight;
	}

	public Box scaled(double s) {
		int nx = (int) Math.floor(x * s), ny = (int) Math.floor(y * s);
		int nx1 = (int) Math.ceil(x1() * s), ny1 = (int) Math.ceil(y1() * s);
		return new Box(index, nx, ny, Math.max(1, nx1 - nx), Math.max(1, ny1 - ny), slice, name);
	}

	public Box grown(int by) {
		return new Box(index, x - by, y - by, width + 2 * by, height + 2 * by, slice, name);
	}
}
