package org.corral.fiji;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertInstanceOf;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.ImageRoi;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.measure.ResultsTable;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.ExecutionException;

import org.corral.CorralException;
import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.scijava.Context;
import org.scijava.command.Command;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;

/**
 * The SciJava commands through CommandService with the string inputs a macro would pass. Boxes
 * come from the image overlay, so this runs headless too.
 */
class CommandsTest {
	@TempDir
	static Path dir;
	static Context context;
	static Path model;
	static Map<String, List<Box>> demoBoxes;

	@BeforeAll
	static void learnOnce() throws Exception {
		context = new Context(CommandService.class);
		demoBoxes = BoxFiles.readCsv(ReferenceData.demo().resolve("boxes.csv"));
		model = dir.resolve("model.zip");
		ImagePlus imp = boxed("seedcoat-01.tif");
		CommandModule m = run(LearnFromBoxes.class, Map.of("image", imp, "source", "current image", "model", model.toString(), "steps", "60", "plot", "false"));
		assertTrue(Files.size(model) > 10_000);
		assertTrue(((String) m.getOutput("summary")).contains("60 steps"), (String) m.getOutput("summary"));
	}

	@AfterAll
	static void close() {
		context.dispose();
	}

	static ImagePlus boxed(String name) {
		ImagePlus imp = IJ.openImage(ReferenceData.demo().resolve("images").resolve(name).toString());
		Overlay ov = new Overlay();
		for (Box b : demoBoxes.get(name)) {
			Roi r = new Roi(b.x(), b.y(), b.width(), b.height());
			r.setName(b.name());
			ov.add(r);
		}
		imp.setOverlay(ov);
		return imp;
	}

	static CommandModule run(Class<? extends Command> c, Map<String, Object> in) throws Exception {
		return context.service(CommandService.class).run(c, true, in).get();
	}

	@Test
	void masksForBoxesGivesLabelsOutlinesAndOneRowPerBox() throws Exception {
		ImagePlus imp = boxed("seedcoat-02.tif");
		int n = demoBoxes.get("seedcoat-02.tif").size();
		CommandModule m = run(MasksForBoxes.class, Map.of("image", imp, "model", model.toString(), "keep", "true"));
		ImagePlus labels = (ImagePlus) m.getOutput("labels");
		assertEquals(16, labels.getBitDepth());
		assertEquals(imp.getWidth(), labels.getWidth());
		int max = (int) labels.getStatistics().max;
		assertTrue(max <= n && max >= n - 1, "labels are box indices: max " + max + " of " + n);
		ResultsTable rt = (ResultsTable) m.getOutput("boxes");
		assertEquals(n, rt.size());
		assertEquals(1, rt.getValue("box", 0), 1e-9);
		assertTrue(rt.getValue("area", 0) > 0);
		// overlay: the n boxes kept, plus one outline per non-empty mask
		long outlines = java.util.Arrays.stream(imp.getOverlay().toArray()).filter(r -> r.getName().startsWith("mask-")).count();
		assertTrue(outlines >= n - 1, "outlines " + outlines);
		assertEquals(n + outlines, imp.getOverlay().size());
	}

	@Test
	void anImgLib2ImageIsMaskedThroughTheCommandService() throws Exception {
		// what a SciJava script hands over (#@ Img): an ArrayImg of the demo's 16-bit pixels, with the ImgLib2 type
		ImagePlus imp = IJ.openImage(ReferenceData.demo().resolve("images").resolve("seedcoat-04.tif").toString());
		int w = imp.getWidth(), h = imp.getHeight();
		var img = net.imglib2.img.array.ArrayImgs.unsignedShorts((short[]) imp.getProcessor().getPixels(), w, h);
		CommandModule m = run(MasksForImg.class, Map.of("image", img, "model", model.toFile()));
		@SuppressWarnings("unchecked")
		net.imglib2.img.Img<net.imglib2.type.numeric.integer.IntType> labels = (net.imglib2.img.Img<net.imglib2.type.numeric.integer.IntType>) m.getOutput("labels");
		assertEquals(w, labels.dimension(0));
		assertEquals(h, labels.dimension(1));
		int count = (Integer) m.getOutput("count");
		assertTrue(count >= 10, "objects found: " + count);
		// the same objects as the ImagePlus route
		int[] expected;
		try (org.corral.predict.ModelRunner r = org.corral.predict.ModelRunner.open(model)) {
			expected = org.corral.workflow.WholeImage.mask(r, org.corral.io.ImageFiles.planes(imp, 1, 1), 0).result().labels();
		}
		var c = net.imglib2.view.Views.flatIterable(labels).cursor();
		for (int i = 0; c.hasNext(); i++) assertEquals(expected[i], c.next().get(), "label at pixel " + i);
		// a stack is refused with a message, not read as channels
		var stack = net.imglib2.img.array.ArrayImgs.floats(20, 20, 7);
		var e = org.junit.jupiter.api.Assertions.assertThrows(Exception.class, () -> run(MasksForImg.class, Map.of("image", stack, "model", model.toFile())));
		Throwable cause = e;
		while (cause.getCause() != null && !(cause instanceof CorralException)) cause = cause.getCause();
		assertTrue(String.valueOf(cause.getMessage()).contains("7 planes"), "message: " + cause.getMessage());
	}

	@Test
	void quickModeLearnsWhenNoModelIsGiven() throws Exception {
		ImagePlus imp = boxed("seedcoat-03.tif");
		Map<String, Object> in = new HashMap<>(Map.of("image", imp, "steps", "20", "keep", "false"));
		CommandModule m = run(MasksForBoxes.class, in);
		ImagePlus labels = (ImagePlus) m.getOutput("labels");
		assertTrue(labels.getStatistics().max >= 1);
		assertTrue(java.util.Arrays.stream(imp.getOverlay().toArray()).allMatch(r -> r.getName().startsWith("mask-")), "boxes removed when not kept");
	}

	@Test
	void wholeImageCanFirstLearnFromTheBoxesDrawnOnIt() throws Exception {
		ImagePlus imp = boxed("seedcoat-04.tif");
		// a few boxes only: the others are objects the adapted model must find without boxes
		Overlay few = new Overlay();
		for (int k = 0; k < 6; k++) few.add(imp.getOverlay().get(k));
		imp.setOverlay(few);
		ImagePlus adapted = (ImagePlus) run(MasksForWholeImage.class, Map.of("image", imp, "model", model.toString(), "side", "0", "propose", "false", "adapt", "true"))
			.getOutput("labels");
		ImagePlus plain = (ImagePlus) run(MasksForWholeImage.class, Map.of("image", boxed("seedcoat-04.tif"), "model", model.toString(), "side", "0", "propose",
			"false")).getOutput("labels");
		assertTrue(adapted.getStatistics().max > 6, "objects found beyond the 6 boxed: " + adapted.getStatistics().max);
		assertFalse(java.util.Arrays.equals((short[]) adapted.getProcessor().getPixels(), (short[]) plain.getProcessor().getPixels()), "learning from the boxes changed the masks");
		ImagePlus none = IJ.openImage(ReferenceData.demo().resolve("images").resolve("seedcoat-04.tif").toString());
		Exception e = org.junit.jupiter.api.Assertions.assertThrows(Exception.class,
			() -> run(MasksForWholeImage.class, Map.of("image", none, "model", model.toString(), "side", "0", "propose", "false", "adapt", "true")));
		Throwable cause = e;
		while (cause.getCause() != null && !(cause instanceof CorralException)) cause = cause.getCause();
		assertTrue(String.valueOf(cause.getMessage()).contains("No boxes on seedcoat-04.tif"), "message: " + cause.getMessage());
	}

	@Test
	void wholeImageScoreAndPreview() throws Exception {
		ImagePlus imp = IJ.openImage(ReferenceData.demo().resolve("images").resolve("seedcoat-04.tif").toString());
		CommandModule m = run(MasksForWholeImage.class, Map.of("image", imp, "model", model.toString(), "side", "0", "propose", "false"));
		ImagePlus labels = (ImagePlus) m.getOutput("labels");
		ResultsTable objects = (ResultsTable) m.getOutput("objects");
		assertTrue(objects.size() >= 5, "objects found: " + objects.size());
		assertEquals(objects.size(), (int) labels.getStatistics().max);
		// the Fiji table has the columns of NAME.objects.csv, filled from the same rows (no text parsed back)
		assertEquals(String.join(",", org.corral.workflow.Jobs.OBJECT_HEADER.split(",")), String.join(",", objects.getHeadings()));
		for (int r = 0; r < objects.size(); r++) {
			assertEquals(r + 1, (int) objects.getValue("object", r));
			assertTrue(objects.getValue("area", r) > 0 && objects.getValue("mean_probability", r) >= 0.5);
		}

		ImagePlus ref = IJ.openImage(ReferenceData.demo().resolve("reference").resolve("seedcoat-04.tif").toString());
		ResultsTable scores = (ResultsTable) run(ScoreAgainstReference.class, Map.of("labels", labels, "reference", ref)).getOutput("scores");
		assertEquals(1, scores.size());
		assertTrue(scores.getValue("f1_50", 0) > 0.6, "F1 " + scores.getValue("f1_50", 0));
		ResultsTable self = (ResultsTable) run(ScoreAgainstReference.class, Map.of("labels", ref, "reference", ref)).getOutput("scores");
		assertEquals(1.0, self.getValue("mean_ap", 0), 1e-12);

		ImagePlus boxed = boxed("seedcoat-04.tif");
		String summary = (String) run(PreviewBoxSupervision.class, Map.of("image", boxed, "band", "4", "margin", "0", "complete", "false")).getOutput("summary");
		assertTrue(summary.startsWith(demoBoxes.get("seedcoat-04.tif").size() + " boxes"), summary);
		assertInstanceOf(ImageRoi.class, boxed.getOverlay().get(0));
		// the preview keeps the boxes readable for learning
		assertEquals(demoBoxes.get("seedcoat-04.tif").size(), ImageJBoxes.of(boxed).boxes().size());
	}

	/** The preview must show what learning uses: same boxes after tightening, background, bands and bounds. */
	@Test
	void previewShowsExactlyTheSupervisionLearningUses() throws Exception {
		ImagePlus loose = IJ.openImage(ReferenceData.demo().resolve("images").resolve("seedcoat-03.tif").toString());
		Overlay ov = new Overlay();
		List<Box> grown = demoBoxes.get("seedcoat-03.tif").stream().map(b -> b.grown(3)).toList();
		for (Box b : grown) {
			Roi r = new Roi(b.x(), b.y(), b.width(), b.height());
			r.setName(b.name());
			ov.add(r);
		}
		loose.setOverlay(ov);
		PreviewBoxSupervision p = (PreviewBoxSupervision) run(PreviewBoxSupervision.class, Map.of("image", loose, "band", "4", "margin", "3", "complete", "false"))
			.getDelegateObject();
		org.corral.train.LearnSettings s = new org.corral.train.LearnSettings();
		s.band = 4;
		s.margin = 3;
		org.corral.supervision.Supervision learned = org.corral.train.Learner.supervision(
			org.corral.workflow.Jobs.trainingImages(loose, "x", grown, null, x -> {}).get(0), s);
		assertEquals(learned.boxes.stream().map(b -> List.of(b.x(), b.y(), b.width(), b.height())).toList(),
			p.shown.boxes.stream().map(b -> List.of(b.x(), b.y(), b.width(), b.height())).toList(), "tightened boxes");
		assertTrue(learned.boxes.stream().mapToLong(Box::area).sum() < grown.stream().mapToLong(Box::area).sum(), "the loose boxes were tightened");
		assertEquals(learned.constraints, p.shown.constraints, "bands and size bounds");
		org.junit.jupiter.api.Assertions.assertArrayEquals(learned.background, p.shown.background, "known background");
		assertTrue(learned.constraints.stream().anyMatch(c -> c.kind() == org.corral.supervision.Constraint.Kind.values()[0]));
		// the drawn boxes stay in the overlay as they were, so learning still reads the user's boxes
		assertEquals(grown.size(), ImageJBoxes.of(loose).boxes().size());
	}

	@Test
	void processFolderWritesEveryImageAndResumes() throws Exception {
		Path out = dir.resolve("folder-out");
		Map<String, Object> in = Map.of("input", ReferenceData.demo().resolve("images").toString(), "output", out.toString(), "model", model.toString(),
			"mode", "whole images");
		String first = (String) run(ProcessFolder.class, in).getOutput("summary");
		assertTrue(first.startsWith("4 written, 0 skipped"), first);
		for (int i = 1; i <= 4; i++) assertTrue(Files.exists(out.resolve(String.format("seedcoat-%02d.labels.tif", i))));
		String again = (String) run(ProcessFolder.class, in).getOutput("summary");
		assertTrue(again.startsWith("0 written, 4 skipped"), again);
	}

	@Test
	void noBoxesGivesAClearError() {
		ImagePlus plain = IJ.openImage(ReferenceData.demo().resolve("images").resolve("seedcoat-01.tif").toString());
		ExecutionException e = org.junit.jupiter.api.Assertions.assertThrows(ExecutionException.class,
			() -> run(LearnFromBoxes.class, Map.of("image", plain, "source", "current image", "model", dir.resolve("never.zip").toString(), "steps", "5", "plot", "false")));
		Throwable c = e;
		while (!(c instanceof CorralException) && c.getCause() != null) c = c.getCause();
		assertInstanceOf(CorralException.class, c);
		assertTrue(c.getMessage().contains("No boxes"), c.getMessage());
		assertTrue(Files.notExists(dir.resolve("never.zip")), "no model file written");
	}
}
