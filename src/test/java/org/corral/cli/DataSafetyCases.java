package org.corral.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;
import ij.Menus;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.process.FloatProcessor;

import java.io.IOException;
import java.io.InputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.HexFormat;
import java.util.Hashtable;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.Set;
import java.util.TreeMap;
import java.util.function.Supplier;
import java.util.stream.Stream;

import org.corral.CorralException;
import org.corral.cli.BadInputTest.Case;
import org.corral.fiji.ImageJOutputs;
import org.corral.fiji.MacroBridge;
import org.corral.io.ImageFiles;
import org.corral.io.Overlays;
import org.corral.io.RoiSets;
import org.corral.workflow.FolderRun;

/**
 * The rows of the bad-input table that guard the user's data: outputs never replace inputs, folder
 * runs survive any per-image failure, option values are checked, outline colours do not come from
 * names, and command titles are unique in ImageJ's command table.
 */
final class DataSafetyCases {
	private DataSafetyCases() {}

	/** A copy of the demo images (and box file) that a case may try to damage. */
	static Path copyDemo(Path demoImages, Path demoBoxes, Path work) throws IOException {
		Path in = Files.createDirectories(work.resolve("in"));
		try (Stream<Path> s = Files.list(demoImages)) {
			for (Path p : s.toList()) Files.copy(p, in.resolve(p.getFileName()));
		}
		Files.copy(demoBoxes, in.resolve("boxes.csv"));
		return in;
	}

	/** File name -> SHA-256 of every file of a folder. */
	static Map<String, String> digest(Path dir) throws Exception {
		Map<String, String> out = new TreeMap<>();
		try (Stream<Path> s = Files.list(dir)) {
			for (Path p : s.toList()) {
				MessageDigest md = MessageDigest.getInstance("SHA-256");
				out.put(p.getFileName().toString(), HexFormat.of().formatHex(md.digest(Files.readAllBytes(p))));
			}
		}
		return out;
	}

	static List<Case> cases(Supplier<Path> model, Path demoImages, Path demoBoxes) {
		List<Case> c = new ArrayList<>();
		// outputs never replace inputs: the whole folder is compared byte for byte afterwards
		Map<String, Map<String, String>> before = new java.util.HashMap<>();
		BadInputTest.Check unchanged = w -> assertEquals(before.get(w.toString()), digest(w.resolve("in")), "inputs left byte-identical, nothing added");
		c.add(new Case("mask-boxes with the output folder equal to the image folder", w -> {
			Path in = copyDemo(demoImages, demoBoxes, w);
			before.put(w.toString(), digest(in));
			return new String[] {"mask-boxes", "--images", in.toString(), "--boxes", in.resolve("boxes.csv").toString(), "--model", model.get().toString(), "--out",
				in.toString()};
		}, "is the input folder", unchanged));
		c.add(new Case("mask-image with the output folder equal to the image folder (spelt differently)", w -> {
			Path in = copyDemo(demoImages, demoBoxes, w);
			before.put(w.toString(), digest(in));
			return new String[] {"mask-image", "--images", in.toString(), "--model", model.get().toString(), "--out", in.resolve("..").resolve("in").toString()};
		}, "is the input folder", unchanged));
		c.add(new Case("learn with the model file named like an input image", w -> {
			Path in = copyDemo(demoImages, demoBoxes, w);
			before.put(w.toString(), digest(in));
			return new String[] {"learn", "--images", in.toString(), "--boxes", in.resolve("boxes.csv").toString(), "--model", in.resolve("seedcoat-01.tif").toString(),
				"--steps", "2", "--width", "16", "--minutes", "0"};
		}, "is also an input", unchanged));
		c.add(new Case("learn with the model file equal to the box file", w -> {
			Path in = copyDemo(demoImages, demoBoxes, w);
			before.put(w.toString(), digest(in));
			return new String[] {"learn", "--images", in.toString(), "--boxes", in.resolve("boxes.csv").toString(), "--model", in.resolve("boxes.csv").toString(),
				"--steps", "2", "--width", "16", "--minutes", "0"};
		}, "is also an input", unchanged));
		c.add(new Case("learn with the model file equal to an image's ROI set", w -> {
			Path in = copyDemo(demoImages, demoBoxes, w);
			List<Roi> rects = List.of(new Roi(10, 10, 12, 12));
			RoiSets.writeZip(in.resolve("seedcoat-01.zip"), rects);
			Files.delete(in.resolve("boxes.csv"));
			before.put(w.toString(), digest(in));
			return new String[] {"learn", "--images", in.toString(), "--model", in.resolve("seedcoat-01.zip").toString(), "--steps", "2", "--width", "16", "--minutes", "0"};
		}, "is also an input", unchanged));
		c.add(new Case("score with the table written over a reference image", w -> {
			Path in = Files.createDirectories(w.resolve("in"));
			ImageFiles.saveTiff(new ImagePlus("a", new FloatProcessor(5, 5)), in.resolve("x.tif"));
			ImageFiles.saveTiff(new ImagePlus("a", new FloatProcessor(5, 5)), w.resolve("lab/x.labels.tif"));
			before.put(w.toString(), digest(in));
			return new String[] {"score", "--labels", w.resolve("lab").toString(), "--reference", in.toString(), "--out", in.resolve("x.tif").toString()};
		}, "is also an input", unchanged));
		c.add(new Case("outputs are never listed as images: a second run over an output folder finds none", w -> {
			Path out = w.resolve("first");
			assertEquals(0, Main.run(new String[] {"mask-image", "--images", demoImages.toString(), "--model", model.get().toString(), "--out", out.toString()}));
			return new String[] {"mask-image", "--images", out.toString(), "--model", model.get().toString(), "--out", w.resolve("second").toString()};
		}, "No images", null));
		c.add(new Case("a resumed run does not take a file of the image's own name for its output", w -> {
			Path out = Files.createDirectories(w.resolve("out"));
			Files.copy(demoImages.resolve("seedcoat-01.tif"), out.resolve("seedcoat-01.tif")); // the user's file, not Corral's
			Path in = Files.createDirectories(w.resolve("in"));
			Files.copy(demoImages.resolve("seedcoat-01.tif"), in.resolve("seedcoat-01.tif"));
			before.put(w.toString(), digest(out));
			return new String[] {"mask-image", "--images", in.toString(), "--model", model.get().toString(), "--out", out.toString()};
		}, null, w -> {
			assertTrue(Files.exists(w.resolve("out/seedcoat-01.labels.tif")), "masked, not skipped as done");
			assertEquals(before.get(w.toString()).get("seedcoat-01.tif"), digest(w.resolve("out")).get("seedcoat-01.tif"), "the user's file is untouched");
		}));
		// a loss that is not a number ends learning with a message (a width-8 network on the demo boxes
		// diverged so in a fresh JVM, but not reliably inside the test run, so the guard is called directly)
		c.add(Case.direct("learning that diverges stops with a message", "Learning diverged at step 2", w -> {
			org.corral.train.Learner.requireFinite(1.5f, 1, 16);
			org.corral.train.Learner.requireFinite(Float.NaN, 2, 8);
		}));
		// option values
		c.add(new Case("a typo in a list option", w -> new String[] {"benchmark", "--data", "x", "--grow", "2,x"}, "--grow must be a comma-separated list of whole numbers", null));
		c.add(new Case("a typo in a whole-number option", w -> new String[] {"learn", "--images", "x", "--model", "y", "--steps", "4OO"},
			"--steps must be a whole number from 1", null));
		c.add(new Case("zero steps", w -> new String[] {"learn", "--images", "x", "--model", "y", "--steps", "0"}, "--steps must be a whole number from 1", null));
		c.add(new Case("negative thread count", w -> new String[] {"mask-image", "--images", "x", "--model", "y", "--out", "z", "--threads", "-2"},
			"--threads must be a whole number from 1", null));
		c.add(new Case("text for a number", w -> new String[] {"mask-image", "--images", "x", "--model", "y", "--out", "z", "--object-size", "big"},
			"--object-size must be a number", null));
		c.add(new Case("fill bound above 1", w -> new String[] {"learn", "--images", "x", "--model", "y", "--fill-max", "1.5"}, "--fill-max must be a number from 0 to 1", null));
		c.add(new Case("a seed that is not whole", w -> new String[] {"learn", "--images", "x", "--model", "y", "--seed", "1.5"}, "--seed must be a whole number", null));
		// folder runs in shares, and the cluster scripts
		c.add(new Case("a share that does not exist", w -> new String[] {"mask-image", "--images", "x", "--model", "y", "--out", "z", "--part", "4/3"},
			"Share 4/3 does not exist", null));
		c.add(new Case("cluster-script without the folder job", w -> new String[] {"cluster-script", "--parts", "3"}, "give the folder job after --", null));
		c.add(new Case("cluster-script for a job that cannot run in shares", w -> new String[] {"cluster-script", "--parts", "3", "--", "learn", "--images", "x"},
			"runs mask-image or mask-boxes", null));
		c.add(new Case("cluster-script with --part in the job", w -> new String[] {"cluster-script", "--parts", "3", "--", "mask-image", "--images", "x", "--out", "z",
			"--part", "1/3"}, "sets --part of each task itself", null));
		c.add(new Case("cluster-script with a memory typo", w -> new String[] {"cluster-script", "--parts", "3", "--mem", "4Q", "--", "mask-image", "--images", "x", "--out",
			"z"}, "--mem '4Q' is not a size", null));
		c.add(new Case("cluster-script writes the array and the merge job, submits nothing", w -> new String[] {"cluster-script", "--parts", "4", "--partition", "short",
			"--", "mask-image", "--images", w.resolve("in").toString(), "--model", "m.zip", "--out", w.resolve("cl").toString()}, null, w -> {
				String array = Files.readString(w.resolve("cl/corral-slurm/array.sbatch"));
				assertTrue(array.contains("#SBATCH --array=0-3") && array.contains("#SBATCH --partition=short") && array.contains("--part \"$((SLURM_ARRAY_TASK_ID + 1))/4\""), array);
				assertTrue(Files.readString(w.resolve("cl/corral-slurm/merge.sbatch")).contains(" merge --out " + w.resolve("cl")));
			}));
		c.add(new Case("merge of a folder that does not exist", w -> new String[] {"merge", "--out", w.resolve("nothing-here").toString()}, "No output folder", null));
		// folder runs survive any per-image failure
		c.add(Case.direct("engine error and out of memory on two images: both listed, the others written, run goes on", null, w -> {
			List<Path> imgs = new ArrayList<>();
			for (String n : new String[] {"a.tif", "b.tif", "c.tif", "d.tif"}) {
				ImageFiles.saveTiff(new ImagePlus(n, new FloatProcessor(4, 4)), w.resolve("in").resolve(n));
				imgs.add(w.resolve("in").resolve(n));
			}
			List<String> log = new ArrayList<>();
			FolderRun.Report r = FolderRun.run(imgs, List.of(), w.resolve("out"), true, null, log::add, (img, base) -> {
				if (base.equals("b")) throw new OutOfMemoryError("Java heap space");
				if (base.equals("c")) throw new IllegalStateException("native engine failure");
				ImageFiles.saveTiff(new ImagePlus(base, new FloatProcessor(4, 4)), w.resolve("out").resolve(base + ".labels.tif"));
				return base + " done";
			});
			assertEquals(2, r.written());
			assertEquals(Set.of("b.tif", "c.tif"), r.failed().keySet());
			assertTrue(r.failed().get("b.tif").contains("ran out of memory") && r.failed().get("b.tif").contains("-Xmx"), r.failed().get("b.tif"));
			String failures = Files.readString(w.resolve("out/corral-failures.csv"));
			assertTrue(failures.contains("c.tif") && failures.contains("native engine failure"), failures);
			assertTrue(Files.exists(w.resolve("out/d.labels.tif")), "the image after the failures was done");
		}));
		// object numbers and colours
		c.add(Case.direct("outline colours from object 10,000 on come from the label, not from the name", null, w -> {
			int n = 10_005, wd = 2 * n, h = 2;
			int[] lab = new int[wd * h];
			for (int l = 1; l <= n; l++) lab[2 * (l - 1)] = l;
			Roi[] rois = RoiSets.outlines(lab, wd, h, n, null);
			ImagePlus imp = new ImagePlus("x", new FloatProcessor(wd, h));
			ImageJOutputs.showOutlines(imp, List.of(rois[9_999], rois[10_003]), false);
			Overlay ov = imp.getOverlay();
			assertEquals(Overlays.colour(10_000), ov.get(0).getStrokeColor().getRGB() & 0xffffff);
			assertEquals(Overlays.colour(10_004), ov.get(1).getStrokeColor().getRGB() & 0xffffff);
			assertNotEquals(Overlays.colour(1000), Overlays.colour(10_004), "the colours a name parser would confuse differ, so the check can fail");
		}));
		// command titles
		c.add(Case.direct("command titles are unique in ImageJ 1.x's own command list", null, w -> {
			Set<String> builtIn = imageJCommands();
			assertTrue(builtIn.size() > 300 && builtIn.contains("Gaussian Blur..."), "ImageJ's command list was read: " + builtIn.size());
			Set<String> ours = new HashSet<>();
			for (String t : MacroBridge.COMMANDS.keySet()) {
				assertFalse(builtIn.contains(t), t + " clashes with an ImageJ command");
				assertTrue(ours.add(t), t + " twice");
				assertTrue(t.startsWith("Corral "), t);
			}
		}));
		c.add(Case.direct("the macro bridge refuses to install over another plugin's command of the same title", "already gives that title to other.Plugin", w -> {
			MacroBridge.install();
			@SuppressWarnings("unchecked")
			Hashtable<String, String> table = Menus.getCommands();
			String title = MacroBridge.COMMANDS.keySet().iterator().next(), ours = table.get(title);
			table.put(title, "other.Plugin");
			try {
				MacroBridge.install();
			} finally {
				assertEquals("other.Plugin", table.get(title), "the other plugin's entry was not replaced");
				table.put(title, ours);
			}
		}));
		return c;
	}

	/** Command titles of ImageJ 1.x itself, from the command list in its jar (IJ_Props.txt). */
	static Set<String> imageJCommands() throws IOException {
		Properties p = new Properties();
		try (InputStream in = ij.IJ.class.getResourceAsStream("/IJ_Props.txt")) {
			if (in == null) throw new CorralException("IJ_Props.txt not found in the ImageJ jar");
			p.load(in);
		}
		Set<String> out = new HashSet<>();
		for (String k : p.stringPropertyNames()) {
			String v = p.getProperty(k);
			if (v.startsWith("\"") && v.indexOf('"', 1) > 0) out.add(v.substring(1, v.indexOf('"', 1)));
		}
		@SuppressWarnings("unchecked")
		Hashtable<String, String> table = Menus.getCommands();
		if (table != null) for (Map.Entry<String, String> e : table.entrySet()) if (!e.getValue().startsWith(MacroBridge.class.getName())) out.add(e.getKey());
		return out;
	}

}
