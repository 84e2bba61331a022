package org.corral.fiji;

import ij.ImagePlus;
import ij.WindowManager;

import java.io.File;
import java.util.ArrayList;
import java.util.List;

import org.corral.CorralException;
import org.corral.supervision.Supervision;
import org.corral.supervision.SupervisionSettings;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.TrainingImage;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** Learns a model from the boxes of the current image, of all open images, or of a folder. */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + LearnFromBoxes.TITLE)
public class LearnFromBoxes implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Learn from Boxes";

	public static final String CURRENT = "current image", ALL_OPEN = "all open images", FOLDER = "folder";

	@Parameter(required = false, persist = false)
	ImagePlus image;

	@Parameter(label = "Boxes from", choices = {CURRENT, ALL_OPEN, FOLDER}, persist = false)
	String source = CURRENT;

	@Parameter(label = "Image folder (for 'folder')", style = "directory", required = false, persist = false)
	File folder;

	@Parameter(label = "Box CSV (for 'folder'; else ROI sets beside the images)", required = false, persist = false)
	File table;

	@Parameter(label = "Model file to write", style = "save", persist = false)
	File model;

	@Parameter(label = "Steps", min = "1", persist = false)
	int steps = LearnSettings.DEFAULT_STEPS;

	@Parameter(label = "Seed", persist = false)
	long seed = LearnSettings.DEFAULT_SEED;

	@Parameter(label = "Band width w", min = "1", persist = false)
	int band = SupervisionSettings.DEFAULT_BAND;

	@Parameter(label = "Margin for loose boxes (px)", min = "0", persist = false)
	int margin = SupervisionSettings.DEFAULTS.margin();

	@Parameter(label = "Every object is boxed (else: background only in a ring around each box)", persist = false)
	boolean complete = false;

	@Parameter(label = "Live plot", persist = false)
	boolean plot = true;

	@Parameter(type = ItemIO.OUTPUT)
	String summary;

	/** Set by callers (the macro bridge) that can cancel from outside. */
	ImageJProgress progress;

	/** The settings of the Fiji commands (learning and preview alike); the rest are the defaults. */
	static LearnSettings settings(int band, int margin, boolean complete) {
		LearnSettings s = new LearnSettings();
		s.band = band;
		s.margin = margin;
		s.minutes = 0; // in ImageJ the user cancels with Esc; the step count keeps results reproducible
		s.background = complete ? Supervision.BackgroundMode.FULL : Supervision.BackgroundMode.RING;
		s.validate();
		return s;
	}

	@Override
	public void run() {
		LearnSettings s = settings(band, margin, complete);
		s.steps = steps;
		s.seed = seed;
		if (model == null) throw new CorralException("Choose where to save the model");
		List<TrainingImage> images = new ArrayList<>();
		switch (source) {
			case FOLDER -> {
				if (folder == null) throw new CorralException("Choose the image folder");
				var boxed = BoxedImages.find(folder.toPath(), table == null ? null : table.toPath());
				Jobs.checkModelTarget(model.toPath(), boxed.keySet(), table == null ? null : table.toPath());
				images.addAll(Jobs.trainingImages(boxed, ij.IJ::log));
			}
			case ALL_OPEN -> {
				int[] ids = WindowManager.getIDList();
				if (ids == null) throw new CorralException("No open images");
				for (int id : ids) {
					ImagePlus imp = WindowManager.getImage(id);
					ImageJBoxes.Found f;
					try {
						f = ImageJBoxes.of(imp);
					} catch (CorralException e) {
						continue; // an open image without boxes is simply not used
					}
					images.addAll(Jobs.trainingImages(imp, imp.getTitle(), f.boxes(), f.region(), ij.IJ::log));
				}
			}
			default -> {
				if (image == null) throw new CorralException("No image: open the image whose boxes to learn from");
				ImageJBoxes.Found f = ImageJBoxes.of(image);
				ij.io.FileInfo fi = image.getOriginalFileInfo();
				if (fi != null && fi.directory != null && fi.fileName != null)
					Jobs.checkModelTarget(model.toPath(), List.of(java.nio.file.Path.of(fi.directory, fi.fileName)), null);
				images.addAll(Jobs.trainingImages(image, image.getTitle(), f.boxes(), f.region(), ij.IJ::log));
			}
		}
		if (images.isEmpty()) throw new CorralException("No boxes found to learn from (" + source + ")");
		ImageJProgress p = progress != null ? progress : new ImageJProgress(plot);
		try (Learner.Result r = new Learner(s).learn(images, p)) {
			org.corral.model.ModelFile.write(model.toPath(), r.header(), r.net());
			summary = String.format(java.util.Locale.ROOT, "learned from %s boxes on %s image(s) in %s steps; constraints met %.3f; model %s", r.header().counts.boxes,
				r.header().counts.images, r.header().counts.steps, r.header().scores.constraintsMet, model);
			ij.IJ.showStatus("Corral: " + summary);
		}
	}
}
