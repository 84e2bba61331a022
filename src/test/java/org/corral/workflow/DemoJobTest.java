package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.cli.Main;
import org.corral.io.ImageFiles;
import org.corral.train.LearnSettings;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The main job end to end on the bundled demo images, through the command line's entry point. */
class DemoJobTest {
	@TempDir
	Path out;

	@Test
	void demoWritesEveryOutputAndBeatsTheBox() throws Exception {
		assertEquals(0, Main.run(new String[] {"demo", "--out", out.toString(), "--steps", "120", "--minutes", "0"}));
		Map<String, List<Box>> boxes = BoxFiles.readCsv(fields().resolve("boxes.csv"));
		for (Map.Entry<String, List<Box>> e : boxes.entrySet()) {
			String base = e.getKey().replace(".tif", "");
			Path masks = out.resolve("masks");
			for (String ending : new String[] {".labels.tif", ".outlines.zip", ".objects.csv", ".overlay.png"})
				assertTrue(Files.size(masks.resolve(base + ending)) > 0, base + ending);
			int[] labels = ImageFiles.readLabels(masks.resolve(base + ".labels.tif"), null);
			java.util.Set<Integer> distinct = new java.util.TreeSet<>();
			for (int v : labels) if (v > 0) distinct.add(v);
			assertTrue(distinct.stream().allMatch(v -> v <= e.getValue().size()), "label values are box indices");
			assertTrue(distinct.size() >= e.getValue().size() - 1, "nearly every box got a mask: " + distinct.size() + " of " + e.getValue().size());
			assertEquals(e.getValue().size() + 1, Files.readAllLines(masks.resolve(base + ".objects.csv")).size(), "one row per box");
			assertEquals(distinct.size(), countEntries(masks.resolve(base + ".outlines.zip")), "one outline per non-empty mask");
		}
		List<String> score = Files.readAllLines(out.resolve("scores.csv"));
		String[] all = score.get(score.size() - 1).split(",");
		assertEquals("ALL", all[0]);
		double dice = Double.parseDouble(all[3]);
		// the box itself on the same demo boxes, for comparison
		double box = boxDice(boxes);
		assertTrue(dice > box + 0.03, "demo per-object Dice " + dice + " vs box " + box);
		assertFalse(Files.list(out).anyMatch(p -> p.toString().endsWith(".part")), "no temporary files left");
	}

	static int countEntries(Path zip) throws Exception {
		try (var z = new java.util.zip.ZipFile(zip.toFile())) {
			return z.size();
		}
	}

	/** What {@code corral demo} runs on: the realistic fields. */
	static Path fields() {
		return ReferenceData.demo().resolve("fields");
	}

	static double boxDice(Map<String, List<Box>> boxes) {
		org.corral.score.Scores.Tally t = new org.corral.score.Scores.Tally();
		for (Map.Entry<String, List<Box>> e : boxes.entrySet()) {
			var im = ImageFiles.read(fields().resolve("images").resolve(e.getKey()));
			t.add(org.corral.score.Scores.compare(Baselines.boxItself(im, e.getValue()),
				ImageFiles.readLabels(fields().resolve("reference").resolve(e.getKey()), null)));
		}
		return t.objectDice();
	}

	@Test
	void sameSeedSameLabelsDifferentSeedDifferentModel() throws Exception {
		Map<Path, List<Box>> boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		int[][] runs = new int[3][];
		long[] seeds = {5, 5, 6};
		byte[][] models = new byte[3][];
		for (int i = 0; i < 3; i++) {
			LearnSettings s = new LearnSettings();
			s.steps = 12;
			s.minutes = 0;
			s.seed = seeds[i];
			Path model = out.resolve("m" + i + ".zip");
			Jobs.learn(boxed, null, s, model, org.corral.train.Progress.silent(), n -> {}).close();
			try (var m = org.corral.predict.ModelRunner.open(model)) {
				Jobs.maskBoxes(boxed, null, m, org.corral.instances.BoxMasks.Options.DEFAULTS, Share.ALL, out.resolve("r" + i), null, x -> {});
			}
			runs[i] = ImageFiles.readLabels(out.resolve("r" + i).resolve("seedcoat-01.labels.tif"), null);
			models[i] = parameters(model);
		}
		assertArrayEquals(runs[0], runs[1], "same seed, same thread count: identical label image");
		assertArrayEquals(models[0], models[1], "same seed: identical parameters");
		assertFalse(java.util.Arrays.equals(models[0], models[2]), "another seed gives another model");
	}

	static byte[] parameters(Path model) throws Exception {
		try (var z = new java.util.zip.ZipFile(model.toFile())) {
			return z.getInputStream(z.getEntry("parameters.bin")).readAllBytes();
		}
	}
}
