package org.corral.cluster;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;

import org.corral.ReferenceData;
import org.corral.train.LearnSettings;
import org.corral.train.Progress;
import org.corral.workflow.BoxedImages;
import org.corral.workflow.Jobs;
import org.corral.workflow.OutputNames;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The cluster path for real: a one-node SLURM cluster on localhost ({@link LocalSlurm}) runs the
 * scripts of {@code corral cluster-script} for a small folder as a job array of 3 tasks plus the
 * merge job, submitted with the very command Corral prints; the merged folder must hold byte for
 * byte what one process writes for the whole folder. Skipped, with the reason printed, only where
 * SLURM cannot start ({@code .ci/run} installs it).
 */
class SlurmClusterTest {
	@TempDir
	Path dir;

	@Test
	void jobArrayOfThreeSharesMergesToTheSameBytesAsOneProcess() throws Exception {
		Path demo = ReferenceData.demo(), images = dir.resolve("images");
		Files.createDirectories(images);
		try (Stream<Path> s = Files.list(demo.resolve("images"))) {
			for (Path p : s.toList()) Files.copy(p, images.resolve(p.getFileName()));
		}
		LearnSettings ls = new LearnSettings();
		ls.steps = 40;
		ls.minutes = 0;
		Path model = dir.resolve("model.zip");
		Jobs.learn(BoxedImages.find(demo.resolve("images"), demo.resolve("boxes.csv")), null, ls, model, Progress.silent(), n -> {}).close();

		try (LocalSlurm slurm = LocalSlurm.start()) {
			if (slurm == null) System.out.println("SlurmClusterTest skipped: " + LocalSlurm.why);
			Assumptions.assumeTrue(slurm != null, () -> "SLURM cannot start here: " + LocalSlurm.why);
			List<String> launcher = SlurmScript.javaLauncher(System.getProperty("surefire.test.class.path", System.getProperty("java.class.path")));
			Path cluster = dir.resolve("out-cluster"), single = dir.resolve("out-single");
			List<String> job = List.of("mask-image", "--images", images.toString(), "--model", model.toString(), "--out", cluster.toString(), "--propose");
			SlurmScript.Scripts sc = SlurmScript.write(new SlurmScript.Settings(job, 3, "00:10:00", "1500M", null, 1, launcher, dir));
			String array = Files.readString(sc.array());
			assertTrue(array.contains("#SBATCH --array=0-2") && array.contains("SLURM_ARRAY_TASK_ID"), array);

			long t0 = System.nanoTime();
			LocalSlurm.Result submitted = LocalSlurm.run(List.of("bash", "-c", sc.submit() + " && echo \"array $jid\""), slurm.env(), 60);
			assertEquals(0, submitted.code(), submitted.out());
			Matcher m = Pattern.compile("array (\\d+)").matcher(submitted.out());
			assertTrue(m.find(), submitted.out());
			String arrayJob = m.group(1);
			waitForEmptyQueue(slurm, 600);
			double seconds = (System.nanoTime() - t0) / 1e9;

			// every task and the merge completed (slurmctld keeps finished jobs for MinJobAge)
			String states = LocalSlurm.run(List.of("scontrol", "show", "job", "-o"), slurm.env(), 30).out();
			List<String> finished = new ArrayList<>();
			Matcher st = Pattern.compile("JobId=(\\d+) (?:ArrayJobId=(\\d+) ArrayTaskId=(\\d+) )?.*?JobState=(\\S+)").matcher(states);
			while (st.find()) finished.add((st.group(3) == null ? "merge" : "task " + st.group(3)) + "=" + st.group(4));
			assertEquals(List.of("merge=COMPLETED", "task 0=COMPLETED", "task 1=COMPLETED", "task 2=COMPLETED"), finished.stream().sorted().toList(),
				states + "\n" + logs(sc.logs()));
			for (int k = 0; k < 3; k++) assertTrue(Files.isRegularFile(sc.logs().resolve("share-" + k + ".log")), "log of task " + k);
			assertTrue(Files.readString(sc.logs().resolve("merge.log")).contains("4 image(s) done, 0 failed, 0 not run yet"), logs(sc.logs()));

			// one process, the same launcher and threads, the whole folder
			List<String> one = new ArrayList<>(launcher.stream().map(w -> w.startsWith(SlurmScript.RAW) ? "-Dai.djl.offline=true" : w).toList());
			one.addAll(List.of("mask-image", "--images", images.toString(), "--model", model.toString(), "--out", single.toString(), "--propose", "--threads", "1"));
			LocalSlurm.Result r = LocalSlurm.run(one, Map.of(), 300);
			assertEquals(0, r.code(), r.out());
			List<Path> files;
			try (Stream<Path> s = Files.list(single)) {
				files = s.filter(Files::isRegularFile).sorted().toList();
			}
			assertTrue(files.contains(single.resolve(OutputNames.OBJECTS)) && files.size() == 4 * 5 + 2, "whole-run outputs: " + files);
			for (Path f : files)
				assertTrue(java.util.Arrays.equals(Files.readAllBytes(f), Files.readAllBytes(cluster.resolve(f.getFileName()))), "differs after the cluster run: " + f.getFileName());
			System.out.printf(java.util.Locale.ROOT, "SlurmClusterTest: job %s, 3 shares of %d images + merge done in %.1f s; %d files identical to one process%n", arrayJob,
				4, seconds, files.size());
		}
	}

	private static void waitForEmptyQueue(LocalSlurm slurm, int seconds) throws Exception {
		long until = System.nanoTime() + seconds * 1_000_000_000L;
		while (System.nanoTime() < until) {
			LocalSlurm.Result q = LocalSlurm.run(List.of("squeue", "-h"), slurm.env(), 30);
			if (q.code() == 0 && q.out().isBlank()) return;
			Thread.sleep(1000);
		}
		throw new AssertionError("jobs still queued after " + seconds + " s");
	}

	private static String logs(Path dir) throws Exception {
		StringBuilder b = new StringBuilder();
		try (Stream<Path> s = Files.list(dir)) {
			for (Path p : s.sorted().toList()) b.append("--- ").append(p.getFileName()).append('\n').append(Files.readString(p));
		}
		return b.toString();
	}
}
