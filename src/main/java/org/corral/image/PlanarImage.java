package org.corral.image;

/** A 2D multi-channel float image, one array per channel in raster order. The core's image type. */
public final class PlanarImage {
	public final int width, height;
	public final float[][] channels;

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

	public int nChannels() {
		return channels.length;
	}

	public float get(int c, int x, int y) {
		return channels[c][y * width + x];
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
