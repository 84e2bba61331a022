package org.corral.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import ij.ImagePlus;
import ij.process.ColorProcessor;
import ij.process.FloatProcessor;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;

import org.corral.CorralException;
import org.corral.ReferenceData;
import org.corral.io.AtomicFiles;
import org.corral.io.ImageFiles;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.DynamicTest;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.TestFactory;
import org.junit.jupiter.api.io.TempDir;

/**
 * Bad input on every command-line path, as one table: each row runs a job and expects either a
 * clear error containing the given words (and no partial output), or a defined success.
 */
class BadInputTest {
	@TempDir
	static Path dir;
	static Path model, demoImages, demoBoxes;

	/**
	 * One row: a name, the argv to run (built lazily; or {@code direct}, code run instead of the
	 * command line), what the error must say (null = success), and a check afterwards.
	 */
	record Case(String name, Setup argv, String error, Check after, Check direct) {
		Case(String name, Setup argv, String error, Check after) {
			this(name, argv, error, after, null);
		}

		static Case direct(String name, String error, Check code) {
			return new Case(name, null, error, null, code);
		}
	}

	interface Setup {
		String[] make(Path work) throws Exception;
	}

	interface Check {
		void run(Path work) throws Exception;
	}

	@BeforeAll
	static void smallModel() throws Exception {
		demoImages = ReferenceData.demo().resolve("images").toAbsolutePath();
		demoBoxes = ReferenceData.demo().resolve("boxes.csv").toAbsolutePath();
		model = dir.resolve("small.zip");
		assertEquals(0, Main.run(new String[] {"learn", "--images", demoImages.toString(), "--boxes", demoBoxes.toString(), "--model", model.toString(),
			"--steps", "3", "--width", "16", "--minutes", "0"}));
	}

	static Path folderWith(Path work, String name, ImagePlus imp) {
		Path f = work.resolve("in");
		ImageFiles.saveTiff(imp, f.resolve(name));
		return f;
	}

	static Path write(Path p, String text) throws IOException {
		Files.createDirectories(p.getParent());
		Files.writeString(p, text);
		return p;
	}

	static Path zip(Path p, String entry, String text) throws IOException {
		try (OutputStream o = Files.newOutputStream(p); ZipOutputStream z = new ZipOutputStream(o)) {
			z.putNextEntry(new ZipEntry(entry));
			z.write(text.getBytes(StandardCharsets.UTF_8));
		}
		return p;
	}

	static String[] learn(Path images, Path boxes, Path out) {
		return new String[] {"learn", "--images", images.toString(), "--boxes", boxes.toString(), "--model", out.resolve("m.zip").toString(), "--steps", "2",
			"--width", "16", "--minutes", "0"};
	}

	static String[] maskImage(Path images, Path m, Path out) {
		return new String[] {"mask-image", "--images", images.toString(), "--model", m.toString(), "--out", out.resolve("out").toString()};
	}

	static int objects(Path out, String base) throws IOException {
		return Files.readAllLines(out.resolve("out").resolve(base + ".objects.csv")).size() - 1;
	}

	static List<Case> cases() {
		List<Case> c = new ArrayList<>();
		// images
		c.add(new Case("empty (0-byte) image file", w -> learn(write(w.resolve("in/a.tif"), "").getParent(), write(w.resolve("b.csv"), "image,x,y,width,height\na.tif,1,1,3,3\n"), w),
			"Cannot read image", w -> assertFalse(Files.exists(w.resolve("m.zip")))));
		c.add(new Case("unreadable TIFF among good images: reported, others go on", w -> {
			Path in = folderWith(w, "good.tif", new ImagePlus("g", new FloatProcessor(40, 30)));
			Files.write(in.resolve("bad.tif"), new byte[] {'I', 'I', 42, 0, 1, 2, 3});
			return maskImage(in, model, w);
		}, "exit 3", w -> {
			assertTrue(Files.exists(w.resolve("out/good.labels.tif")));
			assertFalse(Files.exists(w.resolve("out/bad.labels.tif")));
			String f = Files.readString(w.resolve("out/corral-failures.csv"));
			assertTrue(f.contains("bad.tif,\"Cannot read image"), f); // quoted: the message holds a comma
		}));
		c.add(new Case("constant image: no objects, no error", w -> maskImage(folderWith(w, "flat.tif", new ImagePlus("f", new FloatProcessor(64, 48, new float[64 * 48]))), model, w),
			null, w -> assertEquals(0, objects(w, "flat"))));
		c.add(new Case("NaN and infinite pixels (32-bit): treated as background", w -> {
			float[] v = new float[64 * 48];
			for (int i = 0; i < v.length; i++) v[i] = i % 7 == 0 ? Float.NaN : i % 11 == 0 ? Float.POSITIVE_INFINITY : i % 5;
			return maskImage(folderWith(w, "nan.tif", new ImagePlus("n", new FloatProcessor(64, 48, v))), model, w);
		}, null, w -> assertTrue(Files.exists(w.resolve("out/nan.labels.tif")))));
		c.add(new Case("1x1 image", w -> maskImage(folderWith(w, "dot.tif", new ImagePlus("d", new FloatProcessor(1, 1))), model, w), null,
			w -> assertEquals(1, ImageFiles.open(w.resolve("out/dot.labels.tif")).getWidth())));
		c.add(new Case("wrong channel count for the model (RGB vs grey)", w -> maskImage(folderWith(w, "rgb.tif", new ImagePlus("c", new ColorProcessor(32, 32))), model, w),
			"exit 3", w -> {
				assertFalse(Files.exists(w.resolve("out/rgb.labels.tif")));
				assertTrue(Files.readString(w.resolve("out/corral-failures.csv")).contains("rgb.tif,The model was learned on 1-channel images; this image has 3"));
			}));
		c.add(new Case("non-image files in the folder are skipped", w -> {
			Path in = folderWith(w, "g.tif", new ImagePlus("g", new FloatProcessor(40, 30)));
			write(in.resolve("notes.txt"), "hello");
			return maskImage(in, model, w);
		}, null, w -> assertEquals(List.of("corral-objects.csv", "g.labels.tif", "g.objects.csv", "g.outlines.zip", "g.overlay.png"), list(w.resolve("out")), "the folder table, no failure file")));
		c.add(new Case("empty image folder", w -> maskImage(Files.createDirectories(w.resolve("in")), model, w), "No images", null));
		// boxes
		c.add(new Case("no boxes at all: learning refuses", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width,height\n"), w), "No boxes",
			w -> assertFalse(Files.exists(w.resolve("m.zip")))));
		c.add(new Case("box file lacks a column", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width\nseedcoat-01.tif,1,2,3\n"), w), "height", null));
		c.add(new Case("negative box size", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width,height\nseedcoat-01.tif,1,2,-3,4\n"), w), "line 2", null));
		c.add(new Case("text in a numeric column", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width,height\nseedcoat-01.tif,1,2,3,4\nseedcoat-01.tif,1,two,3,4\n"), w),
			"line 3: column y holds 'two'", null));
		c.add(new Case("box file names a missing image", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width,height\nnot-here.tif,1,2,3,4\n"), w), "not-here.tif", null));
		c.add(new Case("box file does not exist", w -> learn(demoImages, w.resolve("none.csv"), w), "Cannot read box file", null));
		c.add(new Case("every box outside its image", w -> learn(demoImages, write(w.resolve("b.csv"), "image,x,y,width,height\nseedcoat-01.tif,500,500,10,10\n"), w),
			"none of the", w -> assertFalse(Files.exists(w.resolve("m.zip")))));
		// models
		c.add(new Case("truncated model file", w -> {
			byte[] b = Files.readAllBytes(model);
			Path t = w.resolve("t.zip");
			Files.write(t, java.util.Arrays.copyOf(b, b.length / 3));
			return maskImage(demoImages, t, w);
		}, "truncated", w -> assertFalse(Files.exists(w.resolve("out")) && list(w.resolve("out")).size() > 0)));
		c.add(new Case("model from a newer format version", w -> maskImage(demoImages, zip(w.resolve("n.zip"), "header.json",
			"{\"format\":\"corral-model\",\"formatVersion\":7,\"inChannels\":1,\"baseChannels\":8,\"levels\":4}"), w), "newer", null));
		c.add(new Case("model zip with a path escaping its folder", w -> maskImage(demoImages, zip(w.resolve("e.zip"), "../../etc/x", "{}"), w), "escapes", null));
		c.add(new Case("not a model at all", w -> maskImage(demoImages, write(w.resolve("x.zip"), "plain text"), w), "not a zip", null));
		// outputs and options
		c.add(new Case("output folder is a file", w -> new String[] {"mask-image", "--images", demoImages.toString(), "--model", model.toString(), "--out",
			write(w.resolve("file-not-folder"), "x").toString()}, "output folder", null));
		c.add(new Case("unknown option", w -> new String[] {"learn", "--images", "x", "--model", "y", "--stpes", "3"}, "unknown option --stpes", null));
		c.add(new Case("invalid setting", w -> new String[] {"learn", "--images", demoImages.toString(), "--boxes", demoBoxes.toString(), "--model",
			w.resolve("m.zip").toString(), "--band", "0"}, "--band must be a whole number from 1", w -> assertFalse(Files.exists(w.resolve("m.zip")))));
		c.add(new Case("score: label image of another size", w -> {
			ImageFiles.saveTiff(new ImagePlus("a", new FloatProcessor(5, 5)), w.resolve("lab/seedcoat-01.tif"));
			ImageFiles.saveTiff(new ImagePlus("a", new FloatProcessor(6, 5)), w.resolve("ref/seedcoat-01.tif"));
			return new String[] {"score", "--labels", w.resolve("lab").toString(), "--reference", w.resolve("ref").toString()};
		}, "is 5x5, its reference 6x5", null));
		c.add(new Case("score: a reference without label image", w -> new String[] {"score", "--labels", Files.createDirectories(w.resolve("lab")).toString(), "--reference",
			ReferenceData.demo().resolve("reference").toAbsolutePath().toString()}, "No label image for reference seedcoat-01.tif", null));
		c.add(new Case("score: RGB is not a label image", w -> {
			ImageFiles.saveTiff(new ImagePlus("a", new ColorProcessor(5, 5)), w.resolve("lab/x.tif"));
			ImageFiles.saveTiff(new ImagePlus("a", new FloatProcessor(5, 5)), w.resolve("ref/x.tif"));
			return new String[] {"score", "--labels", w.resolve("lab").toString(), "--reference", w.resolve("ref").toString()};
		}, "RGB", null));
		return c;
	}

	static List<String> list(Path d) throws IOException {
		try (Stream<Path> s = Files.list(d)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	/** Every row is its own test, so one failure does not hide the others. */
	@TestFactory
	Stream<DynamicTest> everyBadInputGetsAClearErrorAndLeavesNoPartialOutput() {
		List<Case> cases = new ArrayList<>(cases());
		cases.addAll(DataSafetyCases.cases(() -> model, demoImages, demoBoxes));
		int[] k = {0};
		return cases.stream().map(c -> DynamicTest.dynamicTest(c.name(), () -> run(c, Files.createDirectories(dir.resolve("case" + (++k[0]))))));
	}

	static void run(Case c, Path work) throws Exception {
		String error = null;
		try {
			if (c.direct() != null) c.direct().run(work);
			else {
				int code = Main.run(c.argv().make(work));
				if (code != 0) error = "exit " + code;
			}
		} catch (CorralException e) {
			error = e.getMessage();
		}
		if (c.error() == null) assertEquals(null, error, c.name());
		else if (error == null) fail(c.name() + ": expected an error mentioning '" + c.error() + "', it succeeded");
		else assertTrue(error.contains(c.error()), c.name() + ": '" + error + "' should mention '" + c.error() + "'");
		if (c.after() != null) c.after().run(work);
		try (Stream<Path> s = Files.walk(work)) {
			assertFalse(s.anyMatch(p -> p.getFileName().toString().endsWith(".part")), c.name() + ": temporary file left behind");
		}
	}

	@Test
	void aWriteThatFailsMidwayLeavesTheOldFile() throws Exception {
		Path target = dir.resolve("labels.tif");
		Files.writeString(target, "previous complete file");
		try {
			AtomicFiles.write(target, out -> {
				out.write(new byte[4096]);
				throw new IOException("No space left on device");
			});
			fail("the failing write must be reported");
		} catch (CorralException e) {
			assertTrue(e.getMessage().contains("No space left on device") && e.getMessage().contains("labels.tif"), e.getMessage());
		}
		assertEquals("previous complete file", Files.readString(target));
		assertEquals(List.of("labels.tif"), list(dir).stream().filter(n -> n.contains("labels")).toList(), "no temporary file left");
	}

	/** Every outcome ends the process with its own code; an internal error prints its trace instead of leaving the process open. */
	@Test
	void everyOutcomeHasItsExitCode() {
		java.io.ByteArrayOutputStream buf = new java.io.ByteArrayOutputStream();
		java.io.PrintStream err = new java.io.PrintStream(buf, true, StandardCharsets.UTF_8);
		assertEquals(0, Main.exitCode(() -> 0, err));
		assertEquals(2, Main.exitCode(() -> { throw new CorralException("no boxes"); }, err));
		assertEquals(130, Main.exitCode(() -> { throw new java.util.concurrent.CancellationException("learning cancelled at step 3"); }, err));
		assertEquals(1, Main.exitCode(() -> { throw new ArrayIndexOutOfBoundsException("Index -1 out of bounds for length 0"); }, err));
		String said = buf.toString(StandardCharsets.UTF_8);
		assertTrue(said.contains("corral: error: no boxes"), said);
		assertTrue(said.contains("learning cancelled at step 3; nothing written"), said);
		assertTrue(said.contains("internal error") && said.contains("ArrayIndexOutOfBoundsException"), said);
	}
}
