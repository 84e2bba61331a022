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
import ai.djl.training.tracker.Tracker;

import java.time.Instant;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.SplittableRandom;
import java.util.concurrent.CancellationException;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.Resample;
import org.corral.loss.BoxLoss;
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

	public Result learn(List<TrainingImage> images, Progress progress) {
		if (images.isEmpty()) throw new CorralException("Nothing to learn from: no images");
		int nc = images.get(0).image().nChannels();
		int nBoxes = 0;
		List<String> classes = classes(images);
		List<CropSampler.Prepared> prepared = new ArrayList<>();
		List<Double> sides = new ArrayList<>(), microns = new ArrayList<>();
		for (TrainingImage ti : images) {
			microns.add(ti.image().micronsPerPixel());
			if (ti.image().nChannels() != nc)
				throw new CorralException("Image " + ti.name() + " has " + ti.image().nChannels() + " channel(s), the first image " + nc + "; all learning images need the same channels");
			PlanarImage norm = Normalise.percentiles(ti.image());
			Supervision sup = s.supervision().forImage(norm, ti.boxes(), ti.region());
			if (sup.boxes.isEmpty()) continue;
			nBoxes += sup.boxes.size();
			for (Box b : ti.boxes()) sides.add(b.meanSide()); // as drawn: masking sees boxes drawn alike
			prepared.add(new CropSampler.Prepared(ti.name(), norm, Resample.mean3(norm), sup, Normalise.bounds(ti.image(), Normalise.LOW, Normalise.HIGH),
				classes.size() < 2 ? null : classMap(sup, classes)));
		}
		if (nBoxes == 0) throw new CorralException("Nothing to learn from: none of the " + images.size() + " image(s) has a box inside it");
		int nExact = prepared.stream().mapToInt(p -> p.sup().exactCount()).sum();
		boolean exact = nExact > 0;

		Engine.getInstance().setRandomSeed((int) s.seed);
		SplittableRandom rnd = new SplittableRandom(s.seed);
		CropSampler sampler = new CropSampler(prepared, s, rnd);
		if (from != null && (from.header().inChannels != nc || from.header().baseChannels != s.base || from.header().levels != s.levels))
			throw new CorralException("Cannot continue from the model: it was learned on " + from.header().inChannels + "-channel images with width "
				+ from.header().baseChannels + " and " + from.header().levels + " levels; these images have " + nc + " channel(s)");
		boolean instance = from != null ? from.header().hasInstanceMap() : s.instanceMap;
		int nClasses = classes.size() < 2 ? 0 : classes.size();
		int outputs = 1 + (instance ? 1 : 0) + nClasses;
		UNet net = new UNet(nc, s.base, s.levels, outputs);
		if (from != null && instance) sampler.keepInstanceMap(); // until new targets exist
		int[] total = {s.steps};
		boolean shortened = false;
		Tracker lr = step -> (float) (s.learningRate * lrFactor(step, total[0]));
		Model model = Model.newInstance("corral");
		model.setBlock(net);
		// DJL's config requires a loss; the trainer never calls it, BoxLoss is computed by hand below
		DefaultTrainingConfig cfg = new DefaultTrainingConfig(Loss.l2Loss())
			.optOptimizer(Optimizer.adam().optLearningRateTracker(lr).build())
			.optInitializer(new XavierInitializer(XavierInitializer.RandomType.GAUSSIAN, XavierInitializer.FactorType.IN, 2), Parameter.Type.WEIGHT)
			.optDevices(new Device[] {Device.cpu()});
		Progress.Report last = null;
		try (Trainer trainer = model.newTrainer(cfg)) {
			int b = s.batch, c = s.crop;
			trainer.initialize(new Shape(b, nc, c, c));
			if (from != null) { // same block structure: parameters (and batch-norm statistics) in the same order
				var src = from.net().getParameters();
				var to = net.getParameters();
				for (int i = 0; i < to.size(); i++) src.get(i).getValue().getArray().copyTo(to.get(i).getValue().getArray());
			}
			long start = System.nanoTime(), warm = start;
			double[] acc = new double[5];
			int accN = 0;
			for (int step = 1; step <= total[0]; step++) {
				if (progress.cancelled()) throw new CancellationException("learning cancelled at step " + step);
				double t = tAt(step, total[0]);
				if (instance && step == maskTargetStep(total[0])) maskTargets(net, prepared, sampler, trainer.getManager());
				float[] x = new float[b * nc * c * c], bg = new float[b * c * c], ph = new float[b * c * (c - 1)], pv = new float[b * (c - 1) * c];
				float[] cen = new float[b * c * c], cw = new float[b * c * c];
				float[] ex = exact ? new float[b * c * c] : null, exw = exact ? new float[b * c * c] : null;
				float[] oneHot = nClasses > 0 ? new float[b * nClasses * c * c] : null, clw = nClasses > 0 ? new float[b * c * c] : null;
				List<List<org.corral.supervision.Constraint>> cons = new ArrayList<>();
				for (int i = 0; i < b; i++) {
					CropSampler.Crop cr = sampler.next();
					for (int ch = 0; ch < nc; ch++) System.arraycopy(cr.channels()[ch], 0, x, (i * nc + ch) * c * c, c * c);
					System.arraycopy(cr.background(), 0, bg, i * c * c, c * c);
					System.arraycopy(cr.pairH(), 0, ph, i * c * (c - 1), c * (c - 1));
					System.arraycopy(cr.pairV(), 0, pv, i * (c - 1) * c, (c - 1) * c);
					System.arraycopy(cr.instance(), 0, cen, i * c * c, c * c);
					System.arraycopy(cr.instanceWeight(), 0, cw, i * c * c, c * c);
					if (nClasses > 0)
						for (int q = 0; q < c * c; q++) {
							int k = cr.classes()[q];
							if (k < 0) continue;
							oneHot[(i * nClasses + k) * c * c + q] = 1;
							clw[i * c * c + q] = 1;
						}
					if (exact) {
						System.arraycopy(cr.exact(), 0, ex, i * c * c, c * c);
						System.arraycopy(cr.exactWeight(), 0, exw, i * c * c, c * c);
					}
					cons.add(cr.constraints());
				}
				try (NDManager sm = trainer.getManager().newSubManager(); GradientCollector gc = trainer.newGradientCollector()) {
					BoxLoss.Targets tg = new BoxLoss.Targets(sm, b, c, c, bg, ph, pv, cons, s.weights);
					if (instance) tg.optInstanceMap(sm, b, c, c, cen, cw);
					if (nClasses > 0) tg.optClasses(sm, b, nClasses, c, c, oneHot, clw);
					if (exact) tg.optExact(sm, b, c, c, ex, exw);
					NDArray in = sm.create(x, new Shape(b, nc, c, c));
					NDArray logits = trainer.forward(new NDList(in)).singletonOrThrow();
					BoxLoss.Parts p = BoxLoss.compute(logits, tg, t, s.weights);
					float loss = p.total().getFloat();
					requireFinite(loss, step, s.base);
					gc.backward(p.total());
					acc[0] += loss;
					acc[1] += p.background().getFloat();
					acc[2] += p.constraints().getFloat();
					acc[3] += p.pairwise().getFloat();
					acc[4] += p.met().getFloat();
					accN++;
				}
				trainer.step();
				double elapsed = (System.nanoTime() - start) / 1e9;
				if (step == 2) warm = System.nanoTime();
				if (s.minutes > 0 && step >= 12 && (step - 12) % 25 == 0) {
					// the time budget is a cap: when the remaining steps will not fit, the run (and with it
					// the t and learning-rate schedules) is shortened; the header records it
					double sps = (System.nanoTime() - warm) / 1e9 / (step - 2);
					int fit = (int) (step + (s.minutes * 60 - elapsed) / sps);
					if (fit < total[0]) {
						total[0] = Math.max(step + 1, fit);
						shortened = true;
					}
				}
				if (step % s.reportEvery == 0 || step == total[0]) {
					double sps = elapsed / step;
					Progress.Report r = new Progress.Report(step, total[0], acc[0] / accN, acc[1] / accN, acc[2] / accN, acc[3] / accN,
						acc[4] / accN, t, sps, sps * (total[0] - step));
					last = r;
					progress.report(r);
					Arrays.fill(acc, 0);
					accN = 0;
				}
			}
			ModelHeader h = new ModelHeader();
			h.created = Instant.now().toString();
			h.inChannels = nc;
			h.baseChannels = s.base;
			h.levels = s.levels;
			h.outputs = outputs;
			if (nClasses > 0) h.classes = classes;
			h.normLow = Normalise.LOW;
			h.normHigh = Normalise.HIGH;
			h.objectSize = from != null ? from.header().objectSize : median(sides);
			// the pixel size is remembered only when every learning image is calibrated alike
			if (from != null) {
				h.pixelSize = from.header().pixelSize;
				h.pixelUnit = from.header().pixelUnit;
			} else if (!microns.contains(0.0) && java.util.Collections.max(microns) < 1.01 * java.util.Collections.min(microns)) {
				h.pixelSize = median(microns);
				h.pixelUnit = "micron";
			}
			h.seed = s.seed;
			h.training = s.asMap();
			if (from != null) h.counts.put("continuedFrom", from.header().created);
			h.counts.put("images", prepared.size());
			h.counts.put("boxes", nBoxes);
			h.counts.put("outlines", nExact);
			h.counts.put("steps", total[0]);
			h.counts.put("shortenedByTimeBudget", shortened);
			h.counts.put("secondsPerStep", (System.nanoTime() - start) / 1e9 / total[0]);
			if (last != null) {
				h.scores.put("loss", last.loss());
				h.scores.put("background", last.background());
				h.scores.put("constraints", last.constraints());
				h.scores.put("pairwise", last.pairwise());
				h.scores.put("constraintsMet", last.met());
			}
			// keep the parameters alive after the trainer closes: move them to a manager we hand out
			NDManager keep = NDManager.newBaseManager();
			for (var pair : net.getParameters()) pair.getValue().getArray().attach(keep);
			return new Result(net, h, keep);
		} finally {
			model.close(); // the parameters were moved to the manager handed out (or are dropped with it on failure)
		}
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

	/**
	 * The instance output's targets from the network's own masks of the boxes: each image is masked
	 * with the network as it is, each mask fitted to its box, and the normalised distance of those
	 * masks ({@link org.corral.instances.DistanceTargets}) becomes the target inside the boxes, 0 on
	 * known background.
	 */
	private void maskTargets(UNet net, List<CropSampler.Prepared> prepared, CropSampler sampler, NDManager parent) {
		try (NDManager m = parent.newSubManager()) {
			// the images as learning sees them, already normalised; one pass each, as whole images are masked
			org.corral.predict.TiledPredictor predictor = new org.corral.predict.TiledPredictor(net, m);
			for (int i = 0; i < prepared.size(); i++) {
				PlanarImage im = prepared.get(i).image();
				Supervision sup = prepared.get(i).sup();
				float[] prob = predictor.predictMaps(im, null)[0];
				int[] lab = org.corral.instances.BoxMasks.make(prob, im.width, im.height, sup.boxes,
					org.corral.instances.BoxMasks.Options.DEFAULTS.withMargin(s.margin)).labels();
				for (int k = 0; k < sup.boxes.size(); k++) { // an outlined object is its outline
					Box bx = sup.boxes.get(k);
					if (!bx.isExact()) continue;
					for (int y = bx.y(); y < bx.y1(); y++)
						for (int x = bx.x(); x < bx.x1(); x++) {
							int q = y * im.width + x;
							if (bx.inMask(x, y)) lab[q] = k + 1;
							else if (lab[q] == k + 1) lab[q] = 0;
						}
				}
				float[] tg = org.corral.instances.DistanceTargets.of(lab, im.width, im.height);
				float[] wt = new float[tg.length];
				for (int k = 0; k < wt.length; k++) wt[k] = sup.inBox[k] != 0 || sup.background[k] != 0 ? 1 : 0;
				sampler.useMaskTargets(i, tg, wt);
			}
		}
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

	/**
	 * Short linear warm-up (common practice), then cosine decay to 5 % (the cosine schedule of "SGDR:
	 * Stochastic Gradient Descent with Warm Restarts", ICLR 2017, without restarts).
	 */
	static double lrFactor(int step, int total) {
		int warm = Math.max(1, Math.min(20, total / 10));
		if (step < warm) return (step + 1.0) / warm;
		double f = Math.min(1, (step - warm) / (double) Math.max(1, total - warm));
		return 0.05 + 0.95 * 0.5 * (1 + Math.cos(Math.PI * f));
	}

	static double median(List<Double> v) {
		if (v.isEmpty()) return 0;
		List<Double> c = new ArrayList<>(v);
		c.sort(null);
		int n = c.size();
		return n % 2 == 1 ? c.get(n / 2) : (c.get(n / 2 - 1) + c.get(n / 2)) / 2;
	}
}
