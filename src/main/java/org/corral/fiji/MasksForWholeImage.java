package org.corral.fiji;

import ij.ImagePlus;

import java.io.File;

import org.corral.CorralException;
import org.corral.predict.ModelRunner;
import org.corral.train.Learner;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * Masks every object of an image, with a model learned from boxes elsewhere; optionally ({@code adapt})
 * the model first continues learning on the boxes drawn on this image, then masks all its objects,
 * boxed or not.
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + MasksForWholeImage.TITLE)
public class MasksForWholeImage implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Masks for Whole Image";

	@Parameter(persist = false)
	ImagePlus image;

	@Parameter(label = "Model file", persist = false)
	File model;

	@Parameter(label = "Typical object side in px (0 = measure)", min = "0", persist = false)
	double side = 0;

	@Parameter(label = "Also add the objects as boxes (to correct and learn again)", persist = false)
	boolean propose = false;

	/** Boxes drawn on this image teach the model how objects of its look are outlined (README, "whole images of a new look"). */
	@Parameter(label = "First learn from the boxes drawn on this image", persist = false)
	boolean adapt = false;

	@Parameter(type = ItemIO.OUTPUT)
	ImagePlus labels;

	@Parameter(type = ItemIO.OUTPUT)
	ij.measure.ResultsTable objects;

	@Override
	public void run() {
		if (model == null) throw new CorralException("Choose a model file");
		Jobs.WholeImageOutcome o;
		try (ModelRunner m = ModelRunner.open(model.toPath())) {
			if (adapt) {
				try (Learner.Result r = MasksForBoxes.adaptTo(image, ImageJBoxes.of(image), m,
					"No boxes on " + image.getTitle() + " to learn from: draw rectangles around some objects, or untick learning first");
					ModelRunner adapted = new ModelRunner(r.header(), r.net(), r.manager())) {
					ij.IJ.log("Corral: " + adapted.wholeImageSettings());
					o = Jobs.maskWhole(image, adapted, side);
				}
			} else {
				ij.IJ.log("Corral: " + m.wholeImageSettings());
				o = Jobs.maskWhole(image, m, side);
			}
		}
		labels = ImageJOutputs.labelImage(image.getShortTitle() + "-objects", o.labels(), image);
		ImageJOutputs.showOutlines(image, o.outlines(), false);
		if (propose) ImageJOutputs.showOutlines(image, o.proposals(), true);
		objects = ImageJOutputs.objectTable(o.objects(), o.classes());
		ImageJOutputs.show(objects, "Corral objects");
	}
}
