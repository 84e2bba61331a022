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
	/** Output maps: 1 = object probability; 2 = also the instance map (older files: 1). */
	public int outputs = 1;
	// normalisation: per channel percentiles mapped to 0 and 1
	public double normLow;
	public double normHigh;
	/** Median of the mean box side of the learning boxes, in pixels: the object size the model knows. */
	public double objectSize;
	/** Pixel width of the learning images when calibrated, else 0. */
	public double pixelSize;
	public String pixelUnit;
	public long seed;
	public Map<String, Object> training = new LinkedHashMap<>();
	public Map<String, Object> counts = new LinkedHashMap<>();
	public Map<String, Object> scores = new LinkedHashMap<>();
}
