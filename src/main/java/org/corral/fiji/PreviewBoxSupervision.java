package org.corral.fiji;

import ij.ImagePlus;
import ij.gui.ImageRoi;
import ij.gui.Line;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.process.ColorProcessor;

import java.awt.Color;

import org.corral.boxes.Box;
import org.corral.supervision.Constraint;
import org.corral.supervision.Supervision;
import org.corral.supervision.SupervisionSettings;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * Shows on the image what its boxes tell the learner, built by the very recipe learning uses
 * ({@link Learner#supervision}): known background tinted blue (nothing is known where it is clear),
 * each box as drawn in yellow and, with a margin, as tightened for learning in orange, the band
 * boundaries of the tightness prior as thin lines, and the annotated region in green. A partly boxed image without a region shows at once
 * that its unboxed objects would be learned as background.
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + PreviewBoxSupervision.TITLE)
public class PreviewBoxSupervision implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Preview Box Supervision";

	@Parameter(persist = false)
	ImagePlus image;

	@Parameter(label = "Band width w", min = "1", persist = false)
	int band = SupervisionSettings.DEFAULT_BAND;

	@Parameter(label = "Margin for loose boxes (px)", min = "0", persist = false)
	int margin = SupervisionSettings.DEFAULTS.margin();

	@Parameter(label = "Every object is boxed (else: background only in a ring around each box)", persist = false)
	boolean complete = false;

	@Parameter(type = ItemIO.OUTPUT)
	String summary;

	/** The supervision shown: the very one learning builds for these boxes and settings. */
	Supervision shown;

	@Override
	public void run() {
		ImageJBoxes.Found f = ImageJBoxes.of(image);
		int w = image.getWidth(), h = image.getHeight();
		LearnSettings settings = LearnFromBoxes.settings(band, margin, complete);
		// the boxes as learning takes them (awkward boxes dropped or clipped), supervision from the
		// same recipe: loose boxes tightened, the same bands and bounds
		var images = Jobs.trainingImages(image, image.getTitle(), f.boxes(), f.region(), ij.IJ::log);
		if (images.isEmpty()) throw new org.corral.CorralException("None of the boxes lies on " + image.getTitle());
		Supervision s = Learner.supervision(images.get(0), settings);
		shown = s;
		ColorProcessor tint = new ColorProcessor(w, h);
		int[] px = (int[]) tint.getPixels();
		for (int i = 0; i < px.length; i++) px[i] = s.background[i] != 0 ? 0x2060ff : 0;
		ImageRoi bg = new ImageRoi(0, 0, tint);
		bg.setZeroTransparent(true);
		bg.setOpacity(0.35);
		bg.setName("known background");
		Overlay ov = new Overlay();
		ov.add(bg);
		for (Box b : f.boxes()) { // the boxes as drawn, unchanged, so learning can read them back from this overlay
			Roi r = new Roi(b.x(), b.y(), b.width(), b.height());
			r.setStrokeColor(Color.yellow);
			r.setName(b.name());
			ov.add(r);
		}
		for (Box b : s.boxes) { // as learning uses them (tightened with a margin): a line, so never read as a box
			if (f.boxes().stream().anyMatch(d -> d.x() == b.x() && d.y() == b.y() && d.width() == b.width() && d.height() == b.height())) continue;
			float[] xs = {b.x(), b.x1(), b.x1(), b.x(), b.x()}, ys = {b.y(), b.y(), b.y1(), b.y1(), b.y()};
			Roi r = new ij.gui.PolygonRoi(xs, ys, Roi.POLYLINE);
			r.setStrokeColor(Color.orange);
			r.setName("tightened-" + b.name());
			ov.add(r);
		}
		for (Constraint c : s.constraints) {
			if (c.kind() != Constraint.Kind.BAND) continue;
			Box b = s.boxes.stream().filter(x -> x.index() == c.box()).findFirst().orElseThrow();
			boolean rows = c.x0() == b.x() && c.x1() == b.x1() && !(c.y0() == b.y() && c.y1() == b.y1());
			Line l = rows ? new Line(c.x0(), c.y1(), c.x1(), c.y1()) : new Line(c.x1(), c.y0(), c.x1(), c.y1());
			l.setStrokeColor(rows ? new Color(0, 220, 220, 160) : new Color(230, 0, 230, 160));
			ov.add(l);
		}
		if (f.region() != null) {
			ij.process.ByteProcessor m = new ij.process.ByteProcessor(w, h);
			for (int i = 0; i < w * h; i++) m.set(i, f.region()[i] != 0 ? 255 : 0);
			m.setThreshold(255, 255, ij.process.ImageProcessor.NO_LUT_UPDATE);
			Roi region = new ij.plugin.filter.ThresholdToSelection().convert(m);
			if (region != null) {
				region.setStrokeColor(Color.green);
				region.setName("region");
				ov.add(region);
			}
		}
		image.setOverlay(ov);
		summary = String.format(java.util.Locale.ROOT, "%d boxes, %d band constraints, %.1f %% of pixels known background (%s)", s.boxes.size(),
			s.count(Constraint.Kind.BAND), 100.0 * s.knownBackground() / (w * (double) h),
			f.region() != null ? "inside the annotated region" : complete ? "everything outside the boxes" : "a ring around each box");
		ij.IJ.showStatus("Corral: " + summary);
	}
}
