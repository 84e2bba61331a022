package org.corral.model;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * The JSON header of a model file: what a reader needs to rebuild the network and prepare images
 * the way the network saw them during learning, plus a record of how it was learned.
 */
public final class ModelHeader {
	public static final String FORMAT = "corral-model";
	public static final int VERSION = 1;

	public String format = FORMAT;
	public int formatVersion = VERSION;
	public String createdBy = "Corral";
	public String created;
	// network shape
	public int inChannels;
	public int baseChannels;
	public int levels;
	/**
	 * Output maps: the object probability, then the instance map when learned, then one map per
	 * class when the boxes had two or more classes ({@link #classes}).
	 */
	public int outputs = 1;
	/** Class names, in the order of the class maps; empty for a model of one kind of object. */
	public java.util.List<String> classes = new java.util.ArrayList<>();

	/** Number of class maps (0 for one kind of object). */
	public int classCount() {
		return classes == null || classes.size() < 2 ? 0 : classes.size();
	}

	/** True when the network has the instance map (channel 1). */
	public boolean hasInstanceMap() {
		return outputs - 1 - classCount() == 1;
	}

	/** Channel of the first class map. */
	public int firstClassChannel() {
		return hasInstanceMap() ? 2 : 1;
	}
	// normalisation: per channel percentiles mapped to 0 and 1
	public double normLow;
	public double normHigh;
	/** Median of the mean box side of the learning boxes, in pixels: the object size the model knows. */
	public double objectSize;
	/** Pixel width of the learning images when calibrated, else 0. */
	public double pixelSize;
	public String pixelUnit;
	public long seed;
	/**
	 * Range of each 3x3 convolution's activations on the learning images, for masking in 8 bits
	 * ({@code org.corral.predict.ActivationRanges}); absent in models of earlier versions, which mask in float.
	 */
	public float[] activationRanges;
	/**
	 * How whole images are masked ({@link #WHOLE_IMAGE_THRESHOLD}, {@link #WHOLE_IMAGE_FLIPS}): the
	 * probability threshold of objects and the test-time flips (1 or 4). Models of earlier versions
	 * lack them and mask at 0.5 in one pass; models of the versions that chose them on their own
	 * learning images keep their choice.
	 */
	public double imageThreshold = 0.5;
	public int imageFlips = 1;
	/**
	 * What a model learned now masks whole images with: four test-time flips at probability 0.45, the
	 * same for every model. Measured on the cross-collection protocol (15 cells: five pairs, as learned,
	 * adapted and half boxed; README "Masks for whole images"): F1 / mean AP 0.836 / 0.500 on average,
	 * against 0.826 / 0.487 for the settings each model chose on its own learning images, judged there
	 * against their box masks, where the model is surest and the fitted box masks favour low
	 * thresholds; four flips at 0.5 gave 0.831 / 0.497, at 0.4 0.838 / 0.501 (the fluorescence pairs
	 * lost up to 0.014 mean AP there).
	 */
	public static final double WHOLE_IMAGE_THRESHOLD = 0.45;
	public static final int WHOLE_IMAGE_FLIPS = 4;
	/**
	 * The noise of the noisiest learning image after normalisation (standard deviation, in units of
	 * the normalised range; {@code org.corral.image.Normalise#noise}): masking does not let the
	 * background of an empty or nearly empty field come out noisier. 0 in models of earlier
	 * versions, which normalise every field by its percentiles alone.
	 */
	public double noiseLevel;
	/** Per channel, the median of the learning images' normalised medians: where their background lay (with {@link #noiseLevel}). */
	public float[] backgroundLevel;
	public Map<String, Object> training = new LinkedHashMap<>();
	public Counts counts = new Counts();
	public Scores scores = new Scores();

	/** What the model was learned from, and for how long. */
	public static final class Counts {
		/** The creation time of the model this one continued from (adaptation), else absent. */
		public String continuedFrom;
		public int images, boxes;
		/** Boxes given with their exact outline (corrections). */
		public int outlines;
		public int steps;
		public boolean shortenedByTimeBudget;
		public double secondsPerStep;
	}

	/** Learning's last report: the loss, the share of box constraints met, and each loss term by name. */
	public static final class Scores {
		public double loss = Double.NaN;
		public double constraintsMet = Double.NaN;
		public Map<String, Double> parts = new LinkedHashMap<>();
	}
}
