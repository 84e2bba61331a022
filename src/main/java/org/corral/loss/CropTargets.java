package org.corral.loss;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.corral.supervision.Constraint;

/**
 * What the loss knows of one crop, in plain Java: named planes (the known background, the pairs to
 * agree, the instance map's targets, ...) and the box constraints in crop coordinates. The crop
 * sampler fills them; each {@link LossTerm} names the planes it reads.
 */
public final class CropTargets {
	/** A plane of {@code channels x height x width} floats, row-major. */
	public record Plane(float[] data, int channels, int height, int width) {
		public Plane {
			if (data.length != channels * height * width) throw new IllegalArgumentException("plane of " + data.length + " values is not " + channels + "x" + height + "x" + width);
		}
	}

	private final Map<String, Plane> planes = new LinkedHashMap<>();
	private final List<Constraint> constraints;

	public CropTargets(List<Constraint> constraints) {
		this.constraints = List.copyOf(constraints);
	}

	/** Adds a plane (DJL-style option; the crop sampler calls it once per name). */
	public CropTargets optPlane(String name, float[] data, int channels, int height, int width) {
		planes.put(name, new Plane(data, channels, height, width));
		return this;
	}

	public Plane plane(String name) {
		Plane p = planes.get(name);
		if (p == null) throw new IllegalArgumentException("the crop has no plane '" + name + "' (it has " + planes.keySet() + ")");
		return p;
	}

	public List<Constraint> constraints() {
		return constraints;
	}
}
