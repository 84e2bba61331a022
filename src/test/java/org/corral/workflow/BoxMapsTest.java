package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.stream.Collectors;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.image.PlanarImage;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Box masks computed on the boxes' own tiles only are the box masks of the whole-image maps. */
class BoxMapsTest {
	@TempDir
	Path dir;

	@Test
	void onlyTheBoxesTilesAreComputedAndTheMasksAreTheSame() {
		LearnSettings s = new LearnSettings();
		s.steps = 6;
		s.minutes = 0;
		Path model = dir.resolve("m.zip");
		Jobs.learn(BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv")), null, s, model, Progress.silent(), n -> {}).close();
		Path fields = ReferenceData.demo().resolve("fields");
		Map<String, List<Box>> all = BoxFiles.readCsv(fields.resolve("boxes.csv"));
		PlanarImage raw = ImageFiles.read(fields.resolve("images").resolve("seedcoat-field-01.tif"));
		// a user who boxed the objects of the top-left quarter only, and two boxes that end at the
		// quarter's edge: at each scale below the tiles' seam lies there, so the resampling reads
		// across it (the padding around the boxes must cover that)
		List<Box> corner = all.get("seedcoat-field-01.tif").stream().filter(b -> b.x() + b.width() <= 240 && b.y() + b.height() <= 240).collect(Collectors.toList());
		assertTrue(corner.size() >= 5, corner.size() + " boxes in the corner");
		corner.add(new Box(corner.size(), 230, 100, 26, 26));
		corner.add(new Box(corner.size(), 100, 230, 26, 26));
		try (ModelRunner m = ModelRunner.open(model)) {
			for (double scale : new double[] {1, 1.37, 0.71}) {
				float[] whole = m.maps(raw, scale, null, 1)[0];
				int allTiles = m.tilesComputed();
				float[] part = m.boxMaps(raw, corner, scale, null, 1)[0];
				int someTiles = m.tilesComputed();
				assertTrue(someTiles < allTiles, "scale " + scale + ": " + someTiles + " of " + allTiles + " tiles");
				for (Box b : corner)
					for (int y = b.y(); y < b.y() + b.height(); y++)
						for (int x = b.x(); x < b.x() + b.width(); x++)
							assertEquals(whole[y * raw.width + x], part[y * raw.width + x], "scale " + scale + " at " + x + "," + y);
				assertArrayEquals(BoxMasks.make(whole, raw.width, raw.height, corner, BoxMasks.Options.DEFAULTS).labels(),
					BoxMasks.make(part, raw.width, raw.height, corner, BoxMasks.Options.DEFAULTS).labels(), "scale " + scale);
			}
		}
	}
}
