package org.corral.fiji;

import ij.ImagePlus;

import org.corral.CorralException;
import org.corral.score.Scores;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** A label image against a reference label image: the score table of the command line. */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + ScoreAgainstReference.TITLE)
public class ScoreAgainstReference implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Score Against Reference";

	@Parameter(label = "Label image", persist = false)
	ImagePlus labels;

	@Parameter(label = "Reference label image", persist = false)
	ImagePlus reference;

	@Parameter(type = ItemIO.OUTPUT)
	ij.measure.ResultsTable scores;

	@Override
	public void run() {
		if (labels.getWidth() != reference.getWidth() || labels.getHeight() != reference.getHeight())
			throw new CorralException("Label image " + labels.getTitle() + " and reference " + reference.getTitle() + " differ in size");
		if (labels.getType() == ImagePlus.COLOR_RGB || reference.getType() == ImagePlus.COLOR_RGB)
			throw new CorralException("Label images must be 8-, 16- or 32-bit grey, not RGB");
		Scores.Tally t = Scores.compare(values(labels), values(reference));
		scores = ImageJOutputs.scoreTable(labels.getTitle(), t);
		ImageJOutputs.show(scores, "Corral scores");
	}

	static int[] values(ImagePlus imp) {
		ij.process.ImageProcessor ip = imp.getProcessor();
		int[] v = new int[ip.getPixelCount()];
		for (int i = 0; i < v.length; i++) v[i] = Math.max(0, Math.round(ip.getf(i)));
		return v;
	}
}
