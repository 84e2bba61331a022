package org.corral.workflow;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Collection;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.Set;
import java.util.List;
import java.util.Map;
import java.util.concurrent.CancellationException;
import java.util.function.BooleanSupplier;
import java.util.function.Consumer;

import org.corral.CorralException;
import org.corral.io.AtomicFiles;
import org.corral.io.ImageFiles;

/**
 * One pass over the images of a folder run: skips images whose label image (written last) already
 * exists, runs each of the others on its own so that any failure of one image (a bad file, an engine
 * error, running out of memory) is listed with its reason while the others go on, and keeps the
 * failures in {@link OutputNames#FAILURES} for batch jobs nobody watches (a clean rerun removes it).
 */
public final class FolderRun {
	/** What a folder run did: images written, skipped because already done, and failures by name. */
	public record Report(int written, int skipped, Map<String, String> failed) {
		public String summary() {
			return written + " written, " + skipped + " skipped (already done), " + failed.size() + " failed";
		}
	}

	/** The work on one image; its outputs go through {@link AtomicFiles}, the label image last. */
	public interface ImageJob {
		/** Does the image and returns a line for the log. */
		String run(Path image, String base) throws Exception;
	}

	private FolderRun() {}

	/**
	 * Runs {@code job} on each image. The output folder is refused when it is the folder of any of
	 * the images, or when one of {@code otherInputs} (box file, ...) lies in it under an output's name.
	 */
	public static Report run(List<Path> images, Collection<Path> otherInputs, Path outDir, boolean resume, BooleanSupplier cancelled, Consumer<String> log, ImageJob job) {
		return run(images, Share.ALL, otherInputs, outDir, resume, cancelled, log, job);
	}

	/**
	 * As above for one share of a folder ({@code images} are the share's own): its failures go to
	 * the share's own list ({@link Share#fileName}).
	 */
	public static Report run(List<Path> images, Share share, Collection<Path> otherInputs, Path outDir, boolean resume, BooleanSupplier cancelled, Consumer<String> log,
		ImageJob job) {
		Set<Path> folders = new LinkedHashSet<>();
		for (Path p : images) folders.add(p.toAbsolutePath().normalize().getParent());
		OutputNames.checkOutputFolder(outDir, folders, otherInputs);
		Jobs.mkdirs(outDir);
		int written = 0, skipped = 0;
		Map<String, String> failed = new LinkedHashMap<>();
		for (Path img : images) {
			if (cancelled != null && cancelled.getAsBoolean())
				throw new CancellationException("folder run cancelled; finished images are complete, run again to resume");
			String base = ImageFiles.baseName(img);
			if (resume && Files.isRegularFile(OutputNames.labels(outDir, base))) {
				skipped++;
				log.accept(img.getFileName() + ": already done, skipped");
				continue;
			}
			try {
				log.accept(job.run(img, base));
				written++;
			} catch (CancellationException e) {
				throw e;
			} catch (OutOfMemoryError e) {
				fail(failed, log, img, "ran out of memory on this image (" + e.getMessage()
					+ "); give Corral more memory (CORRAL_JAVA_OPTS=-Xmx8g for ./corral, Edit > Options > Memory in Fiji) or split the image into parts");
			} catch (Throwable e) { // any failure of one image is that image's failure: the run goes on
				fail(failed, log, img, e instanceof CorralException ? e.getMessage() : e.toString());
			}
		}
		Path failures = outDir.resolve(share.fileName(OutputNames.FAILURES));
		if (failed.isEmpty()) try {
			Files.deleteIfExists(failures);
		} catch (IOException e) {
			throw new CorralException("Cannot remove " + failures + ": " + e.getMessage(), e);
		}
		else {
			StringBuilder f = new StringBuilder("image,error\n");
			failed.forEach((k, v) -> f.append(Table.text(k)).append(',').append(Table.text(v)).append('\n'));
			AtomicFiles.writeString(failures, f.toString());
		}
		return new Report(written, skipped, failed);
	}

	private static void fail(Map<String, String> failed, Consumer<String> log, Path img, String why) {
		failed.put(img.getFileName().toString(), why);
		log.accept(img.getFileName() + ": FAILED: " + why);
	}
}
