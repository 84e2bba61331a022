package org.corral.io;

import ij.gui.Roi;
import ij.io.RoiEncoder;
import ij.plugin.filter.ThresholdToSelection;
import ij.process.ByteProcessor;

import java.io.DataOutputStream;
import java.nio.file.Path;
import java.util.List;
import java.util.zip.ZipEntry;
import java.util.zip.ZipOutputStream;

/** Outline ROIs of label images, and ROI-set zips that ImageJ's ROI Manager opens. */
public final class RoiSets {
	private RoiSets() {}

	/**
	 * One outline ROI per label value 1..n (null for an empty label), traced from its pixels;
	 * {@code names[k-1]} names label k so each outline leads back to its box. Each outline is drawn
	 * in the colour of its label ({@link Overlays#colour}).
	 */
	public static Roi[] outlines(int[] labels, int w, int h, int n, String[] names) {
		int[] x0 = new int[n + 1], y0 = new int[n + 1], x1 = new int[n + 1], y1 = new int[n + 1];
		java.util.Arrays.fill(x0, Integer.MAX_VALUE);
		java.util.Arrays.fill(y0, Integer.MAX_VALUE);
		java.util.Arrays.fill(x1, -1);
		java.util.Arrays.fill(y1, -1);
		for (int y = 0; y < h; y++)
			for (int x = 0; x < w; x++) {
				int l = labels[y * w + x];
				if (l <= 0 || l > n) continue;
				x0[l] = Math.min(x0[l], x);
				y0[l] = Math.min(y0[l], y);
				x1[l] = Math.max(x1[l], x);
				y1[l] = Math.max(y1[l], y);
			}
		Roi[] rois = new Roi[n];
		for (int l = 1; l <= n; l++) {
			if (x1[l] < 0) continue;
			int bw = x1[l] - x0[l] + 1, bh = y1[l] - y0[l] + 1;
			ByteProcessor bp = new ByteProcessor(bw, bh);
			for (int y = 0; y < bh; y++)
				for (int x = 0; x < bw; x++)
					if (labels[(y + y0[l]) * w + x + x0[l]] == l) bp.set(x, y, 255);
			bp.setThreshold(255, 255, ByteProcessor.NO_LUT_UPDATE);
			Roi roi = new ThresholdToSelection().convert(bp);
			if (roi == null) continue;
			roi.setLocation(roi.getXBase() + x0[l], roi.getYBase() + y0[l]);
			roi.setName(names != null && names[l - 1] != null ? names[l - 1] : String.format("object-%04d", l));
			roi.setStrokeColor(new java.awt.Color(Overlays.colour(l))); // coloured by its label value here, never from its name
			roi.setProperty(org.corral.boxes.RoiBoxes.FINGERPRINT, org.corral.boxes.RoiBoxes.fingerprint(roi)); // edited outlines become corrections

			rois[l - 1] = roi;
		}
		return rois;
	}

	/** The time stamp of every entry (2000-01-01 00:00, in no time zone): zips are compared byte for byte across runs and machines. */
	static final java.time.LocalDateTime ENTRY_TIME = java.time.LocalDateTime.of(2000, 1, 1, 0, 0);

	public static void writeZip(Path target, List<Roi> rois) {
		AtomicFiles.write(target, out -> {
			ZipOutputStream zos = new ZipOutputStream(out);
			DataOutputStream dos = new DataOutputStream(zos);
			RoiEncoder enc = new RoiEncoder(dos);
			java.util.Set<String> used = new java.util.HashSet<>(); // a list's lookups made 45,696 outlines take ~10 s
			for (Roi r : rois) {
				if (r == null) continue;
				String name = r.getName();
				while (!used.add(name)) name = name + "_";
				ZipEntry e = new ZipEntry(name + ".roi");
				e.setTimeLocal(ENTRY_TIME); // the same outlines give the same bytes, whenever and wherever they are written
				zos.putNextEntry(e);
				enc.write(r);
				dos.flush();
			}
			zos.finish();
			dos.flush();
		});
	}
}
