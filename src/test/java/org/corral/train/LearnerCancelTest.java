package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.concurrent.CancellationException;
import java.util.concurrent.atomic.AtomicInteger;

import org.corral.ReferenceData;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Jobs;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

class LearnerCancelTest {
	@TempDir
	Path dir;

	@Test
	void cancellingLeavesThePreviousModelUntouched() throws Exception {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		Path model = dir.resolve("model.zip");
		Files.writeString(model, "the previous model");
		byte[] before = Files.readAllBytes(model);
		LearnSettings s = new LearnSettings();
		s.steps = 50;
		s.minutes = 0;
		s.reportEvery = 1;
		AtomicInteger reports = new AtomicInteger();
		Progress p = new Progress() {
			@Override
			public void report(Report r) {
				reports.incrementAndGet();
			}

			@Override
			public boolean cancelled() {
				return reports.get() >= 3;
			}
		};
		CancellationException e = assertThrows(CancellationException.class, () -> Jobs.learn(boxed, null, s, model, p, n -> {}));
		assertTrue(e.getMessage().contains("step 4"), e.getMessage());
		assertArrayEquals(before, Files.readAllBytes(model));
		try (var files = Files.list(dir)) {
			assertTrue(files.allMatch(f -> f.equals(model)), "nothing else written");
		}
	}
}
