package org.corral.predict;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.corral.CorralException;
import org.corral.image.PlanarImage;
import org.corral.model.ModelHeader;
import org.junit.jupiter.api.Test;

class CalibrationTest {
	static ModelRunner runner(double pixelSize, double objectSize) {
		ModelHeader h = new ModelHeader();
		h.inChannels = 1;
		h.pixelSize = pixelSize;
		h.objectSize = objectSize;
		return new ModelRunner(h, null, null);
	}

	static PlanarImage image(double pw, String unit) {
		PlanarImage im = PlanarImage.zeros(4, 4, 1);
		im.pixelWidth = pw;
		im.unit = unit;
		return im;
	}

	@Test
	void anotherPixelSizeIsRescaledToTheModels() {
		ModelRunner m = runner(0.65, 20);
		assertEquals(0.5, m.scaleForCalibration(image(0.325, "micron")), 1e-9, "finer pixels: objects look twice as large, halve the image");
		assertEquals(2.0, m.scaleForCalibration(image(1.3, "µm")), 1e-9);
		assertEquals(0.5, m.scaleForCalibration(image(325, "nm")), 1e-9, "units are converted");
		assertEquals(1.0, m.scaleForCalibration(image(0.7, "um")), 1e-9, "close enough: left alone");
		assertEquals(0, m.scaleForCalibration(image(0, null)), "uncalibrated image: no opinion");
		assertEquals(0, runner(0, 20).scaleForCalibration(image(0.3, "um")), "uncalibrated model: no opinion");
		CorralException e = assertThrows(CorralException.class, () -> m.scaleForCalibration(image(2, "pixel-lengths")));
		assertTrue(e.getMessage().contains("pixel-lengths"), e.getMessage());
	}

	@Test
	void boxSizesSetTheScaleWithinBounds() {
		ModelRunner m = runner(0, 20);
		assertEquals(1, m.scaleFor(22), 1e-9);
		assertEquals(0.5, m.scaleFor(40), 1e-9);
		assertEquals(4, m.scaleFor(2), 1e-9, "bounded at 4x");
	}
}
