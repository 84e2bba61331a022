package org.corral.train;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.image.PlanarImage;

/**
 * One image to learn from: raw pixels, its boxes and, optionally, the annotated region
 * (1 = every object inside is boxed). {@code name} is used in messages.
 */
public record TrainingImage(String name, PlanarImage image, List<Box> boxes, byte[] region) {
	public TrainingImage(String name, PlanarImage image, List<Box> boxes) {
		this(name, image, boxes, null);
	}
}
