package org.corral.io;

import java.awt.Point;
import java.awt.Rectangle;
import java.awt.image.ColorModel;
import java.awt.image.DataBuffer;
import java.awt.image.DirectColorModel;
import java.awt.image.Raster;
import java.awt.image.RenderedImage;
import java.awt.image.SampleModel;
import java.awt.image.SinglePixelPackedSampleModel;
import java.awt.image.WritableRaster;

import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.RowReader;

/** A picture of label outlines over an image, for a quick look at results. */
public final class Overlays {
	private Overlays() {}

	/**
	 * A colour for label k: hues a golden angle apart so neighbours differ, bright and fully
	 * saturated so they read on grey and on stained tissue. Our own categorical scheme.
	 */
	public static int colour(int k) {
		float hue = (float) ((k * 0.381966) % 1.0);
		return java.awt.Color.HSBtoRGB(hue, 0.85f, 1f) & 0xffffff;
	}

	/**
	 * The outlines drawn over the image, computed a band of rows at a time as the PNG encoder asks
	 * for rows (it asks one row at a time), so a huge image's picture is never held whole; the image
	 * is read in bands too, normalised with the whole image's bounds, so it is never held as float.
	 */
	public static RenderedImage outlines(RowReader raw, int[] labels) {
		return new Picture(raw, labels);
	}

	private static final int[] RGB_MASKS = {0xff0000, 0xff00, 0xff};

	/** A one-tile {@link RenderedImage} whose rows are computed when asked for. */
	private static final class Picture implements RenderedImage {
		private final RowReader raw;
		private final int[] labels;
		private final int w, h;
		private final float[][] bounds;
		private final ColorModel colours = new DirectColorModel(24, RGB_MASKS[0], RGB_MASKS[1], RGB_MASKS[2]);
		private PlanarImage band; // the normalised rows bandTop .. bandTop + band.height - 1
		private int bandTop = -1;

		Picture(RowReader raw, int[] labels) {
			this.raw = raw;
			this.labels = labels;
			this.w = raw.width();
			this.h = raw.height();
			this.bounds = Normalise.bounds(raw, 0.5, 99.5);
		}

		/** Row {@code y} as packed RGB. */
		private void row(int y, int[] line) {
			if (band == null || y < bandTop || y >= bandTop + band.height) {
				bandTop = y / BAND_ROWS * BAND_ROWS;
				band = Normalise.with(raw.rows(bandTop, Math.min(h, bandTop + BAND_ROWS)), bounds);
			}
			for (int x = 0; x < w; x++) {
				int i = y * w + x, j = (y - bandTop) * w + x;
				int l = labels[i];
				boolean edge = l > 0 && (x == 0 || y == 0 || x == w - 1 || y == h - 1
					|| labels[i - 1] != l || labels[i + 1] != l || labels[i - w] != l || labels[i + w] != l);
				if (edge) line[x] = colour(l);
				else if (band.nChannels() >= 3) line[x] = (g(band, 0, j) << 16) | (g(band, 1, j) << 8) | g(band, 2, j);
				else {
					int v = g(band, 0, j);
					line[x] = (v << 16) | (v << 8) | v;
				}
			}
		}

		@Override
		public Raster getData(Rectangle r) {
			WritableRaster out = Raster.createPackedRaster(DataBuffer.TYPE_INT, r.width, r.height, RGB_MASKS, new Point(r.x, r.y));
			return copyData(out);
		}

		@Override
		public WritableRaster copyData(WritableRaster out) {
			if (out == null) out = Raster.createPackedRaster(DataBuffer.TYPE_INT, w, h, RGB_MASKS, null);
			Rectangle r = out.getBounds().intersection(new Rectangle(0, 0, w, h));
			int[] line = new int[w];
			for (int y = r.y; y < r.y + r.height; y++) {
				row(y, line);
				out.setDataElements(r.x, y, r.width, 1, r.x == 0 && r.width == w ? line : java.util.Arrays.copyOfRange(line, r.x, r.x + r.width));
			}
			return out;
		}

		@Override
		public Raster getData() {
			return getData(new Rectangle(0, 0, w, h));
		}

		@Override
		public Raster getTile(int tileX, int tileY) {
			return getData();
		}

		@Override
		public SampleModel getSampleModel() {
			return new SinglePixelPackedSampleModel(DataBuffer.TYPE_INT, w, h, RGB_MASKS);
		}

		@Override
		public ColorModel getColorModel() {
			return colours;
		}

		@Override
		public java.util.Vector<RenderedImage> getSources() {
			return null;
		}

		@Override
		public Object getProperty(String name) {
			return java.awt.Image.UndefinedProperty;
		}

		@Override
		public String[] getPropertyNames() {
			return null;
		}

		// one tile: the whole picture
		@Override public int getWidth() { return w; }
		@Override public int getHeight() { return h; }
		@Override public int getMinX() { return 0; }
		@Override public int getMinY() { return 0; }
		@Override public int getNumXTiles() { return 1; }
		@Override public int getNumYTiles() { return 1; }
		@Override public int getMinTileX() { return 0; }
		@Override public int getMinTileY() { return 0; }
		@Override public int getTileWidth() { return w; }
		@Override public int getTileHeight() { return h; }
		@Override public int getTileGridXOffset() { return 0; }
		@Override public int getTileGridYOffset() { return 0; }
	}

	private static final int BAND_ROWS = 256;

	private static int g(PlanarImage n, int c, int i) {
		return (int) Math.max(0, Math.min(255, n.channels[c][i] * 255));
	}
}
