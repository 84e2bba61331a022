package org.corral.workflow;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.TreeMap;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;

import org.corral.CorralException;
import org.corral.io.AtomicFiles;
import org.corral.io.ImageFiles;

/**
 * Folder-wide tables of a folder run, from what its images (or its shares, {@link Share}) wrote:
 * {@link OutputNames#OBJECTS}, every image's object table under one header with the image's name
 * first; and, after a run in shares, the shares' failure lists and proposed boxes, each in one file
 * of the whole run's name. The tables are built from the files alone, in image-name order, so a run
 * in shares and a run of the whole folder give the same bytes.
 */
public final class FolderMerge {
	private FolderMerge() {}

	/** What the merge found: images done, images that failed, images with neither (when the image folder is known), objects. */
	public record Report(int done, int failed, List<String> missing, int objects) {
		public String summary() {
			return done + " image(s) done, " + failed + " failed, " + missing.size() + " not run yet" + (missing.isEmpty() ? "" : " " + missing)
				+ "; " + objects + " object(s) in " + OutputNames.OBJECTS;
		}

		public boolean complete() {
			return failed == 0 && missing.isEmpty();
		}
	}

	private static final Pattern SHARE_NAME = Pattern.compile("(corral-[a-z-]+)\\.part-(\\d+)-of-(\\d+)\\.csv");

	/**
	 * Merges the shares' tables in {@code outDir}. {@code images} (null = unknown) are the images
	 * of the whole run: those with neither a label image nor a failure are reported missing.
	 */
	public static Report merge(Path outDir, List<Path> images) {
		if (!Files.isDirectory(outDir)) throw new CorralException("No output folder " + outDir + " to merge");
		int objects = writeObjects(outDir);
		List<String> failures = mergeShares(outDir, OutputNames.FAILURES);
		mergeShares(outDir, OutputNames.PROPOSED_CSV);
		Set<String> failed = new LinkedHashSet<>();
		for (String row : failures) failed.add(firstCell(row));
		int done = done(outDir).size();
		List<String> missing = new ArrayList<>();
		if (images != null) for (Path p : images) {
			String name = p.getFileName().toString();
			if (!Files.isRegularFile(OutputNames.labels(outDir, ImageFiles.baseName(p))) && !failed.contains(name)) missing.add(name);
		}
		return new Report(done, failed.size(), missing, objects);
	}

	/** Writes {@link OutputNames#OBJECTS} from the object tables of the images done; returns the number of objects. */
	public static int writeObjects(Path outDir) {
		StringBuilder out = new StringBuilder();
		String header = null;
		int rows = 0;
		for (String base : done(outDir)) {
			Path t = OutputNames.table(outDir, base);
			if (!Files.isRegularFile(t)) continue;
			List<String> lines = records(read(t));
			if (lines.isEmpty()) continue;
			if (header == null) {
				header = lines.get(0);
				out.append("image,").append(header).append('\n');
			} else if (!header.equals(lines.get(0)))
				throw new CorralException("The object tables in " + outDir + " come from different jobs (" + t.getFileName() + " has other columns): use one output folder per job");
			for (String row : lines.subList(1, lines.size())) {
				out.append(Table.text(base)).append(',').append(row).append('\n');
				rows++;
			}
		}
		Path target = outDir.resolve(OutputNames.OBJECTS);
		if (header != null) AtomicFiles.writeString(target, out.toString());
		return rows;
	}

	/**
	 * Joins the share files of one folder-level table ({@code corral-failures.part-K-of-N.csv}, ...)
	 * into the table of the whole run, rows in image-name order; without rows the whole run's file is
	 * removed. Returns the rows. Refuses shares of different splits in one folder.
	 */
	static List<String> mergeShares(Path outDir, String name) {
		String stem = name.substring(0, name.lastIndexOf('.'));
		TreeMap<Integer, Path> parts = new TreeMap<>();
		Set<Integer> splits = new LinkedHashSet<>();
		try (Stream<Path> s = Files.list(outDir)) {
			for (Path p : s.toList()) {
				Matcher m = SHARE_NAME.matcher(p.getFileName().toString());
				if (!m.matches() || !m.group(1).equals(stem)) continue;
				splits.add(Integer.parseInt(m.group(3)));
				parts.put(Integer.parseInt(m.group(2)), p);
			}
		} catch (IOException e) {
			throw new CorralException("Cannot list " + outDir + ": " + e.getMessage(), e);
		}
		if (splits.size() > 1)
			throw new CorralException(outDir + " holds shares of different splits " + splits + " (" + stem + ".part-*): use one output folder per split");
		Path target = outDir.resolve(name);
		if (parts.isEmpty()) return List.of();
		String header = null;
		List<String> rows = new ArrayList<>();
		for (Path p : parts.values()) {
			List<String> lines = records(read(p));
			if (lines.isEmpty()) continue;
			header = lines.get(0);
			rows.addAll(lines.subList(1, lines.size()));
		}
		rows.sort(Comparator.comparing(FolderMerge::firstCell)); // stable: an image's rows keep their order
		try {
			if (rows.isEmpty() || header == null) Files.deleteIfExists(target);
			else AtomicFiles.writeString(target, header + "\n" + String.join("\n", rows) + "\n");
		} catch (IOException e) {
			throw new CorralException("Cannot remove " + target + ": " + e.getMessage(), e);
		}
		return rows;
	}

	/** Base names of the images done (label image present), sorted. */
	static List<String> done(Path outDir) {
		try (Stream<Path> s = Files.list(outDir)) {
			return s.map(p -> p.getFileName().toString()).filter(n -> n.endsWith(OutputNames.LABELS))
				.map(n -> n.substring(0, n.length() - OutputNames.LABELS.length())).sorted().toList();
		} catch (IOException e) {
			throw new CorralException("Cannot list " + outDir + ": " + e.getMessage(), e);
		}
	}

	private static String read(Path p) {
		try {
			return Files.readString(p, StandardCharsets.UTF_8);
		} catch (IOException e) {
			throw new CorralException("Cannot read " + p + ": " + e.getMessage(), e);
		}
	}

	/** CSV records (RFC 4180): a line break inside quotes belongs to its cell. */
	static List<String> records(String text) {
		List<String> out = new ArrayList<>();
		StringBuilder cur = new StringBuilder();
		boolean quoted = false;
		for (int i = 0; i < text.length(); i++) {
			char c = text.charAt(i);
			if (c == '"') quoted = !quoted;
			if (!quoted && (c == '\n' || c == '\r')) {
				if (c == '\r' && i + 1 < text.length() && text.charAt(i + 1) == '\n') i++;
				if (cur.length() > 0) out.add(cur.toString());
				cur.setLength(0);
			} else cur.append(c);
		}
		if (cur.length() > 0) out.add(cur.toString());
		return out;
	}

	/** The first cell of a record, unquoted. */
	static String firstCell(String record) {
		if (!record.startsWith("\"")) {
			int comma = record.indexOf(',');
			return comma < 0 ? record : record.substring(0, comma);
		}
		StringBuilder b = new StringBuilder();
		for (int i = 1; i < record.length(); i++) {
			char c = record.charAt(i);
			if (c == '"') {
				if (i + 1 < record.length() && record.charAt(i + 1) == '"') {
					b.append('"');
					i++;
				} else break;
			} else b.append(c);
		}
		return b.toString();
	}
}
