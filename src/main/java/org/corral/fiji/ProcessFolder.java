package org.corral.fiji;

import java.io.File;

import org.corral.CorralException;
import org.corral.predict.ModelRunner;
import org.corral.supervision.SupervisionSettings;
import org.corral.train.LearnSettings;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.FolderRun;
import org.corral.workflow.Jobs;
import org.corral.workflow.Share;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * Folder in, folder out: label TIFFs, ROI zips, per-image CSV; resumable (images already done are
 * skipped), atomic, and a failing image is reported without stopping the rest.
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + ProcessFolder.TITLE)
public class ProcessFolder implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Process Folder";

	public static final String WHOLE = "whole images", BOXES = "boxes";

	@Parameter(label = "Image folder", style = "directory", persist = false)
	File input;

	@Parameter(label = "Output folder", style = "directory", persist = false)
	File output;

	@Parameter(label = "Model file", persist = false)
	File model;

	@Parameter(label = "Mask", choices = {WHOLE, BOXES}, persist = false)
	String mode = WHOLE;

	@Parameter(label = "Box CSV (for 'boxes'; else ROI sets beside the images)", required = false, persist = false)
	File table;

	@Parameter(label = "First learn from the boxes being masked (for 'boxes')", persist = false)
	boolean adapt = true;

	@Parameter(label = "Share K/N of the images (empty: all)", required = false, persist = false)
	String part = "";

	@Parameter(type = ItemIO.OUTPUT)
	String summary;

	@Override
	public void run() {
		requireChosen(input, output, model);
		FolderRun.Report r;
		Share share = Share.parse(part);
		if (BOXES.equals(mode)) {
			var boxed = BoxedImages.find(input.toPath(), table == null ? null : table.toPath());
			if (boxed.isEmpty()) throw new CorralException("No boxes found for the images in " + input);
			LearnSettings s = LearnFromBoxes.settings(SupervisionSettings.DEFAULT_BAND, 0, false);
			r = Jobs.maskBoxes(boxed, table == null ? null : table.toPath(), model.toPath(), new Jobs.AdaptPlan(adapt, 0, null, s), share, output.toPath(),
				ij.IJ::escapePressed, new ImageJProgress(false), ij.IJ::log);
		} else try (ModelRunner m = ModelRunner.open(model.toPath())) {
			r = Jobs.maskImages(BoxedImages.images(input.toPath()), share, m, output.toPath(), 0, false, ij.IJ::escapePressed, ij.IJ::log);
		}
		summary = r.summary() + (r.failed().isEmpty() ? "" : ": " + r.failed());
		ij.IJ.log("Corral: " + summary);
	}

	/** Both folder commands need all three paths chosen in the dialog (or given by the macro). */
	static void requireChosen(File input, File output, File model) {
		if (input == null || output == null || model == null) throw new CorralException("Choose the image folder, the output folder and the model file");
	}
}
