package org.corral.io;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.io.FileSaver;
import ij.io.Opener;
import ij.measure.Calibration;
import ij.process.ImageProcessor;
import ij.process.ShortProcessor;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Locale;

import org.corral.CorralException;
import org.corral.image.PlanarImage;

/** Reading images into {@link PlanarImage}s and writing label images, through ImageJ 1.x file code. */
public final class ImageFiles {
	private ImageFiles() {}

	private static final String[] IMAGE_ENDINGS = {".tif", ".tiff", ".png", ".jpg", ".jpeg", ".bmp", ".gif"};

	public static boolean looksLikeImage(Path p) {
		String n = p.getFileName().toString().toLowerCase(Locale.ROOT);
		if (n.startsWith(".")) return false;
		for (String e : IMAGE_ENDINGS) if (n.endsWith(e)) return true;
		return false;
	}

	public static String baseName(Path p) {
		String n = p.getFileName().toString();
		int dot = n.lastIndexOf('.');
		return dot > 0 ? n.substring(0, dot) : n;
	}

	public static ImagePlus open(Path file) {
		if (!Files.isRegularFile(file)) throw new CorralException("Image " + file + " does not exist");
		ImagePlus imp;
		try {
			IJ.redirectErrorMessages();
			imp = new Opener().openImage(file.toString());
		} catch (RuntimeException e) {
			throw new CorralException("Cannot read image " + file + ": " + e, e);
		}
		if (imp == null) throw new CorralException("Cannot read image " + file + " (not an image ImageJ can open, or damaged)");
		if (imp.getWidth() < 1 || imp.getHeight() < 1) throw new CorralException("Image " + file + " is empty");
		return imp;
	}

	public static PlanarImage read(Path file) {
		return planes(open(file), 1, 1);
	}

	/** Number of frames (time points, or z slices when there is no time axis) of a stack. */
	public static int positions(ImagePlus imp) {
		return imp.getNFrames() > 1 ? imp.getNFrames() : imp.getNSlices();
	}

	/** The channels of one stack position (1-based z and t) as a float image; RGB gives 3 channels. */
	public static PlanarImage planes(ImagePlus imp, int z, int t) {
		return rowReader(imp, z, t).all();
	}

	/**
	 * The channels of one stack position read a band of rows at a time (raw values as float; RGB as
	 * 3 channels) with the image's calibration, without a float copy of the whole plane.
	 */
	public static org.corral.image.RowReader rowReader(ImagePlus imp, int z, int t) {
		int w = imp.getWidth(), h = imp.getHeight();
		boolean rgb = imp.getType() == ImagePlus.COLOR_RGB;
		int nc = rgb ? 3 : imp.getNChannels();
		ImageStack st = imp.getStack();
		ImageProcessor[] ip = new ImageProcessor[rgb ? 1 : nc];
		for (int c = 0; c < ip.length; c++) ip[c] = st.getProcessor(imp.getStackIndex(c + 1, z, t));
		Calibration cal = imp.getCalibration();
		return new org.corral.image.RowReader() {
			@Override
			public int width() {
				return w;
			}

			@Override
			public int height() {
				return h;
			}

			@Override
			public int nChannels() {
				return nc;
			}

			@Override
			public PlanarImage rows(int y0, int y1) {
				org.corral.image.RowReader.checkRows(y0, y1, h);
				int n = (y1 - y0) * w;
				float[][] ch = new float[nc][n];
				if (rgb) {
					int[] px = (int[]) ip[0].getPixels();
					for (int i = 0, q = y0 * w; i < n; i++, q++) {
						ch[0][i] = (px[q] >> 16) & 0xff;
						ch[1][i] = (px[q] >> 8) & 0xff;
						ch[2][i] = px[q] & 0xff;
					}
				} else
					for (int c = 0; c < nc; c++)
						for (int i = 0, q = y0 * w; i < n; i++, q++) ch[c][i] = ip[c].getf(q);
				PlanarImage p = new PlanarImage(w, y1 - y0, ch);
				if (cal != null && cal.scaled()) {
					p.pixelWidth = cal.pixelWidth;
					p.unit = cal.getUnit();
				}
				return p;
			}
		};
	}

	/** Stack position (1-based) to (z, t) for {@link #planes}. */
	public static int[] zt(ImagePlus imp, int position) {
		return imp.getNFrames() > 1 ? new int[] {1, position} : new int[] {position, 1};
	}

	/** A label image as 16-bit (32-bit float when there are more than 65535 labels). */
	public static ImagePlus labelImage(String title, int[][] labelsPerSlice, int w, int h, Calibration cal) {
		int max = 0;
		for (int[] l : labelsPerSlice) for (int v : l) max = Math.max(max, v);
		ImageStack st = new ImageStack(w, h);
		for (int[] l : labelsPerSlice) {
			if (max <= 65535) {
				short[] s = new short[l.length];
				for (int i = 0; i < l.length; i++) s[i] = (short) l[i];
				st.addSlice(new ShortProcessor(w, h, s, null));
			} else {
				float[] f = new float[l.length];
				for (int i = 0; i < l.length; i++) f[i] = l[i];
				st.addSlice(new ij.process.FloatProcessor(w, h, f));
			}
		}
		ImagePlus imp = new ImagePlus(title, st);
		if (cal != null) imp.setCalibration(cal.copy());
		imp.setDisplayRange(0, Math.max(1, max));
		return imp;
	}

	/** Written straight to a temporary file by ImageJ (no copy of the image in memory), then moved into place. */
	public static void saveTiff(ImagePlus imp, Path target) {
		String title = imp.getTitle();
		AtomicFiles.writeFile(target, tmp -> {
			if (!new FileSaver(imp).saveAsTiff(tmp.toString())) throw new java.io.IOException("cannot encode " + title + " as TIFF");
		});
		imp.setTitle(title); // ImageJ names the image after the file it wrote
	}

	public static void savePng(java.awt.image.RenderedImage img, Path target) {
		AtomicFiles.write(target, out -> {
			if (!javax.imageio.ImageIO.write(img, "png", out)) throw new java.io.IOException("no PNG encoder for this picture");
		});
	}

	/** Label values of a label image file (first slice), as ints. */
	public static int[] readLabels(Path file, int[] sizeOut) {
		ImagePlus imp = open(file);
		ImageProcessor ip = imp.getProcessor();
		if (imp.getType() == ImagePlus.COLOR_RGB) throw new CorralException("Label image " + file + " is RGB, not a label image");
		int n = ip.getWidth() * ip.getHeight();
		int[] out = new int[n];
		for (int i = 0; i < n; i++) {
			float v = ip.getf(i);
			if (v < 0 || v != Math.rint(v)) throw new CorralException("Label image " + file + " holds the non-label value " + v);
			out[i] = (int) v;
		}
		if (sizeOut != null) {
			sizeOut[0] = ip.getWidth();
			sizeOut[1] = ip.getHeight();
		}
		return out;
	}
}
