package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import org.corral.ReferenceData;
import org.corral.cli.Main;
import org.corral.io.ImageFiles;
import org.corral.model.ModelFile;
import org.corral.model.ModelHeader;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** mask-boxes learns from the boxes it is asked to mask: reproducibly, recorded, and optional. */
class AdaptationTest {
	@TempDir
	Path dir;

	@Test
	void stepsGrowWithTheBoxesWithinBounds() {
		assertEquals(Adaptation.MIN_STEPS, Adaptation.steps(3));
		assertEquals(100, Adaptation.steps(100));
		assertEquals(Adaptation.MAX_STEPS, Adaptation.steps(5000));
		assertEquals(120, Adaptation.MAX_STEPS, "the README states the rule: 60 to 120 steps");
	}

	@Test
	void maskBoxesAdaptsReproduciblyRecordsTheModelAndCanBeSwitchedOff() throws Exception {
		Path demo = ReferenceData.demo().toAbsolutePath(), images = demo.resolve("images"), boxes = demo.resolve("boxes.csv");
		Path model = dir.resolve("base.zip");
		assertEquals(0, Main.run(new String[] {"learn", "--images", images.toString(), "--boxes", boxes.toString(), "--model", model.toString(), "--steps", "20",
			"--width", "16", "--minutes", "0"}));
		int[][] runs = new int[3][];
		for (int i = 0; i < 3; i++) {
			Path out = dir.resolve("out" + i);
			List<String> argv = new java.util.ArrayList<>(List.of("mask-boxes", "--images", images.toString(), "--boxes", boxes.toString(), "--model", model.toString(),
				"--out", out.toString(), "--adapt-steps", "15"));
			if (i == 0) argv.addAll(List.of("--save-adapted", dir.resolve("adapted.zip").toString()));
			if (i == 2) argv.add("--no-adapt");
			assertEquals(0, Main.run(argv.toArray(String[]::new)));
			runs[i] = ImageFiles.readLabels(out.resolve("seedcoat-02.labels.tif"), null);
			String record = Files.readString(out.resolve(OutputNames.RUN_RECORD));
			assertTrue(record.contains("\"model\": \"" + model.toAbsolutePath()), record);
			assertTrue(record.contains("\"adapt\": " + (i < 2)), record);
			if (i < 2) assertTrue(record.contains("\"adaptSteps\": 15"), record);
		}
		assertArrayEquals(runs[0], runs[1], "same boxes, model, seed and steps: the same label image");
		assertFalse(java.util.Arrays.equals(runs[0], runs[2]), "adapting changed the masks");
		try (var m = org.corral.predict.ModelRunner.open(dir.resolve("adapted.zip"))) {
			assertEquals(ModelFile.readHeader(model).created, m.header().counts.continuedFrom, "the adapted model names its start");
			assertEquals(ModelFile.readHeader(model).objectSize, m.header().objectSize, 1e-9);
			float[] base = ModelFile.readHeader(model).activationRanges, adapted = m.header().activationRanges;
			assertEquals(14, base.length, "learning records one activation range per 3x3 convolution, for 8-bit masking");
			assertEquals(14, adapted.length);
			assertFalse(java.util.Arrays.equals(base, adapted), "the adapted network's ranges are measured again");
			// every model learned now masks whole images alike: four flips at 0.45, written in its file
			var h = m.header();
			assertEquals(ModelHeader.WHOLE_IMAGE_THRESHOLD, h.imageThreshold, "threshold");
			assertEquals(ModelHeader.WHOLE_IMAGE_FLIPS, h.imageFlips, "flips");
			assertEquals(0.45, ModelHeader.WHOLE_IMAGE_THRESHOLD);
			assertEquals(4, ModelHeader.WHOLE_IMAGE_FLIPS);
			// the noise and background of the learning images, for nearly empty fields: never below the start's
			var start = ModelFile.readHeader(model);
			assertTrue(start.noiseLevel > 0 && h.noiseLevel >= start.noiseLevel, "noise level " + start.noiseLevel + " -> " + h.noiseLevel);
			assertEquals(1, h.backgroundLevel.length);
			assertTrue(h.backgroundLevel[0] >= 0 && h.backgroundLevel[0] < 0.2, "a dark fluorescence background: " + h.backgroundLevel[0]);
		}
	}

	/**
	 * mask-image with boxes on some of its images (a few boxed images of a new look): it learns from
	 * them first, then masks every image, the unboxed ones included, with the model it adapted.
	 */
	@Test
	void maskImageLearnsFromTheBoxesOfSomeImagesThenMasksThemAll() throws Exception {
		Path demo = ReferenceData.demo().toAbsolutePath(), images = demo.resolve("images");
		Path model = dir.resolve("base.zip");
		assertEquals(0, Main.run(new String[] {"learn", "--images", images.toString(), "--boxes", demo.resolve("boxes.csv").toString(), "--model", model.toString(), "--steps",
			"20", "--width", "16", "--minutes", "0"}));
		List<String> lines = Files.readAllLines(demo.resolve("boxes.csv"));
		List<String> few = new java.util.ArrayList<>(List.of(lines.get(0)));
		lines.stream().filter(l -> l.startsWith("seedcoat-01.tif,")).limit(8).forEach(few::add);
		assertEquals(9, few.size(), "8 boxes of one image");
		Path boxes = dir.resolve("few.csv");
		Files.write(boxes, few);
		Path out = dir.resolve("adapted-out"), saved = dir.resolve("adapted.zip");
		var said = new java.io.ByteArrayOutputStream();
		var stdout = System.out;
		System.setOut(new java.io.PrintStream(said, true, java.nio.charset.StandardCharsets.UTF_8));
		try {
			assertEquals(0, Main.run(new String[] {"mask-image", "--images", images.toString(), "--model", model.toString(), "--boxes", boxes.toString(), "--out",
				out.toString(), "--adapt-steps", "12", "--save-adapted", saved.toString()}));
		} finally {
			System.setOut(stdout);
		}
		assertTrue(said.toString(java.nio.charset.StandardCharsets.UTF_8).contains("note: 3 image(s) without boxes are masked with the model adapted"), said.toString());
		String record = Files.readString(out.resolve(OutputNames.RUN_RECORD));
		for (String field : List.of("\"adapt\": true", "\"adaptSteps\": 12", "\"adaptBoxes\": 8", "\"adaptImages\": 1",
			"\"savedTo\": \"" + saved))
			assertTrue(record.contains(field), field + " in " + record);
		for (int k = 1; k <= 4; k++) assertTrue(Files.isRegularFile(out.resolve("seedcoat-0" + k + ".labels.tif")), "every image is masked, boxed or not: " + k);
		// the unboxed images were masked with the adapted model, not the one given
		Path again = dir.resolve("again"), plain = dir.resolve("plain");
		assertEquals(0, Main.run(new String[] {"mask-image", "--images", images.toString(), "--model", saved.toString(), "--out", again.toString()}));
		assertEquals(0, Main.run(new String[] {"mask-image", "--images", images.toString(), "--model", model.toString(), "--out", plain.toString()}));
		int[] adapted = ImageFiles.readLabels(out.resolve("seedcoat-03.labels.tif"), null);
		assertArrayEquals(ImageFiles.readLabels(again.resolve("seedcoat-03.labels.tif"), null), adapted);
		assertFalse(java.util.Arrays.equals(ImageFiles.readLabels(plain.resolve("seedcoat-03.labels.tif"), null), adapted), "learning from the boxes changed the masks");
		// refused before anything is learned or written: shares would each repeat the learning; a model onto an image
		Path refused = dir.resolve("refused");
		String[][] bad = {
			{"--boxes", boxes.toString(), "--part", "1/2"},
			{"--boxes", boxes.toString(), "--save-adapted", images.resolve("seedcoat-01.tif").toString()},
			{"--adapt-steps", "5"}}; // learning options without boxes to learn from
		String[] message = {"would repeat the same learning in every share", "seedcoat-01.tif", "need --boxes"};
		for (int i = 0; i < bad.length; i++) {
			List<String> argv = new java.util.ArrayList<>(List.of("mask-image", "--images", images.toString(), "--model", model.toString(), "--out", refused.toString()));
			argv.addAll(List.of(bad[i]));
			var e = org.junit.jupiter.api.Assertions.assertThrows(org.corral.CorralException.class, () -> Main.run(argv.toArray(String[]::new)));
			assertTrue(e.getMessage().contains(message[i]), e.getMessage());
		}
		assertFalse(Files.exists(refused), "nothing written");
	}
}
