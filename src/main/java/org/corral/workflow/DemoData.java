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
 * Deterministic: the same seed writes the same files.
 */
public final class DemoData {
	public static final int WIDTH = 160, HEIGHT = 128, IMAGES = 4;

	private DemoData() {}

	public static void main(String[] args) {
		write(Path.of(args.length > 0 ? args[0] : "test-images"), 20261201L);
	}

	public static void write(Path dir, long seed) {
		StringBuilder csv = new StringBuilder("image,x,y,width,height\n");
		for (int n = 1; n <= IMAGES; n++) {
			SplittableRandom rnd = new SplittableRandom(seed * 31 + n);
			String name = String.format(Locale.ROOT, "seedcoat-%02d.tif", n);
			int[] labels = new int[WIDTH * HEIGHT];
			List<int[]> boxes = new ArrayList<>();
			float[] img = new float[WIDTH * HEIGHT];
			double gx = rnd.nextDouble(-2, 2), gy = rnd.nextDouble(-2, 2);
			for (int y = 0; y < HEIGHT; y++)
				for (int x = 0; x < WIDTH; x++) img[y * WIDTH + x] = (float) (300 + gx * x + gy * y);
			int placed = 0;
			for (int tries = 0; tries < 400 && placed < 14; tries++) {
				double a = rnd.nextDouble(6, 13), b = a * rnd.nextDouble(0.6, 1.0), th = rnd.nextDouble(Math.PI);
				double cx = rnd.nextDouble(4, WIDTH - 4), cy = rnd.nextDouble(4, HEIGHT - 4);
				// allow touching but not overlapping: test the ellipse against the labels so far
				List<Integer> px = new ArrayList<>();
				boolean free = true;
				double c = Math.cos(th), s = Math.sin(th);
				for (int y = (int) (cy - a - 1); y <= cy + a + 1 && free; y++)
					for (int x = (int) (cx - a - 1); x <= cx + a + 1; x++) {
						if (x < 0 || y < 0 || x >= WIDTH || y >= HEIGHT) continue;
						double u = ((x - cx) * c + (y - cy) * s) / a, v = (-(x - cx) * s + (y - cy) * c) / b;
						if (u * u + v * v <= 1) {
							if (labels[y * WIDTH + x] != 0) {
								free = false;
								break;
							}
							px.add(y * WIDTH + x);
						}
					}
				if (!free || px.size() < 20) continue;
				placed++;
				double bright = rnd.nextDouble(900, 2200), f1 = rnd.nextDouble(0.2, 0.5), f2 = rnd.nextDouble(0.2, 0.5), ph = rnd.nextDouble(6.3);
				int x0 = WIDTH, y0 = HEIGHT, x1 = -1, y1 = -1;
				for (int i : px) {
					labels[i] = placed;
					int x = i % WIDTH, y = i / WIDTH;
					img[i] += (float) (bright * (0.8 + 0.2 * Math.sin(f1 * x + ph) * Math.cos(f2 * y)));
					x0 = Math.min(x0, x);
					y0 = Math.min(y0, y);
					x1 = Math.max(x1, x);
					y1 = Math.max(y1, y);
				}
				boxes.add(new int[] {x0, y0, x1 - x0 + 1, y1 - y0 + 1});
			}
			float[] blurred = blur(img);
			short[] pix = new short[WIDTH * HEIGHT];
			for (int i = 0; i < pix.length; i++) {
				double v = blurred[i] + rnd.nextDouble(-1, 1) * 60 + Math.sqrt(Math.max(0, blurred[i])) * gauss(rnd);
				pix[i] = (short) Math.max(0, Math.min(65535, Math.round(v)));
			}
			ImageFiles.saveTiff(new ImagePlus(name, new ShortProcessor(WIDTH, HEIGHT, pix, null)), dir.resolve("images").resolve(name));
			ImageFiles.saveTiff(ImageFiles.labelImage(name, new int[][] {labels}, WIDTH, HEIGHT, null), dir.resolve("reference").resolve(name));
			for (int[] bx : boxes) csv.append(String.format(Locale.ROOT, "%s,%d,%d,%d,%d%n", name, bx[0], bx[1], bx[2], bx[3]));
		}
		AtomicFiles.writeString(dir.resolve("boxes.csv"), csv.toString());
	}

	private static double gauss(SplittableRandom r) {
		return Math.sqrt(-2 * Math.log(1 - r.nextDouble())) * Math.cos(2 * Math.PI * r.nextDouble());
	}

	/** 3x3 binomial blur, to soften edges like an optical point-spread function would. */
	private static float[] blur(float[] v) {
		float[] out = new float[v.length];
		float[] k = {1, 2, 1};
		for (int y = 0; y < HEIGHT; y++)
			for (int x = 0; x < WIDTH; x++) {
				float s = 0;
				for (int dy = -1; dy <= 1; dy++)
					for (int dx = -1; dx <= 1; dx++) {
						int xx = Math.max(0, Math.min(WIDTH - 1, x + dx)), yy = Math.max(0, Math.min(HEIGHT - 1, y + dy));
						s += k[dx + 1] * k[dy + 1] * v[yy * WIDTH + xx];
					}
				out[y * WIDTH + x] = s / 16f;
			}
		return out;
	}
}
