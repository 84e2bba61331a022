package org.corral.workflow;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Collection;
import java.util.List;
import java.util.Locale;

import org.corral.CorralException;

/**
 * The names of everything Corral writes, and the guard that keeps outputs from replacing inputs.
 * Every per-image output carries a suffix of its own ({@code NAME.labels.tif}, ...), so an output can
 * never be mistaken for an input image or ROI set, and is never listed as an image to learn from or
 * to mask; a resumed folder run recognises only these names as its own.
 */
public final class OutputNames {
	private OutputNames() {}

	public static final String LABELS = ".labels.tif", OUTLINES = ".outlines.zip", TABLE = ".objects.csv", OVERLAY = ".overlay.png",
		PROPOSED_BOXES = ".proposed-boxes.zip";
	/** Folder-level outputs. */
	public static final String PROPOSED_CSV = "corral-proposed-boxes.csv", FAILURES = "corral-failures.csv", RUN_RECORD = "corral-run.json",
		OBJECTS = "corral-objects.csv";
	/** Folder-level files of one share of a folder run ({@link Share#fileName}), and the cluster scripts' folder. */
	static final java.util.regex.Pattern SHARE_FILE = java.util.regex.Pattern.compile("corral-(failures|proposed-boxes|run)\\.part-\\d+-of-\\d+\\.(csv|json)");
	public static final String SCRIPTS = "corral-slurm";

	private static final List<String> PER_IMAGE = List.of(LABELS, OUTLINES, TABLE, OVERLAY, PROPOSED_BOXES);

	public static Path labels(Path outDir, String base) {
		return outDir.resolve(base + LABELS);
	}

	public static Path outlines(Path outDir, String base) {
		return outDir.resolve(base + OUTLINES);
	}

	public static Path table(Path outDir, String base) {
		return outDir.resolve(base + TABLE);
	}

	public static Path overlay(Path outDir, String base) {
		return outDir.resolve(base + OVERLAY);
	}

	public static Path proposedBoxes(Path outDir, String base) {
		return outDir.resolve(base + PROPOSED_BOXES);
	}

	/** True for a file named as one of Corral's outputs: never read back as an input image or ROI set. */
	public static boolean isOutput(Path p) {
		String n = p.getFileName().toString().toLowerCase(Locale.ROOT);
		for (String s : PER_IMAGE) if (n.endsWith(s)) return true;
		return n.equals(PROPOSED_CSV) || n.equals(FAILURES) || n.equals(RUN_RECORD) || n.equals(OBJECTS) || SHARE_FILE.matcher(n).matches();
	}

	/**
	 * Refuses an output folder that is an input folder (or holds an input file under an output's
	 * name): the user's images, box files and ROI sets are never replaced. {@code inputFolders} are
	 * folders whose images are read; {@code inputFiles} single input files (box CSV, model, ...).
	 */
	public static void checkOutputFolder(Path outDir, Collection<Path> inputFolders, Collection<Path> inputFiles) {
		for (Path in : inputFolders)
			if (in != null && same(outDir, in))
				throw new CorralException("Output folder " + outDir + " is the input folder " + in
					+ ": choose another output folder (Corral never writes beside the images it reads, so no input can be replaced)");
		for (Path f : inputFiles)
			if (f != null && f.toAbsolutePath().normalize().getParent() != null && same(outDir, f.toAbsolutePath().normalize().getParent()) && isOutput(f))
				throw new CorralException("Input " + f + " lies in the output folder under a name Corral writes; choose another output folder");
	}

	/** Refuses an output file that is one of the inputs (same file, whatever the path spelling). */
	public static void checkOutputFile(Path out, String what, Collection<Path> inputs) {
		for (Path in : inputs)
			if (in != null && same(out, in))
				throw new CorralException(what + " " + out + " is also an input (" + in + "); choose another file name so the input is not replaced");
	}

	/** Refuses an output file that would replace an image of an input folder or a file the job reads from it. */
	public static void checkNotInFolders(Path out, String what, Collection<Path> inputFolders) {
		for (Path dir : inputFolders) {
			if (dir == null) continue;
			Path parent = out.toAbsolutePath().normalize().getParent();
			if (parent != null && same(parent, dir) && Files.exists(out) && !isOutput(out) && org.corral.io.ImageFiles.looksLikeImage(out))
				throw new CorralException(what + " " + out + " would replace an input image of " + dir + "; choose another file name");
		}
	}

	/** The same file or folder, whatever the spelling (links resolved when both exist). */
	static boolean same(Path a, Path b) {
		Path x = a.toAbsolutePath().normalize(), y = b.toAbsolutePath().normalize();
		if (x.equals(y)) return true;
		try {
			return Files.exists(x) && Files.exists(y) && Files.isSameFile(x, y);
		} catch (IOException e) {
			return false;
		}
	}
}
