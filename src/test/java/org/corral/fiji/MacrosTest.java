package org.corral.fiji;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeFalse;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.Roi;
import ij.macro.Interpreter;
import ij.measure.ResultsTable;
import ij.plugin.frame.RoiManager;

import java.awt.GraphicsEnvironment;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import org.corral.ReferenceData;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.io.ImageFiles;
import org.corral.score.Scores;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** The macros of macros/ through ImageJ's own macro interpreter, on the demo images; outputs checked. */
class MacrosTest {
	@TempDir
	static Path dir;

	@BeforeAll
	static void install() {
		MacroBridge.install();
		MacroBridge.install(); // idempotent
	}

	static String runMacro(String file, String arg) throws Exception {
		String code = Files.readString(Path.of("macros", file));
		Interpreter in = new Interpreter();
		in.setIgnoreErrors(true);
		String result = in.run(code, arg);
		assertNull(in.getErrorMessage(), file + " failed: " + in.getErrorMessage());
		return result;
	}

	@Test
	void learnFromFolderThenProcessFolderThenScore() throws Exception {
		Path model = dir.resolve("folder-model.zip"), out = dir.resolve("masked");
		Path demo = ReferenceData.demo().toAbsolutePath();
		runMacro("learn_folder_then_process.ijm", demo.resolve("images") + "|" + demo.resolve("boxes.csv") + "|" + model + "|" + demo.resolve("images") + "|" + out);
		assertTrue(Files.size(model) > 10_000);
		for (int i = 1; i <= 4; i++) {
			String base = String.format("seedcoat-%02d", i);
			int[] lab = ImageFiles.readLabels(out.resolve(base + ".labels.tif"), null);
			int[] ref = ImageFiles.readLabels(demo.resolve("reference").resolve(base + ".tif"), null);
			Scores.Tally t = Scores.compare(lab, ref);
			assertTrue(t.f1(0.5) > 0.6, base + " F1 " + t.f1(0.5));
			assertTrue(Files.readAllLines(out.resolve(base + ".objects.csv")).size() == t.predObjects + 1, "one row per object");
		}
		assertTrue(MacroBridge.last("summary").startsWith("4 written"), MacroBridge.last("summary"));
		// run again: everything is skipped (resumable), the model is reused
		runMacro("learn_folder_then_process.ijm", demo.resolve("images") + "|" + demo.resolve("boxes.csv") + "|" + model + "|" + demo.resolve("images") + "|" + out);
		assertTrue(MacroBridge.last("summary").startsWith("0 written, 4 skipped"), MacroBridge.last("summary"));

		// one share of the folder, as a cluster's array task runs it
		Interpreter in = new Interpreter();
		in.run("run(\"Corral Process Folder\", \"input=[" + demo.resolve("images") + "] output=[" + dir.resolve("share-2-of-3") + "] model=[" + model
			+ "] mode=[whole images] part=2/3\");", "");
		assertTrue(MacroBridge.last("summary").startsWith("1 written"), MacroBridge.last("summary"));
		assertTrue(Files.isRegularFile(dir.resolve("share-2-of-3/seedcoat-02.labels.tif")), "share 2 of 3 is the second image by name");

		runMacro("score_folder.ijm", out + "|" + demo.resolve("reference"));
		ResultsTable rt = ResultsTable.getResultsTable("Corral folder scores");
		assertEquals(4, rt.size());
		assertEquals("seedcoat-01.tif", rt.getStringValue("image", 0));
		int[] lab = ImageFiles.readLabels(out.resolve("seedcoat-03.labels.tif"), null);
		int[] ref = ImageFiles.readLabels(demo.resolve("reference").resolve("seedcoat-03.tif"), null);
		assertEquals(Scores.compare(lab, ref).objectDice(), rt.getValue("object_dice", 2), 1e-9, "the table holds the core's score");
	}

	@Test
	void clusterScriptFromAMacro() throws Exception {
		Path demo = ReferenceData.demo().toAbsolutePath(), out = dir.resolve("cluster-out");
		runMacro("cluster_script.ijm", demo.resolve("images") + "|" + dir.resolve("some-model.zip") + "|" + out + "|3");
		String submit = MacroBridge.last("summary");
		assertTrue(submit.startsWith("jid=$(sbatch --parsable ") && submit.contains("--dependency=afterany:"), submit);
		String array = Files.readString(out.resolve("corral-slurm/array.sbatch"));
		for (String line : List.of("#SBATCH --array=0-2", "#SBATCH --cpus-per-task=2", "#SBATCH --mem=4G", "#SBATCH --time=00:30:00", "mask-image --images " + demo.resolve("images"),
			"--threads 2 --part \"$((SLURM_ARRAY_TASK_ID + 1))/3\""))
			assertTrue(array.contains(line), "array.sbatch lacks '" + line + "':\n" + array);
		assertTrue(Files.readString(out.resolve("corral-slurm/merge.sbatch")).contains("merge --out " + out), "the merge job merges the same folder");
	}

	@Test
	void learnAndMaskFromTheRoiManager() throws Exception {
		assumeFalse(GraphicsEnvironment.isHeadless(), "the ROI Manager needs a display (run the tests under xvfb-run)");
		Path demo = ReferenceData.demo().toAbsolutePath();
		List<Box> boxes = BoxFiles.readCsv(demo.resolve("boxes.csv")).get("seedcoat-01.tif");
		ImagePlus imp = IJ.openImage(demo.resolve("images").resolve("seedcoat-01.tif").toString());
		Interpreter.batchMode = true;
		try {
			imp.show();
			WindowManager.setTempCurrentImage(imp);
			RoiManager rm = RoiManager.getRoiManager();
			rm.reset();
			for (Box b : boxes) {
				Roi r = new Roi(b.x(), b.y(), b.width(), b.height());
				r.setName(b.name());
				rm.addRoi(r);
			}
			Path model = dir.resolve("rm-model.zip");
			runMacro("learn_and_mask_roi_manager.ijm", model.toString());
			assertTrue(Files.size(model) > 10_000);
			ResultsTable rt = ResultsTable.getResultsTable();
			assertEquals(boxes.size(), rt.size(), "one row per box");
			long outlines = java.util.Arrays.stream(rm.getRoisAsArray()).filter(r -> r.getName().startsWith("mask-")).count();
			assertTrue(outlines >= boxes.size() - 1, "outlines in the ROI Manager: " + outlines);
			assertEquals(boxes.size() + outlines, rm.getCount(), "the boxes were kept");
			ImagePlus labels = WindowManager.getImage("seedcoat-01-masks");
			assertTrue(labels != null && labels.getBitDepth() == 16);
			Scores.Tally t = Scores.compare(ScoreAgainstReference.values(labels),
				ImageFiles.readLabels(demo.resolve("reference").resolve("seedcoat-01.tif"), null));
			assertTrue(t.objectDice() > 0.8, "per-object Dice " + t.objectDice());

			// the user corrects one outline in the ROI Manager and learns again from the same ROI Manager
			int at = -1;
			for (int i = 0; i < rm.getCount(); i++) if (rm.getRoi(i).getName().startsWith("mask-")) { at = i; break; }
			Roi outline = rm.getRoi(at);
			java.awt.Rectangle ob = outline.getBounds();
			Roi corrected = new ij.gui.OvalRoi(ob.x, ob.y, ob.width + 1, ob.height);
			corrected.setName(outline.getName());
			rm.setRoi(corrected, at);
			Path again = dir.resolve("rm-model-corrected.zip");
			new Interpreter().run("run(\"Corral Learn from Boxes\", \"source=[current image] model=[" + again + "] steps=20\");", "");
			try (org.corral.predict.ModelRunner m = org.corral.predict.ModelRunner.open(again)) {
				assertEquals(1, m.header().counts.outlines, "the corrected outline is learned as an exact object");
				assertEquals(boxes.size(), m.header().counts.boxes, "it replaces its box; the other boxes stay");
			}
		} finally {
			Interpreter.batchMode = false;
			RoiManager rm = RoiManager.getInstance();
			if (rm != null) {
				rm.reset();
				rm.close();
			}
		}
	}

	@Test
	void aFailingCommandStopsTheMacroWithItsMessage() {
		Interpreter in = new Interpreter();
		in.setIgnoreErrors(true);
		in.run("run(\"Corral Process Folder\", \"input=[/no/such/folder] output=[" + dir.resolve("x") + "] model=[/no/such/model.zip] mode=[whole images]\");", "");
		assertTrue(in.getErrorMessage() != null && in.getErrorMessage().contains("does not exist"), in.getErrorMessage());
	}
}
