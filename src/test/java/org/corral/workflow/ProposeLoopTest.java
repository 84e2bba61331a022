package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CancellationException;
import java.util.concurrent.atomic.AtomicInteger;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.score.Scores;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The correct-and-relearn loop on the demo data: learn, propose boxes, drop some, learn again, mask. */
class ProposeLoopTest {
	@TempDir
	Path dir;

	static LearnSettings steps(int n) {
		LearnSettings s = new LearnSettings();
		s.steps = n;
		s.minutes = 0;
		return s;
	}

	@Test
	void proposeDropSomeAndLearnAgain() throws Exception {
		Path images = ReferenceData.demo().resolve("images");
		var boxed = BoxedImages.find(images, ReferenceData.demo().resolve("boxes.csv"));
		Path first = dir.resolve("first.zip");
		Jobs.learn(boxed, null, steps(60), first, Progress.silent(), n -> {}).close();
		Path proposed = dir.resolve("proposed");
		try (ModelRunner m = ModelRunner.open(first)) {
			org.corral.workflow.FolderRun.Report r = Jobs.maskImages(BoxedImages.images(images), m, proposed, 0, true, null, x -> {});
			assertEquals(4, r.written());
		}
		Map<String, List<Box>> props = BoxFiles.readCsv(proposed.resolve("corral-proposed-boxes.csv"));
		assertEquals(4, props.size());
		for (String name : props.keySet())
			assertEquals(props.get(name).size(), BoxFiles.readRoiZip(proposed.resolve(name.replace(".tif", ".proposed-boxes.zip"))).size(), "ROI zip of rectangles matches the CSV");
		// the user drops every third proposal and learns again from the corrected file
		StringBuilder kept = new StringBuilder("image,x,y,width,height\n");
		int n = 0, dropped = 0;
		for (var e : props.entrySet())
			for (Box b : e.getValue())
				if (++n % 3 == 0) dropped++;
				else kept.append(e.getKey()).append(',').append(b.x()).append(',').append(b.y()).append(',').append(b.width()).append(',').append(b.height()).append('\n');
		Path corrected = Files.writeString(dir.resolve("corrected.csv"), kept);
		assertTrue(dropped > 5);
		Path second = dir.resolve("second.zip");
		var relearn = BoxedImages.find(images, corrected);
		LearnSettings s = steps(60);
		Jobs.learn(relearn, null, s, second, Progress.silent(), x -> {}).close();
		// the relearned model masks the true boxes well
		Scores.Tally t = new Scores.Tally(), box = new Scores.Tally();
		try (ModelRunner m = ModelRunner.open(second)) {
			for (var e : boxed.entrySet()) {
				Jobs.BoxMaskOutcome o = Jobs.maskBoxes(ImageFiles.open(e.getKey()), e.getValue(), m);
				int[] ref = ImageFiles.readLabels(ReferenceData.demo().resolve("reference").resolve(e.getKey().getFileName()), null);
				t.add(Scores.compare(o.labels()[0], ref));
				box.add(Scores.compare(Baselines.boxItself(ImageFiles.read(e.getKey()), e.getValue()), ref));
			}
		}
		assertTrue(t.objectDice() > box.objectDice() + 0.03, "relearned " + t.objectDice() + " vs box " + box.objectDice());
	}

	@Test
	void cancelledFolderRunResumesWhereItStopped() throws Exception {
		Path images = ReferenceData.demo().resolve("images");
		var boxed = BoxedImages.find(images, ReferenceData.demo().resolve("boxes.csv"));
		Path model = dir.resolve("m.zip");
		Jobs.learn(boxed, null, steps(10), model, Progress.silent(), n -> {}).close();
		Path out = dir.resolve("out");
		AtomicInteger logged = new AtomicInteger();
		List<String> log = new ArrayList<>();
		try (ModelRunner m = ModelRunner.open(model)) {
			assertThrows(CancellationException.class, () -> Jobs.maskImages(BoxedImages.images(images), m, out, 0, false, () -> logged.get() >= 2, x -> {
				logged.incrementAndGet();
				log.add(x);
			}));
			try (var files = Files.list(out)) {
				assertEquals(2, files.filter(p -> p.toString().endsWith(".labels.tif")).count(), "two images complete, nothing half-written");
			}
			org.corral.workflow.FolderRun.Report r = Jobs.maskImages(BoxedImages.images(images), m, out, 0, false, null, log::add);
			assertEquals(2, r.written());
			assertEquals(2, r.skipped());
		}
	}
}
