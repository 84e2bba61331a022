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

	/** The plot of the history so far (also used for screenshots). */
	public static Plot makePlot(List<Report> history) {
		int n = history.size();
		double[] step = new double[n], loss = new double[n], bg = new double[n], pair = new double[n], cons = new double[n], met = new double[n];
		for (int i = 0; i < n; i++) {
			Report r = history.get(i);
			step[i] = r.step();
			loss[i] = r.loss();
			bg[i] = r.background();
			pair[i] = r.pairwise();
			cons[i] = r.constraints();
			met[i] = r.met();
		}
		Plot p = new Plot("Corral learning", "step", "loss terms / fraction met");
		p.setColor(new Color(30, 30, 30));
		p.addPoints(step, loss, Plot.LINE);
		p.setColor(new Color(0, 110, 200));
		p.addPoints(step, bg, Plot.LINE);
		p.setColor(new Color(220, 120, 0));
		p.addPoints(step, pair, Plot.LINE);
		p.setColor(new Color(150, 0, 150));
		p.addPoints(step, cons, Plot.LINE);
		p.setColor(new Color(0, 150, 60));
		p.addPoints(step, met, Plot.LINE);
		p.setColor(Color.black);
		p.addLegend("total loss\nbackground\npairwise\nbox constraints (barrier)\nfraction of constraints met");
		double low = 0;
		for (int i = 0; i < n; i++) low = Math.min(low, Math.min(cons[i], Math.min(loss[i], bg[i])));
		double high = 1;
		for (int i = 0; i < n; i++) high = Math.max(high, Math.max(loss[i], Math.max(bg[i], pair[i])));
		// room above 1 so the fraction met (usually 1) shows as a line, not as the frame
		p.setLimits(step[0], step[n - 1], low - 0.05, high + 0.08);
		return p;
	}

	public List<Report> history() {
		return history;
	}

	@Override
	public boolean cancelled() {
		return cancelled || IJ.escapePressed() || Thread.currentThread().isInterrupted();
	}
}
