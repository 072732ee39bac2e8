# rlm_reference.R: reference values for the Huber estimator of examples/robust.
# Run from this folder: Rscript rlm_reference.R
# Writes rlm_data.csv (invented data: 40 rows, a slope, a 0/1 column and
# four gross outliers) and rlm_reference.csv (MASS::rlm's Huber fit with
# k = 1.345 and the MAD scale, iterated to a tight tolerance).
library(MASS)
set.seed(20240601)
n <- 40
x1 <- round(runif(n, 0, 10), 3)
x2 <- rep(c(0, 1), length.out = n)
y <- round(5 + 0.8 * x1 + 3 * x2 + rnorm(n, sd = 1.5), 3)
y[c(4, 11, 23, 37)] <- y[c(4, 11, 23, 37)] + c(15, -12, 20, -18)
d <- data.frame(y = y, x1 = x1, x2 = x2)
header <- sprintf("# %s, MASS %s; invented data, see rlm_reference.R", R.version.string, packageVersion("MASS"))
writeLines(header, "rlm_data.csv")
suppressWarnings(write.table(d, "rlm_data.csv", sep = ",", row.names = FALSE, append = TRUE))
m <- rlm(y ~ x1 + x2, data = d, psi = psi.huber, k = 1.345, scale.est = "MAD", acc = 1e-14, maxit = 500)
out <- data.frame(name = c("intercept", "x1", "x2", "scale", "downweighted"),
                  value = c(coef(m), m$s, mean(m$w < 1)))
writeLines(header, "rlm_reference.csv")
suppressWarnings(write.table(format(out, digits = 17), "rlm_reference.csv", sep = ",", row.names = FALSE, quote = FALSE, append = TRUE))
