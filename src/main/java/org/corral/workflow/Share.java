package org.corral.workflow;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.corral.CorralException;

/**
 * Share {@code k} of {@code n} of a folder run, for running one folder as {@code n} independent
 * jobs (a cluster's job array). Images are sorted by file name and dealt out in turn, so the same
 * folder always splits the same way and the shares differ in size by at most one image. A share
 * writes only its own images' outputs, and its folder-level files under names of its own
 * ({@link #fileName}), so shares never write the same file.
 */
public record Share(int k, int n) {
	/** The whole folder, one process. */
	public static final Share ALL = new Share(1, 1);

	private static final Pattern FORM = Pattern.compile("\\s*(\\d{1,6})\\s*/\\s*(\\d{1,6})\\s*");

	public Share {
		if (n < 1 || k < 1 || k > n) throw new CorralException("Share " + k + "/" + n + " does not exist: give K/N with 1 <= K <= N");
	}

	/** Parses {@code K/N} (1-based K); null or blank = the whole folder. */
	public static Share parse(String s) {
		if (s == null || s.isBlank()) return ALL;
		Matcher m = FORM.matcher(s);
		if (!m.matches()) throw new CorralException("Share '" + s + "' is not of the form K/N (for example 2/8: the second of 8 shares)");
		return new Share(Integer.parseInt(m.group(1)), Integer.parseInt(m.group(2)));
	}

	public boolean isAll() {
		return n == 1;
	}

	/** This share's images: the images sorted by file name, every n-th from the k-th on. */
	public <T> List<T> of(List<T> images, java.util.function.Function<T, Path> path) {
		List<T> sorted = new ArrayList<>(images);
		sorted.sort(Comparator.comparing(t -> path.apply(t).getFileName().toString()));
		List<T> out = new ArrayList<>();
		for (int i = k - 1; i < sorted.size(); i += n) out.add(sorted.get(i));
		return out;
	}

	public List<Path> of(List<Path> images) {
		return of(images, p -> p);
	}

	/** A folder-level file's name for this share: {@code corral-failures.csv} -> {@code corral-failures.part-2-of-8.csv}. */
	public String fileName(String name) {
		if (isAll()) return name;
		int dot = name.lastIndexOf('.');
		return name.substring(0, dot) + String.format(Locale.ROOT, ".part-%d-of-%d", k, n) + name.substring(dot);
	}

	@Override
	public String toString() {
		return k + "/" + n;
	}
}
