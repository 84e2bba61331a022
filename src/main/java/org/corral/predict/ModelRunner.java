package org.corral.predict;

import ai.djl.ndarray.NDManager;

import java.nio.file.Path;
import java.util.List;
import java.util.function.BooleanSupplier;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.image.Normalise;
import org.corral.image.PlanarImage;
import org.corral.image.Resample;
import org.corral.model.ModelFile;
import org.corral.model.ModelHeader;
import org.corral.net.UNet;

/**
 * A loaded model that turns raw images into probability maps: the same normalisation as in
 * learning, and a rescale so that objects appear at the size the model learned.
 */
public final class ModelRunner implements AutoCloseable {
	/** Rescale only when objects differ from the learned size by more than this factor. */
	public static final double SCALE_TOLERANCE = 1.25;

	private final ModelHeader header;
	private final NDManager manager;
	/** Made at the first prediction: its tile size depends on the network and the engine. */
	private TiledPredictor predictor;
	/** The same for box masks (8-bit where the model allows). */
	private TiledPredictor boxPredictor;
	/** Tiles of the smaller side that box masks use when their boxes cover little of the image. */
	private TiledPredictor smallTiles;
	/** Tiles for the bands of a tall image ({@link #BAND_TILE}). */
	private TiledPredictor bandTiles;
	/** The one that ran last, for {@link #tilesComputed()}. */
	private TiledPredictor last;
	/** A fixed tile side for every prediction; 0: chosen as above. */
	private int fixedTile;
	private final UNet net;

	public ModelRunner(ModelHeader header, UNet net, NDManager manager) {
		this.header = header;
		this.net = net;
		this.manager = manager;
	}

	public static ModelRunner open(Path modelFile) {
		NDManager m = NDManager.newBaseManager();
		try {
			ModelFile.Loaded l = ModelFile.read(modelFile, m);
			return new ModelRunner(l.header(), l.net(), m);
		} catch (RuntimeException e) {
			m.close();
			throw e;
		}
	}

	public ModelHeader header() {
		return header;
	}

	/** The network, e.g. to continue learning from it. */
	public UNet net() {
		return net;
	}

	/**
	 * The factor to resize an image by so that objects of median side {@code observed} look like
	 * the learned ones; 1 when close enough, bounded to [1/4, 4].
	 */
	public double scaleFor(double observed) {
		if (observed <= 0 || header.objectSize <= 0) return 1;
		double f = header.objectSize / observed;
		if (f < SCALE_TOLERANCE && f > 1 / SCALE_TOLERANCE) return 1;
		return Math.max(0.25, Math.min(4, f));
	}

	/**
	 * The factor from the calibrations, when both the model and the image know their pixel size:
	 * an image at half the model's pixel size shows objects twice as large, so it is halved.
	 * 0 when either is uncalibrated. An image calibrated in a unit that is not a length is refused.
	 */
	public double scaleForCalibration(PlanarImage im) {
		if (header.pixelSize <= 0 || im.pixelWidth <= 0) return 0;
		double um = im.micronsPerPixel();
		if (um <= 0)
			throw new CorralException("The image is calibrated in '" + im.unit + "', which Corral cannot compare with the model's pixel size (" + header.pixelSize
				+ " micron); remove the calibration or give the object size");
		double f = um / header.pixelSize;
		if (f < SCALE_TOLERANCE && f > 1 / SCALE_TOLERANCE) return 1;
		return Math.max(0.25, Math.min(4, f));
	}

	public static double medianSide(List<Box> boxes) {
		double[] v = boxes.stream().mapToDouble(Box::meanSide).sorted().toArray();
		if (v.length == 0) return 0;
		return v.length % 2 == 1 ? v[v.length / 2] : (v[v.length / 2 - 1] + v[v.length / 2]) / 2;
	}

	/**
	 * Test-time flips for masks inside boxes: averaging the four mirrored predictions lifted the
	 * per-object Dice on the held-out histology images from 0.887 to 0.894 (README, "How the defaults
	 * were chosen"). Whole images use the model's own setting ({@link #imageFlips()}); one pass for
	 * models that have none.
	 */
	public static final int BOX_FLIPS = 4, IMAGE_FLIPS = 1;

	/**
	 * Flips for masks inside boxes in this run: {@link #BOX_FLIPS}, or 8 with
	 * {@code -Dcorral.boxFlips=8} (each flip also transposed: every turn and mirror image). Measured
	 * on the cross-collection protocol with the same models: per-object Dice +0.0001 to +0.0020 on
	 * every pair (most on the other-look histology, 0.8857 / 0.8957 to 0.8872 / 0.8977 as learned /
	 * adapted) for twice the network passes, so 4 stays the default (README, "Speed").
	 */
	public static int boxFlips() {
		String v = System.getProperty("corral.boxFlips");
		if (v == null || v.isBlank()) return BOX_FLIPS;
		if (!v.trim().equals("4") && !v.trim().equals("8")) throw new CorralException("corral.boxFlips must be 4 or 8, got '" + v + "'");
		return Integer.parseInt(v.trim());
	}

	/** Test-time flips for whole images: the model's setting ({@link ModelHeader#imageFlips}), {@link #IMAGE_FLIPS} when it has none. */
	public int imageFlips() {
		int f = header.imageFlips;
		return f == 1 || f == 2 || f == 4 ? f : IMAGE_FLIPS;
	}

	/** One line for the log: how this model masks whole images. */
	public String wholeImageSettings() {
		return String.format(java.util.Locale.ROOT, "whole images: objects at probability %.2f, %d network pass(es) per tile%s", imageThreshold(), imageFlips(),
			imageFlips() > 1 ? " (test-time flips)" : "");
	}

	/** Probability threshold of whole-image objects: the model's setting ({@link ModelHeader#imageThreshold}), 0.5 when it has none. */
	public double imageThreshold() {
		double t = header.imageThreshold;
		return t > 0 && t < 1 ? t : org.corral.instances.ImageMasks.THRESHOLD;
	}

	/** Probability map of a raw image, at the image's own size; {@code scale} from {@link #scaleFor}. */
	public float[] probability(PlanarImage raw, double scale, BooleanSupplier cancelled) {
		return probability(raw, scale, cancelled, IMAGE_FLIPS);
	}

	/** As {@link #probability(PlanarImage, double, BooleanSupplier)}, averaged over {@code flips} mirrored passes (1, 2, 4 or 8). */
	public float[] probability(PlanarImage raw, double scale, BooleanSupplier cancelled, int flips) {
		return maps(raw, scale, cancelled, flips)[0];
	}

	/** Every output map at the image's own size: [0] object probability, [1] the instance map when the model has one. */
	public float[][] maps(PlanarImage raw, double scale, BooleanSupplier cancelled, int flips) {
		return maps(raw, null, scale, cancelled, flips);
	}

	/**
	 * As above, normalised with the given raw bounds ({@link Normalise#bounds}; null: the image's own
	 * percentiles): a band of rows of a larger image is masked as the whole image would be.
	 */
	public float[][] maps(PlanarImage raw, float[][] bounds, double scale, BooleanSupplier cancelled, int flips) {
		return maps(raw, bounds, scale, null, cancelled, flips);
	}

	/**
	 * The maps that box masks need, computed only on the tiles that hold the boxes (with a margin of
	 * {@value #BOX_REGION_PAD} pixels for the resampling): equal to {@link #maps} inside
	 * every box, 0 far from all boxes. A few boxes on a large image cost a few tiles.
	 */
	public float[][] boxMaps(PlanarImage raw, List<Box> boxes, double scale, BooleanSupplier cancelled, int flips) {
		return maps(raw, null, scale, boxes, cancelled, flips);
	}

	/** The boxes' rectangles in the network's image of {@code sw} x {@code sh} pixels, padded. */
	private static List<int[]> regions(List<Box> boxes, PlanarImage raw, int sw, int sh) {
		double sx = (double) sw / raw.width, sy = (double) sh / raw.height;
		List<int[]> regions = new java.util.ArrayList<>(boxes.size());
		for (Box b : boxes)
			regions.add(new int[] {(int) Math.floor((b.x() - BOX_REGION_PAD) * sx) - BOX_REGION_PAD, (int) Math.floor((b.y() - BOX_REGION_PAD) * sy) - BOX_REGION_PAD,
				(int) Math.ceil((b.x() + b.width() + BOX_REGION_PAD) * sx) + BOX_REGION_PAD, (int) Math.ceil((b.y() + b.height() + BOX_REGION_PAD) * sy) + BOX_REGION_PAD});
		return regions;
	}

	/** Pixels around a box, in the image and again in the network's image, that {@link #boxMaps} also computes: bilinear sampling reads one beyond. */
	static final int BOX_REGION_PAD = 2;

	/** Tiles the last prediction computed. */
	public int tilesComputed() {
		return last == null ? 0 : last.tilesComputed();
	}

	/**
	 * Every prediction in tiles of at most {@code side} pixels (0, the default: the engine's tile
	 * side, and for boxes the smaller one when that computes fewer pixels).
	 */
	public ModelRunner optTile(int side) {
		if (predictor != null || boxPredictor != null) throw new IllegalStateException("set the tile side before the first prediction");
		if (side != 0 && side < 16) throw new IllegalArgumentException("tiles must be at least 16 pixels, got " + side);
		fixedTile = side;
		return this;
	}

	/**
	 * The predictor for an image of {@code w x h} of which only {@code regions} are needed (null: all):
	 * the engine's large tiles, unless the smaller tiles of {@link TiledPredictor#defaultTile} for DJL
	 * would compute fewer pixels, context included (a few boxes on a large image).
	 */
	private TiledPredictor predictorFor(int w, int h, List<int[]> regions, boolean band) {
		if (band && fixedTile == 0) {
			if (bandTiles == null) bandTiles = new TiledPredictor(net, manager).optMaxTile(BAND_TILE);
			return bandTiles;
		}
		if (regions == null) {
			if (predictor == null) predictor = engineTiles();
			return predictor;
		}
		// box masks run the network in 8 bits where the model has activation ranges; whole images stay in
		// float: on the cross-collection pairs 8 bits moved the box masks by -0.0008 to +0.0003 but a
		// whole-image F1 by -0.006 (README, "Speed")
		if (boxPredictor == null) boxPredictor = engineTiles().optActivationRanges(header.activationRanges);
		if (fixedTile > 0) return boxPredictor;
		int small = TiledPredictor.defaultTile(net, TiledPredictor.Engine.DJL);
		if (small >= boxPredictor.tile()) return boxPredictor;
		if (smallTiles == null) smallTiles = new TiledPredictor(net, manager, small, TiledPredictor.OVERLAP).optActivationRanges(header.activationRanges);
		return smallTiles.work(w, h, regions) < boxPredictor.work(w, h, regions) ? smallTiles : boxPredictor;
	}

	/** Tiles of the side {@link #optTile} fixed, else the engine's own. */
	private TiledPredictor engineTiles() {
		return fixedTile > 0 ? new TiledPredictor(net, manager, fixedTile, TiledPredictor.OVERLAP) : new TiledPredictor(net, manager);
	}

	/**
	 * The largest tile side for the bands of an image masked in bands ({@link #maps} with bounds): a
	 * band and its halos (1152 rows by default) take two rows of tiles whatever their side between
	 * 576 and 1151, so smaller tiles there cost little context and hold the engine's buffers to about
	 * half. Measured on a 8160x8192 image (mask-image, 2 cores, one session): tiles of 1040 95 s and
	 * 2.27 GiB peak, 704 87 s and 1.79 GiB, 480 105 s and 1.75 GiB.
	 */
	public static final int BAND_TILE = 704;

	private synchronized float[][] maps(PlanarImage raw, float[][] bounds, double scale, List<Box> boxes, BooleanSupplier cancelled, int flips) {
		if (raw.nChannels() != header.inChannels)
			throw new CorralException("The model was learned on " + header.inChannels + "-channel images; this image has " + raw.nChannels());
		int no = Math.max(1, header.outputs);
		if (constant(raw)) return new float[no][raw.width * raw.height]; // no contrast, no objects
		PlanarImage norm = Normalise.with(raw, bounds != null ? bounds : normalisationBounds(raw));
		int sw = scale == 1 ? raw.width : Math.max(1, (int) Math.round(raw.width * scale)), sh = scale == 1 ? raw.height : Math.max(1, (int) Math.round(raw.height * scale));
		List<int[]> regions = boxes == null ? null : regions(boxes, raw, sw, sh);
		last = predictorFor(sw, sh, regions, bounds != null).optFlips(flips);
		if (scale == 1) return finite(last.predictMaps(norm, regions, cancelled));
		float[][] p = finite(last.predictMaps(Resample.bilinear(norm, sw, sh), regions, cancelled));
		for (int o = 0; o < p.length; o++) p[o] = Resample.bilinear(p[o], sw, sh, raw.width, raw.height);
		return p;
	}

	/** The raw values of {@code raw} that this model's normalisation maps to 0 and 1, per channel. */
	public float[][] normalisationBounds(org.corral.image.RowReader raw) {
		Normalise.Range r = Normalise.range(raw, header.normLow, header.normHigh, header.noiseLevel, header.backgroundLevel);
		lastNearlyEmpty = r.nearlyEmpty();
		return r.bounds();
	}

	private volatile boolean lastNearlyEmpty;

	/**
	 * Whether the image last normalised counted as a nearly empty field, mapped as the learning
	 * images were instead of by its percentiles ({@link Normalise#range}): for the log of a job.
	 */
	public boolean lastNearlyEmpty() {
		return lastNearlyEmpty;
	}

	/** The instance map among {@link #maps}' outputs, or null when the model has none. */
	public float[] instanceMap(float[][] maps) {
		return header.hasInstanceMap() ? maps[1] : null;
	}

	/** The class maps among {@link #maps}' outputs, in the order of the header's classes; empty for one kind of object. */
	public float[][] classMaps(float[][] maps) {
		int k = header.classCount(), o = header.firstClassChannel();
		float[][] c = new float[k][];
		for (int i = 0; i < k; i++) c[i] = maps[o + i];
		return c;
	}

	/** A map that is not a number would give silently empty masks: refused with a message instead. */
	static float[][] finite(float[][] maps) {
		for (float[] m : maps)
			for (float v : m)
				if (Float.isNaN(v)) throw new CorralException("The model gives no numbers on this image (its parameters are not finite): learn it again, wider or with another seed");
		return maps;
	}

	/** True when every channel holds a single finite value (NaN and infinities ignored). */
	static boolean constant(PlanarImage im) {
		for (float[] c : im.channels) {
			float first = Float.NaN;
			for (float v : c) {
				if (!Float.isFinite(v)) continue;
				if (Float.isNaN(first)) first = v;
				else if (v != first) return false;
			}
		}
		return true;
	}

	@Override
	public void close() {
		if (predictor != null) predictor.close();
		if (boxPredictor != null) boxPredictor.close();
		if (smallTiles != null) smallTiles.close();
		if (bandTiles != null) bandTiles.close();
		manager.close();
	}
}
