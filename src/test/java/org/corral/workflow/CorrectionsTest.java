package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import org.corral.SyntheticObjects;
import org.corral.io.ImageFiles;
import org.corral.train.LearnSettings;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Outlines as corrections help the objects nobody outlined. Invented scenario: whole guard cells of
 * the fictional <i>Corralia borealis</i>, a bright nucleus in a faint cytoplasm; the objects are the
 * whole cells. From boxes alone the network takes mostly the bright nuclei; a few cells outlined
 * whole (the worst-masked tenth) teach it that the faint cytoplasm belongs to the cell, and the
 * other cells of the learning images (their neighbours) must improve, not only the outlined ones.
 */
class CorrectionsTest {
	@TempDir
	static Path dir;

	static final int W = 160, H = 128;
	/** Cytoplasm intensity: faint against the background (0.1) and the nucleus (0.9). */
	static float CYTOPLASM = Float.parseFloat(System.getProperty("cyto", "0.16"));

	/** Images, reference labels and tight boxes of whole cells; deterministic for a seed. */
	static Path write(Path set, int images, long seed) throws Exception {
		Files.createDirectories(set.resolve("images"));
		Files.createDirectories(set.resolve("labels"));
		StringBuilder csv = new StringBuilder("image,x,y,width,height\n");
		for (int n = 1; n <= images; n++) {
			SplittableRandom rnd = new SplittableRandom(seed * 31 + n);
			String name = String.format(Locale.ROOT, "guardcells-%02d.tif", n);
			int[] lab = new int[W * H];
			float[] img = new float[W * H];
			List<int[]> boxes = new ArrayList<>();
			for (int tries = 0; tries < 400 && boxes.size() < 14; tries++) {
				double rx = rnd.nextDouble(8, 13), ry = rnd.nextDouble(8, 13);
				double cx = rnd.nextDouble(rx + 1, W - rx - 1), cy = rnd.nextDouble(ry + 1, H - ry - 1);
				int x0 = (int) Math.floor(cx - rx), x1 = (int) Math.ceil(cx + rx), y0 = (int) Math.floor(cy - ry), y1 = (int) Math.ceil(cy + ry);
				if (!SyntheticObjects.free(lab, W, H, x0, y0, x1, y1, 2)) continue;
				int id = boxes.size() + 1;
				double nx = cx + rnd.nextDouble(-0.2, 0.2) * rx, ny = cy + rnd.nextDouble(-0.2, 0.2) * ry;
				SyntheticObjects.Bounds bounds = new SyntheticObjects.Bounds();
				for (int y = y0; y <= y1; y++)
					for (int x = x0; x <= x1; x++) {
						double dx = (x + 0.5 - cx) / rx, dy = (y + 0.5 - cy) / ry;
						if (dx * dx + dy * dy > 1) continue;
						lab[y * W + x] = id;
						double ex = (x + 0.5 - nx) / (0.45 * rx), ey = (y + 0.5 - ny) / (0.45 * ry);
						img[y * W + x] = ex * ex + ey * ey <= 1 ? 0.9f : CYTOPLASM; // nucleus, cytoplasm
						bounds.add(x, y);
					}
				boxes.add(bounds.box());
			}
			float[] blurred = new float[W * H];
			for (int y = 0; y < H; y++)
				for (int x = 0; x < W; x++) {
					double s = 0;
					int c = 0;
					for (int dy = -1; dy <= 1; dy++)
						for (int dx = -1; dx <= 1; dx++) {
							int xx = Math.min(W - 1, Math.max(0, x + dx)), yy = Math.min(H - 1, Math.max(0, y + dy));
							s += img[yy * W + xx] == 0 ? 0.1 : img[yy * W + xx];
							c++;
						}
					blurred[y * W + x] = (float) (s / c);
				}
			InventedField.save(set, name, W, H, blurred, lab, 0.03, rnd);
			for (int[] b : boxes) csv.append(String.format(Locale.ROOT, "%s,%d,%d,%d,%d%n", name, b[0], b[1], b[2], b[3]));
		}
		Files.writeString(set.resolve("boxes.csv"), csv);
		return set;
	}

	@Test
	void outliningTheWorstTenthImprovesTheirNeighbours() throws Exception {
		Path set = write(dir.resolve("guardcells"), 6, 7);
		LearnSettings s = new LearnSettings();
		s.steps = 150;
		s.minutes = 0;
		List<CorrectionRounds.Round> rounds = CorrectionRounds.run(set, 5, 1, 0.1, s, System.out::println);
		CorrectionRounds.Round before = rounds.get(0), after = rounds.get(1);
		assertTrue(after.outlines() >= 5, "a tenth of the learning images' cells outlined: " + after.outlines());
		assertTrue(after.corrected() > after.correctedBefore() + 0.05, "the outlined cells themselves: " + after.line());
		assertTrue(after.neighbours() > before.neighbours() + 0.03, "the cells nobody outlined, in the same images: " + before.line() + " -> " + after.line());
		assertTrue(after.heldOut() > before.heldOut(), "cells of an image not learned from: " + before.line() + " -> " + after.line());
	}
}
