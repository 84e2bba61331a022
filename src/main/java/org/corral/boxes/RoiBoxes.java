package org.corral.boxes;

import ij.gui.Roi;
import ij.process.ImageProcessor;

import java.awt.Rectangle;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.zip.CRC32;

/**
 * Boxes from ImageJ ROIs, as the user drew or corrected them. A rectangle is a box (the tight-box
 * prior applies). Any other area ROI (polygon, freehand, traced, oval, or an outline Corral wrote
 * and the user then edited) is the exact outline of one object ({@link Box#isExact}); it replaces
 * the rectangle it was made from, found by name ({@code mask-0003-of-NAME} replaces box
 * {@code NAME}) or by place (a rectangle holding the outline's bounding box, with IoU at least
 * {@link #SAME_OBJECT_IOU}). Outlines Corral wrote and nobody edited carry a fingerprint of their
 * shape and are not outlines to learn from (learning from the network's own masks would only teach
 * it its errors): an unedited outline of a box stands for that box when the box itself is no longer
 * in the list, so editing one outline among Corral's and learning again needs nothing else.
 * Area ROIs named {@code region...} mark the annotated region and are returned apart.
 */
public final class RoiBoxes {
	private RoiBoxes() {}

	/** ROI property holding an outline's fingerprint as Corral wrote it. */
	public static final String FINGERPRINT = "corral-outline";
	/** ROI property of a box's outline: the box it was masked from ({@code x,y,width,height}). */
	public static final String SOURCE_BOX = "corral-box";

	/** An outline and a rectangle this much alike (bounding-box IoU) are one object drawn twice (our rule). */
	public static final double SAME_OBJECT_IOU = 0.5;

	/** The boxes (rectangles and outlines, numbered 1..n in ROI order) and the region ROIs. */
	public record Read(List<Box> boxes, List<Roi> regions) {}

	/** @param stack true when the image has several stack positions (a ROI's position places its box) */
	public static Read of(Roi[] rois, boolean stack) {
		List<Box> rects = new ArrayList<>(), outlines = new ArrayList<>(), fromOutlines = new ArrayList<>();
		List<Roi> regions = new ArrayList<>();
		for (Roi r : rois) {
			if (r == null || r instanceof ij.gui.ImageRoi || !r.isArea()) continue; // pictures, lines and points are not boxes
			String name = r.getName() == null ? "" : r.getName();
			if (name.toLowerCase(Locale.ROOT).startsWith("region")) {
				regions.add(r);
				continue;
			}
			int slice = stack ? Math.max(r.getPosition(), Math.max(r.getTPosition(), r.getZPosition())) : 0;
			if (isUneditedOutline(r)) { // stands for its box when the box itself is gone from the list
				Box source = sourceBox(r, slice);
				if (source != null) fromOutlines.add(source);
				continue;
			}
			Rectangle b = r.getBounds();
			String cls = className(r);
			if (r instanceof ij.gui.RotatedRectRoi rr) { // a tight box in its own frame
				rects.add(Box.rotated(0, frameOf(rr), slice, name.isEmpty() ? null : name, cls));
				continue;
			}
			if (isRectangle(r)) rects.add(new Box(0, b.x, b.y, b.width, b.height, slice, name.isEmpty() ? null : name, null, cls));
			else outlines.add(new Box(0, b.x, b.y, b.width, b.height, slice, name.isEmpty() ? null : name, mask(r), cls));
		}
		for (Box f : fromOutlines)
			if (rects.stream().noneMatch(r -> r.slice() == f.slice() && (f.name().equals(r.name()) || r.x() == f.x() && r.y() == f.y() && r.width() == f.width() && r.height() == f.height())))
				rects.add(f);
		List<Box> kept = new ArrayList<>();
		for (Box r : rects) if (outlines.stream().noneMatch(o -> sameObject(o, r))) kept.add(r);
		kept.addAll(outlines);
		List<Box> out = new ArrayList<>();
		for (Box b : kept) {
			int i = out.size() + 1;
			out.add(new Box(i, b.x(), b.y(), b.width(), b.height(), b.slice(), b.name() != null ? b.name() : (b.isExact() ? "outline-" : "box-") + i, b.mask(), b.className(),
				b.frame()));
		}
		return new Read(out, regions);
	}

	/**
	 * A ROI's class: the name of its ROI group when the group has one, else {@code group-N}; null
	 * for group 0 (no group). ImageJ keeps group names in its preferences ({@link Roi#getGroupName}).
	 */
	public static String className(Roi r) {
		int g = r.getGroup();
		if (g <= 0) return null;
		String n = Roi.getGroupName(g);
		return n != null && !n.isBlank() ? n.trim() : "group-" + g;
	}

	/** The box an outline of Corral's was masked from (named as in {@code mask-0003-of-NAME}), or null. */
	static Box sourceBox(Roi r, int slice) {
		String p = r.getProperty(SOURCE_BOX), n = r.getName();
		if (p == null || n == null || !n.startsWith("mask-") || n.indexOf("-of-") < 0) return null;
		String[] v = p.split(",");
		if (v.length != 4) return null;
		try {
			return new Box(0, Integer.parseInt(v[0]), Integer.parseInt(v[1]), Integer.parseInt(v[2]), Integer.parseInt(v[3]), slice, n.substring(n.indexOf("-of-") + 4), null,
				className(r));
		} catch (NumberFormatException e) {
			return null;
		}
	}

	/** Records on a box's outline the box it was masked from. */
	public static void setSourceBox(Roi outline, Box b) {
		outline.setProperty(SOURCE_BOX, b.x() + "," + b.y() + "," + b.width() + "," + b.height());
	}

	/** The frame of ImageJ's rotated rectangle: its long axis from (x1, y1) to (x2, y2), and its width across. */
	public static Box.Frame frameOf(ij.gui.RotatedRectRoi r) {
		double[] p = r.getParams();
		double dx = p[2] - p[0], dy = p[3] - p[1];
		return new Box.Frame((p[0] + p[2]) / 2, (p[1] + p[3]) / 2, Math.hypot(dx, dy), p[4], Math.toDegrees(Math.atan2(dy, dx)));
	}

	/** A plain rectangle (rounded corners make it an outline). */
	public static boolean isRectangle(Roi r) {
		return r.getType() == Roi.RECTANGLE && r.getCornerDiameter() == 0;
	}

	/** True for an outline exactly as Corral wrote it: its fingerprint still matches its shape. */
	public static boolean isUneditedOutline(Roi r) {
		String f = r.getProperty(FINGERPRINT);
		return f != null && f.equals(fingerprint(r));
	}

	/** A checksum of the outline's place and pixels. */
	public static String fingerprint(Roi r) {
		Rectangle b = r.getBounds();
		CRC32 crc = new CRC32();
		crc.update(java.nio.ByteBuffer.allocate(16).putInt(b.x).putInt(b.y).putInt(b.width).putInt(b.height).array());
		crc.update(mask(r));
		return Long.toHexString(crc.getValue());
	}

	/** The ROI's pixels in its bounding box, 1 = inside. */
	static byte[] mask(Roi r) {
		Rectangle b = r.getBounds();
		byte[] m = new byte[b.width * b.height];
		ImageProcessor ip = r.getMask();
		for (int y = 0; y < b.height; y++)
			for (int x = 0; x < b.width; x++) m[y * b.width + x] = (byte) (ip == null || ip.get(x, y) != 0 ? 1 : 0);
		return m;
	}

	/** The outline replaces the rectangle: named after it, or drawn around the same object. */
	static boolean sameObject(Box outline, Box rect) {
		if (outline.slice() != rect.slice()) return false;
		String n = outline.name();
		if (n != null && rect.name() != null && n.startsWith("mask-") && n.endsWith("-of-" + rect.name())) return true;
		boolean holds = rect.x() <= outline.x() && rect.y() <= outline.y() && rect.x1() >= outline.x1() && rect.y1() >= outline.y1();
		return holds && (double) outline.area() / rect.area() >= SAME_OBJECT_IOU; // IoU of nested rectangles
	}
}
