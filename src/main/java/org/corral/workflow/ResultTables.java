package org.corral.workflow;

import java.util.ArrayList;
import java.util.List;

import org.corral.boxes.Box;
import org.corral.instances.BoxMasks;

/** The per-box and per-object tables of Corral's outputs, each defined once ({@link Table}). */
public final class ResultTables {
	private ResultTables() {}

	/** One box of a box-mask result: its number (1-based), the box, its fit, and its class when the model knows classes. */
	public record BoxRow(int number, Box box, BoxMasks.Fit fit, String className, double classConfidence) {}

	/** The rows of a box-mask result; {@code classes} null when the model knows no classes. */
	public static List<BoxRow> boxRows(List<Box> boxes, BoxMasks.Fit[] fits, String[] classes, double[] classConfidence) {
		List<BoxRow> rows = new ArrayList<>();
		for (int k = 0; k < boxes.size(); k++)
			rows.add(new BoxRow(k + 1, boxes.get(k), fits[k], classes == null ? null : classes[k], classes == null ? Double.NaN : classConfidence[k]));
		return rows;
	}

	/** {@code NAME.boxes.csv} and the Fiji box table. */
	public static Table<BoxRow> boxes(boolean classes) {
		Table<BoxRow> t = new Table<BoxRow>()
			.with("box", BoxRow::number)
			.with("name", r -> r.box().name())
			.with("x", r -> r.box().x())
			.with("y", r -> r.box().y())
			.with("width", r -> r.box().width())
			.with("height", r -> r.box().height())
			.with("slice", r -> r.box().slice())
			.with("area", r -> r.fit().area())
			.with("fill", r -> r.fit().fill())
			.with("rows_crossed", r -> r.fit().rowsCrossed())
			.with("columns_crossed", r -> r.fit().columnsCrossed())
			.with("mean_probability", r -> r.fit().meanProbability())
			.with("prior_met", r -> r.fit().priorMet())
			.with("flags", r -> String.join(";", r.fit().flags()));
		if (classes) t.with("class", r -> r.className() == null ? "" : r.className()).with("class_confidence", BoxRow::classConfidence);
		return t;
	}

	/** {@code NAME.objects.csv} and the Fiji object table. */
	public static Table<Jobs.ObjectRow> objects(boolean classes) {
		Table<Jobs.ObjectRow> t = new Table<Jobs.ObjectRow>()
			.with("object", Jobs.ObjectRow::id)
			.with("slice", Jobs.ObjectRow::slice)
			.with("x", r -> r.info().x())
			.with("y", r -> r.info().y())
			.with("width", r -> r.info().width())
			.with("height", r -> r.info().height())
			.with("area", r -> r.info().area())
			.with("mean_probability", r -> r.info().meanProbability())
			.with("confidence", r -> r.info().confidence())
			.with("flags", r -> String.join(";", r.info().flags()));
		if (classes) t.with("class", r -> r.className() == null ? "" : r.className()).with("class_confidence", Jobs.ObjectRow::classConfidence);
		return t;
	}
}
