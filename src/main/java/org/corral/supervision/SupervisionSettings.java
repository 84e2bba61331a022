package org.corral.supervision;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;

/**
 * The one recipe that turns boxes into supervision, shared by learning, its crops and the preview,
 * so that what the user is shown is what the network learns from. The defaults are defined here
 * once; the command line, the Fiji commands and the README read them.
 *
 * <p>Band form of the tightness prior with the box-size bound and known background, as in "Bounding
 * boxes for weakly supervised segmentation: Global constraints get close to full supervision" (MIDL
 * 2020); the plain tightness prior is from "Image segmentation with a bounding box prior" (ICCV 2009).
 * The fill lower bound and the tightening of loose boxes are ours.
 *
 * @param band band width w: every band of w adjacent lines of a box holds at least w object pixels
 * @param margin lines of slack at each box side for loosely drawn boxes (boxes are first tightened)
 * @param fillMin the object fills at least this fraction of its box (ours; keeps masks from collapsing)
 * @param fillMax box-size bound: the object fills at most this fraction of its box
 * @param background where background is known when no region is given
 */
public record SupervisionSettings(int band, int margin, double fillMin, double fillMax, Supervision.BackgroundMode background) {
	public static final int DEFAULT_BAND = 5;
	public static final double DEFAULT_FILL_MIN = 0.3, DEFAULT_FILL_MAX = 0.95;
	public static final SupervisionSettings DEFAULTS = new SupervisionSettings(DEFAULT_BAND, 0, DEFAULT_FILL_MIN, DEFAULT_FILL_MAX,
		Supervision.BackgroundMode.RING);

	/**
	 * The supervision of one image, normalised as for learning: loose boxes tightened to the objects
	 * inside them (each side by at most the margin), one line of slack left for the bands; an
	 * annotated region makes every pixel of it outside the boxes background.
	 */
	public Supervision forImage(PlanarImage normalised, List<Box> boxes, byte[] region) {
		List<Box> tight = BoxTightening.tighten(normalised, boxes, margin);
		return builder(normalised.width, normalised.height).optBackground(region != null ? Supervision.BackgroundMode.FULL : background).optRegion(region)
			.build(tight);
	}

	/** The constraints of the (already tightened) boxes that lie wholly inside a square crop. */
	public List<Constraint> forCrop(int size, List<Box> boxesInCrop) {
		return builder(size, size).build(boxesInCrop).constraints;
	}

	private Supervision.Builder builder(int w, int h) {
		return Supervision.builder(w, h).optBand(band).optMargin(Math.min(1, margin)).optFill(fillMin, fillMax);
	}
}
