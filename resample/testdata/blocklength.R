# blocklength.R: independent worked values of the automatic block length of
# Politis & White (2004), "Automatic block-length selection for the dependent
# bootstrap", Econometric Reviews 23(1), 53-70, with the correction of
# Patton, Politis & White (2009), Econometric Reviews 28(4), 372-375
# (D_SB = 2 g(0)^2, D_CB = (4/3) g(0)^2). Base R only (stats::acf for the
# autocovariances, divisor n). Written for kalends from the papers' formulas
# as documented in resample.BlockLength; no resampling package is used.
#
# Run from this directory:  Rscript blocklength.R
# Writes blocklength_series.csv (invented series) and blocklength_want.csv.

pw <- function(x) {
  n <- length(x)
  kn <- max(5, ceiling(sqrt(log10(n))))
  mmax <- min(ceiling(sqrt(n)) + kn, n - 1)
  bmax <- ceiling(min(3 * sqrt(n), n / 3))
  a <- acf(x, lag.max = mmax, type = "covariance", demean = TRUE, plot = FALSE)
  R <- as.vector(a$acf)            # R[1] is lag 0
  rho <- R / R[1]
  thr <- 2 * sqrt(log10(n) / n)
  mhat <- mmax
  for (m in 0:(mmax - kn)) {
    if (all(abs(rho[m + (1:kn) + 1]) < thr)) { mhat <- m; break }
  }
  M <- min(2 * mhat, mmax)
  lam <- function(t) ifelse(abs(t) <= 0.5, 1, ifelse(abs(t) <= 1, 2 * (1 - abs(t)), 0))
  if (M == 0) {
    g <- R[1]; G <- 0
  } else {
    k <- -M:M
    Rk <- R[abs(k) + 1]
    g <- sum(lam(k / M) * Rk)
    G <- sum(lam(k / M) * abs(k) * Rk)
  }
  dsb <- 2 * g^2
  dcb <- 4 / 3 * g^2
  bound <- function(b) min(max(b, 1), bmax)
  c(stationary = bound((2 * G^2 / dsb)^(1/3) * n^(1/3)),
    circular = bound((2 * G^2 / dcb)^(1/3) * n^(1/3)),
    mhat = mhat, M = M)
}

# Invented series: an AR(1) with phi = 0.6 (n = 200), an AR(1) with
# phi = 0.9 (n = 500), white noise (n = 150) and an MA(2) (n = 120).
set.seed(20240611)
ar1 <- function(n, phi) {
  e <- rnorm(n + 50); x <- numeric(n + 50)
  for (t in 2:(n + 50)) x[t] <- phi * x[t - 1] + e[t]
  x[-(1:50)]
}
series <- list(
  ar06 = ar1(200, 0.6),
  ar09 = ar1(500, 0.9),
  white = rnorm(150),
  ma2 = { e <- rnorm(122); e[3:122] + 0.8 * e[2:121] + 0.5 * e[1:120] }
)

hdr <- sprintf("# made by blocklength.R with %s; invented data", R.version.string)
con <- file("blocklength_series.csv", "w")
writeLines(hdr, con)
writeLines("series,value", con)
for (nm in names(series)) writeLines(sprintf("%s,%.17g", nm, series[[nm]]), con)
close(con)

con <- file("blocklength_want.csv", "w")
writeLines(hdr, con)
writeLines("series,n,stationary,circular,mhat,M", con)
for (nm in names(series)) {
  r <- pw(series[[nm]])
  writeLines(sprintf("%s,%d,%.17g,%.17g,%d,%d", nm, length(series[[nm]]),
                     r["stationary"], r["circular"], r["mhat"], r["M"]), con)
}
close(con)
