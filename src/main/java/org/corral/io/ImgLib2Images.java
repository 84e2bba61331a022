package org.corral.io;

import net.imglib2.Cursor;
import net.imglib2.RandomAccessibleInterval;
import net.imglib2.img.Img;
import net.imglib2.img.array.ArrayImgs;
import net.imglib2.type.numeric.RealType;
import net.imglib2.type.numeric.integer.IntType;
import net.imglib2.view.Views;

import org.corral.CorralException;
import org.corral.image.PlanarImage;
import org.corral.image.RowReader;

/**
 * ImgLib2 images at Corral's boundary: what SciJava scripts ({@code #@ Img}) and other plugins hand
 * over is read a band of rows at a time, and label images go back as an {@link Img}.
 */
public final class ImgLib2Images {
	private ImgLib2Images() {}

	/** Most channels a third axis may hold; a longer third axis is a stack, which is refused. */
	public static final int MAX_CHANNELS = 4;

	/**
	 * A 2D image (X, Y), or X, Y and a short third axis of channels, read through a view of the
	 * requested rows in raster order (the interval's own origin is honoured).
	 */
	public static RowReader rowReader(RandomAccessibleInterval<? extends RealType<?>> img) {
		int nd = img.numDimensions();
		if (nd < 2 || nd > 3)
			throw new CorralException("Corral masks 2D images (X, Y, optionally a channel axis); this image has " + nd + " dimensions");
		long w = img.dimension(0), h = img.dimension(1), nc = nd == 3 ? img.dimension(2) : 1;
		if (nc > MAX_CHANNELS)
			throw new CorralException("The third axis has " + nc + " planes: Corral reads it as channels (at most " + MAX_CHANNELS + "); give one plane of a stack at a time");
		if (w * h > Integer.MAX_VALUE) throw new CorralException("The image is too large for one label image (" + w + "x" + h + ")");
		return new RowReader() {
			@Override
			public int width() {
				return (int) w;
			}

			@Override
			public int height() {
				return (int) h;
			}

			@Override
			public int nChannels() {
				return (int) nc;
			}

			@Override
			public PlanarImage rows(int y0, int y1) {
				RowReader.checkRows(y0, y1, (int) h);
				float[][] ch = new float[(int) nc][(int) (w * (y1 - y0))];
				for (int c = 0; c < nc; c++) {
					long[] min = {img.min(0), img.min(1) + y0}, max = {img.max(0), img.min(1) + y1 - 1};
					RandomAccessibleInterval<? extends RealType<?>> plane = nd == 3 ? Views.hyperSlice(img, 2, img.min(2) + c) : img;
					Cursor<? extends RealType<?>> cur = Views.flatIterable(Views.interval(plane, min, max)).cursor();
					float[] dst = ch[c];
					for (int i = 0; cur.hasNext(); i++) dst[i] = cur.next().getRealFloat();
				}
				return new PlanarImage((int) w, y1 - y0, ch);
			}
		};
	}

	/** A label image (raster order, {@code w} x {@code h}) as an ImgLib2 image sharing the array. */
	public static Img<IntType> labels(int[] labels, int w, int h) {
		return ArrayImgs.ints(labels, w, h);
	}
}
