package org.corral.fiji;

import ij.IJ;
import ij.ImagePlus;
import ij.Macro;
import ij.Menus;
import ij.WindowManager;
import ij.macro.Interpreter;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import java.io.File;
import java.lang.reflect.Field;
import java.util.HashMap;
import java.util.Hashtable;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.Future;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import java.util.regex.Pattern;

import org.corral.CorralException;
import org.scijava.Context;
import org.scijava.command.Command;
import org.scijava.command.CommandInfo;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;
import org.scijava.module.ModuleItem;

/**
 * Lets ImageJ 1.x macros call the Corral commands as {@code run("Corral Learn from Boxes", "steps=200 ...")}
 * where no SciJava layer does it for us (plain ImageJ 1.x, headless batch jobs, tests). In Fiji the
 * commands already are menu entries and macro commands through SciJava; there this bridge is not
 * installed. Keys are the commands' {@code @Parameter} field names; checkboxes are given as bare
 * words ({@code partial}); images by title; outputs: images are shown (batch mode keeps them),
 * tables become the Results table, text goes to the Log and to {@link #last(String)}.
 */
public final class MacroBridge implements PlugIn {
	public static final Map<String, Class<? extends Command>> COMMANDS = new LinkedHashMap<>();
	static {
		COMMANDS.put(LearnFromBoxes.TITLE, LearnFromBoxes.class);
		COMMANDS.put(MasksForBoxes.TITLE, MasksForBoxes.class);
		COMMANDS.put(MasksForWholeImage.TITLE, MasksForWholeImage.class);
		COMMANDS.put(PreviewBoxSupervision.TITLE, PreviewBoxSupervision.class);
		COMMANDS.put(ScoreAgainstReference.TITLE, ScoreAgainstReference.class);
		COMMANDS.put(ProcessFolder.TITLE, ProcessFolder.class);
		COMMANDS.put(ClusterScript.TITLE, ClusterScript.class);
	}

	private static Context context;
	private static final Map<String, String> LAST = new HashMap<>();

	/**
	 * Registers the commands in ImageJ 1.x's command table; idempotent. From a macro:
	 * {@code call("org.corral.fiji.MacroBridge.install");}
	 */
	@SuppressWarnings("unchecked")
	public static synchronized String install() {
		Hashtable<String, String> table = Menus.getCommands();
		if (table == null) { // headless: ImageJ builds its table with its menus, which need a display
			try {
				Field f = Menus.class.getDeclaredField("pluginsTable");
				f.setAccessible(true);
				f.set(null, table = new Hashtable<>());
			} catch (ReflectiveOperationException e) {
				throw new IllegalStateException("cannot create ImageJ's command table", e);
			}
		}
		// ImageJ's command table is flat: a title another plugin already holds is refused, never replaced
		// nor silently left to the other plugin
		for (String label : COMMANDS.keySet()) {
			String ours = MacroBridge.class.getName() + "(\"" + label + "\")", there = table.get(label);
			if (there != null && !there.equals(ours))
				throw new CorralException("Cannot install the Corral command '" + label + "': ImageJ's command table already gives that title to " + there);
		}
		for (String label : COMMANDS.keySet()) table.put(label, MacroBridge.class.getName() + "(\"" + label + "\")");
		return "Corral commands installed";
	}

	/** Text outputs of the last bridged command, for {@code call("org.corral.fiji.MacroBridge.last", "summary")}. */
	public static String last(String key) {
		return LAST.getOrDefault(key, "");
	}

	static synchronized Context context() {
		if (context == null) context = new Context(CommandService.class);
		return context;
	}

	@Override
	public void run(String label) {
		Class<? extends Command> cls = COMMANDS.get(label);
		if (cls == null) throw new IllegalArgumentException("not a Corral command: " + label);
		String options = Macro.getOptions();
		Interpreter macro = Interpreter.getInstance();
		try {
			Map<String, Object> inputs = inputs(cls, options == null ? "" : options);
			Future<CommandModule> f = context().service(CommandService.class).run(cls, true, inputs);
			CommandModule m;
			while (true) {
				try {
					m = f.get(200, TimeUnit.MILLISECONDS);
					break;
				} catch (TimeoutException e) {
					if (macro != null && macro.done() || IJ.escapePressed()) f.cancel(true); // the macro was aborted
				}
			}
			publish(cls, m);
		} catch (ExecutionException e) {
			fail(label, e.getCause() != null ? e.getCause() : e, macro);
		} catch (java.util.concurrent.CancellationException | InterruptedException e) {
			fail(label, new CorralException("cancelled"), macro);
		} catch (RuntimeException e) {
			fail(label, e, macro);
		}
	}

	private static void fail(String label, Throwable t, Interpreter macro) {
		Throwable c = t;
		while (!(c instanceof CorralException) && c.getCause() != null) c = c.getCause();
		String msg = label + ": " + (c instanceof CorralException ? c.getMessage() : t.toString());
		LAST.put("error", msg);
		if (macro != null) macro.abort(msg);
		else IJ.error("Corral", msg);
	}

	/** The command's inputs as SciJava describes them (its {@link CommandInfo}), filled from the macro's options. */
	static Map<String, Object> inputs(Class<? extends Command> cls, String options) {
		Map<String, Object> in = new HashMap<>();
		for (ModuleItem<?> item : info(cls).inputs()) {
			String key = item.getName();
			Class<?> t = item.getType();
			if (t == boolean.class) {
				String v = Macro.getValue(options, key, null);
				boolean word = Pattern.compile("(^|\\s)" + Pattern.quote(key) + "(\\s|$)").matcher(options).find();
				if (v != null && !v.equals(key)) in.put(key, Boolean.parseBoolean(v));
				else if (word) in.put(key, true);
				else if (!options.isBlank()) in.put(key, false); // macro convention: an absent checkbox is off
				continue;
			}
			String v = Macro.getValue(options, key, null);
			if (t == ImagePlus.class) {
				ImagePlus imp = v != null ? WindowManager.getImage(v) : null;
				if (v != null && imp == null) throw new CorralException("no open image titled '" + v + "' for " + key);
				if (imp == null && (key.equals("image") || key.equals("labels"))) imp = WindowManager.getCurrentImage();
				if (imp != null) in.put(key, imp);
			} else if (v != null) in.put(key, t == File.class ? new File(v) : v);
		}
		return in;
	}

	private static CommandInfo info(Class<? extends Command> cls) {
		CommandInfo info = context().service(CommandService.class).getCommand(cls);
		if (info == null) throw new IllegalStateException("SciJava does not know the command " + cls.getName());
		return info;
	}

	private static void publish(Class<? extends Command> cls, CommandModule m) {
		for (ModuleItem<?> item : info(cls).outputs()) {
			String name = item.getName();
			Object v = m.getOutput(name);
			if (v instanceof ImagePlus imp) imp.show();
			else if (v instanceof ResultsTable rt) { // becomes the system Results table: nResults, getResult()
				ij.plugin.filter.Analyzer.setResultsTable(rt);
				rt.show("Results");
			}
			else if (v != null) {
				LAST.put(name, v.toString());
				IJ.log("Corral: " + v);
			}
		}
	}
}
