package org.corral.io;

import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;

import org.corral.CorralException;

/**
 * Writes a file next to its destination and moves it into place only when complete, so a crash,
 * a cancel or a full disk leaves either the old file or the new one, never half a file.
 */
public final class AtomicFiles {
	private AtomicFiles() {}

	public interface Writer {
		void write(OutputStream out) throws IOException;
	}

	/** Writes the file of a library that wants a path: it writes a temporary file, which is then moved into place. */
	public interface FileWriter {
		void write(Path file) throws IOException;
	}

	public static void write(Path target, Writer writer) {
		writeFile(target, tmp -> {
			try (OutputStream out = Files.newOutputStream(tmp)) {
				writer.write(out);
			}
		});
	}

	public static void writeFile(Path target, FileWriter writer) {
		Path dir = target.toAbsolutePath().getParent();
		Path tmp = null;
		try {
			Files.createDirectories(dir);
			tmp = Files.createTempFile(dir, "." + target.getFileName() + ".", ".part");
			writer.write(tmp);
			try { // temp files are private; the result should read like any other file
				Files.setPosixFilePermissions(tmp, java.nio.file.attribute.PosixFilePermissions.fromString("rw-r--r--"));
			} catch (UnsupportedOperationException e) {
				// not a POSIX file system
			}
			try {
				Files.move(tmp, target, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
			} catch (AtomicMoveNotSupportedException e) {
				Files.move(tmp, target, StandardCopyOption.REPLACE_EXISTING);
			}
			tmp = null;
		} catch (IOException e) {
			throw new CorralException("Cannot write " + target + ": " + e.getMessage(), e);
		} finally {
			if (tmp != null) try {
				Files.deleteIfExists(tmp);
			} catch (IOException ignored) {
				// the original error is the one to report
			}
		}
	}

	public static void writeString(Path target, String text) {
		write(target, out -> out.write(text.getBytes(java.nio.charset.StandardCharsets.UTF_8)));
	}
}
