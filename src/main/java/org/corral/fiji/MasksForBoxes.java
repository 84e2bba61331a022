package org.corral.fiji;

import ij.ImagePlus;

import java.io.File;
import java.util.List;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * One mask per box of the image: a label image (label k = k-th box), one outline per object in the
 * ROI Manager and the overlay, and a table with one row per box. Without a model file, it first
 * learns on this image's boxes (quick mode).
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>Masks for Boxes")
public class MasksForBoxes implements Command {
	@Parameter(persist = false)
	ImagePlus image;

	@Parameter(label = "Model file (empty: learn on this image's boxes first)", required = false, persist = false)
	File model;

	@Parameter(label = "Steps (quick learning without a model)", min = "1", persist = false)
	int steps = 150;

	@Parameter(label = "Keep the boxes in the ROI Manager", persist = false)
	boolean keep = true;

	@Parameter(type = ItemIO.OUTPUT)
	ImagePlus labels;

	@Parameter(type = ItemIO.OUTPUT)
	ij.measure.ResultsTable boxes;

	@Override
	public void run() {
		ImageJBoxes.Found f = ImageJBoxes.of(image);
		List<Box> bs = f.boxes();
		Jobs.BoxMaskOutcome o;
		if (model != null && model.getPath().length() > 0) {
			try (ModelRunner m = ModelRunner.open(model.toPath())) {
				o = Jobs.maskBoxes(image, bs, m);
			}
		} else {
			LearnSettings s = new LearnSettings();
			s.steps = steps;
			s.minutes = 0;
			try (Learner.Result r = new Learner(s).learn(Jobs.trainingImages(image, image.getTitle(), bs, f.region(), ij.IJ::log), new ImageJProgress(false))) {
				o = Jobs.maskBoxes(image, bs, new ModelRunner(r.header(), r.net(), r.manager()));
			}
		}
		if (o.shown() == null) throw new CorralException("None of the boxes lies on " + image.getTitle());
		labels = ImageJOutputs.labelImage(image.getShortTitle() + "-masks", o.labels(), image);
		ImageJOutputs.showOutlines(image, Jobs.boxOutlines(o.labels(), image.getWidth(), image.getHeight(), bs), keep);
		boxes = ImageJOutputs.boxTable(bs, o.fits());
		ImageJOutputs.show(boxes, "Corral boxes");
	}
}
