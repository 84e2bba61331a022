package org.corral.fiji;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.ImageWindow;
import ij.gui.Roi;
import ij.io.FileSaver;
import ij.measure.ResultsTable;
import ij.plugin.frame.RoiManager;

import java.awt.GraphicsEnvironment;
import java.awt.Rectangle;
import java.awt.Robot;
import java.awt.Window;
import java.awt.image.BufferedImage;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;

import org.corral.CorralException;
import org.corral.boxes.Box;
import org.corral.boxes.BoxFiles;
import org.corral.io.ImageFiles;
import org.scijava.Context;
import org.scijava.command.CommandService;

/**
 * What a new user does, on a display (run under xvfb-run on a server): open a demo image, box ten
 * objects in the ROI Manager, learn, mask; then screenshots of the learning plot, of the outlines
 * over the image, and of the screen with the ROI Manager, image, masks and table windows.
 */
public final class Tour {
	private Tour() {}

	public static void run(Path demo, Path out, int steps) throws Exception {
		if (GraphicsEnvironment.isHeadless()) throw new CorralException("The tour needs a display; on a server run it under xvfb-run -a");
		java.nio.file.Files.createDirectories(out);
		ImagePlus imp = IJ.openImage(demo.resolve("images/seedcoat-02.tif").toString());
		imp.show();
		IJ.run(imp, "Enhance Contrast", "saturated=0.35");
		RoiManager rm = RoiManager.getRoiManager();
		rm.reset();
		Map<String, List<Box>> boxes = BoxFiles.readCsv(demo.resolve("boxes.csv"));
		List<Box> ten = boxes.get("seedcoat-02.tif").subList(0, 10);
		for (Box b : ten) {
			Roi r = new Roi(b.x(), b.y(), b.width(), b.height());
			r.setName(b.name());
			rm.addRoi(r);
		}
		Context ctx = new Context(CommandService.class);
		try {
			CommandService cs = ctx.service(CommandService.class);
			Path model = out.resolve("tour-model.zip");
			ImageJProgress progress = new ImageJProgress(true);
			LearnFromBoxes learn = new LearnFromBoxes();
			learn.image = imp;
			learn.model = model.toFile();
			learn.steps = steps;
			learn.progress = progress;
			learn.run(); // directly: the tour keeps the plot window for its screenshot
			new FileSaver(ImageJProgress.makePlot(progress.history()).getImagePlus()).saveAsPng(out.resolve("learning-plot.png").toString());
			var m = cs.run(MasksForBoxes.class, true, Map.of("image", imp, "model", model.toFile(), "keep", true)).get();
			ImagePlus labels = (ImagePlus) m.getOutput("labels");
			labels.show();
			ResultsTable rt = (ResultsTable) m.getOutput("boxes");
			rt.save(out.resolve("boxes-table.csv").toString());
			ImagePlus flat = imp.flatten();
			ImageFiles.savePng(enlarge(flat.getBufferedImage(), 4), out.resolve("outlines-over-image.png"));
			Thread.sleep(1500); // let the windows paint
			capture(out.resolve("screen.png"));
			IJ.log("Corral tour: " + ten.size() + " boxes, " + rm.getCount() + " ROIs in the ROI Manager, " + rt.size() + " table rows");
		} finally {
			ctx.dispose();
		}
	}

	static BufferedImage enlarge(BufferedImage src, int f) {
		BufferedImage big = new BufferedImage(src.getWidth() * f, src.getHeight() * f, BufferedImage.TYPE_INT_RGB);
		java.awt.Graphics2D g = big.createGraphics();
		g.drawImage(src, 0, 0, big.getWidth(), big.getHeight(), null);
		g.dispose();
		return big;
	}

	/** The union of all visible windows, as a real screen capture. */
	static void capture(Path target) throws Exception {
		Rectangle all = null;
		for (Window w : Window.getWindows()) {
			if (!w.isShowing()) continue;
			all = all == null ? w.getBounds() : all.union(w.getBounds());
		}
		if (all == null) throw new CorralException("no window to capture");
		ImageFiles.savePng(new Robot().createScreenCapture(all), target);
		for (int id : WindowManager.getIDList() == null ? new int[0] : WindowManager.getIDList()) {
			ImageWindow win = WindowManager.getImage(id).getWindow();
			if (win != null) win.toFront();
		}
	}
}
