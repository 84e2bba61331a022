package org.corral.image;

/**
 * An image read a band of rows at a time, so that a huge image need never be held as float: a
 * {@link PlanarImage} is one, and {@link org.corral.io.ImageFiles#rowReader} reads the rows of an
 * ImageJ image plane on demand. Bands carry the image's calibration.
 */
public interface RowReader {
	int width();

	int height();

	int nChannels();

	/** Rows {@code y0 .. y1 - 1} as a float image of their own. */
	PlanarImage rows(int y0, int y1);

	/** Refuses a row range outside {@code 0 .. height} or empty, for every reader alike. */
	static void checkRows(int y0, int y1, int height) {
		if (y0 < 0 || y1 > height || y0 >= y1) throw new IllegalArgumentException("rows " + y0 + ".." + y1 + " of an image of " + height);
	}

	/** Every row at once. */
	default PlanarImage all() {
		return rows(0, height());
	}
}
