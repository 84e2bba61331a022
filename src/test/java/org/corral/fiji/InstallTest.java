package org.corral.fiji;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The Maven route into a Fiji installation (README, "Install into Fiji"): pom-scijava's
 * {@code -Dscijava.app.directory} copies the Corral jar and its dependencies into jars/ and DJL's
 * native CPU library into jars/linux64/. Checked against an empty folder with Fiji's
 * layout, on a copy of the project so this build's own target/ is left alone.
 */
class InstallTest {
	@TempDir
	Path dir;

	@Test
	void mavenCopiesPluginAndDependenciesIntoAFijiFolder() throws Exception {
		Path project = dir.resolve("project"), fiji = dir.resolve("Fiji.app");
		Files.createDirectories(fiji.resolve("jars"));
		Files.createDirectories(fiji.resolve("plugins"));
		Files.copy(Path.of("pom.xml"), Files.createDirectories(project).resolve("pom.xml"));
		copyTree(Path.of("src/main"), project.resolve("src/main"));
		String mvn = System.getProperty("os.name").startsWith("Windows") ? "mvn.cmd" : "mvn";
		ProcessBuilder pb = new ProcessBuilder(mvn, "-B", "-q", "-DskipTests", "-Dscijava.app.directory=" + fiji.toAbsolutePath(), "install")
			.directory(project.toFile()).redirectErrorStream(true).redirectOutput(dir.resolve("mvn.log").toFile());
		Process p;
		try {
			p = pb.start();
		} catch (IOException e) {
			assumeTrue(false, "mvn is not on the PATH: install check skipped");
			return;
		}
		assertTrue(p.waitFor(15, TimeUnit.MINUTES), "maven finished");
		assertEquals(0, p.exitValue(), Files.readString(dir.resolve("mvn.log")));
		List<String> plugins = names(fiji.resolve("plugins")), jars = names(fiji.resolve("jars"));
		// SciJava commands are found in any jar on Fiji's class path; pom-scijava puts ours in jars/
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("Corral_-") && n.endsWith(".jar")) || plugins.stream().anyMatch(n -> n.startsWith("Corral_-")),
			"Corral jar in jars/ or plugins/: " + jars + " " + plugins);
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("api-0.36.0")), "DJL api in jars/: " + jars);
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("pytorch-engine-")), "DJL PyTorch engine in jars/: " + jars);
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("pytorch-jni-")), "PyTorch JNI in jars/: " + jars);
		// inference: ONNX Runtime carries its native libraries inside its jar; protobuf-java writes the graph
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("onnxruntime-")), "ONNX Runtime in jars/: " + jars);
		assertTrue(jars.stream().anyMatch(n -> n.startsWith("protobuf-java-")), "protobuf-java in jars/: " + jars);
		assertTrue(names(fiji.resolve("jars/linux64")).stream().anyMatch(n -> n.startsWith("pytorch-native-cpu")), "native CPU library in jars/linux64/");
	}

	static List<String> names(Path d) throws IOException {
		if (!Files.isDirectory(d)) return List.of();
		try (Stream<Path> s = Files.list(d)) {
			return s.map(x -> x.getFileName().toString()).sorted().toList();
		}
	}

	static void copyTree(Path from, Path to) throws IOException {
		try (Stream<Path> s = Files.walk(from)) {
			for (Path p : (Iterable<Path>) s::iterator) {
				Path t = to.resolve(from.relativize(p).toString());
				if (Files.isDirectory(p)) Files.createDirectories(t);
				else Files.copy(p, t, StandardCopyOption.REPLACE_EXISTING);
			}
		}
	}
}
