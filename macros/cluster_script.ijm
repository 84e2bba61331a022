// Corral on a cluster: write a SLURM job array that masks every object of a folder in shares,
// then merges the shares' tables. Nothing is submitted: the sbatch command is printed to the Log.
// Argument: "image folder|model file|output folder|number of shares"
a = split(getArgument(), "|");
if (a.length < 4) exit("Argument: image folder|model file|output folder|number of shares");
run("Corral Cluster Script", "input=[" + a[0] + "] model=[" + a[1] + "] output=[" + a[2] + "] mode=[whole images] parts=" + a[3]
	+ " time=00:30:00 memory=4G threads=2");
print(call("org.corral.fiji.MacroBridge.last", "summary"));
