# Reference robust subspaces for analysis/robust_test.go, computed offline
# with R's rrcov (PcaHubert, ROBPCA of Hubert, Rousseeuw & Vanden Branden
# 2005). Run from this folder:  Rscript rrcov_reference.R
# Each table is standardised as pcqc's unit scaling does (classical mean,
# standard deviation with divisor n-1) and the same number of components is
# fitted; mcd = FALSE forces ROBPCA even where rrcov would use plain MCD.
suppressMessages(library(rrcov))
cases <- list(
  list(file = "wine.csv",          drop = "cultivar",  k = 3),
  list(file = "breast_cancer.csv", drop = "diagnosis", k = 3),
  list(file = "diabetes.csv",      drop = NULL,        k = 3),
  list(file = "usarrests.csv",     drop = "state",     k = 2),
  list(file = "iris.csv",          drop = "species",   k = 2)
)
for (cs in cases) {
  x <- read.csv(file.path("..", "datasets", cs$file), check.names = FALSE)
  x <- as.matrix(x[, setdiff(names(x), cs$drop)])
  z <- scale(x)
  set.seed(1)
  fit <- PcaHubert(z, k = cs$k, kmax = cs$k, alpha = 0.75, mcd = FALSE, scale = FALSE)
  out <- data.frame(variable = colnames(z), getLoadings(fit), check.names = FALSE)
  name <- sub("\\.csv$", "", cs$file)
  con <- file(paste0(name, "_pcahubert.csv"), "w")
  writeLines(sprintf("# rrcov %s PcaHubert(scale(x), k=%d, alpha=0.75, mcd=FALSE), %s; eigenvalues %s",
                     packageVersion("rrcov"), cs$k, R.version.string,
                     paste(format(getEigenvalues(fit), digits = 10), collapse = " ")), con)
  write.csv(out, con, row.names = FALSE)
  close(con)
}
