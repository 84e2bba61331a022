package org.corral.predict;

import ai.djl.ndarray.NDManager;

import java.util.function.BooleanSupplier;

import net.imglib2.Cursor;
import net.imglib2.img.array.ArrayImgs;
import net.imglib2.type.numeric.real.FloatType;
import net.imglib2.view.Views;

import org.corral.CorralException;
import org.corral.image.PlanarImage;
import org.corral.net.UNet;

/**
 * Object probability of every pixel of an image of any size, tile by tile: each tile is read with
 * an overlap of context on every side (mirrored at the image border) and only its centre is kept,
 * so seams do not show and memory depends on the tile size, not on the image size. Tiles are
 * at most {@code tile} pixels on a side.
 */
public final class TiledPredictor implements AutoCloseable {
	private final UNet net;
	private final NDManager manager;
	private final int overlap;
	private int tile;
	private int flips = 1, tilesComputed;
	/** The network with batch normalisation folded in, made at the first prediction (parameters are final by then). */
	private FoldedNetwork folded;
	/** What runs it: ONNX Runtime, or DJL when that cannot load here ({@link #network()}). */
	private TileNetwork network;
	/** System property naming the default engine for inference: "onnx" (default) or "djl". */
	public static final String ENGINE_PROPERTY = "corral.inference";
	private static volatile boolean fallbackReported;
	private Engine engine = defaultEngine();

	/** What runs the network: ONNX Runtime (fast on CPUs) or DJL's PyTorch binding (the learning engine). */
	public enum Engine {
		ONNX, DJL
	}

	static Engine defaultEngine() {
		String e = System.getProperty(ENGINE_PROPERTY, "onnx");
		if (e.equals("onnx")) return Engine.ONNX;
		if (e.equals("djl")) return Engine.DJL;
		throw new CorralException(ENGINE_PROPERTY + " must be onnx or djl, got '" + e + "'");
	}

	/** Ranges of the activations ({@link ActivationRanges}): with them, ONNX Runtime runs the network in 8 bits. */
	private float[] activationRanges;
	/** System property choosing the precision of masking where the model allows 8 bits: "int8" (default) or "fp32". */
	public static final String PRECISION_PROPERTY = "corral.precision";

	/**
	 * The activation ranges of the model (null: none recorded, float); with them and ONNX Runtime the
	 * network runs in 8 bits unless {@value #PRECISION_PROPERTY} is "fp32". Set before the first prediction.
	 */
	public TiledPredictor optActivationRanges(float[] ranges) {
		if (network != null) throw new IllegalStateException("the network already runs");
		activationRanges = ranges;
		return this;
	}

	static boolean int8Allowed() {
		String p = System.getProperty(PRECISION_PROPERTY, "int8");
		if (p.equals("int8")) return true;
		if (p.equals("fp32")) return false;
		throw new CorralException(PRECISION_PROPERTY + " must be int8 or fp32, got '" + p + "'");
	}

	/** Runs the tiles through {@code n} instead (closed with this predictor); tiles as for ONNX Runtime. */
	TiledPredictor useNetwork(TileNetwork n) {
		if (network != null) throw new IllegalStateException("the network already runs");
		network = n;
		if (tile == ENGINE_DEFAULT) tile = defaultTile(net, Engine.ONNX);
		return this;
	}

	/** The engine for the network; set before the first prediction. */
	public TiledPredictor optEngine(Engine e) {
		if (network != null) throw new IllegalStateException("the network already runs");
		this.engine = e;
		return this;
	}

	public TiledPredictor(UNet net, NDManager manager, int tile, int overlap) {
		if (tile < 16 || overlap < 0) throw new IllegalArgumentException("tile must be >= 16 and overlap >= 0");
		this.net = net;
		this.manager = manager;
		this.tile = tile;
		this.overlap = overlap;
	}

	/**
	 * Tiles sized for the engine that runs them. DJL: the network's largest buffer, the decoder's
	 * full-resolution concatenation ({@link UNet#widestFullResolution()} channels, context included),
	 * stays within 32 MiB, the largest buffer glibc can be told to reuse instead of mapping it afresh
	 * (fresh pages cost about 7 us each on these machines: measured, PLATFORM.md); 352 px for the
	 * default network (measured: 0.95-1.00 MP/s against 0.50 with tiles of 640). ONNX Runtime reuses
	 * its own buffers, so there only the context matters, which large tiles spread thinner: 1.78 MP/s
	 * with tiles of 352, 2.72 with 1024 (one tile per 696x520 field) on 10 BBBC039 fields, 2 cores;
	 * its budget of {@value #ONNX_BUFFER_MIB} MiB gives 1040 px for the default network.
	 */
	public TiledPredictor(UNet net, NDManager manager) {
		this(net, manager, ENGINE_DEFAULT, OVERLAP);
	}

	private static final int ENGINE_DEFAULT = Integer.MAX_VALUE;
	static final long REUSED_BUFFER_BYTES = 32L << 20;
	static final int ONNX_BUFFER_MIB = 224;
	/** Mirrored context on each side of a tile: most of the default network's field of view (44 px); what lies beyond moves its maps by about 0.001 (BoxMapsTest). */
	static final int OVERLAP = 32;

	/**
	 * At most {@code side} pixels per tile, whatever the engine's own rule gives (a smaller side
	 * only); set before the first prediction.
	 */
	public TiledPredictor optMaxTile(int side) {
		if (network != null) throw new IllegalStateException("the network already runs");
		if (side < 16) throw new IllegalArgumentException("tiles must be at least 16 pixels, got " + side);
		maxTile = side;
		return this;
	}

	private int maxTile = Integer.MAX_VALUE;

	/** The tile side the default constructor uses for this network in this engine. */
	public static int defaultTile(UNet net, Engine engine) {
		return tileFor(net, OVERLAP, engine == Engine.ONNX ? (long) ONNX_BUFFER_MIB << 20 : REUSED_BUFFER_BYTES);
	}

	/** The tile side this predictor uses (known once its network runs: it depends on the engine). */
	public int tile() {
		network();
		return tile;
	}

	/** The largest tile side (a multiple of the pooling grid, at least 64) whose widest buffer fits {@code bytes}. */
	static int tileFor(UNet net, int overlap, long bytes) {
		double side = Math.sqrt(bytes / (4.0 * net.widestFullResolution())) - 2 * overlap;
		int m = net.multiple();
		return Math.max(64, (int) (side / m) * m);
	}

	/**
	 * Test-time flips: 1 = none, 2 = also mirrored left-right, 4 = also top-bottom and both, 8 = each
	 * of the four also transposed (rows for columns: with the flips, every turn by 90 degrees and its
	 * mirror image); the probabilities are averaged (common practice; it smooths the network's
	 * orientation bias).
	 */
	public TiledPredictor optFlips(int n) {
		if (n != 1 && n != 2 && n != 4 && n != 8) throw new IllegalArgumentException("flips must be 1, 2, 4 or 8");
		this.flips = n;
		return this;
	}

	/** Probabilities in [0, 1], raster order. {@code im} must already be normalised. */
	public float[] predict(PlanarImage im, BooleanSupplier cancelled) {
		return predictMaps(im, cancelled)[0];
	}

	/** Every output map of the network (object probability, and the instance map when it has one), in [0, 1]. */
	public float[][] predictMaps(PlanarImage im, BooleanSupplier cancelled) {
		return predictMaps(im, null, cancelled);
	}

	/**
	 * As above, computing only the tiles whose kept part meets one of {@code regions} ({x0, y0, x1,
	 * y1}, exclusive ends, in this image's pixels; null: every tile); the maps are 0 elsewhere. The
	 * tiles are laid out as for the whole image, so what is computed equals the whole-image maps.
	 */
	public float[][] predictMaps(PlanarImage im, java.util.List<int[]> regions, BooleanSupplier cancelled) {
		return tiles(im, regions, cancelled);
	}

	private float[][] tiles(PlanarImage im, java.util.List<int[]> regions, BooleanSupplier cancelled) {
		if (im.nChannels() != net.inChannels())
			throw new CorralException("The model expects " + net.inChannels() + " channel(s), the image has " + im.nChannels());
		int w = im.width, h = im.height;
		int no = net.outputs();
		tilesComputed = 0;
		float[][] out = new float[no][w * h];
		TileNetwork network = network();
		int c = im.nChannels();
		for (int[] t : layout(w, h, regions)) {
			if (cancelled != null && cancelled.getAsBoolean()) throw new java.util.concurrent.CancellationException("prediction cancelled");
			int tx = t[0], ty = t[1], cw = t[2], ch = t[3], ox = t[4], oy = t[5], iw = t[6], ih = t[7];
			tilesComputed++;
			float[] in = tileWithContext(im, ox, oy, iw, ih);
			// test-time flips: predict the mirrored tile, mirror back, average. One flip per call: a batch of
			// four ran no faster in ONNX Runtime (0.45-0.76 against 0.70-0.77 MP/s, measured) and needs 4x the memory
			int plane = iw * ih;
			float[] p = flips == 1 ? network.probabilities(in, 1, ih, iw) : new float[no * plane];
			if (flips > 1) {
				float[] mirrored = new float[c * plane], back = new float[plane];
				// buffers of the transposed passes, only when there are any (8 flips)
				float[] turned = flips > 4 ? new float[c * plane] : null, untransposed = flips > 4 ? new float[plane] : null;
				for (int f = 0; f < flips; f++) {
					int m = f & 3;
					boolean transposed = f >= 4;
					for (int k = 0; k < c; k++) mirror(in, k * plane, mirrored, k * plane, iw, ih, m);
					if (transposed) for (int k = 0; k < c; k++) transpose(mirrored, k * plane, turned, k * plane, iw, ih);
					float[] pf = transposed ? network.probabilities(turned, 1, iw, ih) : network.probabilities(mirrored, 1, ih, iw);
					for (int o = 0; o < no; o++) {
						if (transposed) {
							transpose(pf, o * plane, untransposed, 0, ih, iw); // back to ih rows of iw
							mirror(untransposed, 0, back, 0, iw, ih, m);
						} else mirror(pf, o * plane, back, 0, iw, ih, m);
						for (int i = 0; i < plane; i++) p[o * plane + i] += back[i] / flips;
					}
				}
			}
			keep(p, out, tx - ox, ty - oy, tx, ty, cw, ch, iw, w);
		}
		return out;
	}

	/** Copies the kept part of a tile's maps ({@code p}, planes of {@code iw} wide) into the image's maps. */
	private static void keep(float[] p, float[][] out, int dx, int dy, int tx, int ty, int cw, int ch, int iw, int w) {
		int plane = p.length / out.length;
		for (int o = 0; o < out.length; o++)
			for (int y = 0; y < ch; y++)
				System.arraycopy(p, o * plane + (y + dy) * iw + dx, out[o], (ty + y) * w + tx, cw);
	}

	/**
	 * The network that runs the tiles: ONNX Runtime unless {@link #optEngine} or the system property
	 * {@value #ENGINE_PROPERTY} says DJL, or the runtime cannot load on this machine (then DJL,
	 * reported once on stderr).
	 */
	public TileNetwork network() {
		if (network != null) return network;
		if (folded == null) folded = new FoldedNetwork(net, manager);
		if (engine == Engine.ONNX) {
			try {
				int threads = Integer.getInteger("ai.djl.pytorch.num_threads", 0);
				network = activationRanges != null && int8Allowed() ? OnnxNetwork.int8(folded, activationRanges, threads) : OnnxNetwork.of(folded, threads);
			} catch (ai.onnxruntime.OrtException | LinkageError e) {
				if (!fallbackReported) System.err.println("corral: ONNX Runtime is not available here (" + e.getMessage() + "); the network runs in DJL, about 5x slower");
				fallbackReported = true;
			}
		}
		if (network == null) network = folded;
		if (tile == ENGINE_DEFAULT) tile = defaultTile(net, network instanceof OnnxNetwork ? Engine.ONNX : Engine.DJL);
		tile = Math.min(tile, maxTile);
		return network;
	}

	/** Copies one plane of {@code w x h}, mirrored as flip {@code f} says: 0 none, 1 left-right, 2 top-bottom, 3 both (its own inverse). */
	static void mirror(float[] src, int from, float[] dst, int to, int w, int h, int f) {
		boolean lr = f == 1 || f == 3, tb = f >= 2;
		for (int y = 0; y < h; y++) {
			int sy = tb ? h - 1 - y : y, s = from + sy * w, d = to + y * w;
			if (!lr) System.arraycopy(src, s, dst, d, w);
			else for (int x = 0; x < w; x++) dst[d + x] = src[s + w - 1 - x];
		}
	}

	/** Copies one plane of {@code w x h} transposed: {@code h x w}, rows for columns. */
	static void transpose(float[] src, int from, float[] dst, int to, int w, int h) {
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) dst[to + x * h + y] = src[from + y * w + x];
	}

	@Override
	public void close() {
		if (network != null && network != folded) network.close();
		if (folded != null) folded.close();
		network = null;
		folded = null;
	}

	/**
	 * The tile's pixels with their context, channel after channel: read through ImgLib2's mirrored
	 * extension (the edge pixel not repeated), so a tile may reach past any border.
	 */
	static float[] tileWithContext(PlanarImage im, int ox, int oy, int iw, int ih) {
		float[] in = new float[im.nChannels() * iw * ih];
		long[] min = {ox, oy}, max = {ox + iw - 1L, oy + ih - 1L};
		// ImgLib2's single-boundary mirror fails on a side of one pixel; a side doubled mirrors alike
		int sw = Math.max(2, im.width), sh = Math.max(2, im.height);
		for (int c = 0; c < im.nChannels(); c++) {
			float[] src = im.channels[c];
			if (sw != im.width || sh != im.height) {
				src = new float[sw * sh];
				for (int y = 0; y < sh; y++)
					for (int x = 0; x < sw; x++) src[y * sw + x] = im.channels[c][Math.min(y, im.height - 1) * im.width + Math.min(x, im.width - 1)];
			}
			var plane = Views.extendMirrorSingle(ArrayImgs.floats(src, sw, sh));
			Cursor<FloatType> cur = Views.flatIterable(Views.interval(plane, min, max)).cursor();
			for (int i = c * iw * ih; cur.hasNext(); i++) in[i] = cur.next().get();
		}
		return in;
	}

	/**
	 * The tiles for an image of {@code w x h}, only those meeting {@code regions} (null: all), each
	 * {x, y, width, height} of the part kept and {x, y, width, height} of the network's input around it.
	 */
	private java.util.List<int[]> layout(int w, int h, java.util.List<int[]> regions) {
		if (tile == ENGINE_DEFAULT || maxTile < tile) network(); // the tile side depends on the engine that runs, and the cap
		int m = net.multiple();
		java.util.List<int[]> tiles = new java.util.ArrayList<>();
		// as few tiles as the size limit allows, all of about the same size: no tile is mostly padding
		int nx = (w + tile - 1) / tile, ny = (h + tile - 1) / tile;
		int tw = (w + nx - 1) / nx, th = (h + ny - 1) / ny;
		for (int ty = 0; ty < h; ty += th)
			for (int tx = 0; tx < w; tx += tw) {
				int cw = Math.min(tw, w - tx), ch = Math.min(th, h - ty);
				if (regions != null && !meets(regions, tx, ty, tx + cw, ty + ch)) continue;
				// tile origins on the pooling grid of the whole image, so every tile pools alike
				int ox = Math.floorDiv(tx - overlap, m) * m, oy = Math.floorDiv(ty - overlap, m) * m;
				tiles.add(new int[] {tx, ty, cw, ch, ox, oy, roundUp(tx + cw + overlap - ox, m), roundUp(ty + ch + overlap - oy, m)});
			}
		return tiles;
	}

	/** Pixels the network would process (context included) to predict {@code regions} of an image of {@code w x h} (null: all of it). */
	public long work(int w, int h, java.util.List<int[]> regions) {
		long px = 0;
		for (int[] t : layout(w, h, regions)) px += (long) t[6] * t[7];
		return px;
	}

	private static boolean meets(java.util.List<int[]> regions, int x0, int y0, int x1, int y1) {
		for (int[] r : regions)
			if (r[0] < x1 && x0 < r[2] && r[1] < y1 && y0 < r[3]) return true;
		return false;
	}

	/** Tiles the last prediction computed (each with all its flips). */
	public int tilesComputed() {
		return tilesComputed;
	}

	static int roundUp(int v, int m) {
		return (v + m - 1) / m * m;
	}
}
