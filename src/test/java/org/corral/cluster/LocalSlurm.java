package org.corral.cluster;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.PosixFilePermissions;
import java.security.SecureRandom;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;

/**
 * A one-node SLURM cluster on localhost for tests: Debian's {@code slurm-wlm} and {@code munge}
 * (installed by {@code .ci/run}), configured in a scratch folder as {@code ../shared/PLATFORM.md}
 * records (verified on these machines). {@link #start} returns null with the reason in
 * {@link #why} when SLURM cannot run here; {@link #close} stops the daemons it started.
 */
final class LocalSlurm implements AutoCloseable {
	static String why;

	final Path dir, conf;
	private final List<Path> pidFiles = new ArrayList<>();

	private LocalSlurm(Path dir) {
		this.dir = dir;
		this.conf = dir.resolve("slurm.conf");
	}

	static LocalSlurm start() throws Exception {
		for (String tool : List.of("slurmctld", "slurmd", "sbatch", "squeue", "scontrol", "munged", "munge"))
			if (run(List.of("sh", "-c", "command -v " + tool), Map.of(), 10).code != 0) return skip(tool + " is not installed (apt-get install slurm-wlm munge)");
		if (!"0".equals(run(List.of("id", "-u"), Map.of(), 10).out.trim())) return skip("the daemons are configured to run as root, and this is not root");
		if (!startMunge()) return skip("munged did not start: " + why);
		LocalSlurm s = new LocalSlurm(Files.createTempDirectory("corral-slurm")); // not the test's folder: the daemons write into it until they stop
		s.configure();
		Map<String, String> env = s.env();
		Result ctl = run(List.of("slurmctld", "-f", s.conf.toString()), env, 30);
		Result d = run(List.of("slurmd", "-f", s.conf.toString()), env, 30);
		s.pidFiles.add(s.dir.resolve("slurmctld.pid"));
		s.pidFiles.add(s.dir.resolve("slurmd.pid"));
		long until = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
		String state = "";
		while (System.nanoTime() < until) {
			state = run(List.of("sinfo", "-h", "-o", "%t"), env, 10).out.trim();
			if (state.equals("idle") || state.equals("mix")) return s;
			Thread.sleep(500);
		}
		String logs = tail(s.dir.resolve("slurmctld.log")) + "\n" + tail(s.dir.resolve("slurmd.log"));
		s.close();
		return skip("the node did not come up (sinfo: '" + state + "'; slurmctld rc " + ctl.code + ", slurmd rc " + d.code + ")\n" + logs);
	}

	private static LocalSlurm skip(String reason) {
		why = reason;
		return null;
	}

	Map<String, String> env() {
		return Map.of("SLURM_CONF", conf.toString());
	}

	private void configure() throws IOException {
		Files.createDirectories(dir.resolve("state"));
		Files.createDirectories(dir.resolve("spool"));
		String text = String.join("\n",
			"ClusterName=local", "SlurmctldHost=localhost", "SlurmUser=root", "SlurmdUser=root", "AuthType=auth/munge",
			"ProctrackType=proctrack/linuxproc", "TaskPlugin=task/none", "SelectType=select/cons_tres", "SelectTypeParameters=CR_Core",
			"ReturnToService=2", "JobAcctGatherType=jobacct_gather/none", "AccountingStorageType=accounting_storage/none",
			"MinJobAge=600",
			"StateSaveLocation=" + dir.resolve("state"), "SlurmdSpoolDir=" + dir.resolve("spool"),
			"SlurmctldPidFile=" + dir.resolve("slurmctld.pid"), "SlurmdPidFile=" + dir.resolve("slurmd.pid"),
			"SlurmctldLogFile=" + dir.resolve("slurmctld.log"), "SlurmdLogFile=" + dir.resolve("slurmd.log"),
			"NodeName=localhost CPUs=2 RealMemory=4000 State=UNKNOWN",
			"PartitionName=debug Nodes=localhost Default=YES MaxTime=INFINITE State=UP", "");
		Files.writeString(conf, text);
	}

	/** munged with a key of its own when none runs yet (a running one is left as it is). */
	private static boolean startMunge() throws Exception {
		if (run(List.of("sh", "-c", "echo x | munge | unmunge"), Map.of(), 10).code == 0) return true;
		Path key = Path.of("/etc/munge/munge.key");
		for (String d : List.of("/etc/munge", "/var/log/munge", "/run/munge", "/var/lib/munge")) {
			Files.createDirectories(Path.of(d));
			run(List.of("chown", "munge:munge", d), Map.of(), 10);
		}
		if (!Files.exists(key)) {
			byte[] bytes = new byte[1024];
			new SecureRandom().nextBytes(bytes);
			Files.write(key, bytes);
		}
		run(List.of("chown", "munge:munge", key.toString()), Map.of(), 10);
		Files.setPosixFilePermissions(key, PosixFilePermissions.fromString("r--------"));
		Result r = run(List.of("su", "-s", "/bin/sh", "munge", "-c", "/usr/sbin/munged"), Map.of(), 30);
		for (int i = 0; i < 20; i++) {
			if (run(List.of("sh", "-c", "echo x | munge | unmunge"), Map.of(), 10).code == 0) return true;
			Thread.sleep(250);
		}
		why = "rc " + r.code + ": " + r.out;
		return false;
	}

	/**
	 * Stops the daemons and waits until they are gone (slurmctld saves its state while it stops),
	 * then removes the scratch folder.
	 */
	@Override
	public void close() {
		List<String> pids = new ArrayList<>();
		for (Path p : pidFiles) try {
			if (!Files.isRegularFile(p)) continue;
			String pid = Files.readString(p).trim();
			pids.add(pid);
			run(List.of("kill", pid), Map.of(), 10);
		} catch (Exception e) {
			// already gone
		}
		try {
			long until = System.nanoTime() + TimeUnit.SECONDS.toNanos(30);
			for (String pid : pids)
				while (System.nanoTime() < until && run(List.of("kill", "-0", pid), Map.of(), 10).code == 0) Thread.sleep(200);
			try (var files = Files.walk(dir)) {
				for (Path f : files.sorted(java.util.Comparator.reverseOrder()).toList()) Files.deleteIfExists(f);
			}
		} catch (Exception e) {
			System.out.println("LocalSlurm: scratch folder " + dir + " left behind: " + e);
		}
	}

	record Result(int code, String out) {}

	/** Runs a command and returns its exit code and output (stdout and stderr together). */
	static Result run(List<String> cmd, Map<String, String> env, int seconds) throws Exception {
		ProcessBuilder pb = new ProcessBuilder(cmd).redirectErrorStream(true);
		pb.environment().putAll(env);
		Path log = Files.createTempFile("corral-slurm", ".out");
		pb.redirectOutput(log.toFile());
		Process p = pb.start();
		if (!p.waitFor(seconds, TimeUnit.SECONDS)) {
			p.destroyForcibly();
			return new Result(124, "timed out after " + seconds + " s: " + String.join(" ", cmd));
		}
		String out = Files.readString(log);
		Files.deleteIfExists(log);
		return new Result(p.exitValue(), out);
	}

	private static String tail(Path log) {
		try {
			List<String> lines = Files.readAllLines(log);
			return String.join("\n", lines.subList(Math.max(0, lines.size() - 15), lines.size()));
		} catch (IOException e) {
			return "(no " + log.getFileName() + ")";
		}
	}
}
