# How far rrcov's own PcaHubert subspace moves when only its set of random
# directions changes (maxdir 100, 500, 1000, 2000 against the default 250):
# the largest principal angle in degrees, per table. rrcov draws directions
# from its own fixed generator, so set.seed changes nothing; the number of
# directions is what changes the set. It sets the tolerance of
# analysis/robust_test.go. Run from this folder:
#   Rscript rrcov_direction_spread.R > rrcov_direction_spread.txt
suppressMessages(library(rrcov))
cases <- list(c("wine.csv", "cultivar", 3), c("breast_cancer.csv", "diagnosis", 3),
              c("diabetes.csv", "", 3), c("usarrests.csv", "state", 2), c("iris.csv", "species", 2))
angle <- function(a, b) { s <- svd(t(a) %*% b)$d; acos(min(1, min(s))) * 180 / pi }
for (cs in cases) {
  x <- read.csv(file.path("..", "datasets", cs[1]), check.names = FALSE)
  x <- as.matrix(x[, setdiff(names(x), cs[2])]); z <- scale(x); k <- as.integer(cs[3])
  ref <- getLoadings(PcaHubert(z, k = k, kmax = k, alpha = 0.75, mcd = FALSE))
  a <- sapply(c(100, 500, 1000, 2000), function(d) angle(ref, getLoadings(PcaHubert(z, k = k, kmax = k, alpha = 0.75, mcd = FALSE, maxdir = d))))
  cat(cs[1], sprintf("%.2f", a), "\n")
}
