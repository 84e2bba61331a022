package org.corral.train;

import ai.djl.Device;
import ai.djl.Model;
import ai.djl.engine.Engine;
import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDList;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.Shape;
import ai.djl.nn.Parameter;
import ai.djl.training.DefaultTrainingConfig;
import ai.djl.training.GradientCollector;
import ai.djl.training.Trainer;
import ai.djl.training.initializer.XavierInitializer;
import ai.djl.training.loss.Loss;
import ai.djl.training.optimizer.Optimizer;

import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.concurrent.CancellationException;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.Resample;
import org.corral.loss.Batch;
import org.corral.loss.BoxLoss;
import org.corral.loss.ConstraintTerm;
import org.corral.loss.CropTargets;
import org.corral.loss.LossTerm;
import org.corral.loss.Outputs;
import org.corral.model.ModelHeader;
import org.corral.net.UNet;
import org.corral.supervision.Supervision;

/**
 * Learns a {@link UNet} from boxes alone with the {@link BoxLoss}, on the CPU, with Adam ("Adam: A
 * Method for Stochastic Optimization", ICLR 2015). The schedules (log-
 * barrier t, learning rate) are fractions of the total number of steps, so a longer budget
 * stretches them instead of driving t ever higher (which made the plain method collapse).
 */
public final class Learner {

	/** The learned network, its header, and the manager that owns its parameters (close it). */
	public record Result(UNet net, ModelHeader header, NDManager manager) implements AutoCloseable {
		@Override
		public void close() {
			manager.close();
		}
	}

	/**
	 * A model to continue learning from (adaptation): its parameters are the starting point and its
	 * object size and pixel size are kept, so the caller gives images already rescaled to them.
	 */
	public record Start(UNet net, ModelHeader header) {}

	private final LearnSettings s;
	private Start from;

	public Learner(LearnSettings settings) {
		settings.validate();
		this.s = settings;
	}

	/** Continue from this model instead of from random weights (DJL-style option). */
	public Learner optStart(Start start) {
		this.from = start;
		return this;
	}

	/** The learning images as learning sees them, and what they hold. */
	private record Prepared(List<CropSampler.Prepared> all, int nOriginals, int[] origin, int channels, int boxes, int outlines, List<String> classes,
		List<Double> sides, List<Double> microns) {
		/** The learning images as given (without the scale-jitter copies). */
		List<CropSampler.Prepared> images() {
			return all.subList(0, nOriginals);
		}
	}

	/** What the report and the header need of the run so far. */
	private static final class Run {
		int total;
		LearningRateSchedule rate;
		boolean shortened;
		long start, warm;
		Progress.Report last;
	}

	public Result learn(List<TrainingImage> images, Progress progress) {
		Prepared prep = prepare(images);
		checkStart(prep.channels());
		Engine.getInstance().setRandomSeed((int) s.seed);
		SplittableRandom rnd = new SplittableRandom(s.seed);
		int nClasses = prep.classes().size() < 2 ? 0 : prep.classes().size();
		CropSampler sampler = new CropSampler(prep.all(), s, rnd, nClasses);
		boolean instance = from != null ? from.header().hasInstanceMap() : s.instanceMap;
		int outputs = 1 + (instance ? 1 : 0) + nClasses;
		UNet net = new UNet(prep.channels(), s.base, s.levels, outputs);
		if (from != null && instance) sampler.keepInstanceMap(); // until new targets exist
		// a heavier instance weight from the first step slowed the box masks' learning: it acts only
		// once the map learns from the box masks and they have settled (LossWeights.warmUp)
		List<LossTerm> terms = BoxLoss.terms(s.weights.warmUp(), prep.outlines() > 0, instance, nClasses);
		List<LossTerm> lateTerms = BoxLoss.terms(s.weights, prep.outlines() > 0, instance, nClasses);
		Run run = new Run();
		run.total = s.steps;
		Model model = Model.newInstance("corral");
		model.setBlock(net);
		try (Trainer trainer = model.newTrainer(trainingConfig(run))) {
			trainer.initialize(new Shape(s.batch, prep.channels(), s.crop, s.crop));
			if (from != null) copyParameters(from.net(), net);
			run.start = System.nanoTime();
			run.warm = run.start;
			Map<String, Double> acc = new LinkedHashMap<>();
			int accN = 0;
			for (int step = 1; step <= run.total; step++) {
				if (progress.cancelled()) throw new CancellationException("learning cancelled at step " + step);
				double t = tAt(step, run.total);
				if (instance && step == maskTargetStep(run.total)) maskTargets(net, prep, sampler, trainer.getManager());
				if (instance && terms != lateTerms && step >= heavyInstanceStep(run.total, from != null)) terms = lateTerms;
				step(trainer, sampler, prep.channels(), terms, instance, nClasses, t, step, acc);
				accN++;
				trainer.step();
				fitTimeBudget(run, step);
				if (step % s.reportEvery == 0 || step == run.total) {
					report(run, step, t, acc, accN, progress);
					acc.clear();
					accN = 0;
				}
			}
			ModelHeader h = header(prep, run, outputs, nClasses);
			h.activationRanges = org.corral.predict.ActivationRanges.measure(net, trainer.getManager(),
				prep.images().stream().map(CropSampler.Prepared::image).toList());
			// keep the parameters alive after the trainer closes: move them to a manager we hand out
			NDManager keep = NDManager.newBaseManager();
			for (var pair : net.getParameters()) pair.getValue().getArray().attach(keep);
			return new Result(net, h, keep);
		} finally {
			model.close(); // the parameters were moved to the manager handed out (or are dropped with it on failure)
		}
	}

	/**
	 * Normalises every image and builds its supervision; refuses mixed channels and runs without
	 * boxes. With scale jitter, each image with a box also comes resized by 1 / (1 + j) and 1 + j,
	 * after the originals: crops are drawn from all of them alike.
	 */
	private Prepared prepare(List<TrainingImage> images) {
		if (images.isEmpty()) throw new CorralException("Nothing to learn from: no images");
		int nc = images.get(0).image().nChannels();
		int nBoxes = 0;
		List<String> classes = classes(images);
		List<CropSampler.Prepared> prepared = new ArrayList<>();
		List<TrainingImage> boxed = new ArrayList<>();
		List<Double> sides = new ArrayList<>(), microns = new ArrayList<>();
		for (TrainingImage ti : images) {
			microns.add(ti.image().micronsPerPixel());
			if (ti.image().nChannels() != nc)
				throw new CorralException("Image " + ti.name() + " has " + ti.image().nChannels() + " channel(s), the first image " + nc + "; all learning images need the same channels");
			CropSampler.Prepared p = prepared(ti, ti.name(), classes);
			if (p == null) continue;
			prepared.add(p);
			boxed.add(ti);
			nBoxes += p.sup().boxes.size();
			for (Box b : ti.boxes()) sides.add(b.meanSide()); // as drawn: masking sees boxes drawn alike
		}
		if (nBoxes == 0) throw new CorralException("Nothing to learn from: none of the " + images.size() + " image(s) has a box inside it");
		int nExact = prepared.stream().mapToInt(p -> p.sup().exactCount()).sum();
		int originals = prepared.size();
		List<Integer> origin = new ArrayList<>();
		for (int j = 0; j < originals; j++) origin.add(j);
		if (s.scaleJitter > 0)
			for (double f : new double[] {1 / (1 + s.scaleJitter), 1 + s.scaleJitter})
				for (int j = 0; j < originals; j++) {
					TrainingImage ti = boxed.get(j);
					CropSampler.Prepared p = prepared(ti.scaled(f), ti.name() + " x" + f, classes);
					if (p == null) continue;
					prepared.add(p);
					origin.add(j);
				}
		return new Prepared(prepared, originals, origin.stream().mapToInt(Integer::intValue).toArray(), nc, nBoxes, nExact, classes, sides, microns);
	}

	/** One image as learning sees it (normalised, smoothed guide, supervision), or null when no box lies inside it. */
	private CropSampler.Prepared prepared(TrainingImage ti, String name, List<String> classes) {
		PlanarImage norm = Normalise.percentiles(ti.image());
		Supervision sup = s.supervision().forImage(norm, ti.boxes(), ti.region());
		if (sup.boxes.isEmpty()) return null;
		return new CropSampler.Prepared(name, norm, Resample.mean3(norm), sup, Normalise.bounds(ti.image(), Normalise.LOW, Normalise.HIGH),
			classes.size() < 2 ? null : classMap(sup, classes));
	}

	private void checkStart(int nc) {
		if (from != null && (from.header().inChannels != nc || from.header().baseChannels != s.base || from.header().levels != s.levels))
			throw new CorralException("Cannot continue from the model: it was learned on " + from.header().inChannels + "-channel images with width "
				+ from.header().baseChannels + " and " + from.header().levels + " levels; these images have " + nc + " channel(s)");
	}

	/** Adam with the warm-up and cosine schedule over the run's (possibly shortened) length. */
	private DefaultTrainingConfig trainingConfig(Run run) {
		run.rate = new LearningRateSchedule(s.learningRate, run.total);
		// DJL's config requires a loss; the trainer never calls it, BoxLoss is computed by hand in step()
		return new DefaultTrainingConfig(Loss.l2Loss())
			.optOptimizer(Optimizer.adam().optLearningRateTracker(run.rate).build())
			.optInitializer(new XavierInitializer(XavierInitializer.RandomType.GAUSSIAN, XavierInitializer.FactorType.IN, 2), Parameter.Type.WEIGHT)
			.optDevices(new Device[] {Device.cpu()});
	}

	/** Same block structure: parameters (and batch-norm statistics) in the same order. */
	private static void copyParameters(UNet source, UNet target) {
		var src = source.getParameters();
		var to = target.getParameters();
		for (int i = 0; i < to.size(); i++) src.get(i).getValue().getArray().copyTo(to.get(i).getValue().getArray());
	}

	/** One batch: crops drawn, forward, loss, backward; adds the loss and its parts to {@code acc}. */
	private void step(Trainer trainer, CropSampler sampler, int nc, List<LossTerm> terms, boolean instance, int nClasses, double t, int step, Map<String, Double> acc) {
		int b = s.batch, c = s.crop;
		float[] x = new float[b * nc * c * c];
		List<CropTargets> targets = new ArrayList<>(b);
		for (int i = 0; i < b; i++) {
			CropSampler.Crop cr = sampler.next();
			for (int ch = 0; ch < nc; ch++) System.arraycopy(cr.channels()[ch], 0, x, (i * nc + ch) * c * c, c * c);
			targets.add(cr.targets());
		}
		try (NDManager sm = trainer.getManager().newSubManager(); GradientCollector gc = trainer.newGradientCollector()) {
			NDArray in = sm.create(x, new Shape(b, nc, c, c));
			NDArray logits = trainer.forward(new NDList(in)).singletonOrThrow();
			BoxLoss.Value v = BoxLoss.compute(terms, new Outputs(logits, instance, nClasses), new Batch(sm, targets), t);
			float loss = v.total().getFloat();
			requireFinite(loss, step, s.base);
			gc.backward(v.total());
			acc.merge(LOSS, (double) loss, Double::sum);
			for (String name : v.parts().keySet()) acc.merge(name, (double) v.part(name), Double::sum);
		}
	}

	private static final String LOSS = "loss";

	/**
	 * The time budget is a cap: when the remaining steps will not fit, the run (and with it the t and
	 * learning-rate schedules) is shortened; the header records it.
	 */
	private void fitTimeBudget(Run run, int step) {
		double elapsed = (System.nanoTime() - run.start) / 1e9;
		if (step == 2) run.warm = System.nanoTime();
		if (s.minutes > 0 && step >= 12 && (step - 12) % 25 == 0) {
			double sps = (System.nanoTime() - run.warm) / 1e9 / (step - 2);
			int fit = (int) (step + (s.minutes * 60 - elapsed) / sps);
			if (fit < run.total) {
				run.total = Math.max(step + 1, fit);
				run.rate.setTotal(run.total);
				run.shortened = true;
			}
		}
	}

	private void report(Run run, int step, double t, Map<String, Double> acc, int n, Progress progress) {
		double sps = (System.nanoTime() - run.start) / 1e9 / step;
		Map<String, Double> parts = new LinkedHashMap<>();
		for (var e : acc.entrySet()) if (!e.getKey().equals(LOSS)) parts.put(e.getKey(), e.getValue() / n);
		run.last = new Progress.Report(step, run.total, acc.get(LOSS) / n, parts, t, sps, sps * (run.total - step));
		progress.report(run.last);
	}

	private ModelHeader header(Prepared prep, Run run, int outputs, int nClasses) {
		ModelHeader h = new ModelHeader();
		h.created = Instant.now().toString();
		h.inChannels = prep.channels();
		h.baseChannels = s.base;
		h.levels = s.levels;
		h.outputs = outputs;
		if (nClasses > 0) h.classes = prep.classes();
		h.normLow = Normalise.LOW;
		h.normHigh = Normalise.HIGH;
		// where empty fields are mapped to (Normalise.bounds with a noise level): as the learning images were
		h.noiseLevel = noiseLevel(prep.images());
		h.backgroundLevel = backgroundLevel(prep.images());
		if (from != null) h.noiseLevel = Math.max(h.noiseLevel, from.header().noiseLevel);
		h.objectSize = from != null ? from.header().objectSize : median(prep.sides());
		h.imageThreshold = ModelHeader.WHOLE_IMAGE_THRESHOLD;
		h.imageFlips = ModelHeader.WHOLE_IMAGE_FLIPS;
		// the pixel size is remembered only when every learning image is calibrated alike
		List<Double> microns = prep.microns();
		if (from != null) {
			h.pixelSize = from.header().pixelSize;
			h.pixelUnit = from.header().pixelUnit;
		} else if (!microns.contains(0.0) && java.util.Collections.max(microns) < 1.01 * java.util.Collections.min(microns)) {
			h.pixelSize = median(microns);
			h.pixelUnit = "micron";
		}
		h.seed = s.seed;
		h.training = s.asMap();
		if (from != null) h.counts.continuedFrom = from.header().created;
		h.counts.images = prep.images().size();
		h.counts.boxes = prep.boxes();
		h.counts.outlines = prep.outlines();
		h.counts.steps = run.total;
		h.counts.shortenedByTimeBudget = run.shortened;
		h.counts.secondsPerStep = (System.nanoTime() - run.start) / 1e9 / run.total;
		if (run.last != null) {
			h.scores.loss = run.last.loss();
			h.scores.constraintsMet = run.last.part(ConstraintTerm.MET);
			for (var e : run.last.parts().entrySet()) if (!e.getKey().equals(ConstraintTerm.MET)) h.scores.parts.put(e.getKey(), e.getValue());
		}
		return h;
	}

	/**
	 * The instance map learns from the network's own box masks once these are good: from this
	 * fraction of the run on (when the log-barrier t reaches its cap). Before that, learning from
	 * scratch gives it each box's inscribed-ellipse cone as a start, and continued learning leaves it
	 * as it is. Measured on the other-look histology: from 0.3 of the run, adapted whole-image F1 0.500
	 * against 0.640 from 0.6.
	 */
	static final double MASK_TARGET_FROM = 0.6;

	static int maskTargetStep(int total) {
		return Math.max(1, (int) Math.round(MASK_TARGET_FROM * total));
	}

	/** The step from which a heavier instance weight acts ({@link LearnSettings#heavyInstanceFrom}). */
	int heavyInstanceStep(int total, boolean continued) {
		return continued ? maskTargetStep(total) : Math.max(maskTargetStep(total), s.heavyInstanceFrom);
	}

	/**
	 * The instance output's targets from the network's own masks of the boxes: each image is masked
	 * with the network as it is, each mask fitted to its box, and the normalised distance of those
	 * masks ({@link org.corral.instances.DistanceTargets}) becomes the target inside the boxes, 0 on
	 * known background. A scale-jitter copy takes its original's map, resized, fitted to its own
	 * boxes: one network pass per original instead of 3.3 times its pixels (measured, learning on
	 * S-BSST265's 10 images: 400 steps 233 s before, 195 s now, peak memory 4.0 GiB before, 3.5 now,
	 * the same box masks; README).
	 */
	private void maskTargets(UNet net, Prepared prep, CropSampler sampler, NDManager parent) {
		List<CropSampler.Prepared> all = prep.all();
		float[][] maps = new float[prep.nOriginals()][];
		try (NDManager m = parent.newSubManager()) {
			// the images as learning sees them, already normalised; one pass each, as whole images are masked
			// in the learning engine, as learning is: the learned model does not depend on whether ONNX
			// Runtime loads here, and learning holds no second engine's buffers (measured: the same figures
			// to the fourth decimal as with ONNX Runtime's tiles, as the targets come from thresholded masks)
			org.corral.predict.TiledPredictor predictor = new org.corral.predict.TiledPredictor(net, m).optEngine(org.corral.predict.TiledPredictor.Engine.DJL);
			for (int i = 0; i < maps.length; i++) maps[i] = predictor.predictMaps(all.get(i).image(), null)[0];
		}
		for (int i = 0; i < all.size(); i++) {
			int o = prep.origin()[i];
			PlanarImage im = all.get(i).image(), original = all.get(o).image();
			Supervision sup = all.get(i).sup();
			float[] prob = o == i ? maps[i] : org.corral.image.Resample.bilinear(maps[o], original.width, original.height, im.width, im.height);
			int[] lab = boxMaskLabels(prob, im, sup);
			float[] tg = org.corral.instances.DistanceTargets.of(lab, im.width, im.height);
			float[] wt = new float[tg.length];
			for (int k = 0; k < wt.length; k++) wt[k] = sup.inBox[k] != 0 || sup.background[k] != 0 ? 1 : 0;
			sampler.useMaskTargets(i, tg, wt);
		}
	}

	/** The noise of the noisiest channel of the learning images, as learning sees them (normalised). */
	static double noiseLevel(List<CropSampler.Prepared> prepared) {
		double most = 0;
		for (CropSampler.Prepared p : prepared)
			for (float sigma : Normalise.noise(p.image())) most = Math.max(most, sigma);
		return most;
	}

	/** Per channel, the median over the learning images of each one's median (normalised): where their background lies. */
	static float[] backgroundLevel(List<CropSampler.Prepared> prepared) {
		float[][] perImage = new float[prepared.size()][];
		for (int i = 0; i < perImage.length; i++) perImage[i] = Normalise.medians(prepared.get(i).image());
		float[] level = new float[perImage[0].length];
		for (int c = 0; c < level.length; c++) {
			float[] medians = new float[perImage.length];
			for (int i = 0; i < medians.length; i++) medians[i] = perImage[i][c];
			java.util.Arrays.sort(medians);
			level[c] = medians[medians.length / 2];
		}
		return level;
	}

	/** The network's masks of the boxes, fitted to them; an outlined object is its outline. */
	private int[] boxMaskLabels(float[] prob, PlanarImage im, Supervision sup) {
		int[] lab = org.corral.instances.BoxMasks.make(prob, im.width, im.height, sup.boxes,
			org.corral.instances.BoxMasks.Options.DEFAULTS.withMargin(s.margin)).labels();
		for (int k = 0; k < sup.boxes.size(); k++) {
			Box bx = sup.boxes.get(k);
			if (!bx.isExact()) continue;
			for (int y = bx.y(); y < bx.y1(); y++)
				for (int x = bx.x(); x < bx.x1(); x++) {
					int q = y * im.width + x;
					if (bx.inMask(x, y)) lab[q] = k + 1;
					else if (lab[q] == k + 1) lab[q] = 0;
				}
		}
		return lab;
	}

	/**
	 * The classes of the boxes, sorted by name; a model to continue from keeps its own classes, and
	 * a box of a class it does not know is refused. Fewer than two classes: one kind of object.
	 */
	private List<String> classes(List<TrainingImage> images) {
		java.util.TreeSet<String> given = new java.util.TreeSet<>();
		for (TrainingImage ti : images) for (Box b : ti.boxes()) if (b.className() != null) given.add(b.className());
		if (from == null) return new ArrayList<>(given);
		List<String> known = from.header().classes == null ? List.of() : from.header().classes;
		for (String g : given)
			if (known.size() >= 2 && !known.contains(g))
				throw new CorralException("The model knows the classes " + known + "; a box of class '" + g + "' cannot continue its learning");
		return known.size() >= 2 ? known : List.of();
	}

	/**
	 * The class index of each pixel inside a box of a known class (an outline: its pixels only);
	 * -1 elsewhere, and where boxes of two classes overlap.
	 */
	static int[] classMap(Supervision sup, List<String> classes) {
		int w = sup.width;
		int[] map = new int[w * sup.height];
		java.util.Arrays.fill(map, -1);
		boolean[] clash = new boolean[map.length];
		for (Box b : sup.boxes) {
			int k = b.className() == null ? -1 : classes.indexOf(b.className());
			if (k < 0) continue;
			for (int y = b.y(); y < b.y1(); y++)
				for (int x = b.x(); x < b.x1(); x++) {
					if (b.isExact() && !b.inMask(x, y)) continue;
					int i = y * w + x;
					if (map[i] >= 0 && map[i] != k) clash[i] = true;
					map[i] = k;
				}
		}
		for (int i = 0; i < map.length; i++) if (clash[i]) map[i] = -1;
		return map;
	}

	/** Never hand out a broken model: a loss that is not a number ends learning with a message. */
	public static void requireFinite(float loss, int step, int width) {
		if (!Float.isFinite(loss))
			throw new CorralException("Learning diverged at step " + step + " (the loss is not a number); nothing was written. Try a wider network (--width "
				+ Math.max(16, 2 * width) + "), a smaller learning rate (--lr) or another seed");
	}

	/**
	 * What learning takes from one image's boxes (the preview shows exactly this): the image
	 * normalised as for learning, then {@link org.corral.supervision.SupervisionSettings#forImage}.
	 */
	public static Supervision supervision(TrainingImage ti, LearnSettings s) {
		return s.supervision().forImage(Normalise.percentiles(ti.image()), ti.boxes(), ti.region());
	}

	/** Log-barrier t: geometric growth from tStart to tMax over the first tRamp of the run, then held. */
	double tAt(int step, int total) {
		double f = Math.min(1, step / (s.tRamp * total));
		return s.tStart * Math.pow(s.tMax / s.tStart, f);
	}

	static double median(List<Double> v) {
		if (v.isEmpty()) return 0;
		List<Double> c = new ArrayList<>(v);
		c.sort(null);
		int n = c.size();
		return n % 2 == 1 ? c.get(n / 2) : (c.get(n / 2 - 1) + c.get(n / 2)) / 2;
	}
}
