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
		int ci = -1, cx = -1, cy = -1, cw = -1, ch = -1, cs = -1;
		for (int i = 0; i < header.length; i++) {
			switch (header[i].trim().toLowerCase(Locale.ROOT)) {
				case "image" -> ci = i;
				case "x" -> cx = i;
				case "y" -> cy = i;
				case "width" -> cw = i;
				case "height" -> ch = i;
				case "slice" -> cs = i;
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
			int x = integer(f[cx], "x", where), y = integer(f[cy], "y", where);
			int w = integer(f[cw], "width", where), h = integer(f[ch], "height", where);
			int s = cs >= 0 && !f[cs].isBlank() ? integer(f[cs], "slice", where) : 0;
			if (w <= 0 || h <= 0) throw new CorralException(where + ": box width and height must be positive, found " + w + " x " + h);
			List<Box> list = out.computeIfAbsent(image, k -> new ArrayList<>());
			int index = list.size() + 1;
			list.add(new Box(index, x, y, w, h, s, "box-" + index));
		}
		return out;
	}

	/** Rectangles of an ImageJ ROI-set zip (or a single .roi file); other ROI shapes are refused. */
	public static List<Box> readRoiZip(Path file) {
		List<Box> boxes = new ArrayList<>();
		try (InputStream in = Files.newInputStream(file)) {
			if (file.toString().toLowerCase(Locale.ROOT).endsWith(".roi")) {
				addRoi(boxes, new RoiDecoder(in.readAllBytes(), file.getFileName().toString()).getRoi(), file.toString());
				return boxes;
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
		return boxes;
	}

	private static void addRoi(List<Box> boxes, Roi roi, String where) {
		if (roi == null) throw new CorralException("Unreadable ROI in " + where);
		if (roi.getType() != Roi.RECTANGLE)
			throw new CorralException("ROI '" + roi.getName() + "' in " + where + " is a " + roi.getTypeAsString() + ", not a rectangle");
		java.awt.Rectangle r = roi.getBounds();
		int index = boxes.size() + 1;
		int slice = Math.max(roi.getPosition(), Math.max(roi.getTPosition(), roi.getZPosition()));
		String name = roi.getName() != null ? roi.getName() : "box-" + index;
		boxes.add(new Box(index, r.x, r.y, r.width, r.height, slice, name));
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
