// Corral: learn from the rectangles in the ROI Manager of the current image, then mask every box.
// Argument (optional): where to save the model; default: next to the image.
// Result: a label image (label k = k-th box), one outline per object in the ROI Manager and the
// image overlay, and one row per box in the Results table.
model = getArgument();
if (model == "") model = getDirectory("image") + File.nameWithoutExtension + "-corral-model.zip";
if (roiManager("count") == 0) exit("Draw rectangles around some objects and add them to the ROI Manager (key t) first.");
source = getTitle();
run("Corral Learn from Boxes", "source=[current image] model=[" + model + "] steps=150");
selectImage(source);
run("Corral Masks for Boxes", "model=[" + model + "] keep");
empty = 0;
for (i = 0; i < nResults; i++) if (getResult("area", i) == 0) empty++;
print("Corral: " + nResults + " boxes masked, " + empty + " empty; model " + model);
