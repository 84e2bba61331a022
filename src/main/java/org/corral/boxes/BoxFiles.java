package org.corral.boxes;

import ij.gui.Roi;
import ij.io.RoiDecoder;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.zip.ZipEntry;
import java.util.zip.ZipInputStream;

import org.corral.CorralException;

/** Reads boxes from a CSV file (columns image,x,y,width,height) or from ImageJ ROI-set zips. */
public final class BoxFiles {
	private BoxFiles() {}

	/**
	 * Boxes per image file name, in the order of the file. Every bad line is an error that names
	 * the file and the line: a box list with silently dropped rows would train the wrong thing.
	 */
	public static Map<String, List<Box>> readCsv(Path file) {
		List<String> lines;
		try {
			lines = Files.readAllLines(file, StandardCharsets.UTF_8);
		} catch (IOException e) {
			throw new CorralException("Cannot read box file " + file + ": " + e.getMessage(), e);
		}
		if (lines.isEmpty()) throw new CorralException("Box file " + file + " is empty (expected a header row image,x,y,width,height)");
		String[] header = split(stripBom(lines.get(0)));
		int ci = -1, cx = -1, cy = -1, cw = -1, ch = -1, cs = -1, cm = -1, cc = -1, rcx = -1, rcy = -1, rl = -1, rb = -1, ra = -1;
		Map<Path, ij.process.ImageProcessor[]> masks = new java.util.HashMap<>();
		for (int i = 0; i < header.length; i++) {
			switch (header[i].trim().toLowerCase(Locale.ROOT)) {
				case "image" -> ci = i;
				case "x" -> cx = i;
				case "y" -> cy = i;
				case "width" -> cw = i;
				case "height" -> ch = i;
				case "slice" -> cs = i;
				case "mask" -> cm = i;
				case "class" -> cc = i;
				case "centre_x" -> rcx = i;
				case "centre_y" -> rcy = i;
				case "length" -> rl = i;
				case "breadth" -> rb = i;
				case "angle" -> ra = i;
				default -> { }
			}
		}
		List<String> missing = new ArrayList<>();
		if (ci < 0) missing.add("image");
		if (cx < 0) missing.add("x");
		if (cy < 0) missing.add("y");
		if (cw < 0) missing.add("width");
		if (ch < 0) missing.add("height");
		if (!missing.isEmpty())
			throw new CorralException("Box file " + file + " lacks the column(s) " + String.join(", ", missing) + " in its header row");
		Map<String, List<Box>> out = new LinkedHashMap<>();
		for (int n = 1; n < lines.size(); n++) {
			String line = lines.get(n);
			if (line.isBlank()) continue;
			String[] f = split(line);
			String where = file.getFileName() + " line " + (n + 1);
			int need = Math.max(Math.max(ci, cx), Math.max(Math.max(cy, cw), Math.max(ch, cs)));
			if (f.length <= need) throw new CorralException(where + ": expected at least " + (need + 1) + " fields, found " + f.length);
			String image = f[ci].trim();
			if (image.isEmpty()) throw new CorralException(where + ": empty image name");
			if (ra >= 0 && ra < f.length && !f[ra].isBlank()) { // a rotated box: centre, length, breadth, angle
				if (rcx < 0 || rcy < 0 || rl < 0 || rb < 0)
					throw new CorralException(where + ": a rotated box needs the columns centre_x, centre_y, length, breadth and angle");
				double fcx = number(f, rcx, "centre_x", where), fcy = number(f, rcy, "centre_y", where), len = number(f, rl, "length", where),
					br = number(f, rb, "breadth", where), ang = number(f, ra, "angle", where);
				if (len <= 0 || br <= 0) throw new CorralException(where + ": length and breadth must be positive, found " + len + " x " + br);
				int s = cs >= 0 && cs < f.length && !f[cs].isBlank() ? integer(f[cs], "slice", where) : 0;
				List<Box> list = out.computeIfAbsent(image, k -> new ArrayList<>());
				int index = list.size() + 1;
				String cls = cc >= 0 && cc < f.length && !f[cc].isBlank() ? f[cc].trim() : null;
				list.add(Box.rotated(index, new Box.Frame(fcx, fcy, len, br, ang), s, "box-" + index, cls));
				continue;
			}
			int x = integer(f[cx], "x", where), y = integer(f[cy], "y", where);
			int w = integer(f[cw], "width", where), h = integer(f[ch], "height", where);
			int s = cs >= 0 && !f[cs].isBlank() ? integer(f[cs], "slice", where) : 0;
			if (w <= 0 || h <= 0) throw new CorralException(where + ": box width and height must be positive, found " + w + " x " + h);
			List<Box> list = out.computeIfAbsent(image, k -> new ArrayList<>());
			int index = list.size() + 1;
			byte[] m = cm >= 0 && cm < f.length && !f[cm].isBlank() ? objectIn(masks, file, f[cm].trim(), x, y, w, h, s, where) : null;
			String cls = cc >= 0 && cc < f.length && !f[cc].isBlank() ? f[cc].trim() : null;
			list.add(new Box(index, x, y, w, h, s, (m != null ? "outline-" : "box-") + index, m, cls));
		}
		return out;
	}

	/**
	 * An exact object from a mask image named in the {@code mask} column (relative to the box file's
	 * folder; binary or label image the size of the image): its pixels inside the box that carry the
	 * box's most frequent non-zero value.
	 */
	private static byte[] objectIn(Map<Path, ij.process.ImageProcessor[]> cache, Path csv, String name, int x, int y, int w, int h, int slice, String where) {
		Path p = csv.toAbsolutePath().getParent().resolve(name);
		ij.process.ImageProcessor[] planes = cache.computeIfAbsent(p, q -> {
			if (!Files.isRegularFile(q)) throw new CorralException(where + ": mask image " + q + " does not exist");
			ij.ImagePlus imp = ij.IJ.openImage(q.toString());
			if (imp == null) throw new CorralException(where + ": cannot read mask image " + q);
			ij.process.ImageProcessor[] out = new ij.process.ImageProcessor[imp.getStackSize()];
			for (int i = 0; i < out.length; i++) out[i] = imp.getStack().getProcessor(i + 1);
			return out;
		});
		ij.process.ImageProcessor ip = planes[slice > 0 && slice <= planes.length ? slice - 1 : 0];
		java.util.Map<Float, Integer> count = new java.util.HashMap<>();
		for (int yy = Math.max(0, y); yy < Math.min(ip.getHeight(), y + h); yy++)
			for (int xx = Math.max(0, x); xx < Math.min(ip.getWidth(), x + w); xx++) {
				float v = ip.getf(xx, yy);
				if (v != 0) count.merge(v, 1, Integer::sum);
			}
		if (count.isEmpty()) throw new CorralException(where + ": the mask image " + name + " has no object inside this box");
		float label = java.util.Collections.max(count.entrySet(), java.util.Map.Entry.comparingByValue()).getKey();
		byte[] m = new byte[w * h];
		for (int yy = 0; yy < h; yy++)
			for (int xx = 0; xx < w; xx++) {
				int ix = x + xx, iy = y + yy;
				if (ix >= 0 && iy >= 0 && ix < ip.getWidth() && iy < ip.getHeight() && ip.getf(ix, iy) == label) m[yy * w + xx] = 1;
			}
		return m;
	}

	/** Boxes of an ImageJ ROI-set zip (or a single .roi file): rectangles, and outlines as exact objects ({@link RoiBoxes}). */
	public static List<Box> readRoiZip(Path file) {
		List<Roi> boxes = new ArrayList<>();
		try (InputStream in = Files.newInputStream(file)) {
			if (file.toString().toLowerCase(Locale.ROOT).endsWith(".roi")) {
				addRoi(boxes, new RoiDecoder(in.readAllBytes(), file.getFileName().toString()).getRoi(), file.toString());
				return RoiBoxes.of(boxes.toArray(new Roi[0]), true).boxes();
			}
			try (ZipInputStream zin = new ZipInputStream(in)) {
				ZipEntry e;
				while ((e = zin.getNextEntry()) != null) {
					if (e.isDirectory() || !e.getName().endsWith(".roi")) continue;
					ByteArrayOutputStream buf = new ByteArrayOutputStream();
					zin.transferTo(buf);
					Roi roi = new RoiDecoder(buf.toByteArray(), e.getName()).getRoi();
					addRoi(boxes, roi, file + " entry " + e.getName());
				}
			}
		} catch (IOException e) {
			throw new CorralException("Cannot read ROI set " + file + ": " + e.getMessage(), e);
		}
		return RoiBoxes.of(boxes.toArray(new Roi[0]), true).boxes();
	}

	private static void addRoi(List<Roi> rois, Roi roi, String where) {
		if (roi == null) throw new CorralException("Unreadable ROI in " + where);
		if (roi.getName() != null && roi.getName().toLowerCase(Locale.ROOT).startsWith("region"))
			throw new CorralException("ROI '" + roi.getName() + "' in " + where + ": an annotated region is read from the ROI Manager or the image's overlay, not from ROI-set files");
		rois.add(roi);
	}

	private static double number(String[] f, int col, String column, String where) {
		if (col >= f.length || f[col].isBlank()) throw new CorralException(where + ": empty " + column);
		try {
			double v = Double.parseDouble(f[col].trim());
			if (!Double.isFinite(v)) throw new NumberFormatException();
			return v;
		} catch (NumberFormatException e) {
			throw new CorralException(where + ": " + column + " '" + f[col].trim() + "' is not a number");
		}
	}

	private static int integer(String s, String column, String where) {
		String t = s.trim();
		try {
			double v = Double.parseDouble(t);
			if (Double.isNaN(v) || Double.isInfinite(v) || v != Math.rint(v)) throw new NumberFormatException();
			return (int) v;
		} catch (NumberFormatException e) {
			throw new CorralException(where + ": column " + column + " holds '" + t + "', not a whole number");
		}
	}

	private static String stripBom(String s) {
		return s.startsWith("\uFEFF") ? s.substring(1) : s;
	}

	private static String[] split(String line) {
		return line.split(",", -1);
	}
}
