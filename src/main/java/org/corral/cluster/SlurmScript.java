package org.corral.cluster;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.corral.CorralException;
import org.corral.io.AtomicFiles;
import org.corral.workflow.OutputNames;

/**
 * A folder run as SLURM batch scripts: a job array whose task {@code i} runs share {@code i+1} of
 * {@code N} of the folder ({@code --part}), and a merge job to run after it ({@code --dependency}),
 * which joins the shares' tables into the whole run's (corral merge). SLURM does the scheduling;
 * Corral only writes the scripts and prints the {@code sbatch} command, and never submits anything.
 */
public final class SlurmScript {
	/** The jobs that can run in shares. */
	public static final List<String> JOBS = List.of("mask-image", "mask-boxes");

	/**
	 * @param job        the folder job's command line without the program: {@code mask-image --images DIR ...}
	 * @param parts      number of shares (array tasks)
	 * @param time       time limit per task ({@code HH:MM:SS} or any form sbatch takes)
	 * @param memory     memory per task ({@code 4G}, {@code 1500M})
	 * @param partition  partition, or null for the cluster's default
	 * @param threads    cores per task, given to Corral as {@code --threads}
	 * @param launcher   the command that runs Corral's command line on the cluster's nodes
	 * @param workDir    the folder the jobs run in (relative paths of {@code job} are relative to it)
	 */
	public record Settings(List<String> job, int parts, String time, String memory, String partition, int threads, List<String> launcher, Path workDir) {
		public Settings {
			job = List.copyOf(job);
			launcher = List.copyOf(launcher);
			if (job.isEmpty() || !JOBS.contains(job.get(0)))
				throw new CorralException("cluster-script runs " + String.join(" or ", JOBS) + " in shares; got '" + (job.isEmpty() ? "" : job.get(0)) + "'");
			for (String a : job)
				if (a.equals("--part") || a.equals("--threads"))
					throw new CorralException("cluster-script sets " + a + " of each task itself; leave it out of the job's options");
			if (parts < 1) throw new CorralException("cluster-script: --parts must be at least 1");
			if (threads < 1) throw new CorralException("cluster-script: --threads must be at least 1");
			if (!TIME.matcher(time).matches()) throw new CorralException("cluster-script: --time '" + time + "' is not a SLURM time (MM, HH:MM:SS or D-HH:MM:SS)");
			megabytes(memory);
			if (partition != null && !partition.matches("[A-Za-z0-9_.,-]+")) throw new CorralException("cluster-script: --partition '" + partition + "' is not a partition name");
			if (launcher.isEmpty()) throw new CorralException("cluster-script: no command to run Corral with (--launcher)");
		}

		String option(String name) {
			for (int i = 0; i + 1 < job.size(); i++) if (job.get(i).equals("--" + name)) return job.get(i + 1);
			return null;
		}
	}

	/** The scripts written and the command that submits them. */
	public record Scripts(Path array, Path merge, Path logs, String submit) {}

	private static final Pattern TIME = Pattern.compile("\\d+|\\d+:\\d{2}|\\d+:\\d{2}:\\d{2}|\\d+-\\d+(:\\d{2}(:\\d{2})?)?");
	private static final Pattern MEMORY = Pattern.compile("(\\d+)([KMGT]?)", Pattern.CASE_INSENSITIVE);

	private SlurmScript() {}

	/** Writes {@code OUT/corral-slurm/array.sbatch} and {@code merge.sbatch} and returns the submit command. */
	public static Scripts write(Settings s) {
		String out = s.option("out"), images = s.option("images");
		if (out == null || images == null) throw new CorralException("cluster-script: the job needs --images DIR and --out DIR");
		Path outDir = s.workDir().resolve(out).toAbsolutePath().normalize();
		Path dir = outDir.resolve(OutputNames.SCRIPTS), logs = dir.resolve("logs");
		try {
			Files.createDirectories(logs); // sbatch opens the log files before the job starts
		} catch (IOException e) {
			throw new CorralException("Cannot create " + logs + ": " + e.getMessage(), e);
		}
		Path array = dir.resolve("array.sbatch"), merge = dir.resolve("merge.sbatch");
		AtomicFiles.writeString(array, arrayScript(s, logs));
		AtomicFiles.writeString(merge, mergeScript(s, logs, outDir));
		array.toFile().setExecutable(true);
		merge.toFile().setExecutable(true);
		String submit = "jid=$(sbatch --parsable " + quote(array.toString()) + ") && sbatch --dependency=afterany:${jid%%;*} " + quote(merge.toString());
		return new Scripts(array, merge, logs, submit);
	}

	static String arrayScript(Settings s, Path logs) {
		StringBuilder b = header(s, "corral-" + s.job().get(0), s.memory(), s.time(), s.threads());
		b.append("#SBATCH --array=0-").append(s.parts() - 1).append('\n');
		b.append("#SBATCH --output=").append(logs.resolve("share-%a.log")).append('\n');
		b.append(environment(heapFor(s.memory())));
		List<String> cmd = new ArrayList<>(s.launcher());
		cmd.addAll(s.job());
		cmd.add("--threads");
		cmd.add(Integer.toString(s.threads()));
		b.append("# share K of N: array task K-1\n");
		b.append("exec ").append(words(cmd)).append(" --part \"$((SLURM_ARRAY_TASK_ID + 1))/").append(s.parts()).append("\"\n");
		return b.toString();
	}

	static String mergeScript(Settings s, Path logs, Path outDir) {
		StringBuilder b = header(s, "corral-merge", MERGE_MEMORY, MERGE_TIME, 1);
		b.append("#SBATCH --output=").append(logs.resolve("merge.log")).append('\n');
		b.append(environment(heapFor(MERGE_MEMORY)));
		List<String> cmd = new ArrayList<>(s.launcher());
		cmd.addAll(List.of("merge", "--out", outDir.toString(), "--images", s.option("images"), "--job", s.job().get(0)));
		if (s.option("boxes") != null) cmd.addAll(List.of("--boxes", s.option("boxes")));
		b.append("exec ").append(words(cmd)).append('\n');
		return b.toString();
	}

	/** The merge reads tables only. */
	static final String MERGE_MEMORY = "1G", MERGE_TIME = "00:30:00";

	private static StringBuilder header(Settings s, String name, String memory, String time, int cpus) {
		StringBuilder b = new StringBuilder("#!/bin/bash\n");
		b.append("# written by corral cluster-script; submit with the command it printed\n");
		b.append("#SBATCH --job-name=").append(name).append('\n');
		b.append("#SBATCH --ntasks=1\n");
		b.append("#SBATCH --cpus-per-task=").append(cpus).append('\n');
		b.append("#SBATCH --mem=").append(memory).append('\n');
		b.append("#SBATCH --time=").append(time).append('\n');
		if (s.partition() != null) b.append("#SBATCH --partition=").append(s.partition()).append('\n');
		b.append("#SBATCH --chdir=").append(s.workDir().toAbsolutePath().normalize()).append('\n');
		return b;
	}

	private static String environment(long heapMb) {
		// as the ./corral launcher does: glibc keeps PyTorch's large buffers; the Java heap leaves
		// room in the task's memory for the engine's own (native) memory
		return "set -euo pipefail\nexport MALLOC_MMAP_THRESHOLD_=33554432 MALLOC_TRIM_THRESHOLD_=17179869184\n"
			+ "export CORRAL_JAVA_OPTS=" + quote("-Xmx" + heapMb + "m -Dai.djl.offline=true") + "\n";
	}

	/** Java heap for a task of this memory: 60 %, the rest for the engine's native memory and the JVM itself (our rule). */
	static long heapFor(String memory) {
		return Math.max(256, megabytes(memory) * 6 / 10);
	}

	/** sbatch's memory form (a number with K, M, G or T; M when bare) in megabytes. */
	static long megabytes(String memory) {
		Matcher m = MEMORY.matcher(memory == null ? "" : memory.trim());
		if (!m.matches()) throw new CorralException("cluster-script: --mem '" + memory + "' is not a size such as 4G or 1500M");
		long v = Long.parseLong(m.group(1));
		return switch (m.group(2).toUpperCase(Locale.ROOT)) {
			case "K" -> v / 1024;
			case "G" -> v * 1024;
			case "T" -> v * 1024 * 1024;
			default -> v;
		};
	}

	/**
	 * The command that runs Corral's command line here: the {@code ./corral} launcher when it
	 * started this process ({@code CORRAL_LAUNCHER}), else this JVM's java with this class path.
	 */
	public static List<String> defaultLauncher() {
		String env = System.getenv("CORRAL_LAUNCHER");
		if (env != null && !env.isBlank()) return List.of(env);
		return javaLauncher(System.getProperty("java.class.path"));
	}

	/** {@code java $CORRAL_JAVA_OPTS -cp CLASSPATH org.corral.cli.Main}; the options are expanded by the script's shell. */
	public static List<String> javaLauncher(String classPath) {
		return List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(), RAW + "$CORRAL_JAVA_OPTS", "-cp", classPath, "org.corral.cli.Main");
	}

	/** A launcher word marked to be left unquoted (expanded by the script's shell). */
	static final String RAW = "\u0000raw:";

	static String words(List<String> cmd) {
		StringBuilder b = new StringBuilder();
		for (String w : cmd) {
			if (b.length() > 0) b.append(' ');
			b.append(w.startsWith(RAW) ? w.substring(RAW.length()) : quote(w));
		}
		return b.toString();
	}

	/** A word for the shell: single-quoted unless plainly safe. */
	static String quote(String w) {
		if (w.matches("[A-Za-z0-9_./:=@%+,-]+")) return w;
		return "'" + w.replace("'", "'\\''") + "'";
	}
}
