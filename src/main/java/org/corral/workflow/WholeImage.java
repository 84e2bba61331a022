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

	public record Outcome(ImageMasks.Result result, float[] probability, double scale) {}

	/**
	 * @param objectSize the typical object side in this image, in pixels, when known (0 = from the
	 *                   calibrations when model and image both have one, else estimated: a first
	 *                   pass at scale 1 measures the objects, and the image is masked again at the
	 *                   learned size when they are far from it)
	 */
	public static Outcome mask(ModelRunner model, PlanarImage im, double objectSize) {
		double byCalibration = objectSize > 0 ? 0 : model.scaleForCalibration(im);
		double scale = objectSize > 0 ? model.scaleFor(objectSize) : byCalibration > 0 ? byCalibration : 1;
		float[] prob = model.probability(im, scale, null);
		double learned = model.header().objectSize;
		ImageMasks.Result r = ImageMasks.make(prob, im.width, im.height, learned / scale, 0.5, true);
		if (objectSize <= 0 && byCalibration == 0 && r.count() > 0) {
			double s2 = model.scaleFor(ModelRunner.medianSide(boxes(r)));
			if (s2 != 1) {
				scale = s2;
				prob = model.probability(im, scale, null);
				r = ImageMasks.make(prob, im.width, im.height, learned / scale, 0.5, true);
			}
		}
		return new Outcome(r, prob, scale);
	}

	public static List<Box> boxes(ImageMasks.Result r) {
		List<Box> out = new ArrayList<>();
		for (ImageMasks.ObjectInfo o : r.objects()) out.add(new Box(o.label(), o.x(), o.y(), o.width(), o.height()));
		return out;
	}
}
