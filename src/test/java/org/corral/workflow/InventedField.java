package org.corral.workflow;

import ij.ImagePlus;
import ij.process.ShortProcessor;

import java.nio.file.Path;
import java.util.SplittableRandom;

import org.corral.io.ImageFiles;

/** Writing the invented fields of the tests: a 16-bit image with Gaussian noise and its reference labels. */
final class InventedField {
	private InventedField() {}

	/** Writes {@code set/images/name} (1000 x (intensity + noise x N(0,1)), at least 0) and {@code set/labels/name}. */
	static void save(Path set, String name, int w, int h, float[] intensity, int[] labels, double noise, SplittableRandom rnd) {
		ShortProcessor ip = new ShortProcessor(w, h), lp = new ShortProcessor(w, h);
		for (int i = 0; i < w * h; i++) {
			ip.set(i, (int) Math.round(1000 * Math.max(0, intensity[i] + noise * gauss(rnd))));
			lp.set(i, labels[i]);
		}
		ImageFiles.saveTiff(new ImagePlus(name, ip), set.resolve("images").resolve(name));
		ImageFiles.saveTiff(new ImagePlus(name, lp), set.resolve("labels").resolve(name));
	}

	/** A standard normal draw (Box-Muller). */
	static double gauss(SplittableRandom r) {
		return Math.sqrt(-2 * Math.log(1 - r.nextDouble())) * Math.cos(2 * Math.PI * r.nextDouble());
	}
}
