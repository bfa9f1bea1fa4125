# Reference timing for `npm run bench`: R's glm.fit (IRLS with LINPACK QR) with the binomial family.
# Loads the float64 files written by src/cli/bench/synth.ts (same values as the CSV) BEFORE the timer, then times
# glm.fit(cbind(1, X), y, family = binomial(), control = list(epsilon = EPS, maxit = 100)) only.
# Usage: Rscript glm_fit.R X_BIN Y_BIN N P EPS REPEATS     Prints one JSON line.
a <- commandArgs(trailingOnly = TRUE)
n <- as.integer(a[3]); p <- as.integer(a[4]); eps <- as.numeric(a[5]); repeats <- as.integer(a[6])
X <- cbind(1, matrix(readBin(a[1], "double", n = n * p, size = 8, endian = "little"), nrow = n, ncol = p))
y <- readBin(a[2], "double", n = n, size = 8, endian = "little")
secs <- numeric(0); cpu <- numeric(0)
for (r in seq_len(repeats)) {
  t0 <- proc.time()
  f <- glm.fit(X, y, family = binomial(), control = list(epsilon = eps, maxit = 100))
  d <- proc.time() - t0
  secs <- c(secs, d[["elapsed"]]); cpu <- c(cpu, d[["user.self"]] + d[["sys.self"]])
}
num <- function(v) paste(sprintf("%.17g", v), collapse = ",")
cat(sprintf('{"library":"R %s stats::glm.fit(binomial, epsilon=%g)","seconds":[%s],"cpuSeconds":[%s],"iterations":%d,"converged":%s,"beta":[%s]}\n',
  paste(R.version$major, R.version$minor, sep = "."), eps, num(secs), num(cpu), f$iter, tolower(f$converged), num(f$coefficients)))
