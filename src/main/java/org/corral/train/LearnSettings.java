package org.corral.train;

import org.corral.loss.LossWeights;
import org.corral.supervision.Supervision.BackgroundMode;
import org.corral.supervision.SupervisionSettings;

/**
 * Everything that shapes learning. The defaults are what a user gets without tuning; they were
 * chosen by measurement on the developer reference sets (README, "How the defaults were chosen").
 */
public final class LearnSettings {
	/** Defaults read by the command line, the Fiji commands and the docs. */
	public static final int DEFAULT_STEPS = 400, QUICK_STEPS = 150;
	public static final long DEFAULT_SEED = 1;

	public int base = 16, levels = 4;
	public int crop = 128, batch = 8;
	/** Number of steps; with the same seed and thread count, the same steps give the same model. */
	public int steps = DEFAULT_STEPS;
	/** Time budget in minutes (0 = none): when the steps would take longer, the run is shortened to fit. */
	public double minutes = 5;
	public double learningRate = 2e-3;
	public long seed = DEFAULT_SEED;
	public int band = SupervisionSettings.DEFAULTS.band(), margin = SupervisionSettings.DEFAULTS.margin();
	public double fillMin = SupervisionSettings.DEFAULTS.fillMin(), fillMax = SupervisionSettings.DEFAULTS.fillMax();
	public LossWeights weights = LossWeights.defaults();
	/** Log-barrier t: from tStart, growing geometrically to tMax over the first tRamp of the steps, then held. */
	public double tStart = 5, tMax = 30, tRamp = 0.6;
	/** Two neighbours are "similar" for the pairwise term when their smoothed intensities differ by less. */
	public double pairTolerance = 0.06;
	/**
	 * Where background is known. The safe default, RING, works whether or not every object is boxed;
	 * FULL (every object of each image is boxed) also uses the pixels far from the boxes.
	 */
	public BackgroundMode background = SupervisionSettings.DEFAULTS.background();
	/**
	 * Appearance jitter of the crops beyond gain and offset: stain (RGB), gamma, blur, noise
	 * ({@link Appearance}). Off by default: measured on the other-look histology (learned on the
	 * developer histology set) it did not help, per-object Dice 0.881 with it against 0.882 without
	 * (0.896 against 0.898 adapted). With scale jitter and the unknown ground it lifted that look's
	 * whole images without its boxes (F1 0.679 to 0.703) but cost the developer histology's (0.749 to
	 * 0.715) and every figure of both fluorescence pairs; stain jitter alone gave 0.655 (README, "How
	 * the defaults were chosen").
	 */
	public boolean augment = false;
	/**
	 * Scale jitter j: each learning image is also learned resized by 1 / (1 + j) and by 1 + j (0 =
	 * off), so that objects a little smaller or larger than the learned size look familiar. 0.3 by
	 * default (with {@link #unknownGround}): across collections it raised every figure measured
	 * (BBBC039 to S-BSST265, seed 1: box masks 0.917 / 0.928 to 0.925 / 0.933 not adapted / adapted,
	 * whole-image F1 0.723 / 0.748 to 0.758 / 0.777); within the developer histology whole-image F1
	 * fell by 0.017 without adaptation (README, "How the defaults were chosen").
	 */
	public double scaleJitter = 0.3;
	/**
	 * Weight of the background term on ground that is neither inside a box nor known background
	 * (known background weighs 1; 0 = left out of the loss, as Corral did before this weight existed). Without it the network
	 * learns the ring around each box as background by its nearness to an object, and ground far
	 * from every box stays near 0.45: in a sparse invented field a scale-jittered model took it for
	 * one object covering 13,400 of 20,480 pixels (README). 0.1 keeps the half-boxed BBBC039 test's
	 * unboxed objects at mean probability 0.875 (0.867 with 0).
	 */
	public double unknownGround = 0.1;
	/**
	 * Also learn the instance map (a second output): each object's normalised distance to its own
	 * edge, learned from the network's own fitted box masks ({@link Learner}); whole-image objects are
	 * split along its valleys and must reach its core height. On by default: measured (whole-image F1
	 * / mean AP) BBBC039 to S-BSST265 0.680 / 0.286 to 0.720 / 0.295, adapted 0.543 / 0.220 to 0.745 /
	 * 0.329; histology to its other look, adapted, 0.587 / 0.224 to 0.692 / 0.280; README.
	 */
	public boolean instanceMap = true;
	/**
	 * A heavier instance weight ({@link org.corral.loss.LossWeights#warmUp}) acts from the step where
	 * the instance map learns from the box masks, but when learning from scratch not before this step:
	 * the box masks must have settled first. Measured: switched at step 240 of 400 the box masks held
	 * on the five pairs of the cross-collection protocol (within 0.0013); switched at step 120 of 200
	 * (the suite's BBBC039 reference test) they fell from 0.9527 to 0.9393. Continued learning starts
	 * from settled box masks and switches at its own mask-target step.
	 */
	public int heavyInstanceFrom = 240;
	/** Print/notify progress every this many steps. */
	public int reportEvery = 10;

	public void validate() {
		check(base >= 4 && base <= 128, "network width must be 4..128, got " + base);
		check(levels >= 2 && levels <= 6, "levels must be 2..6, got " + levels);
		check(crop >= 32 && crop % (1 << (levels - 1)) == 0, "crop must be >= 32 and a multiple of " + (1 << (levels - 1)) + ", got " + crop);
		check(batch >= 1, "batch must be >= 1");
		check(steps >= 1, "steps must be at least 1, got " + steps);
		check(minutes >= 0, "time budget must not be negative");
		check(band >= 1, "band width w must be >= 1, got " + band);
		check(margin >= 0, "margin must not be negative, got " + margin);
		check(fillMin >= 0 && fillMax <= 1 && fillMin <= fillMax, "fill bounds must satisfy 0 <= min <= max <= 1");
		check(tStart > 0 && tMax >= tStart, "t must start > 0 and tMax >= tStart");
		check(learningRate > 0, "learning rate must be positive");
		check(scaleJitter >= 0 && scaleJitter <= 1, "scale jitter must be 0..1, got " + scaleJitter);
		check(unknownGround >= 0 && unknownGround <= 1, "unknown ground's weight must be 0..1, got " + unknownGround);
		check(heavyInstanceFrom >= 0, "the heavy instance weight's first step must not be negative, got " + heavyInstanceFrom);
	}

	private static void check(boolean ok, String msg) {
		if (!ok) throw new org.corral.CorralException("Invalid setting: " + msg);
	}

	/** An independent copy, to change for one run. */
	public LearnSettings copy() {
		LearnSettings c = new LearnSettings();
		c.base = base;
		c.levels = levels;
		c.crop = crop;
		c.batch = batch;
		c.steps = steps;
		c.minutes = minutes;
		c.learningRate = learningRate;
		c.seed = seed;
		c.band = band;
		c.margin = margin;
		c.fillMin = fillMin;
		c.fillMax = fillMax;
		c.weights = weights;
		c.tStart = tStart;
		c.tMax = tMax;
		c.tRamp = tRamp;
		c.pairTolerance = pairTolerance;
		c.background = background;
		c.reportEvery = reportEvery;
		c.augment = augment;
		c.scaleJitter = scaleJitter;
		c.unknownGround = unknownGround;
		c.instanceMap = instanceMap;
		c.heavyInstanceFrom = heavyInstanceFrom;
		return c;
	}

	/** The supervision recipe of these settings (learning, its crops and the preview all use it). */
	public SupervisionSettings supervision() {
		return new SupervisionSettings(band, margin, fillMin, fillMax, background);
	}

	public java.util.Map<String, Object> asMap() {
		java.util.Map<String, Object> m = new java.util.LinkedHashMap<>();
		m.put("crop", crop);
		m.put("batch", batch);
		m.put("steps", steps);
		m.put("minutes", minutes);
		m.put("learningRate", learningRate);
		m.put("band", band);
		m.put("margin", margin);
		m.put("fillMin", fillMin);
		m.put("fillMax", fillMax);
		m.put("weightBand", weights.band());
		m.put("weightFill", weights.fill());
		m.put("weightPairwise", weights.pairwise());
		m.put("weightInstance", weights.instance());
		m.put("tStart", tStart);
		m.put("tMax", tMax);
		m.put("tRamp", tRamp);
		m.put("pairTolerance", pairTolerance);
		m.put("background", background.name());
		m.put("augment", augment);
		if (scaleJitter > 0) m.put("scaleJitter", scaleJitter); // absent when off, as in models without it
		if (unknownGround > 0) m.put("unknownGround", unknownGround);
		m.put("instanceMap", instanceMap);
		if (weights.instance() > org.corral.loss.LossWeights.WARM_UP_INSTANCE) m.put("heavyInstanceFrom", heavyInstanceFrom);
		return m;
	}
}
