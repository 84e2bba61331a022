package org.corral.train;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertSame;

import java.util.List;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Jobs;
import org.junit.jupiter.api.Test;

/** Scale jitter: learning images also learned resized by 1 / (1 + j) and 1 + j. */
class ScaleJitterTest {
	@Test
	void aResizedImageKeepsItsBoxesOnTheirObjects() {
		PlanarImage im = PlanarImage.zeros(100, 60, 1);
		for (int y = 20; y < 30; y++)
			for (int x = 40; x < 60; x++) im.channels[0][y * 100 + x] = 1;
		byte[] region = new byte[100 * 60];
		for (int i = 0; i < 50; i++) region[i] = 1; // first half of the top row
		TrainingImage ti = new TrainingImage("a", im, List.of(new Box(0, 40, 20, 20, 10)), region);
		assertSame(ti, ti.scaled(1));
		TrainingImage big = ti.scaled(1.3);
		assertEquals(130, big.image().width);
		assertEquals(78, big.image().height);
		Box b = big.boxes().get(0);
		assertEquals(52, b.x());
		assertEquals(26, b.y());
		assertEquals(26, b.width());
		assertEquals(13, b.height());
		// the bright rectangle fills the scaled box: its centre is bright, the pixels beyond it dark
		assertEquals(1, big.image().channels[0][(b.y() + b.height() / 2) * 130 + b.x() + b.width() / 2], 1e-6);
		assertEquals(0, big.image().channels[0][(b.y() - 2) * 130 + b.x()], 1e-6);
		assertEquals(1, big.region()[64]);
		assertEquals(0, big.region()[66]);
		assertEquals(0, big.region()[3 * 130]);
	}

	@Test
	void learningWithScaleJitterIsRecordedAndChangesTheModel() {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		var first = new java.util.LinkedHashMap<java.nio.file.Path, List<Box>>();
		var e = boxed.entrySet().iterator().next();
		first.put(e.getKey(), e.getValue());
		float[][] heads = new float[2][];
		for (int k = 0; k < 2; k++) {
			LearnSettings s = new LearnSettings();
			s.steps = 3;
			s.minutes = 0;
			s.base = 4;
			s.scaleJitter = k == 0 ? 0 : 0.3;
			try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(first), Progress.silent())) {
				assertEquals(1, r.header().counts.images, "the resized copies are not counted as images");
				if (k == 0) assertNull(r.header().training.get("scaleJitter"), "absent when off, as in models without it");
				else assertEquals(0.3, ((Number) r.header().training.get("scaleJitter")).doubleValue(), 1e-12);
				heads[k] = r.net().getParameters().valueAt(0).getArray().toFloatArray();
			}
		}
		// the same seed draws the same boxes; with the resized copies among them, the crops (and so the model) differ
		assertFalse(java.util.Arrays.equals(heads[0], heads[1]));
	}
}
