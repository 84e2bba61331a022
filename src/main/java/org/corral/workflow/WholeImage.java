package org.corral.workflow;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.instances.ImageMasks;
import org.corral.predict.ModelRunner;

/** Masks for every object of an image nobody boxed, at the object size the model learned. */
public final class WholeImage {
	private WholeImage() {}

	/** The objects, the object probability, the scale used, and the class maps (none for one kind of object). */
	public record Outcome(ImageMasks.Result result, float[] probability, double scale, float[][] classMaps) {}

	/**
	 * @param objectSize the typical object side in this image, in pixels, when known (0 = from the
	 *                   calibrations when model and image both have one, else estimated: a first
	 *                   pass at scale 1 measures the objects, and the image is masked again at the
	 *                   learned size when they are far from it)
	 */
	public static Outcome mask(ModelRunner model, PlanarImage im, double objectSize) {
		double byCalibration = objectSize > 0 ? 0 : model.scaleForCalibration(im);
		double scale = objectSize > 0 ? model.scaleFor(objectSize) : byCalibration > 0 ? byCalibration : 1;
		float[][] maps = model.maps(im, scale, null, ModelRunner.IMAGE_FLIPS);
		double learned = model.header().objectSize;
		ImageMasks.Result r = instances(maps[0], model.instanceMap(maps), im, learned / scale);
		if (objectSize <= 0 && byCalibration == 0 && r.count() > 0) {
			// objects cut at probability 0.5 look smaller than the boxes they were learned from: an
			// estimate near the learned size is not trusted, only a clearly different one
			double measured = ModelRunner.medianSide(boxes(r)), f = learned / measured;
			double s2 = f < ESTIMATE_TOLERANCE && f > 1 / ESTIMATE_TOLERANCE ? 1 : model.scaleFor(measured);
			if (s2 != 1) {
				scale = s2;
				maps = model.maps(im, scale, null, ModelRunner.IMAGE_FLIPS);
				r = instances(maps[0], model.instanceMap(maps), im, learned / scale);
			}
		}
		return new Outcome(r, maps[0], scale, model.classMaps(maps));
	}

	/**
	 * A first-pass size estimate rescales the image only when it differs from the learned size by
	 * more than this factor (measured on the other-look histology: the 1.25 of calibrated sizes
	 * rescaled 3 of 6 images whose boxes were within 1.15 of the learned size).
	 */
	public static final double ESTIMATE_TOLERANCE = 1.6;

	static ImageMasks.Result instances(float[] prob, float[] instanceMap, PlanarImage im, double size) {
		return ImageMasks.make(prob, instanceMap, im.width, im.height, size, ImageMasks.THRESHOLD, ImageMasks.PROMINENCE);
	}

	public static List<Box> boxes(ImageMasks.Result r) {
		List<Box> out = new ArrayList<>();
		for (ImageMasks.ObjectInfo o : r.objects()) out.add(new Box(o.label(), o.x(), o.y(), o.width(), o.height()));
		return out;
	}
}
