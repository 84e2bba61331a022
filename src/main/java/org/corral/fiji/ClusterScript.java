package org.corral.fiji;

import java.io.File;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.corral.cluster.SlurmScript;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * Writes a folder run as SLURM scripts (a job array over shares of the folder, then the merge) and
 * shows the {@code sbatch} command to submit them on the cluster; nothing is submitted from here.
 */
@Plugin(type = Command.class, menuPath = "Plugins>Corral>" + ClusterScript.TITLE)
public class ClusterScript implements Command {
	public static final String TITLE = "Corral Cluster Script";

	@Parameter(label = "Image folder (as the cluster sees it)", style = "directory", persist = false)
	File input;

	@Parameter(label = "Output folder (as the cluster sees it)", style = "directory", persist = false)
	File output;

	@Parameter(label = "Model file", persist = false)
	File model;

	@Parameter(label = "Mask", choices = {ProcessFolder.WHOLE, ProcessFolder.BOXES}, persist = false)
	String mode = ProcessFolder.WHOLE;

	@Parameter(label = "Box CSV (for 'boxes'; else ROI sets beside the images)", required = false, persist = false)
	File table;

	@Parameter(label = "First learn from each share's boxes (for 'boxes')", persist = false)
	boolean adapt = false;

	@Parameter(label = "Shares (array tasks)", min = "1", persist = false)
	int parts = 10;

	@Parameter(label = "Time per task", persist = false)
	String time = "01:00:00";

	@Parameter(label = "Memory per task", persist = false)
	String memory = "4G";

	@Parameter(label = "Partition (empty: the cluster's default)", required = false, persist = false)
	String partition = "";

	@Parameter(label = "Cores per task", min = "1", persist = false)
	int threads = 2;

	@Parameter(label = "Corral command on the cluster (empty: this installation)", required = false, persist = false)
	String launcher = "";

	@Parameter(type = ItemIO.OUTPUT)
	String summary;

	@Override
	public void run() {
		ProcessFolder.requireChosen(input, output, model);
		List<String> job = new ArrayList<>(List.of(ProcessFolder.BOXES.equals(mode) ? "mask-boxes" : "mask-image", "--images", input.getAbsolutePath(),
			"--model", model.getAbsolutePath(), "--out", output.getAbsolutePath()));
		if (ProcessFolder.BOXES.equals(mode)) {
			if (table != null) job.addAll(List.of("--boxes", table.getAbsolutePath()));
			if (!adapt) job.add("--no-adapt");
		}
		SlurmScript.Scripts sc = SlurmScript.write(new SlurmScript.Settings(job, parts, time, memory, partition == null || partition.isBlank() ? null : partition,
			threads, launcher == null || launcher.isBlank() ? SlurmScript.defaultLauncher() : List.of(launcher), output.getAbsoluteFile().toPath()));
		summary = sc.submit();
		ij.IJ.log("Corral: scripts written to " + sc.array().getParent() + "; on the cluster, submit with:\n  " + summary);
	}
}
