package org.corral.loss;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.Shape;

import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.corral.supervision.Constraint;

/**
 * The targets of a batch of crops: each named plane is packed into one [B, C, H, W] array the first
 * time a term asks for it, so a plane no registered term reads costs nothing.
 */
public final class Batch {
	private final NDManager manager;
	private final List<CropTargets> crops;
	private final Map<String, NDArray> packed = new HashMap<>();

	public Batch(NDManager manager, List<CropTargets> crops) {
		if (crops.isEmpty()) throw new IllegalArgumentException("a batch needs at least one crop");
		this.manager = manager;
		this.crops = List.copyOf(crops);
	}

	public int size() {
		return crops.size();
	}

	public NDManager manager() {
		return manager;
	}

	/** The plane {@code name} of every crop as one [B, C, H, W] array. */
	public NDArray plane(String name) {
		return packed.computeIfAbsent(name, n -> {
			CropTargets.Plane first = crops.get(0).plane(n);
			int per = first.data().length;
			float[] all = new float[crops.size() * per];
			for (int i = 0; i < crops.size(); i++) {
				CropTargets.Plane p = crops.get(i).plane(n);
				if (p.data().length != per) throw new IllegalArgumentException("plane '" + n + "' differs in size between crops");
				System.arraycopy(p.data(), 0, all, i * per, per);
			}
			return manager.create(all, new Shape(crops.size(), first.channels(), first.height(), first.width()));
		});
	}

	/** The box constraints of each crop, in crop coordinates. */
	public List<List<Constraint>> constraints() {
		return crops.stream().map(CropTargets::constraints).toList();
	}
}
