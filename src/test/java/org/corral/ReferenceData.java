package org.corral;

import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.nio.file.Files;
import java.nio.file.Path;

/**
 * Where the reference sets are: system property {@code corral.reference}, environment variable
 * {@code CORRAL_REFERENCE_DATA}, or {@code ../shared/reference-data} beside the clone. Tests that
 * need them are skipped, saying why, when they are absent (a user's clone); CI requires them.
 */
public final class ReferenceData {
	private ReferenceData() {}

	public static Path root() {
		String p = System.getProperty("corral.reference", System.getenv("CORRAL_REFERENCE_DATA"));
		return p != null ? Path.of(p) : Path.of("..", "shared", "reference-data");
	}

	public static Path set(String name) {
		Path p = root().resolve(name);
		assumeTrue(Files.isDirectory(p.resolve("images")),
			"reference set " + name + " not found at " + p.toAbsolutePath() + " (set CORRAL_REFERENCE_DATA); integration test skipped");
		return p;
	}

	public static Path demo() {
		return Path.of("test-images");
	}
}
