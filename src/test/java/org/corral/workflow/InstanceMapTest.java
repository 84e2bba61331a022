package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import org.corral.ReferenceData;
import org.corral.image.PlanarImage;
import org.corral.io.ImageFiles;
import org.corral.model.ModelFile;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The optional centre map (--centres on): a second output that is saved, read back and used for whole images. */
class CentreMapTest {
	@TempDir
	Path dir;

	@Test
	void aTwoOutputModelRoundTripsAndMasksWholeImages() {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		LearnSettings s = new LearnSettings();
		s.steps = 30;
		s.minutes = 0;
		s.base = 16;
		s.centres = true;
		Path file = dir.resolve("c.zip");
		try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(boxed), Progress.silent())) {
			assertEquals(2, r.header().outputs);
			ModelFile.write(file, r.header(), r.net());
		}
		try (ModelRunner m = ModelRunner.open(file)) {
			assertEquals(2, m.header().outputs);
			PlanarImage im = ImageFiles.read(boxed.keySet().iterator().next());
			float[][] maps = m.maps(im, 1, null, 1);
			assertEquals(2, maps.length);
			float lo = 1, hi = 0;
			for (float v : maps[1]) {
				lo = Math.min(lo, v);
				hi = Math.max(hi, v);
			}
			assertTrue(lo >= 0 && hi <= 1 && hi > lo, "a centre map in [0, 1] with some contrast: " + lo + ".." + hi);
			assertTrue(WholeImage.mask(m, im, 0).result().count() > 0, "objects found with the centre map's seeds");
		}
	}
}
