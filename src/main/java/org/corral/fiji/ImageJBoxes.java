package org.corral.fiji;

import ij.ImagePlus;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.plugin.frame.RoiManager;
import ij.process.ImageProcessor;

import java.awt.Rectangle;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.corral.CorralException;
import org.corral.boxes.Box;

/**
 * The boxes of an image as the user drew them: rectangles in the ROI Manager, or in the image's
 * overlay when the ROI Manager is empty or absent (headless). An area ROI whose name starts with
 * "region" marks the annotated region (every object inside it is boxed). Outlines Corral itself
 * added ("mask-...", "object-..."), lines, points and pictures are not boxes and are passed over.
 */
public final class ImageJBoxes {
	private ImageJBoxes() {}

	public record Found(List<Box> boxes, byte[] region, String from) {}

	public static Found of(ImagePlus imp) {
		Roi[] rois = null;
		String from;
		RoiManager rm = RoiManager.getInstance();
		if (rm != null && java.util.Arrays.stream(rm.getRoisAsArray()).anyMatch(ImageJBoxes::isBox)) {
			rois = rm.getRoisAsArray();
			from = "the ROI Manager";
		} else { // an empty ROI Manager, or one holding only outlines, leaves the overlay in charge
			Overlay ov = imp.getOverlay();
			if (ov != null && ov.size() > 0) rois = ov.toArray();
			from = "the overlay of " + imp.getTitle();
		}
		if (rois == null) throw new CorralException("No boxes on " + imp.getTitle() + ": draw rectangles and add them to the ROI Manager (key t), or to the image's overlay");
		org.corral.boxes.RoiBoxes.Read read = org.corral.boxes.RoiBoxes.of(rois, imp.getStackSize() > 1);
		List<Box> boxes = read.boxes();
		byte[] region = null;
		for (Roi r : read.regions()) {
			if (region == null) region = new byte[imp.getWidth() * imp.getHeight()];
			paint(region, r, imp.getWidth(), imp.getHeight());
		}
		if (boxes.isEmpty()) throw new CorralException("No rectangles or corrected outlines in " + from + " for " + imp.getTitle());
		return new Found(boxes, region, from);
	}

	/** A rectangle, or an outline someone drew or edited (not one Corral wrote and nobody touched). */
	static boolean isBox(Roi r) {
		String n = r.getName() == null ? "" : r.getName().toLowerCase(Locale.ROOT);
		return r.isArea() && !(r instanceof ij.gui.ImageRoi) && !n.startsWith("region") && !org.corral.boxes.RoiBoxes.isUneditedOutline(r);
	}

	private static void paint(byte[] region, Roi r, int w, int h) {
		ImageProcessor mask = r.getMask();
		Rectangle b = r.getBounds();
		for (int y = 0; y < b.height; y++)
			for (int x = 0; x < b.width; x++) {
				int ix = b.x + x, iy = b.y + y;
				if (ix < 0 || iy < 0 || ix >= w || iy >= h) continue;
				if (mask == null || mask.get(x, y) != 0) region[iy * w + ix] = 1;
			}
	}
}
