package org.corral.net;

import ai.djl.ndarray.NDArray;
import ai.djl.ndarray.NDList;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;
import ai.djl.nn.AbstractBlock;
import ai.djl.nn.Activation;
import ai.djl.nn.Block;
import ai.djl.nn.SequentialBlock;
import ai.djl.nn.convolutional.Conv2d;
import ai.djl.nn.norm.BatchNorm;
import ai.djl.nn.pooling.Pool;
import ai.djl.training.ParameterStore;
import ai.djl.util.PairList;

import java.util.ArrayList;
import java.util.List;

/**
 * A small U-Net ("U-Net: Convolutional Networks for Biomedical Image Segmentation", Ronneberger et
 * al., MICCAI 2015): {@code levels} resolutions, {@code base} channels at the top, doubling per
 * level; one output channel of object logits. Each convolution is followed by batch normalisation
 * ("Batch Normalization: Accelerating Deep Network Training by Reducing Internal Covariate Shift",
 * ICML 2015). DJL's PyTorch engine has no transposed convolution,
 * so the decoder upsamples by nearest-neighbour repetition and lets the next convolution smooth.
 * Input height and width must be multiples of {@link #multiple()}.
 */
public final class UNet extends AbstractBlock {
	private static final byte VERSION = 1;

	private final int inChannels, base, levels, outputs;
	private final List<Block> down = new ArrayList<>(), up = new ArrayList<>();
	private final Block head;

	public UNet(int inChannels, int base, int levels) {
		this(inChannels, base, levels, 1);
	}

	/**
	 * @param outputs 1: object logits; 2: also logits of the instance map, which rises from 0 at each
	 *                object's edge to 1 at its core (for splitting touching objects)
	 */
	public UNet(int inChannels, int base, int levels, int outputs) {
		super(VERSION);
		if (outputs < 1) throw new IllegalArgumentException("outputs must be at least 1, got " + outputs);
		this.outputs = outputs;
		if (levels < 2 || levels > 6) throw new IllegalArgumentException("levels must be 2..6, got " + levels);
		this.inChannels = inChannels;
		this.base = base;
		this.levels = levels;
		for (int i = 0; i < levels; i++) down.add(addChildBlock("down" + i, doubleConv(width(i))));
		for (int i = 0; i < levels - 1; i++) up.add(addChildBlock("up" + i, doubleConv(width(i))));
		head = addChildBlock("head", Conv2d.builder().setKernelShape(new Shape(1, 1)).setFilters(outputs).build());
	}

	public int multiple() {
		return 1 << (levels - 1);
	}

	public int inChannels() {
		return inChannels;
	}

	public int outputs() {
		return outputs;
	}

	/**
	 * Floating-point operations of one forward pass per input pixel (multiply and add counted apart):
	 * each 3x3 convolution costs 2 * 9 * in * out at its level, whose pixels are 4^level fewer; the
	 * 1x1 head 2 * base * outputs. Pooling, upsampling, batch normalisation and ReLU are not counted.
	 */
	public long flopsPerPixel() {
		double f = 2.0 * width(0) * outputs;
		for (int i = 0; i < levels; i++) {
			long in = i == 0 ? inChannels : width(i - 1), c = width(i);
			double level = 2 * 9 * (in * c + c * c);
			if (i < levels - 1) level += 2 * 9 * ((c + width(i + 1)) * c + c * c);
			f += level / Math.pow(4, i);
		}
		return Math.round(f);
	}

	/** Channels of the widest full-resolution tensor: the decoder's concatenation of level 0 and the level below. */
	public int widestFullResolution() {
		return width(0) + width(1);
	}

	private int width(int level) {
		return base << level;
	}

	private static SequentialBlock doubleConv(int filters) {
		SequentialBlock b = new SequentialBlock();
		for (int k = 0; k < 2; k++)
			b.add(Conv2d.builder().setKernelShape(new Shape(3, 3)).optPadding(new Shape(1, 1)).setFilters(filters).optBias(false).build())
				.add(BatchNorm.builder().build())
				.add(Activation::relu);
		return b;
	}

	@Override
	protected NDList forwardInternal(ParameterStore ps, NDList inputs, boolean training, PairList<String, Object> params) {
		NDArray x = inputs.singletonOrThrow();
		List<NDArray> skips = new ArrayList<>();
		for (int i = 0; i < levels; i++) {
			x = down.get(i).forward(ps, new NDList(x), training).singletonOrThrow();
			if (i < levels - 1) {
				skips.add(x);
				x = Pool.maxPool2d(x, new Shape(2, 2), new Shape(2, 2), new Shape(0, 0), false);
			}
		}
		for (int i = levels - 2; i >= 0; i--) {
			x = x.repeat(2, 2).repeat(3, 2);
			x = skips.get(i).concat(x, 1);
			x = up.get(i).forward(ps, new NDList(x), training).singletonOrThrow();
		}
		return head.forward(ps, new NDList(x), training);
	}

	@Override
	public Shape[] getOutputShapes(Shape[] inputShapes) {
		Shape s = inputShapes[0];
		return new Shape[] {new Shape(s.get(0), outputs, s.get(2), s.get(3))};
	}

	@Override
	protected void initializeChildBlocks(NDManager manager, DataType dataType, Shape... inputShapes) {
		Shape s = inputShapes[0];
		long b = s.get(0), h = s.get(2), w = s.get(3);
		for (int i = 0; i < levels; i++) {
			long c = i == 0 ? inChannels : width(i - 1);
			down.get(i).initialize(manager, dataType, new Shape(b, c, h >> i, w >> i));
		}
		for (int i = 0; i < levels - 1; i++)
			up.get(i).initialize(manager, dataType, new Shape(b, width(i) + width(i + 1), h >> i, w >> i));
		head.initialize(manager, dataType, new Shape(b, width(0), h, w));
	}
}
