// Corral: score every label image of a folder (NAME.labels.tif) against the reference label image NAME.tif.
// Argument: "label folder|reference folder"
// Result: one row per image in a table "Corral folder scores", and the mean per-object Dice printed.
a = split(getArgument(), "|");
if (a.length < 2) exit("Argument: label folder|reference folder");
labels = a[0]; refs = a[1];
if (!endsWith(labels, "/")) labels = labels + "/";
if (!endsWith(refs, "/")) refs = refs + "/";
list = getFileList(refs);
Table.create("Corral folder scores");
row = 0; sum = 0;
for (i = 0; i < list.length; i++) {
	if (!endsWith(list[i], ".tif")) continue;
	base = substring(list[i], 0, lengthOf(list[i]) - 4);
	if (!File.exists(labels + base + ".labels.tif")) { print("missing label image for " + list[i]); continue; }
	open(labels + base + ".labels.tif"); rename("labels-" + list[i]); lab = getTitle();
	open(refs + list[i]); rename("reference-" + list[i]); ref = getTitle();
	run("Corral Score Against Reference", "labels=[" + lab + "] reference=[" + ref + "]");
	d = getResult("object_dice", 0);
	Table.set("image", row, list[i], "Corral folder scores");
	Table.set("object_dice", row, d, "Corral folder scores");
	Table.set("f1_50", row, getResult("f1_50", 0), "Corral folder scores");
	Table.set("mean_ap", row, getResult("mean_ap", 0), "Corral folder scores");
	sum += d; row++;
	close(lab); close(ref);
}
if (row > 0) print("Corral: " + row + " images, mean per-object Dice " + d2s(sum / row, 4));
