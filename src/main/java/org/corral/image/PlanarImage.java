package org.corral.image;

/** A 2D multi-channel float image, one array per channel in raster order. The core's image type. */
public final class PlanarImage implements RowReader {
	public final int width, height;
	public final float[][] channels;
	/** Pixel width in {@link #unit} when the image is calibrated, else 0 (metadata only). */
	public double pixelWidth;
	public String unit;

	public PlanarImage(int width, int height, float[][] channels) {
		if (width < 1 || height < 1) throw new IllegalArgumentException("empty image " + width + "x" + height);
		for (float[] c : channels)
			if (c.length != width * height) throw new IllegalArgumentException("channel size mismatch");
		this.width = width;
		this.height = height;
		this.channels = channels;
	}

	public static PlanarImage zeros(int width, int height, int nChannels) {
		return new PlanarImage(width, height, new float[nChannels][width * height]);
	}

	/** A copy of rows {@code y0 .. y1 - 1}, with the calibration. */
	@Override
	public PlanarImage rows(int y0, int y1) {
		RowReader.checkRows(y0, y1, height);
		float[][] c = new float[channels.length][];
		for (int k = 0; k < c.length; k++) c[k] = java.util.Arrays.copyOfRange(channels[k], y0 * width, y1 * width);
		PlanarImage p = new PlanarImage(width, y1 - y0, c);
		p.pixelWidth = pixelWidth;
		p.unit = unit;
		return p;
	}

	@Override
	public int width() {
		return width;
	}

	@Override
	public int height() {
		return height;
	}

	@Override
	public int nChannels() {
		return channels.length;
	}

	@Override
	public PlanarImage all() {
		return this;
	}

	/** This image's pixel width in micrometres, or 0 when it is not calibrated in a known length unit. */
	public double micronsPerPixel() {
		return pixelWidth > 0 ? pixelWidth * micronsPer(unit) : 0;
	}

	/** Micrometres per unit for the length units ImageJ writes; 0 for unknown ones. */
	public static double micronsPer(String unit) {
		if (unit == null) return 0;
		return switch (unit.trim().toLowerCase(java.util.Locale.ROOT)) {
			case "µm", "um", "micron", "microns", "micrometer", "micrometre" -> 1;
			case "nm", "nanometer", "nanometre" -> 1e-3;
			case "mm", "millimeter", "millimetre" -> 1e3;
			case "cm" -> 1e4;
			case "m", "meter", "metre" -> 1e6;
			default -> 0;
		};
	}

	public long pixels() {
		return (long) width * height;
	}

	/** Mirror an index into [0, n) without repeating the edge pixel; works for any offset. */
	public static int mirror(int i, int n) {
		if (n == 1) return 0;
		int period = 2 * (n - 1);
		int k = Math.floorMod(i, period);
		return k < n ? k : period - k;
	}
}
