package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import org.corral.ReferenceData;
import org.corral.image.PlanarImage;
import org.corral.io.ImageFiles;
import org.corral.predict.ModelRunner;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The bands of a tall image run in tiles of at most {@link ModelRunner#BAND_TILE}; a window of its own in the engine's tiles. */
class BandTilesTest {
	@TempDir
	Path dir;

	@Test
	void bandsTakeTheSmallerTilesAndAgreeWithTheLargeOnes() {
		Path model = BoxMapsTest.sixStepModel(dir);
		// a demo field's top rows, three times side by side: wider than either tile side
		PlanarImage field = ImageFiles.read(ReferenceData.demo().resolve("fields").resolve("images").resolve("seedcoat-field-01.tif"));
		int w = 3 * field.width, h = 160;
		PlanarImage raw = PlanarImage.zeros(w, h, 1);
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) raw.channels[0][y * w + x] = field.channels[0][y * field.width + x % field.width];
		try (ModelRunner m = ModelRunner.open(model)) {
			float[] whole = m.maps(raw, 1, null, 1)[0];
			int wholeTiles = m.tilesComputed();
			float[] band = m.maps(raw, m.normalisationBounds(raw), 1, null, 1)[0];
			int bandTiles = m.tilesComputed();
			assertEquals((w + ModelRunner.BAND_TILE - 1) / ModelRunner.BAND_TILE, bandTiles, "a band: tiles of at most " + ModelRunner.BAND_TILE);
			assertTrue(wholeTiles < bandTiles, "a window of its own: the engine's larger tiles (" + wholeTiles + ")");
			// other tiles see other context near their seams only: the field of view (44 px) is wider than the context (32 px)
			double worst = 0, sum = 0;
			int flipped = 0;
			for (int i = 0; i < whole.length; i++) {
				worst = Math.max(worst, Math.abs(whole[i] - band[i]));
				sum += Math.abs(whole[i] - band[i]);
				if ((whole[i] >= 0.5) != (band[i] >= 0.5)) flipped++;
			}
			System.out.printf("band vs window: max %.4f mean %.6f, %d of %d pixels change side%n", worst, sum / whole.length, flipped, whole.length);
			assertTrue(worst < 0.05 && sum / whole.length < 1e-3 && flipped <= whole.length / 2000, "max " + worst + ", mean " + sum / whole.length + ", " + flipped + " pixels change side");
		}
	}
}
