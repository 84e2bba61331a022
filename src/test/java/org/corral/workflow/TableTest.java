package org.corral.workflow;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;

import org.junit.jupiter.api.Test;

class TableTest {
	record Row(int n, String name, double v, boolean ok) {}

	@Test
	void csvWritesIntegersDecimalsAndQuotedTextByRfc4180() {
		Table<Row> t = new Table<Row>().with("n", Row::n).with("name", Row::name).with("v", Row::v).with("ok", Row::ok);
		String csv = t.csv(List.of(new Row(1, "plain", 0.123456, true), new Row(2, "a,b \"c\"", Double.NaN, false), new Row(3, null, 2, true)));
		assertEquals("n,name,v,ok\n1,plain,0.1235,1\n2,\"a,b \"\"c\"\"\",NaN,0\n3,,2.0000,1\n", csv);
		assertEquals(List.of("n", "name", "v", "ok"), t.header());
	}

	@Test
	void classColumnsComeLastAndOnlyWithClasses() {
		assertEquals(Jobs.BOX_COLUMNS, ResultTables.boxes(false).header());
		List<String> withClasses = ResultTables.boxes(true).header();
		assertEquals(List.of("class", "class_confidence"), withClasses.subList(withClasses.size() - 2, withClasses.size()));
		assertEquals(Jobs.OBJECT_HEADER + ",class,class_confidence", String.join(",", ResultTables.objects(true).header()));
	}
}
