package org.corral.model;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ai.djl.ndarray.NDList;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;
import ai.djl.training.ParameterStore;
import ai.djl.training.initializer.NormalInitializer;
import ai.djl.nn.Parameter;

import java.io.OutputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;

import org.corral.CorralException;
import org.corral.net.UNet;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class ModelFileTest {
	@TempDir
	Path dir;

	static ModelHeader header() {
		ModelHeader h = new ModelHeader();
		h.inChannels = 2;
		h.baseChannels = 4;
		h.levels = 2;
		h.normLow = 1;
		h.normHigh = 99.8;
		h.objectSize = 12.5;
		h.seed = 7;
		h.counts.boxes = 31;
		h.counts.steps = 400;
		h.counts.continuedFrom = "2026-01-02T03:04:05Z";
		h.scores.constraintsMet = 0.997;
		h.scores.parts.put("background", 0.02);
		h.activationRanges = new float[] {1.5f, 0.25f, 7f};
		h.imageThreshold = 0.4;
		h.imageFlips = 4;
		h.noiseLevel = 0.007;
		h.backgroundLevel = new float[] {0.02f, 0.9f};
		return h;
	}

	float[] run(UNet net, NDManager m) {
		float[] x = new float[2 * 8 * 8];
		for (int i = 0; i < x.length; i++) x[i] = (i % 7) / 7f;
		return net.forward(new ParameterStore(m, false), new NDList(m.create(x, new Shape(1, 2, 8, 8))), false).singletonOrThrow().toFloatArray();
	}

	@Test
	void roundTripGivesTheSameNetwork() {
		Path f = dir.resolve("m.zip");
		float[] before;
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = new UNet(2, 4, 2);
			net.setInitializer(new NormalInitializer(0.1f), Parameter.Type.WEIGHT);
			net.initialize(m, DataType.FLOAT32, new Shape(1, 2, 8, 8));
			before = run(net, m);
			ModelFile.write(f, header(), net);
		}
		try (NDManager m = NDManager.newBaseManager()) {
			ModelFile.Loaded l = ModelFile.read(f, m);
			assertEquals(12.5, l.header().objectSize);
			assertEquals(7, l.header().seed);
			assertEquals(31, l.header().counts.boxes);
			assertEquals(400, l.header().counts.steps);
			assertEquals("2026-01-02T03:04:05Z", l.header().counts.continuedFrom);
			assertEquals(0.997, l.header().scores.constraintsMet);
			assertEquals(0.02, l.header().scores.parts.get("background"));
			assertTrue(Double.isNaN(l.header().scores.loss), "a score never reported stays unknown");
			assertArrayEquals(new float[] {1.5f, 0.25f, 7f}, l.header().activationRanges, "the ranges for 8-bit masking travel with the model");
			assertEquals(0.4, l.header().imageThreshold, "the whole-image threshold travels with the model");
			assertEquals(4, l.header().imageFlips);
			assertEquals(0.007, l.header().noiseLevel, "the learning images' noise travels with the model");
			assertArrayEquals(new float[] {0.02f, 0.9f}, l.header().backgroundLevel);
			assertArrayEquals(before, run(l.net(), m), 1e-6f);
		}
	}

	/** A model written before the whole-image settings existed masks as it did: threshold 0.5, one pass. */
	@Test
	void aHeaderWithoutWholeImageSettingsKeepsTheDefaults() {
		ModelHeader h = new com.google.gson.Gson().fromJson("{\"format\":\"corral-model\",\"formatVersion\":1,\"inChannels\":1,\"baseChannels\":4,\"levels\":2}",
			ModelHeader.class);
		assertEquals(0.5, h.imageThreshold);
		assertEquals(1, h.imageFlips);
		assertEquals(0, h.noiseLevel, "no noise level: every field normalised by its percentiles, as before");
		assertEquals(null, h.backgroundLevel);
	}

	@Test
	void damagedFilesGiveClearErrors() throws Exception {
		Path good = dir.resolve("good.zip");
		try (NDManager m = NDManager.newBaseManager()) {
			UNet net = new UNet(2, 4, 2);
			net.setInitializer(new NormalInitializer(0.1f), Parameter.Type.WEIGHT);
			net.initialize(m, DataType.FLOAT32, new Shape(1, 2, 8, 8));
			ModelFile.write(good, header(), net);
		}
		byte[] bytes = Files.readAllBytes(good);
		Path truncated = dir.resolve("truncated.zip");
		Files.write(truncated, java.util.Arrays.copyOf(bytes, bytes.length / 2));
		assertMessage(truncated, "truncated");

		Path newer = zip("newer.zip", "header.json", "{\"format\":\"corral-model\",\"formatVersion\":99,\"inChannels\":1,\"baseChannels\":4,\"levels\":2}");
		assertMessage(newer, "newer");

		Path escape = zip("escape.zip", "../evil.json", "{}");
		assertMessage(escape, "escapes");

		Path other = zip("other.zip", "readme.txt", "hello");
		assertMessage(other, "no header.json");

		assertMessage(dir.resolve("absent.zip"), "does not exist");
	}

	Path zip(String name, String entry, String text) throws Exception {
		Path p = dir.resolve(name);
		try (OutputStream o = Files.newOutputStream(p); ZipOutputStream z = new ZipOutputStream(o)) {
			z.putNextEntry(new ZipEntry(entry));
			z.write(text.getBytes(StandardCharsets.UTF_8));
		}
		return p;
	}

	static void assertMessage(Path f, String part) {
		try (NDManager m = NDManager.newBaseManager()) {
			CorralException e = assertThrows(CorralException.class, () -> ModelFile.read(f, m));
			assertTrue(e.getMessage().contains(part) && e.getMessage().contains(f.toString()), e.getMessage());
		}
	}
}
