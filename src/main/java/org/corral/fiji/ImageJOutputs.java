package org.corral.fiji;

import ij.ImagePlus;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.measure.ResultsTable;
import ij.plugin.frame.RoiManager;
import ij.process.LUT;

import java.awt.GraphicsEnvironment;
import java.util.List;

import org.corral.boxes.Box;
import org.corral.instances.BoxMasks;
import org.corral.io.ImageFiles;
import org.corral.io.Overlays;
import org.corral.score.Scores;
import org.corral.workflow.Jobs;
import org.corral.workflow.ResultTables;
import org.corral.workflow.Table;

/** Results back into ImageJ: label images with our lookup table, outline ROIs, results tables. */
public final class ImageJOutputs {
	private ImageJOutputs() {}

	/** Our categorical lookup table: 0 black, label k the golden-angle hue of {@link Overlays#colour}. */
	public static LUT labelLut() {
		byte[] r = new byte[256], g = new byte[256], b = new byte[256];
		for (int k = 1; k < 256; k++) {
			int c = Overlays.colour(k);
			r[k] = (byte) (c >> 16);
			g[k] = (byte) (c >> 8);
			b[k] = (byte) c;
		}
		return new LUT(r, g, b);
	}

	public static ImagePlus labelImage(String title, int[][] labels, ImagePlus like) {
		ImagePlus out = ImageFiles.labelImage(title, labels, like.getWidth(), like.getHeight(), like.getCalibration());
		if (out.getBitDepth() == 16) {
			out.getProcessor().setLut(labelLut());
			out.setDisplayRange(0, 255); // label k and k+255 share a colour; neighbours never do
		}
		return out;
	}

	/**
	 * Outlines go to the ROI Manager when there is a display (removing the boxes unless {@code keep}),
	 * and always into the source image's overlay, coloured like their labels.
	 */
	public static void showOutlines(ImagePlus source, List<Roi> outlines, boolean keep) {
		Overlay ov = keep && source.getOverlay() != null ? source.getOverlay() : new Overlay();
		for (Roi r : outlines) { // the ROI Manager names each class's group after its class
			String cls = r.getProperty(org.corral.workflow.Jobs.CLASS_PROPERTY);
			if (cls != null && r.getGroup() > 0) Roi.setGroupName(r.getGroup(), cls);
		}
		for (Roi r : outlines) {
			ov.add((Roi) r.clone()); // outlines carry the colour of their label from when they were traced
		}
		source.setOverlay(ov);
		if (!GraphicsEnvironment.isHeadless()) {
			RoiManager rm = RoiManager.getRoiManager();
			if (!keep) rm.reset();
			for (Roi r : outlines) rm.addRoi((Roi) r.clone());
		}
	}

	/** The per-box table, with the columns of {@code NAME.boxes.csv}; the class columns when the model knows classes. */
	public static ResultsTable boxTable(List<Box> boxes, BoxMasks.Fit[] fits, String[] classes, double[] classConfidence) {
		return resultsTable(ResultTables.boxes(classes != null), ResultTables.boxRows(boxes, fits, classes, classConfidence));
	}

	/** The per-object table of a whole-image result, with the columns of {@code NAME.objects.csv}. */
	public static ResultsTable objectTable(List<Jobs.ObjectRow> rows, boolean classes) {
		return resultsTable(ResultTables.objects(classes), rows);
	}

	/** A table rendered as an ImageJ results table: numbers as values, text as strings. */
	static <R> ResultsTable resultsTable(Table<R> table, List<R> rows) {
		ResultsTable rt = new ResultsTable();
		for (R r : rows) {
			rt.incrementCounter();
			for (Table.Column<R> c : table.columns()) {
				Object v = c.cell().apply(r);
				if (v instanceof Number n) rt.addValue(c.name(), n.doubleValue());
				else if (v instanceof Boolean b) rt.addValue(c.name(), b ? 1 : 0);
				else rt.addValue(c.name(), v == null ? "" : v.toString());
			}
		}
		return rt;
	}

	public static ResultsTable scoreTable(String name, Scores.Tally t) {
		ResultsTable rt = new ResultsTable();
		rt.incrementCounter();
		rt.addValue("image", name);
		rt.addValue("reference_objects", t.refObjects);
		rt.addValue("predicted_objects", t.predObjects);
		rt.addValue("object_dice", t.objectDice());
		rt.addValue("object_iou", t.objectIoU());
		rt.addValue("pixel_dice", t.pixelDice());
		rt.addValue("precision_50", t.precision(0.5));
		rt.addValue("recall_50", t.recall(0.5));
		rt.addValue("f1_50", t.f1(0.5));
		rt.addValue("mean_ap", t.meanAP());
		return rt;
	}

	/** Shows a table under a title when there is a display or a macro to read it; harmless headless. */
	public static void show(ResultsTable rt, String title) {
		rt.show(title);
	}
}
