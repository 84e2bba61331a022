package org.corral.fiji;

import ij.ImagePlus;

import java.io.File;
import java.util.List;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.supervision.SupervisionSettings;
import org.corral.train.TrainingImage;
import org.corral.workflow.Adaptation;
import org.corral.workflow.Jobs;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * One mask per box of the image: a label image (label k = k-th box), one outline per object in the
 * ROI Manager and the overlay, and a table with one row per box. With a model file, the model first
 * continues learning on this image's boxes (unless {@code adapt} is off); without one, it learns on
 * them from scratch (quick mode). Each mask is fitted to its box.
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + MasksForBoxes.TITLE)
public class MasksForBoxes implements Command {
	/** The title in ImageJ's (flat) command table and in macros: prefixed, so no other plugin's title clashes. */
	public static final String TITLE = "Corral Masks for Boxes";

	@Parameter(persist = false)
	ImagePlus image;

	@Parameter(label = "Model file (empty: learn on this image's boxes first)", required = false, persist = false)
	File model;

	@Parameter(label = "Steps (quick learning without a model)", min = "1", persist = false)
	int steps = LearnSettings.QUICK_STEPS;

	@Parameter(label = "First learn from these boxes (adapt the model to this image)", persist = false)
	boolean adapt = true;

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
				if (adapt) { // continue learning on this image's boxes, then mask them
					// the adapted model masks these boxes only and is not kept
					try (Learner.Result r = adaptTo(image, f, m, "None of the boxes lies on " + image.getTitle())) {
						o = Jobs.maskBoxes(image, bs, new ModelRunner(r.header(), r.net(), r.manager()));
					}
				} else o = Jobs.maskBoxes(image, bs, m);
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
		ImageJOutputs.showOutlines(image, Jobs.boxOutlines(o.labels(), image.getWidth(), image.getHeight(), bs, o.classes()), keep);
		boxes = ImageJOutputs.boxTable(bs, o.fits(), o.classes(), o.classConfidence());
		ImageJOutputs.show(boxes, "Corral boxes");
	}

	/**
	 * The model continued on the boxes {@code f} of {@code image}, by the rule of {@link Adaptation}
	 * (shown in ImageJ's progress bar); {@code noBoxes} is the error when none lies on the image.
	 */
	static Learner.Result adaptTo(ImagePlus image, ImageJBoxes.Found f, ModelRunner m, String noBoxes) {
		List<TrainingImage> own = Jobs.trainingImages(image, image.getTitle(), f.boxes(), f.region(), ij.IJ::log);
		int n = own.stream().mapToInt(t -> t.boxes().size()).sum();
		if (n == 0) throw new CorralException(noBoxes);
		LearnSettings s = Adaptation.settings(LearnFromBoxes.settings(SupervisionSettings.DEFAULT_BAND, 0, false), m, n, 0);
		ij.IJ.log("Corral: learning from " + n + " boxes of " + image.getTitle() + ", " + s.steps + " steps");
		return Adaptation.adapt(m, own, s, new ImageJProgress(false));
	}
}
