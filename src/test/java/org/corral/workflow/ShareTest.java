package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

import org.corral.CorralException;
import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.instances.BoxMasks;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A folder run in shares ({@code --part K/N}) and the merge: each share writes only its own
 * images' outputs and failure list, and the merged folder holds byte for byte what one run of the
 * whole folder writes (objects table, failures, every image's files).
 */
class ShareTest {
	@TempDir
	static Path dir;
	static Path model, images;
	static java.util.Map<Path, List<Box>> boxed;

	@BeforeAll
	static void learn() throws Exception {
		Path demo = ReferenceData.demo();
		images = dir.resolve("images");
		Files.createDirectories(images);
		try (Stream<Path> s = Files.list(demo.resolve("images"))) {
			for (Path p : s.toList()) Files.copy(p, images.resolve(p.getFileName()));
		}
		Files.write(images.resolve("seedcoat-00-damaged.tif"), new byte[] {'I', 'I', 42, 0, 1, 2, 3}); // fails in its share
		boxed = BoxedImages.find(images, demo.resolve("boxes.csv"));
		LearnSettings s = new LearnSettings();
		s.steps = 40;
		s.minutes = 0;
		model = dir.resolve("m.zip");
		Jobs.learn(BoxedImages.find(demo.resolve("images"), demo.resolve("boxes.csv")), null, s, model, Progress.silent(), n -> {}).close();
	}

	@Test
	void sharesAreStableAndCoverEveryImageOnce() {
		List<Path> all = List.of(Path.of("d/e.tif"), Path.of("d/a.tif"), Path.of("d/c.tif"), Path.of("d/b.tif"), Path.of("d/d.tif"));
		List<Path> seen = new ArrayList<>();
		for (int k = 1; k <= 3; k++) {
			List<Path> share = new Share(k, 3).of(all);
			assertEquals(share, new Share(k, 3).of(List.of(all.get(4), all.get(3), all.get(2), all.get(1), all.get(0))), "the order given does not matter");
			seen.addAll(share);
		}
		assertEquals(List.of("a.tif", "d.tif", "b.tif", "e.tif", "c.tif"), seen.stream().map(p -> p.getFileName().toString()).toList(), "by name, dealt in turn");
		assertEquals(new Share(2, 8), Share.parse(" 2/8 "));
		assertEquals(Share.ALL, Share.parse(null));
		for (String bad : List.of("0/3", "4/3", "3", "a/b", "1/0"))
			assertThrows(CorralException.class, () -> Share.parse(bad), bad);
		assertEquals("corral-failures.part-2-of-8.csv", new Share(2, 8).fileName(OutputNames.FAILURES));
		assertTrue(OutputNames.isOutput(Path.of("corral-failures.part-2-of-8.csv")));
		assertTrue(OutputNames.isOutput(Path.of(OutputNames.OBJECTS)));
	}

	@Test
	void wholeImagesInSharesMergeToTheSameBytesAsOneRun() throws Exception {
		List<Path> all = BoxedImages.images(images);
		assertEquals(5, all.size());
		Path whole = dir.resolve("whole-image"), parts = dir.resolve("whole-image-shares");
		try (ModelRunner m = ModelRunner.open(model)) {
			FolderRun.Report one = Jobs.maskImages(all, m, whole, 0, true, null, x -> {});
			assertEquals(4, one.written());
			assertEquals(List.of("seedcoat-00-damaged.tif"), List.copyOf(one.failed().keySet()));
			int[] written = new int[4];
			for (int k = 1; k <= 3; k++) {
				FolderRun.Report r = Jobs.maskImages(all, new Share(k, 3), m, parts, 0, true, null, x -> {});
				written[k] = r.written() + r.failed().size();
				for (Path p : new Share(k, 3).of(all)) if (!p.getFileName().toString().contains("damaged"))
					assertTrue(Files.isRegularFile(OutputNames.labels(parts, org.corral.io.ImageFiles.baseName(p))));
				if (k == 1) { // only share 1's own images so far, and no folder-wide table
					assertEquals(1, FolderMerge.done(parts).size(), "share 1 holds the damaged image and seedcoat-03");
					assertFalse(Files.exists(parts.resolve(OutputNames.OBJECTS)));
					assertFalse(Files.exists(parts.resolve(OutputNames.FAILURES)));
					assertTrue(Files.isRegularFile(parts.resolve("corral-failures.part-1-of-3.csv")));
					FolderMerge.Report early = FolderMerge.merge(parts, all);
					assertEquals(3, early.missing().size(), "shares 2 and 3 not run yet: " + early.missing());
				}
			}
			assertArrayEquals(new int[] {0, 2, 2, 1}, written);
			assertFalse(Files.exists(parts.resolve("corral-failures.part-2-of-3.csv")), "a share without failures writes no failure list");
		}
		FolderMerge.Report r = FolderMerge.merge(parts, all);
		assertEquals(4, r.done());
		assertEquals(1, r.failed());
		assertTrue(r.missing().isEmpty());
		assertTrue(r.objects() > 20, "the demo's objects: " + r.objects());
		assertSameFiles(whole, parts);
	}

	@Test
	void boxMasksInSharesMergeToTheSameBytesAsOneRun() throws Exception {
		Path whole = dir.resolve("boxes"), parts = dir.resolve("boxes-shares");
		try (ModelRunner m = ModelRunner.open(model)) {
			Jobs.maskBoxes(boxed, null, m, BoxMasks.Options.DEFAULTS, Share.ALL, whole, null, x -> {});
			for (int k = 1; k <= 2; k++) Jobs.maskBoxes(boxed, null, m, BoxMasks.Options.DEFAULTS, new Share(k, 2), parts, null, x -> {});
		}
		FolderMerge.Report r = FolderMerge.merge(parts, List.copyOf(boxed.keySet()));
		assertTrue(r.complete(), r.summary());
		assertSameFiles(whole, parts);
		List<String> rows = Files.readAllLines(parts.resolve(OutputNames.OBJECTS));
		assertEquals("image," + String.join(",", Jobs.BOX_COLUMNS), rows.get(0));
		assertEquals(boxed.values().stream().mapToInt(List::size).sum(), rows.size() - 1, "one row per box of the folder");
	}

	@Test
	void mixedSplitsInOneFolderAreRefused() throws Exception {
		Path out = dir.resolve("mixed");
		Files.createDirectories(out);
		Files.writeString(out.resolve("corral-failures.part-1-of-2.csv"), "image,error\na.tif,x\n");
		Files.writeString(out.resolve("corral-failures.part-1-of-3.csv"), "image,error\nb.tif,y\n");
		CorralException e = assertThrows(CorralException.class, () -> FolderMerge.merge(out, null));
		assertTrue(e.getMessage().contains("different splits"), e.getMessage());
	}

	/** Every file of {@code one} has a file of the same name and bytes in {@code other}. */
	static void assertSameFiles(Path one, Path other) throws Exception {
		List<Path> files;
		try (Stream<Path> s = Files.list(one)) {
			files = s.filter(Files::isRegularFile).sorted().toList();
		}
		assertTrue(files.size() > 10, "outputs of the whole run: " + files);
		for (Path f : files) {
			Path g = other.resolve(f.getFileName());
			assertTrue(Files.isRegularFile(g), "missing after the merge: " + g.getFileName());
			assertArrayEquals(Files.readAllBytes(f), Files.readAllBytes(g), "bytes differ: " + f.getFileName());
		}
	}
}
