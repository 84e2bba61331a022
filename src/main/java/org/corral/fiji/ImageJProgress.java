package org.corral.fiji;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.Plot;
import ij.macro.Interpreter;

import java.awt.Color;
import java.awt.GraphicsEnvironment;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.corral.train.Progress;

/**
 * Learning progress in ImageJ: status bar and progress bar with the time left, and a live plot of
 * the loss terms and of the fraction of box constraints met. Cancelled by Esc in ImageJ, by the
 * abort of a running macro, or by {@link #cancel()}.
 */
public final class ImageJProgress implements Progress {
	private final boolean plot;
	private final List<Report> history = new ArrayList<>();
	private ImagePlus plotImage;
	private volatile boolean cancelled;

	public ImageJProgress(boolean plot) {
		this.plot = plot;
	}

	public void cancel() {
		cancelled = true;
	}

	@Override
	public void report(Report r) {
		history.add(r);
		IJ.showProgress(r.step(), r.total());
		IJ.showStatus(String.format(Locale.ROOT, "Corral: step %d/%d, constraints met %.1f %%, %.0f s left (Esc cancels)", r.step(), r.total(),
			100 * r.met(), r.secondsLeft()));
		if (plot && history.size() >= 2) {
			Plot p = makePlot(history);
			if (plotImage == null) {
				plotImage = p.getImagePlus();
				if (!GraphicsEnvironment.isHeadless() && !Interpreter.isBatchMode()) plotImage.show();
			} else plotImage.setProcessor(null, p.getProcessor());
		}
	}

	/** Line colours of the plot: the total first, then the parts in the order of the loss terms. */
	private static final Color[] COLOURS = {new Color(30, 30, 30), new Color(0, 110, 200), new Color(220, 120, 0), new Color(150, 0, 150), new Color(0, 150, 60),
		new Color(200, 40, 40), new Color(120, 120, 0), new Color(0, 140, 140), new Color(120, 70, 20)};

	/** The plot of the history so far (also used for screenshots): the total and every part by name. */
	public static Plot makePlot(List<Report> history) {
		int n = history.size();
		List<String> names = new java.util.ArrayList<>(history.get(n - 1).parts().keySet());
		double[] step = new double[n];
		double[][] lines = new double[names.size() + 1][n];
		for (int i = 0; i < n; i++) {
			Report r = history.get(i);
			step[i] = r.step();
			lines[0][i] = r.loss();
			for (int k = 0; k < names.size(); k++) lines[k + 1][i] = r.part(names.get(k));
		}
		Plot p = new Plot("Corral learning", "step", "loss terms / fraction met");
		double low = 0, high = 1;
		for (int k = 0; k < lines.length; k++) {
			p.setColor(COLOURS[k % COLOURS.length]);
			p.addPoints(step, lines[k], Plot.LINE);
			for (double v : lines[k])
				if (Double.isFinite(v)) {
					low = Math.min(low, v);
					high = Math.max(high, v);
				}
		}
		p.setColor(Color.black);
		p.addLegend("total loss\n" + String.join("\n", names.stream().map(ImageJProgress::legend).toList()));
		// room above 1 so the fraction met (usually 1) shows as a line, not as the frame
		p.setLimits(step[0], step[n - 1], low - 0.05, high + 0.08);
		return p;
	}

	private static String legend(String part) {
		return part.equals(org.corral.loss.ConstraintTerm.MET) ? "fraction of constraints met" : part;
	}

	public List<Report> history() {
		return history;
	}

	@Override
	public boolean cancelled() {
		return cancelled || IJ.escapePressed() || Thread.currentThread().isInterrupted();
	}
}
