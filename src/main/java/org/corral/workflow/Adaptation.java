package org.corral.workflow;

import java.util.ArrayList;
import java.util.List;

import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.corral.train.TrainingImage;

/**
 * Learning from the boxes one is asked to mask: before masking, the model continues learning on the
 * boxes of the images being masked, with the same loss (or learns from scratch when no model is
 * given). Images are first rescaled so that their boxes have the object size the model knows, so
 * the learned features are reused at their scale. Bounded in steps, seeded and reproducible.
 */
public final class Adaptation {
	private Adaptation() {}

	/**
	 * Steps of continued learning: one per box, at least {@value #MIN_STEPS}, at most {@value #MAX_STEPS}.
	 * The cap keeps a folder of 10 images of about 0.5 MP under a minute on 2 cores (BBBC039's 10
	 * fields of 0.36 MP, 1,237 boxes: mask-boxes end to end 65 s with a cap of 150, 59 s with 120);
	 * across collections 120 steps gave box masks within 0.0015 of 150's (README, "Measured on the
	 * reference sets").
	 */
	public static final int MIN_STEPS = 60, MAX_STEPS = 120;
	/** Learning rate of continued learning: half the learning rate from scratch, as the start is good. */
	public static final double LEARNING_RATE = 1e-3;

	public static int steps(int boxes) {
		return Math.max(MIN_STEPS, Math.min(MAX_STEPS, boxes));
	}

	/**
	 * The settings of continued learning from {@code base} (band, margin, background, seed, threads as
	 * the user set them): the model's network shape, {@link #steps} unless {@code steps} &gt; 0, and no
	 * time cap, so the adapted model is reproducible.
	 */
	public static LearnSettings settings(LearnSettings base, ModelRunner from, int boxes, int steps) {
		LearnSettings s = base.copy();
		s.base = from.header().baseChannels;
		s.levels = from.header().levels;
		s.steps = steps > 0 ? steps : steps(boxes);
		s.minutes = 0;
		s.learningRate = LEARNING_RATE;
		s.validate();
		return s;
	}

	/**
	 * Continues learning {@code from} on the images' boxes ({@code from} null: learns from scratch
	 * with {@code settings} as they are). The result is a model like any other; close it.
	 */
	public static Learner.Result adapt(ModelRunner from, List<TrainingImage> images, LearnSettings settings, Progress progress) {
		if (from == null) return new Learner(settings).learn(images, progress);
		List<TrainingImage> scaled = new ArrayList<>();
		for (TrainingImage ti : images) scaled.add(toModelScale(ti, from));
		return new Learner(settings).optStart(new Learner.Start(from.net(), from.header())).learn(scaled, progress);
	}

	/** The image and its boxes (and region) resized so that its boxes look like the learned objects. */
	static TrainingImage toModelScale(TrainingImage ti, ModelRunner model) {
		return ti.scaled(model.scaleFor(ModelRunner.medianSide(ti.boxes())));
	}
}
