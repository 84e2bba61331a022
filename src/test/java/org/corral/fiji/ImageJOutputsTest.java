package org.corral.fiji;

import static org.junit.jupiter.api.Assertions.assertEquals;

import ij.measure.ResultsTable;

import java.util.List;

import org.corral.boxes.Box;
import org.corral.instances.BoxMasks;
import org.corral.workflow.Jobs;
import org.corral.workflow.ResultTables;
import org.junit.jupiter.api.Test;

class ImageJOutputsTest {
	/** The Fiji box table and NAME.boxes.csv come from one definition: same columns, same values. */
	@Test
	void boxTableHasTheColumnsAndValuesOfTheCsv() {
		List<Box> boxes = List.of(new Box(1, 3, 4, 10, 12), new Box(2, 20, 5, 8, 8));
		BoxMasks.Fit[] fits = {new BoxMasks.Fit(0, boxes.get(0), 90, 0.75, 1, 0.9, 0.88, true, List.of()),
			BoxMasks.Fit.none(1, boxes.get(1), "outside-image")};
		String[] classes = {"spore", null};
		double[] conf = {0.9, Double.NaN};
		ResultsTable rt = ImageJOutputs.boxTable(boxes, fits, classes, conf);
		assertEquals(String.join(",", ResultTables.boxes(true).header()), String.join(",", rt.getHeadings()));
		String[] csv = Jobs.boxTable(boxes, fits, classes, conf).split("\n");
		assertEquals(3, csv.length);
		assertEquals("spore", rt.getStringValue("class", 0));
		assertEquals(0.75, rt.getValue("fill", 0), 1e-9);
		assertEquals("outside-image", rt.getStringValue("flags", 1));
		assertEquals("1,box-1,3,4,10,12,0,90,0.7500,1.0000,0.9000,0.8800,1,,spore,0.9000", csv[1]);
	}
}
