package org.corral.workflow;

import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.predict.ModelRunner;
import org.corral.train.LearnSettings;
import org.corral.train.Learner;
import org.corral.train.Progress;

/** The main job on the bundled demo data: learn from its boxes, mask them, score, draw. */
public final class Demo {
	private Demo() {}

	public static void run(Path demoDir, Path out, LearnSettings s, Progress progress, Consumer<String> log) {
		Path images = demoDir.resolve("images"), boxes = demoDir.resolve("boxes.csv"), reference = demoDir.resolve("reference");
		if (!java.nio.file.Files.isDirectory(images))
			throw new CorralException("Demo data not found at " + demoDir.toAbsolutePath() + " (run from the Corral folder)");
		Jobs.mkdirs(out);
		Map<Path, List<Box>> boxed = BoxedImages.find(images, boxes);
		Path model = out.resolve("demo-model.zip");
		log.accept("learning from " + boxed.values().stream().mapToInt(List::size).sum() + " boxes on " + boxed.size() + " images, " + s.steps + " steps");
		try (Learner.Result r = Jobs.learn(boxed, boxes, s, model, progress, note -> log.accept("note: " + note))) {
			log.accept("model: " + model);
		}
		Path labels = out.resolve("masks");
		try (ModelRunner m = ModelRunner.open(model)) {
			Jobs.maskBoxes(boxed, boxes, m, org.corral.instances.BoxMasks.Options.DEFAULTS.withMargin(s.margin), Share.ALL, labels, null, log);
		}
		log.accept("scores against the demo's reference masks:");
		log.accept(Jobs.score(labels, reference, out.resolve("scores.csv")).strip());
		log.accept("outputs in " + out.toAbsolutePath() + ": masks/NAME.labels.tif, NAME.outlines.zip, NAME.objects.csv, NAME.overlay.png, scores.csv");
	}
}
