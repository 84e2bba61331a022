package org.corral.workflow;

import ij.ImagePlus;
import ij.process.ShortProcessor;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import org.corral.io.AtomicFiles;
import org.corral.io.ImageFiles;

/**
 * Generates the demo data (an invented scenario): DNA-stained nuclei of seed-coat cells of the
 * fictional meadow plant <i>Corralia borealis</i>, imaged at the fictional Northfield Botany Core.
 * Each image holds textured elliptical nuclei, some touching, on an uneven background with noise
 * and blur; the reference masks are the ellipses themselves, the boxes their tight bounding boxes.
 * Two layouts: {@link #TILES}, small images the tests learn from quickly, and {@link #FIELDS},
 * microscope fields of realistic size that {@code corral demo} runs on. Deterministic: the same
 * seed writes the same files.
 */
public final class DemoData {
	/**
	 * How a set is laid out: image size and count, nuclei per image, their long semi-axis range in
	 * pixels, and the share of nuclei placed against one already there (0: only where chance puts them).
	 */
	public record Layout(int width, int height, int images, String prefix, int nuclei, int tries, double minAxis, double maxAxis, double touching) {}

	/** The tests' set: 4 images of 160x128 with 14 nuclei each. */
	public static final Layout TILES = new Layout(160, 128, 4, "seedcoat", 14, 400, 6, 13, 0);
	/** The demo's set: 3 fields of 512x512 with 80 nuclei each, a third of them set against a neighbour. */
	public static final Layout FIELDS = new Layout(512, 512, 3, "seedcoat-field", 80, 4000, 8, 15, 0.35);
	public static final long SEED = 20261201L;

	private DemoData() {}

	/** Writes both sets: {@code DIR} (default test-images) and {@code DIR/fields}. */
	public static void main(String[] args) {
		Path dir = Path.of(args.length > 0 ? args[0] : "test-images");
		write(dir, SEED, TILES);
		write(dir.resolve("fields"), SEED, FIELDS);
	}

	public static void write(Path dir, long seed, Layout l) {
		final int width = l.width(), height = l.height();
		StringBuilder csv = new StringBuilder("image,x,y,width,height\n");
		for (int n = 1; n <= l.images(); n++) {
			SplittableRandom rnd = new SplittableRandom(seed * 31 + n);
			String name = String.format(Locale.ROOT, "%s-%02d.tif", l.prefix(), n);
			int[] labels = new int[width * height];
			List<int[]> boxes = new ArrayList<>();
			List<double[]> centres = new ArrayList<>();
			float[] img = new float[width * height];
			double gx = rnd.nextDouble(-2, 2), gy = rnd.nextDouble(-2, 2);
			for (int y = 0; y < height; y++)
				for (int x = 0; x < width; x++) img[y * width + x] = (float) (300 + gx * x + gy * y);
			int placed = 0;
			for (int tries = 0; tries < l.tries() && placed < l.nuclei(); tries++) {
				double a = rnd.nextDouble(l.minAxis(), l.maxAxis()), b = a * rnd.nextDouble(0.6, 1.0), th = rnd.nextDouble(Math.PI);
				double cx = rnd.nextDouble(4, width - 4), cy = rnd.nextDouble(4, height - 4);
				List<Integer> px;
				if (l.touching() > 0 && !centres.isEmpty() && rnd.nextDouble() < l.touching()) {
					// against a neighbour: from well outside it, step towards it while the ellipse stays free
					double[] nb = centres.get(rnd.nextInt(centres.size()));
					double angle = rnd.nextDouble(2 * Math.PI), d = nb[2] + a + 2;
					px = null;
					for (; d > 0; d -= 1) {
						List<Integer> at = ellipse(labels, width, height, nb[0] + d * Math.cos(angle), nb[1] + d * Math.sin(angle), a, b, th);
						if (at == null) break;
						px = at;
						cx = nb[0] + d * Math.cos(angle);
						cy = nb[1] + d * Math.sin(angle);
					}
				} else {
					px = ellipse(labels, width, height, cx, cy, a, b, th);
				}
				if (px == null || px.size() < 20) continue;
				placed++;
				centres.add(new double[] {cx, cy, a});
				double bright = rnd.nextDouble(900, 2200), f1 = rnd.nextDouble(0.2, 0.5), f2 = rnd.nextDouble(0.2, 0.5), ph = rnd.nextDouble(6.3);
				int x0 = width, y0 = height, x1 = -1, y1 = -1;
				for (int i : px) {
					labels[i] = placed;
					int x = i % width, y = i / width;
					img[i] += (float) (bright * (0.8 + 0.2 * Math.sin(f1 * x + ph) * Math.cos(f2 * y)));
					x0 = Math.min(x0, x);
					y0 = Math.min(y0, y);
					x1 = Math.max(x1, x);
					y1 = Math.max(y1, y);
				}
				boxes.add(new int[] {x0, y0, x1 - x0 + 1, y1 - y0 + 1});
			}
			float[] blurred = blur(img, width, height);
			short[] pix = new short[width * height];
			for (int i = 0; i < pix.length; i++) {
				double v = blurred[i] + rnd.nextDouble(-1, 1) * 60 + Math.sqrt(Math.max(0, blurred[i])) * gauss(rnd);
				pix[i] = (short) Math.max(0, Math.min(65535, Math.round(v)));
			}
			ImageFiles.saveTiff(new ImagePlus(name, new ShortProcessor(width, height, pix, null)), dir.resolve("images").resolve(name));
			ImageFiles.saveTiff(ImageFiles.labelImage(name, new int[][] {labels}, width, height, null), dir.resolve("reference").resolve(name));
			for (int[] bx : boxes) csv.append(String.format(Locale.ROOT, "%s,%d,%d,%d,%d%n", name, bx[0], bx[1], bx[2], bx[3]));
		}
		AtomicFiles.writeString(dir.resolve("boxes.csv"), csv.toString());
	}

	/**
	 * The pixels of an ellipse (semi-axes a, b, turned by th) inside the image, or null where it
	 * would overlap a nucleus already placed: nuclei may touch but not overlap.
	 */
	private static List<Integer> ellipse(int[] labels, int width, int height, double cx, double cy, double a, double b, double th) {
		List<Integer> px = new ArrayList<>();
		double c = Math.cos(th), s = Math.sin(th);
		for (int y = (int) (cy - a - 1); y <= cy + a + 1; y++)
			for (int x = (int) (cx - a - 1); x <= cx + a + 1; x++) {
				if (x < 0 || y < 0 || x >= width || y >= height) continue;
				double u = ((x - cx) * c + (y - cy) * s) / a, v = (-(x - cx) * s + (y - cy) * c) / b;
				if (u * u + v * v <= 1) {
					if (labels[y * width + x] != 0) return null;
					px.add(y * width + x);
				}
			}
		return px;
	}

	private static double gauss(SplittableRandom r) {
		return Math.sqrt(-2 * Math.log(1 - r.nextDouble())) * Math.cos(2 * Math.PI * r.nextDouble());
	}

	/** 3x3 binomial blur, to soften edges like an optical point-spread function would. */
	private static float[] blur(float[] v, int width, int height) {
		float[] out = new float[v.length];
		float[] k = {1, 2, 1};
		for (int y = 0; y < height; y++)
			for (int x = 0; x < width; x++) {
				float s = 0;
				for (int dy = -1; dy <= 1; dy++)
					for (int dx = -1; dx <= 1; dx++) {
						int xx = Math.max(0, Math.min(width - 1, x + dx)), yy = Math.max(0, Math.min(height - 1, y + dy));
						s += k[dx + 1] * k[dy + 1] * v[yy * width + xx];
					}
				out[y * width + x] = s / 16f;
			}
		return out;
	}
}
