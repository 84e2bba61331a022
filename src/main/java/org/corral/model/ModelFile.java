package org.corral.model;

import ai.djl.MalformedModelException;
import ai.djl.ndarray.NDManager;
import ai.djl.ndarray.types.DataType;
import ai.djl.ndarray.types.Shape;

import com.google.gson.Gson;
import com.google.gson.GsonBuilder;
import com.google.gson.JsonParseException;

import java.io.ByteArrayInputStream;
import java.io.ByteArrayOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.Map;
import java.util.zip.ZipEntry;
import java.util.zip.ZipInputStream;
import java.util.zip.ZipOutputStream;

import org.corral.CorralException;
import org.corral.io.AtomicFiles;
import org.corral.net.UNet;

/**
 * A model file: one zip holding {@code header.json} ({@link ModelHeader}) and {@code parameters.bin}
 * (the network's parameters in DJL's stream format). Written atomically.
 */
public final class ModelFile {
	static final String HEADER = "header.json", PARAMETERS = "parameters.bin";
	private static final Gson GSON = new GsonBuilder().setPrettyPrinting().serializeSpecialFloatingPointValues().create();

	private ModelFile() {}

	public static void write(Path target, ModelHeader header, UNet net) {
		byte[] params;
		try {
			ByteArrayOutputStream buf = new ByteArrayOutputStream();
			DataOutputStream dos = new DataOutputStream(buf);
			net.saveParameters(dos);
			dos.flush();
			params = buf.toByteArray();
		} catch (IOException e) {
			throw new CorralException("Cannot serialise the network: " + e.getMessage(), e);
		}
		byte[] json = GSON.toJson(header).getBytes(StandardCharsets.UTF_8);
		AtomicFiles.write(target, out -> {
			ZipOutputStream zos = new ZipOutputStream(out);
			zos.putNextEntry(new ZipEntry(HEADER));
			zos.write(json);
			zos.closeEntry();
			zos.putNextEntry(new ZipEntry(PARAMETERS));
			zos.write(params);
			zos.closeEntry();
			zos.finish();
		});
	}

	/** Reads only the header, checking the file's structure. */
	public static ModelHeader readHeader(Path file) {
		return parseHeader(file, entries(file));
	}

	/** Loads the network into {@code manager}; the caller closes the manager. */
	public static Loaded read(Path file, NDManager manager) {
		Map<String, byte[]> e = entries(file);
		ModelHeader h = parseHeader(file, e);
		byte[] p = e.get(PARAMETERS);
		if (p == null) throw new CorralException("Model file " + file + " has no " + PARAMETERS + " (damaged or not a Corral model)");
		UNet net = new UNet(h.inChannels, h.baseChannels, h.levels, Math.max(1, h.outputs));
		net.initialize(manager, DataType.FLOAT32, new Shape(1, h.inChannels, net.multiple(), net.multiple()));
		try {
			net.loadParameters(manager, new DataInputStream(new ByteArrayInputStream(p)));
		} catch (IOException | MalformedModelException | RuntimeException ex) {
			throw new CorralException("Model file " + file + ": the network parameters do not match its header (" + ex.getMessage() + ")", ex);
		}
		return new Loaded(h, net);
	}

	public record Loaded(ModelHeader header, UNet net) {}

	private static ModelHeader parseHeader(Path file, Map<String, byte[]> e) {
		byte[] json = e.get(HEADER);
		if (json == null) throw new CorralException("Model file " + file + " has no " + HEADER + " (damaged or not a Corral model)");
		ModelHeader h;
		try {
			h = GSON.fromJson(new String(json, StandardCharsets.UTF_8), ModelHeader.class);
		} catch (JsonParseException ex) {
			throw new CorralException("Model file " + file + ": unreadable header (" + ex.getMessage() + ")", ex);
		}
		if (h == null || !ModelHeader.FORMAT.equals(h.format)) throw new CorralException("Model file " + file + " is not a Corral model");
		if (h.formatVersion > ModelHeader.VERSION)
			throw new CorralException("Model file " + file + " has format version " + h.formatVersion + ", newer than this Corral reads (" + ModelHeader.VERSION + "); update Corral");
		if (h.formatVersion < 1 || h.inChannels < 1 || h.baseChannels < 1 || h.levels < 2 || h.levels > 6 || h.outputs < 1 || h.outputs - 1 - h.classCount() < 0 || h.outputs - 1 - h.classCount() > 1)
			throw new CorralException("Model file " + file + " has an invalid header (format " + h.formatVersion + ", channels " + h.inChannels + ", width " + h.baseChannels + ", levels " + h.levels + ")");
		return h;
	}

	private static Map<String, byte[]> entries(Path file) {
		if (!Files.isRegularFile(file)) throw new CorralException("Model file " + file + " does not exist");
		Map<String, byte[]> out = new HashMap<>();
		try (InputStream in = Files.newInputStream(file); ZipInputStream zin = new ZipInputStream(in)) {
			ZipEntry en;
			while ((en = zin.getNextEntry()) != null) {
				String n = en.getName();
				if (n.startsWith("/") || n.contains("..") || n.contains("\\"))
					throw new CorralException("Model file " + file + " holds the entry '" + n + "', a path that escapes the model; refused");
				out.put(n, zin.readAllBytes());
			}
		} catch (IOException ex) {
			throw new CorralException("Model file " + file + " is damaged or truncated (" + ex.getMessage() + ")", ex);
		}
		if (out.isEmpty()) throw new CorralException("Model file " + file + " is empty, truncated or not a zip");
		return out;
	}
}
