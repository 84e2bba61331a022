package org.corral.instances;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/** Hole filling: enclosed background becomes object, background that reaches the border stays. */
class ComponentsTest {
	static boolean[] parse(String... rows) {
		int w = rows[0].length();
		boolean[] m = new boolean[w * rows.length];
		for (int y = 0; y < rows.length; y++) for (int x = 0; x < w; x++) m[y * w + x] = rows[y].charAt(x) == '#';
		return m;
	}

	static String show(boolean[] m, int w) {
		StringBuilder s = new StringBuilder();
		for (int i = 0; i < m.length; i++) s.append(m[i] ? '#' : '.').append((i + 1) % w == 0 ? "|" : "");
		return s.toString();
	}

	@Test
	void enclosedBackgroundIsFilledAndOpenBackgroundIsNot() {
		boolean[] m = parse(
			"........",
			".####...",
			".#..#.#.",
			".####.#.",
			"......##",
			"###.....",
			"#.#....#",
			"###...#.");
		Components.fillHoles(m, 8, 8);
		// the 2x2 hole and the 1-pixel hole at the border corner are filled; the bay open to the right
		// border (rows 2-3, column 7) and the pixel closed only diagonally (row 7, column 7) stay background
		assertEquals(show(parse(
			"........",
			".####...",
			".####.#.",
			".####.#.",
			"......##",
			"###.....",
			"###....#",
			"###...#."), 8), show(m, 8));
	}
}
