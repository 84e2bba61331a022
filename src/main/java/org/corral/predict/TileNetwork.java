package org.corral.predict;

/** What {@link TiledPredictor} runs on a batch of tiles: the learned network for inference only. */
public interface TileNetwork extends AutoCloseable {
	/**
	 * Probabilities [n, outputs, h, w] (raster order) for inputs [n, channels, h, w]; h and w are
	 * multiples of the network's pooling grid.
	 */
	float[] probabilities(float[] inputs, int n, int h, int w);

	/** The engine, for reports: what ran the network. */
	String engine();

	@Override
	void close();
}
