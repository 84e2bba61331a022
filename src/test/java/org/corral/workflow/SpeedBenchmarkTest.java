package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.corral.train.LearnSettings;
import org.junit.jupiter.api.Test;

/** The speed report prints every stage with a rate; it is a command, so only its form is checked, never a speed. */
class SpeedBenchmarkTest {
	@Test
	void printsEveryStageWithAFiniteRate() {
		LearnSettings s = new LearnSettings();
		s.steps = 4;
		String out = SpeedBenchmark.run(Path.of("test-images", "images"), Path.of("test-images", "boxes.csv"), null, s, l -> {});
		for (String stage : new String[] {"read", "normalise", "network, 1 pass, tiles of 1040", "network, 1 pass, in DJL (tiles of 352)",
			"network, 4 flips (box masks, 8-bit)", "network, 4 flips, float", "box masks, fitted", "instance stage (whole image)",
			"  of which seeds", "  of which flooding", "outlines", "writing"}) {
			Matcher m = Pattern.compile("(?m)^" + Pattern.quote(stage) + " +([0-9.]+) +([0-9.]+)$").matcher(out);
			assertTrue(m.find(), "row '" + stage + "' in\n" + out);
			assertTrue(Double.parseDouble(m.group(2)) > 0, stage + " has a rate");
		}
		// the default network: 4 levels, width 16, one input channel, two outputs (instance map on)
		assertTrue(out.contains(String.format(java.util.Locale.ROOT, "%,d FLOP per pixel", new org.corral.net.UNet(1, 16, 4, 2).flopsPerPixel())), out);
		assertTrue(Pattern.compile("learning: [0-9.]+ s/step \\(median of 4 steps; batch 8 of 128x128").matcher(out).find(), out);
		assertTrue(Pattern.compile("network: [0-9.]+ GFLOP/s = [0-9]+ % of the matrix product").matcher(out).find(), out);
		assertTrue(out.contains("network engine: ONNX Runtime"), "the engine is named: " + out);
		assertTrue(Pattern.compile("end to end: mask-image [0-9.]+ MP/s").matcher(out).find(), out);
		Matcher mp = Pattern.compile("(\\d+) image\\(s\\), ([0-9.]+) MP").matcher(out);
		assertTrue(mp.find(), out);
		assertEquals(4, Integer.parseInt(mp.group(1)), "the demo folder's boxed images");
	}
}
