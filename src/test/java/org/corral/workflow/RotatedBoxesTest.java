package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.SplittableRandom;

import org.corral.SyntheticObjects;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.boxes.RoiBoxes;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Rotated boxes for elongated objects. Invented scenario: bundles of parallel hypha cells of the
 * fictional <i>Corralia borealis</i> lying diagonally, so that the upright rectangles around
 * neighbours overlap heavily while rotated boxes fit each cell. The same images are learned and
 * masked once with upright boxes and once with rotated boxes; the rotated boxes must give the
 * better per-object Dice on a field not learned from.
 */
class RotatedBoxesTest {
	@TempDir
	static Path dir;

	static final int W = 160, H = 128;

	/** Writes images/, labels/, upright.csv and rotated.csv (the same cells) for {@code images} fields. */
	static void write(Path set, int images, long seed) throws Exception {
		Files.createDirectories(set.resolve("images"));
		Files.createDirectories(set.resolve("labels"));
		StringBuilder upright = new StringBuilder("image,x,y,width,height\n"), rotated = new StringBuilder("image,x,y,width,height,centre_x,centre_y,length,breadth,angle\n");
		for (int n = 1; n <= images; n++) {
			SplittableRandom rnd = new SplittableRandom(seed * 13 + n);
			String name = String.format(Locale.ROOT, "hyphae-%02d.tif", n);
			int[] lab = new int[W * H];
			float[] img = new float[W * H];
			double angle = rnd.nextDouble(30, 60) * (rnd.nextBoolean() ? 1 : -1);
			int id = 0;
			for (int tries = 0; tries < 600 && id < 12; tries++) {
				double len = rnd.nextDouble(34, 44), br = rnd.nextDouble(8, 10), a = angle + rnd.nextDouble(-5, 5);
				Box.Frame f = new Box.Frame(rnd.nextDouble(15, W - 15), rnd.nextDouble(15, H - 15), len, br, a);
				Box r = Box.rotated(0, f, 0, "x", null);
				if (r.x() < 1 || r.y() < 1 || r.x1() >= W - 1 || r.y1() >= H - 1) continue;
				boolean free = true;
				for (int y = r.y(); y < r.y1() && free; y++)
					for (int x = r.x(); x < r.x1(); x++) {
						double[] uv = f.toFrame(x + 0.5, y + 0.5);
						double du = uv[0] / (len / 2 + 2), dv = uv[1] / (br / 2 + 2);
						if (du * du + dv * dv <= 1 && lab[y * W + x] != 0) { free = false; break; }
					}
				if (!free) continue;
				id++;
				SyntheticObjects.Bounds bounds = new SyntheticObjects.Bounds();
				float level = (float) rnd.nextDouble(0.6, 0.9);
				for (int y = r.y(); y < r.y1(); y++)
					for (int x = r.x(); x < r.x1(); x++) {
						double[] uv = f.toFrame(x + 0.5, y + 0.5);
						double du = uv[0] / (len / 2), dv = uv[1] / (br / 2);
						if (du * du + dv * dv > 1) continue;
						lab[y * W + x] = id;
						img[y * W + x] = level;
						bounds.add(x, y);
					}
				upright.append(name + "," + bounds.csv() + "\n");
				rotated.append(String.format(Locale.ROOT, "%s,,,,,%.2f,%.2f,%.2f,%.2f,%.2f%n", name, f.cx(), f.cy(), len, br, a));
			}
			for (int i = 0; i < W * H; i++) if (img[i] == 0) img[i] = 0.1f; // background
			InventedField.save(set, name, W, H, img, lab, 0.04, rnd);
		}
		Files.writeString(set.resolve("upright.csv"), upright);
		Files.writeString(set.resolve("rotated.csv"), rotated);
	}

	/** Learns from the boxes of the first images and returns the per-object Dice of the last image's box masks. */
	static double dice(Path set, String boxFile) {
		var all = BoxedImages.find(set.resolve("images"), set.resolve(boxFile));
		var learn = new java.util.LinkedHashMap<Path, List<Box>>();
		Path last = null;
		for (var e : all.entrySet()) {
			if (last != null) learn.put(last, all.get(last));
			last = e.getKey();
		}
		LearnSettings s = new LearnSettings();
		s.steps = 150;
		s.minutes = 0;
		Path model = dir.resolve(boxFile + ".zip");
		Jobs.learn(learn, null, s, model, Progress.silent(), n -> {}).close();
		try (ModelRunner m = ModelRunner.open(model)) {
			int[] lab = Jobs.maskBoxes(ImageFiles.open(last), all.get(last), m).labels()[0];
			return Scores.compare(lab, ImageFiles.readLabels(set.resolve("labels").resolve(last.getFileName()), null)).objectDice();
		}
	}

	@Test
	void rotatedBoxesMaskDiagonalCellsBetterThanUprightBoxes() throws Exception {
		Path set = dir.resolve("hyphae");
		write(set, 4, 5);
		double upright = dice(set, "upright.csv"), rotated = dice(set, "rotated.csv");
		System.out.printf(Locale.ROOT, "RotatedBoxesTest: per-object Dice on a field not learned from: upright boxes %.4f, rotated boxes %.4f%n", upright, rotated);
		assertTrue(rotated > upright + 0.02, "rotated " + rotated + " against upright " + upright);
		assertTrue(rotated > 0.8, "rotated boxes: " + rotated);
	}

	@Test
	void rotatedBoxesFromCsvAndFromImageJsRotatedRectangle() throws Exception {
		Path csv = dir.resolve("r.csv");
		Files.writeString(csv, "image,x,y,width,height,centre_x,centre_y,length,breadth,angle\na.tif,,,,,50,40,40,10,45\na.tif,1,2,3,4,,,,,\n");
		Map<String, List<Box>> read = BoxFiles.readCsv(csv);
		Box r = read.get("a.tif").get(0);
		assertTrue(r.isRotated());
		assertEquals(45, r.frame().angle(), 1e-9);
		// corners at 50 +- (20 cos45 + 5 sin45) = 50 +- 17.68: the rectangle its corners span
		assertEquals(32, r.x());
		assertEquals(68 - 32, r.width());
		assertTrue(r.holds(50, 40) && !r.holds(33, 23), "the centre is in, the spanned rectangle's corner is not");
		assertTrue(!read.get("a.tif").get(1).isRotated(), "a row without an angle is an upright box");
		ij.gui.RotatedRectRoi roi = new ij.gui.RotatedRectRoi(30, 20, 70, 60, 10);
		Box.Frame f = RoiBoxes.frameOf(roi);
		assertEquals(50, f.cx(), 1e-9);
		assertEquals(Math.hypot(40, 40), f.length(), 1e-9);
		assertEquals(10, f.breadth(), 1e-9);
		assertEquals(45, f.angle(), 1e-9);
		Box fromRoi = RoiBoxes.of(new ij.gui.Roi[] {roi}, false).boxes().get(0);
		assertTrue(fromRoi.isRotated() && !fromRoi.isExact(), "a rotated rectangle is a box, not an outline");
	}
}
