package org.corral.fiji;

import java.io.File;

import net.imglib2.RandomAccessibleInterval;
import net.imglib2.img.Img;
import net.imglib2.type.numeric.RealType;
import net.imglib2.type.numeric.integer.IntType;

import org.corral.CorralException;
import org.corral.io.ImgLib2Images;
import org.corral.predict.ModelRunner;
import org.corral.workflow.WholeImage;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * Masks every object of an ImgLib2 image, for SciJava scripts and plugins ({@code #@ Img}, {@code
 * #@ CommandService}): the label image comes back as an {@link Img} with one id per object. No
 * menu entry: {@link MasksForWholeImage} is the same job for an open ImagePlus.
 */
@Plugin(type = Command.class, headless = true, label = "Corral masks for an ImgLib2 image")
public class MasksForImg implements Command {
	@Parameter(persist = false)
	RandomAccessibleInterval<? extends RealType<?>> image;

	@Parameter(label = "Model file", persist = false)
	File model;

	@Parameter(label = "Typical object side in px (0 = measure)", min = "0", persist = false, required = false)
	double side = 0;

	@Parameter(type = ItemIO.OUTPUT)
	Img<IntType> labels;

	@Parameter(type = ItemIO.OUTPUT)
	int count;

	@Override
	public void run() {
		if (model == null) throw new CorralException("Choose a model file");
		var reader = ImgLib2Images.rowReader(image);
		try (ModelRunner m = ModelRunner.open(model.toPath())) {
			WholeImage.Outcome o = WholeImage.mask(m, reader, side);
			labels = ImgLib2Images.labels(o.result().labels(), reader.width(), reader.height());
			count = o.result().count();
		}
	}
}
