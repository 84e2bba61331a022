package org.corral.instances;

import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.CancellationException;
import java.util.function.BooleanSupplier;

/**
 * The whole-image instance stage ({@link ImageMasks}) on an image of any height, band by band, so
 * that its memory depends on the band, not on the image: each band of rows is read with a halo of
 * rows above and below, its objects are found in that window, and the band keeps the objects whose
 * first pixel (raster order) lies in its own rows. An object that crosses a seam is therefore kept
 * once, whole, by the band where it starts.
 * <p>
 * The seam rule: an object comes out as in a run on the whole image when it and the objects it
 * touches lie within {@code halo} rows below the band where it starts, and the watershed that splits
 * it sees no farther than that (its seeds, distances and holes are those of nearby objects). With
 * the default halo of several object sizes this holds for every object but giant ones; a test
 * states it on maps with objects across every seam.
 */
public final class BandedImageMasks {
	private BandedImageMasks() {}

	/** The network's maps for a range of rows of the image: [0] object probability, [1] the instance map or absent. */
	@FunctionalInterface
	public interface MapSource {
		float[][] rows(int y0, int y1);
	}

	/** Rows per band (memory: about 50 bytes per pixel of a window, band plus halos). */
	public static final int BAND_ROWS = 1024;

	/** Rows of context above and below a band: at least 64, and three object sizes, on a multiple of 16 (the default network's pooling grid). */
	public static int halo(double objectSize) {
		int r = (int) Math.ceil(Math.max(64, 3 * objectSize));
		return (r + 15) / 16 * 16;
	}

	/**
	 * @param objectSize typical object side in pixels, as for {@link ImageMasks#make}
	 * @param bandRows   rows per band; an image of at most this many rows is one window, the whole-image run itself
	 */
	public static ImageMasks.Result make(MapSource maps, int w, int h, double objectSize, int bandRows, int halo, BooleanSupplier cancelled) {
		return make(maps, w, h, objectSize, ImageMasks.THRESHOLD, bandRows, halo, cancelled);
	}

	/** As above, objects where the probability reaches {@code threshold}. */
	public static ImageMasks.Result make(MapSource maps, int w, int h, double objectSize, double threshold, int bandRows, int halo, BooleanSupplier cancelled) {
		if (bandRows < 1 || halo < 0) throw new IllegalArgumentException("bandRows must be >= 1 and halo >= 0");
		int[] labels = new int[w * h];
		List<ImageMasks.ObjectInfo> objects = new ArrayList<>();
		for (int c0 = 0; c0 < h; c0 += bandRows) {
			if (cancelled != null && cancelled.getAsBoolean()) throw new CancellationException("masking cancelled");
			int c1 = Math.min(h, c0 + bandRows), a = Math.max(0, c0 - halo), b = Math.min(h, c1 + halo);
			float[][] m = maps.rows(a, b);
			ImageMasks.Result r = ImageMasks.make(m[0], m.length > 1 ? m[1] : null, w, b - a, objectSize, threshold, ImageMasks.PROMINENCE, a, h);
			// objects are numbered by their first pixel, whose row is the top of their bounding box
			int[] id = new int[r.count() + 1];
			for (ImageMasks.ObjectInfo o : r.objects()) {
				if (o.y() < c0 || o.y() >= c1) continue;
				id[o.label()] = objects.size() + 1;
				objects.add(new ImageMasks.ObjectInfo(id[o.label()], o.x(), o.y(), o.width(), o.height(), o.area(), o.meanProbability(), o.confidence(), o.flags()));
			}
			int[] lab = r.labels();
			for (int i = 0, off = a * w; i < lab.length; i++) {
				int k = id[lab[i]];
				if (k > 0 && labels[off + i] == 0) labels[off + i] = k;
			}
		}
		return new ImageMasks.Result(labels, objects.size(), objects);
	}
}
