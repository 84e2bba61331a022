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

	/** A model of 6 steps on the demo's boxes, written to {@code dir}: quick, and its maps are not flat. */
	static Path sixStepModel(Path dir) {
		LearnSettings s = new LearnSettings();
		s.steps = 6;
		s.minutes = 0;
		Path model = dir.resolve("m.zip");
		Jobs.learn(BoxedImages.find(ReferenceData.demo().resolve("images"), ReferenceData.demo().resolve("boxes.csv")), null, s, model, Progress.silent(), n -> {}).close();
		return model;
	}

	@Test
	void onlyTheBoxesTilesAreComputedAndTheMasksAreTheSame() {
		// the tiles are what is compared here: both maps in float (box masks run in 8 bits by default; Int8NetworkTest)
		System.setProperty(org.corral.predict.TiledPredictor.PRECISION_PROPERTY, "fp32");
		try {
			compareTiles();
		} finally {
			System.clearProperty(org.corral.predict.TiledPredictor.PRECISION_PROPERTY);
		}
	}

	@Test
	void boxMapsRunInEightBitsWholeImagesInFloat() {
		Path model = sixStepModel(dir);
		Path fields = ReferenceData.demo().resolve("fields");
		List<Box> boxes = BoxFiles.readCsv(fields.resolve("boxes.csv")).get("seedcoat-field-01.tif");
		PlanarImage raw = ImageFiles.read(fields.resolve("images").resolve("seedcoat-field-01.tif"));
		try (ModelRunner m = ModelRunner.open(model)) {
			assertTrue(m.header().activationRanges != null, "learning recorded the activation ranges");
			float[] whole = m.maps(raw, 1, null, 1)[0], part = m.boxMaps(raw, boxes, 1, null, 1)[0];
			double diff = 0;
			int n = 0;
			for (Box b : boxes)
				for (int y = b.y(); y < b.y() + b.height(); y++)
					for (int x = b.x(); x < b.x() + b.width(); x++, n++) diff += Math.abs(whole[y * raw.width + x] - part[y * raw.width + x]);
			diff /= n;
			assertTrue(diff > 0, "the box maps come from the 8-bit network, not the float one");
			assertTrue(diff < 0.01, "8 bits stay close to float inside the boxes: mean difference " + diff);
		}
	}

	private void compareTiles() {
		Path model = sixStepModel(dir);
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
		// tiles of 352 for both, so that the whole-image maps are laid out as the boxes' tiles are
		try (ModelRunner m = ModelRunner.open(model).optTile(352)) {
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
		// default tiles: the whole 512x512 field is one large tile; the corner's boxes take the smaller
		// tiles, which compute less, and every box is given the large tile again
		try (ModelRunner m = ModelRunner.open(model)) {
			float[] whole = m.maps(raw, 1, null, 1)[0];
			assertEquals(1, m.tilesComputed(), "one tile for the whole field");
			float[] part = m.boxMaps(raw, corner, 1, null, 1)[0];
			assertEquals(3, m.tilesComputed(), "small tiles: the corner and the two it meets through the boxes on its edges (3 x 320x320 px, against 576x576 px for the large tile)");
			double maxDiff = 0;
			for (Box b : corner)
				for (int y = b.y(); y < b.y() + b.height(); y++)
					for (int x = b.x(); x < b.x() + b.width(); x++) maxDiff = Math.max(maxDiff, Math.abs(whole[y * raw.width + x] - part[y * raw.width + x]));
			// other tiles see other context: 32 px of it on each side, while the default network's field of
			// view reaches 44 px (2 + 4 + 8 + 16 + 8 + 4 + 2 for its convolution pairs), so far-away pixels move
			// the maps a little (measured 0.0014)
			assertEquals(0, maxDiff, 0.01, "other tiles, nearly the same maps");
			m.boxMaps(raw, all.get("seedcoat-field-01.tif"), 1, null, 1);
			assertEquals(1, m.tilesComputed(), "every object boxed: the one large tile");
		}
	}
}
