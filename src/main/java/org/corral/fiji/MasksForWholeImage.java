package org.corral.fiji;

import ij.ImagePlus;

import java.io.File;

import org.corral.CorralException;
import org.corral.predict.ModelRunner;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** Masks every object of an image nobody boxed, with a model learned from boxes elsewhere. */
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

	@Parameter(type = ItemIO.OUTPUT)
	ImagePlus labels;

	@Parameter(type = ItemIO.OUTPUT)
	ij.measure.ResultsTable objects;

	@Override
	public void run() {
		if (model == null) throw new CorralException("Choose a model file");
		Jobs.WholeImageOutcome o;
		try (ModelRunner m = ModelRunner.open(model.toPath())) {
			ij.IJ.log("Corral: " + m.wholeImageSettings());
			o = Jobs.maskWhole(image, m, side);
		}
		labels = ImageJOutputs.labelImage(image.getShortTitle() + "-objects", o.labels(), image);
		ImageJOutputs.showOutlines(image, o.outlines(), false);
		if (propose) ImageJOutputs.showOutlines(image, o.proposals(), true);
		objects = ImageJOutputs.objectTable(o.objects(), o.classes());
		ImageJOutputs.show(objects, "Corral objects");
	}
}
