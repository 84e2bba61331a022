package org.corral.workflow;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.image.RowReader;
import org.corral.instances.BandedImageMasks;
import org.corral.instances.ImageMasks;
import org.corral.predict.ModelRunner;

/** Masks for every object of an image nobody boxed, at the object size the model learned. */
public final class WholeImage {
	private WholeImage() {}

	/**
	 * The objects, the object probability (null for an image masked in bands), the scale used, and
	 * the class maps (none for one kind of object).
	 */
	public record Outcome(ImageMasks.Result result, float[] probability, double scale, float[][] classMaps) {}

	/**
	 * @param objectSize the typical object side in this image, in pixels, when known (0 = from the
	 *                   calibrations when model and image both have one, else estimated: a first
	 *                   pass at scale 1 measures the objects, and the image is masked again at the
	 *                   learned size when they are far from it)
	 */
	public static Outcome mask(ModelRunner model, PlanarImage im, double objectSize) {
		return mask(model, im, objectSize, BandedImageMasks.BAND_ROWS);
	}

	/** As above for an image read in bands of rows: one taller than a band is never held whole as float. */
	public static Outcome mask(ModelRunner model, RowReader im, double objectSize) {
		return im.height() > BandedImageMasks.BAND_ROWS ? inBands(model, im, objectSize, BandedImageMasks.BAND_ROWS) : mask(model, im.all(), objectSize);
	}

	/** As above, in bands of {@code bandRows} rows when the image is taller than that. */
	static Outcome mask(ModelRunner model, PlanarImage im, double objectSize, int bandRows) {
		return im.height > bandRows ? inBands(model, im, objectSize, bandRows) : window(model, im, null, objectSize);
	}

	/**
	 * One window: the whole image, or with {@code bounds} (the whole image's normalisation bounds) a
	 * band of a taller one, which then runs in the band's tiles ({@link ModelRunner#BAND_TILE}).
	 */
	private static Outcome window(ModelRunner model, PlanarImage im, float[][] bounds, double objectSize) {
		double byCalibration = objectSize > 0 ? 0 : model.scaleForCalibration(im);
		double scale = objectSize > 0 ? model.scaleFor(objectSize) : byCalibration > 0 ? byCalibration : 1;
		float[][] maps = model.maps(im, bounds, scale, null, model.imageFlips());
		double learned = model.header().objectSize;
		ImageMasks.Result r = instances(maps[0], model.instanceMap(maps), im, learned / scale, model.imageThreshold());
		if (objectSize <= 0 && byCalibration == 0 && r.count() > 0) {
			// objects cut at probability 0.5 look smaller than the boxes they were learned from: an
			// estimate near the learned size is not trusted, only a clearly different one
			double measured = ModelRunner.medianSide(boxes(r)), f = learned / measured;
			double s2 = f < ESTIMATE_TOLERANCE && f > 1 / ESTIMATE_TOLERANCE ? 1 : model.scaleFor(measured);
			if (s2 != 1) {
				scale = s2;
				maps = model.maps(im, bounds, scale, null, model.imageFlips());
				r = instances(maps[0], model.instanceMap(maps), im, learned / scale, model.imageThreshold());
			}
		}
		return new Outcome(r, maps[0], scale, model.classMaps(maps));
	}

	/**
	 * An image taller than a band is masked band by band ({@link BandedImageMasks}), so that the
	 * network's maps and the instance stage never cover more than a band and its halo: each band is
	 * normalised with the whole image's bounds, and the object size, when neither given nor known
	 * from the calibrations, is estimated on the middle band.
	 */
	static Outcome inBands(ModelRunner model, RowReader im, double objectSize, int band) {
		int w = im.width(), h = im.height();
		float[][] bounds = model.normalisationBounds(im);
		double scale;
		if (objectSize > 0) scale = model.scaleFor(objectSize);
		else {
			double byCalibration = model.scaleForCalibration(im.rows(0, 1)); // a band carries the calibration
			int mid = Math.max(0, h / 2 - band / 2);
			// normalised and tiled as the bands will be
			scale = byCalibration > 0 ? byCalibration : window(model, im.rows(mid, Math.min(h, mid + band)), bounds, 0).scale();
		}
		double s = scale, size = model.header().objectSize / scale;
		int nClasses = model.header().classCount();
		float[][] classMaps = new float[nClasses][];
		for (int k = 0; k < nClasses; k++) classMaps[k] = new float[w * h];
		ImageMasks.Result r = BandedImageMasks.make((y0, y1) -> {
			float[][] maps = model.maps(im.rows(y0, y1), bounds, s, null, model.imageFlips());
			float[][] cm = model.classMaps(maps);
			for (int k = 0; k < nClasses; k++) System.arraycopy(cm[k], 0, classMaps[k], y0 * w, cm[k].length);
			float[] inst = model.instanceMap(maps);
			return inst == null ? new float[][] {maps[0]} : new float[][] {maps[0], inst};
		}, w, h, size, model.imageThreshold(), band, BandedImageMasks.halo(size), null);
		return new Outcome(r, null, scale, classMaps);
	}

	/**
	 * A first-pass size estimate rescales the image only when it differs from the learned size by
	 * more than this factor (measured on the other-look histology: the 1.25 of calibrated sizes
	 * rescaled 3 of 6 images whose boxes were within 1.15 of the learned size).
	 */
	public static final double ESTIMATE_TOLERANCE = 1.6;

	static ImageMasks.Result instances(float[] prob, float[] instanceMap, PlanarImage im, double size, double threshold) {
		return ImageMasks.make(prob, instanceMap, im.width, im.height, size, threshold, ImageMasks.PROMINENCE);
	}

	public static List<Box> boxes(ImageMasks.Result r) {
		List<Box> out = new ArrayList<>();
		for (ImageMasks.ObjectInfo o : r.objects()) out.add(new Box(o.label(), o.x(), o.y(), o.width(), o.height()));
		return out;
	}
}
