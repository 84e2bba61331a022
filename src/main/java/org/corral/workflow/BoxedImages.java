package org.corral.workflow;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.io.ImageFiles;

/** Finds the images of a folder and their boxes, from a box CSV or from ROI-set zips beside them. */
public final class BoxedImages {
	private BoxedImages() {}

	/** Names of an image's ROI set beside it, in the order they are looked for. */
	public static final List<String> ROI_SET_ENDINGS = List.of(".rois.zip", ".zip", ".roi");

	/** Image files of a folder, sorted by name; non-image files are skipped. */
	public static List<Path> images(Path dir) {
		if (!Files.isDirectory(dir)) throw new CorralException("Image folder " + dir + " does not exist or is not a folder");
		try (Stream<Path> s = Files.list(dir)) {
			// Corral's own outputs are never taken for images, whatever folder they are in
			return s.filter(Files::isRegularFile).filter(ImageFiles::looksLikeImage).filter(p -> !OutputNames.isOutput(p)).sorted().toList();
		} catch (IOException e) {
			throw new CorralException("Cannot list " + dir + ": " + e.getMessage(), e);
		}
	}

	/**
	 * Boxes per image path. With a box file, every image it names must exist in the folder; without
	 * one, each image's ROI set {@code NAME.zip}, {@code NAME.rois.zip} or {@code NAME.roi} is read.
	 */
	public static Map<Path, List<Box>> find(Path dir, Path boxFile) {
		Map<Path, List<Box>> out = new LinkedHashMap<>();
		if (boxFile != null) {
			Map<String, List<Box>> byName = BoxFiles.readCsv(boxFile);
			List<String> missing = new ArrayList<>();
			for (Map.Entry<String, List<Box>> e : byName.entrySet()) {
				Path p = dir.resolve(e.getKey()).normalize();
				if (!p.startsWith(dir.normalize()) || !Files.isRegularFile(p)) missing.add(e.getKey());
				else out.put(p, e.getValue());
			}
			if (!missing.isEmpty())
				throw new CorralException("Box file " + boxFile + " names image(s) not found in " + dir + ": " + String.join(", ", missing.subList(0, Math.min(5, missing.size()))) + (missing.size() > 5 ? " and " + (missing.size() - 5) + " more" : ""));
			return out;
		}
		for (Path img : images(dir)) {
			String base = ImageFiles.baseName(img);
			for (String ending : ROI_SET_ENDINGS) {
				Path z = dir.resolve(base + ending);
				if (Files.isRegularFile(z)) {
					out.put(img, BoxFiles.readRoiZip(z));
					break;
				}
			}
		}
		return out;
	}
}
