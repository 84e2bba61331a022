// Corral batch job: learn from a folder of boxed images, then mask every object of a second folder.
// Argument: "boxed folder|box CSV (or empty: ROI sets beside the images)|model file|folder to mask|output folder"
// Output folder (not the image folder): NAME.labels.tif (one id per object), NAME.outlines.zip, NAME.objects.csv, NAME.overlay.png.
// Running it again resumes: images already done are skipped.
a = split(getArgument(), "|");
if (a.length < 5) exit("Argument: boxed folder|box CSV|model file|folder to mask|output folder");
boxes = "";
if (a[1] != "") boxes = " table=[" + a[1] + "]";
if (!File.exists(a[2]))
	run("Corral Learn from Boxes", "source=folder folder=[" + a[0] + "]" + boxes + " model=[" + a[2] + "] steps=150");
run("Corral Process Folder", "input=[" + a[3] + "] output=[" + a[4] + "] model=[" + a[2] + "] mode=[whole images]");
print(call("org.corral.fiji.MacroBridge.last", "summary"));
