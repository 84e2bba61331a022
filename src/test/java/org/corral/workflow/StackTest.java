package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;
import ij.ImageStack;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** A time-lapse: boxes on frames 1 and 3 of 3; learn from the boxed frames, mask per frame, a label stack. */
class StackTest {
	@TempDir
	Path dir;

	@Test
	void boxesOnSomeFramesGiveALabelStack() throws Exception {
		Path demo = ReferenceData.demo();
		ImageStack st = new ImageStack(160, 128);
		for (int i = 1; i <= 3; i++)
			st.addSlice(ImageFiles.open(demo.resolve("images").resolve(String.format("seedcoat-%02d.tif", i))).getProcessor());
		ImagePlus movie = new ImagePlus("movie", st);
		movie.setDimensions(1, 1, 3);
		ImageFiles.saveTiff(movie, dir.resolve("in/movie.tif"));
		Map<String, List<Box>> demoBoxes = BoxFiles.readCsv(demo.resolve("boxes.csv"));
		StringBuilder csv = new StringBuilder("image,x,y,width,height,slice\n");
		for (int f : new int[] {1, 3})
			for (Box b : demoBoxes.get(String.format("seedcoat-%02d.tif", f)))
				csv.append(String.format("movie.tif,%d,%d,%d,%d,%d%n", b.x(), b.y(), b.width(), b.height(), f));
		Files.writeString(dir.resolve("boxes.csv"), csv);
		int n1 = demoBoxes.get("seedcoat-01.tif").size(), n3 = demoBoxes.get("seedcoat-03.tif").size();

		var boxed = BoxedImages.find(dir.resolve("in"), dir.resolve("boxes.csv"));
		assertEquals(2, Jobs.trainingImages(boxed).size(), "one training image per boxed frame");
		LearnSettings s = new LearnSettings();
		s.steps = 60;
		s.minutes = 0;
		Jobs.learn(boxed, null, s, dir.resolve("m.zip"), Progress.silent(), n -> {}).close();
		try (ModelRunner m = ModelRunner.open(dir.resolve("m.zip"))) {
			Jobs.maskBoxes(boxed, null, m, org.corral.instances.BoxMasks.Options.DEFAULTS, Share.ALL, dir.resolve("out"), null, x -> {});
		}
		ImagePlus labels = ImageFiles.open(dir.resolve("out/movie.labels.tif"));
		assertEquals(3, labels.getStackSize());
		int[] max = new int[3], min = new int[3];
		for (int z = 0; z < 3; z++) {
			short[] px = (short[]) labels.getStack().getPixels(z + 1);
			min[z] = Integer.MAX_VALUE;
			for (short v : px) {
				int l = v & 0xffff;
				max[z] = Math.max(max[z], l);
				if (l > 0) min[z] = Math.min(min[z], l);
			}
		}
		assertTrue(max[0] <= n1 && max[0] >= n1 - 1, "frame 1 holds labels 1.." + n1 + ": " + max[0]);
		assertEquals(0, max[1], "frame 2 had no boxes");
		assertTrue(min[2] > n1 && max[2] <= n1 + n3, "frame 3 holds the labels of its boxes in file order");
		assertEquals(n1 + n3 + 1, Files.readAllLines(dir.resolve("out/movie.objects.csv")).size());
	}
}
