# Another person's PCA of USArrests written by R itself, in the shapes R
# users send: the review tests read these files as they are.
#
# Run from the repository root with Debian's r-base-core 4.2.2:
#   Rscript testdata/review/generate.R
# R's datasets::USArrests is the same table as testdata/datasets/usarrests.csv.
p <- prcomp(USArrests, scale. = TRUE)
out <- function(name) file.path("testdata", "review", name)
# write.csv of a vector: a "" row-name column (1, 2, …), then "x".
write.csv(p$sdev, out("r-sdev.csv"))
# summary(p)$importance: rows Standard deviation, Proportion of Variance,
# Cumulative Proportion; columns PC1..PC4.
write.csv(summary(p)$importance, out("r-importance.csv"))
# The first two components, with the states as row names.
write.csv(p$rotation[, 1:2], out("r-loadings.csv"))
write.csv(p$x[, 1:2], out("r-scores.csv"))
# Score columns in another order under the same names: a defect (the
# column headed PC1 holds the scores on PC2, and so on) ...
x <- p$x[, c(2, 3, 1)]
colnames(x) <- c("PC1", "PC2", "PC3")
write.csv(x, out("r-scores-permuted.csv"))
write.csv(p$rotation[, 1:3], out("r-loadings-3.csv"))
# ... and a harmless reordering that keeps each column's own name.
write.csv(p$x[, c(2, 1)], out("r-scores-reordered.csv"))
