package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import org.corral.ReferenceData;
import org.corral.image.PlanarImage;
import org.corral.instances.DistanceTargets;
import org.corral.io.ImageFiles;
import org.corral.model.ModelFile;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The instance map (default): a second output, saved and read back, high at object cores and low at their rims. */
class InstanceMapTest {
	@TempDir
	Path dir;

	/**
	 * A tall mosaic of a demo image masked in bands of 96 rows (objects across every seam) and as one
	 * window: the network's maps differ only by the tiling's rounding, so the objects agree.
	 */
	static void bandsMaskAsTheWholeImage(ModelRunner m, PlanarImage tile) {
		int w = 2 * tile.width, h = 5 * tile.height;
		float[][] c = new float[tile.nChannels()][w * h];
		for (int k = 0; k < c.length; k++)
			for (int y = 0; y < h; y++)
				for (int x = 0; x < w; x++) c[k][y * w + x] = tile.channels[k][(y % tile.height) * tile.width + x % tile.width];
		PlanarImage tall = new PlanarImage(w, h, c);
		double size = m.header().objectSize;
		WholeImage.Outcome whole = WholeImage.mask(m, tall, size, Integer.MAX_VALUE);
		WholeImage.Outcome banded = WholeImage.mask(m, tall, size, 96);
		int[] a = whole.result().labels(), b = banded.result().labels();
		long same = 0;
		for (int i = 0; i < a.length; i++) if (a[i] == b[i]) same++;
		System.out.printf(java.util.Locale.ROOT, "bands against one window: %d / %d objects, %.5f of pixels with the same label%n", banded.result().count(),
			whole.result().count(), same / (double) a.length);
		assertTrue(whole.result().count() > 40, "the mosaic holds many objects: " + whole.result().count());
		assertEquals(whole.result().count(), banded.result().count(), "objects in bands and in one window");
		assertTrue(same >= 0.999 * a.length, "labels agree on " + same + " of " + a.length + " pixels");
		assertEquals(null, banded.probability(), "no whole-image probability is kept in bands");

		// an image taller than a band, as mask-image meets it: read from ImageJ a band at a time
		int hTall = org.corral.instances.BandedImageMasks.BAND_ROWS + 76;
		float[] px = new float[tile.width * hTall];
		for (int y = 0; y < hTall; y++)
			for (int x = 0; x < tile.width; x++) px[y * tile.width + x] = tile.channels[0][(y % tile.height) * tile.width + x];
		ij.ImagePlus imp = new ij.ImagePlus("tall", new ij.process.FloatProcessor(tile.width, hTall, px));
		Jobs.WholeImageOutcome job = Jobs.maskWhole(imp, m, size);
		int[] one = WholeImage.mask(m, ImageFiles.planes(imp, 1, 1), size, Integer.MAX_VALUE).result().labels();
		long agree = 0;
		for (int i = 0; i < one.length; i++) if (one[i] == job.labels()[0][i]) agree++;
		assertTrue(job.count() > 40, "objects in the tall image: " + job.count());
		assertTrue(agree >= 0.999 * one.length, "mask-image in bands agrees with one window on " + agree + " of " + one.length + " pixels");
	}


	@Test
	void learnedByDefaultRisesTowardsObjectCoresAndMasksWholeImages() {
		var boxed = BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv"));
		LearnSettings s = new LearnSettings();
		s.steps = 60;
		s.minutes = 0;
		Path file = dir.resolve("c.zip");
		try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(boxed), Progress.silent())) {
			assertEquals(2, r.header().outputs, "on by default");
			ModelFile.write(file, r.header(), r.net());
		}
		try (ModelRunner m = ModelRunner.open(file)) {
			assertEquals(2, m.header().outputs);
			double core = 0, rim = 0;
			long nCore = 0, nRim = 0;
			for (Path img : boxed.keySet()) {
				PlanarImage im = ImageFiles.read(img);
				float[][] maps = m.maps(im, 1, null, 1);
				assertEquals(2, maps.length);
				for (float v : maps[1]) assertTrue(v >= 0 && v <= 1);
				// the demo's reference masks (test-images/reference): cores and rims by their own distance map
				int[] ref = ImageFiles.readLabels(ReferenceData.demo().resolve("reference").resolve(img.getFileName()), null);
				float[] d = DistanceTargets.of(ref, im.width, im.height);
				for (int i = 0; i < d.length; i++) {
					if (d[i] >= 0.7) { core += maps[1][i]; nCore++; }
					else if (d[i] > 0 && d[i] <= 0.3) { rim += maps[1][i]; nRim++; }
				}
				assertTrue(WholeImage.mask(m, im, 0).result().count() > 0, "objects found with the instance map's seeds");
			}
			core /= nCore;
			rim /= nRim;
			assertTrue(core > rim + 0.2, "instance map at object cores " + core + " against rims " + rim);
			bandsMaskAsTheWholeImage(m, ImageFiles.read(boxed.keySet().iterator().next()));
		}
		s.instanceMap = false;
		s.steps = 3;
		try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(boxed), Progress.silent())) {
			assertEquals(1, r.header().outputs, "--instance-map off: one output");
		}
	}
}
