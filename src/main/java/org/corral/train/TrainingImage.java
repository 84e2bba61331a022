package org.corral.train;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;
import org.corral.image.Resample;

/**
 * One image to learn from: raw pixels, its boxes and, optionally, the annotated region
 * (1 = every object inside is boxed). {@code name} is used in messages.
 */
public record TrainingImage(String name, PlanarImage image, List<Box> boxes, byte[] region) {
	public TrainingImage(String name, PlanarImage image, List<Box> boxes) {
		this(name, image, boxes, null);
	}

	/** The image (bilinear), its boxes and its region resized by {@code f}; this one when f is 1. */
	public TrainingImage scaled(double f) {
		if (f == 1) return this;
		int w = Math.max(1, (int) Math.round(image.width * f)), h = Math.max(1, (int) Math.round(image.height * f));
		PlanarImage r = Resample.bilinear(image, w, h);
		r.pixelWidth = image.pixelWidth / f;
		r.unit = image.unit;
		byte[] scaledRegion = null;
		if (region != null) { // nearest neighbour
			scaledRegion = new byte[w * h];
			for (int y = 0; y < h; y++)
				for (int x = 0; x < w; x++)
					scaledRegion[y * w + x] = region[Math.min(image.height - 1, (int) (y / f)) * image.width + Math.min(image.width - 1, (int) (x / f))];
		}
		return new TrainingImage(name, r, boxes.stream().map(b -> b.scaled(f)).toList(), scaledRegion);
	}
}
