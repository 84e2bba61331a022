package org.corral.image;

/** Bilinear resampling of images and nearest-neighbour resampling of label images. */
public final class Resample {
	private Resample() {}

	public static PlanarImage bilinear(PlanarImage im, int nw, int nh) {
		if (nw == im.width && nh == im.height) return im;
		float[][] out = new float[im.nChannels()][];
		for (int c = 0; c < im.nChannels(); c++) out[c] = bilinear(im.channels[c], im.width, im.height, nw, nh);
		return new PlanarImage(nw, nh, out);
	}

	public static float[] bilinear(float[] v, int w, int h, int nw, int nh) {
		float[] out = new float[nw * nh];
		double sx = (double) w / nw, sy = (double) h / nh;
		for (int y = 0; y < nh; y++) {
			double fy = Math.max(0, Math.min(h - 1, (y + 0.5) * sy - 0.5));
			int y0 = (int) fy, y1 = Math.min(h - 1, y0 + 1);
			double ay = fy - y0;
			for (int x = 0; x < nw; x++) {
				double fx = Math.max(0, Math.min(w - 1, (x + 0.5) * sx - 0.5));
				int x0 = (int) fx, x1 = Math.min(w - 1, x0 + 1);
				double ax = fx - x0;
				double top = v[y0 * w + x0] * (1 - ax) + v[y0 * w + x1] * ax;
				double bot = v[y1 * w + x0] * (1 - ax) + v[y1 * w + x1] * ax;
				out[y * nw + x] = (float) (top * (1 - ay) + bot * ay);
			}
		}
		return out;
	}

	/** 3x3 mean filter per channel (edges mirrored): a cheap denoiser for intensity comparisons. */
	public static PlanarImage mean3(PlanarImage im) {
		int w = im.width, h = im.height;
		float[][] out = new float[im.nChannels()][w * h];
		for (int c = 0; c < im.nChannels(); c++) {
			float[] v = im.channels[c], o = out[c];
			for (int y = 0; y < h; y++)
				for (int x = 0; x < w; x++) {
					float s = 0;
					for (int dy = -1; dy <= 1; dy++) {
						int yy = PlanarImage.mirror(y + dy, h) * w;
						for (int dx = -1; dx <= 1; dx++) s += v[yy + PlanarImage.mirror(x + dx, w)];
					}
					o[y * w + x] = s / 9f;
				}
		}
		return new PlanarImage(w, h, out);
	}
}
