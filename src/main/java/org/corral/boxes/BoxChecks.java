package org.corral.boxes;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * The defined behaviour for awkward boxes, before learning:
 * <ul>
 * <li>wholly outside the image: ignored, with a note naming the box;</li>
 * <li>partly outside (cut by the border): clipped to the image and used; the border-side bands
 * still hold because every visible line still crosses the visible part of the object;</li>
 * <li>an exact duplicate of an earlier box: used once, with a note;</li>
 * <li>touching, overlapping and nested boxes, and tiny boxes (sides of 1-3 px): used as they are;
 * the band constraints of a tiny box ask for one pixel per line, and masks of overlapping boxes are
 * separated when masking (see {@code BoxMasks}).</li>
 * </ul>
 */
public final class BoxChecks {
	private BoxChecks() {}

	public record Checked(List<Box> usable, List<String> notes) {}

	public static Checked forLearning(List<Box> boxes, int width, int height, String image) {
		List<Box> out = new ArrayList<>();
		List<String> notes = new ArrayList<>();
		Map<String, Integer> seen = new HashMap<>();
		for (Box b : boxes) {
			String id = image + ": box " + b.index() + " (" + b.name() + ", " + b.x() + "," + b.y() + " " + b.width() + "x" + b.height() + ")";
			Box c = b.clip(width, height);
			if (c == null) {
				notes.add(id + " lies outside the " + width + "x" + height + " image: ignored");
				continue;
			}
			String key = b.x() + "," + b.y() + "," + b.width() + "," + b.height() + "," + b.slice();
			Integer first = seen.putIfAbsent(key, b.index());
			if (first != null) {
				notes.add(id + " duplicates box " + first + ": used once");
				continue;
			}
			if (c.width() != b.width() || c.height() != b.height()) notes.add(id + " is cut by the image border: clipped to it");
			out.add(b);
		}
		return new Checked(out, notes);
	}
}
