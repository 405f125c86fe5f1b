# Shares of variance (percent) of USArrests under the preprocessings the
# methods-paragraph tests use (report/methods_test.go), computed with R's
# stats::prcomp, independently of pcqc. Run from the repository root:
#   Rscript testdata/reference/methods_usarrests.R
# Output with R 4.2.2 (Debian r-base-core):
#   unit 62.0060 24.7441 8.9141 4.3358
#   log-unit 67.4251 21.5746 7.0244 3.9759
#   pareto 82.3446 12.6194 3.8198 1.2162
#   none-drop-rows 99.2039 0.6981 0.0979
#   log10-mean-unit 67.5572 21.3896 6.9507 4.1024
x <- read.csv("testdata/datasets/usarrests.csv", row.names = 1)
show <- function(label, p) {
  v <- p$sdev^2
  cat(label, sprintf("%.4f", 100 * v / sum(v)), "\n")
}
show("unit", prcomp(x, scale. = TRUE))
show("log-unit", prcomp(log(x), scale. = TRUE))
show("pareto", prcomp(scale(x, scale = sqrt(apply(x, 2, sd)))))
# Murder of the 4th and Rape of the 11th state missing, rows removed,
# UrbanPop left out, no scaling.
y <- x[-c(4, 11), c("Murder", "Assault", "Rape")]
show("none-drop-rows", prcomp(y))
# The same two cells missing, log10, then each replaced by its column's
# mean of the log10 values; unit scaling.
z <- log10(x)
z[4, "Murder"] <- mean(z[-4, "Murder"])
z[11, "Rape"] <- mean(z[-11, "Rape"])
show("log10-mean-unit", prcomp(z, scale. = TRUE))
