# boot_reference.R: reference intervals for inspect's interval tests, computed
# with R's boot package used as a reference calculator (boot.ci on a given
# bootstrap; we read its frequency array back in Go).
#
# Run from inspect/testdata:  Rscript boot_reference.R
# Writes: boot_data.csv, boot_freq.csv, boot_t.csv, boot_ci.csv, boot_jack.csv.
#
# Invented scenario (not real data): 30 open-air theatre evenings of an
# imaginary summer season; temp is the evening temperature (degrees C) and
# tickets the tickets sold. Simulated below with a fixed seed, rounded.
#
# Statistics (stype = "i", indices): 1 mean of tickets, 2 its variance
# (var/n), 3 OLS slope of tickets on temp, 4 its variance (s^2/Sxx, s^2 with
# n-2 divisor). Pairs (1,2) and (3,4) feed the studentized intervals.
# BCa: L is passed explicitly as empinf(type = "jack"), i.e.
# L_i = (n-1)(t0 - t_(-i)), because boot.ci's default for an index bootstrap
# would be the regression estimate (type = "reg"), which depends on t.
suppressPackageStartupMessages(library(boot))
hdr <- sprintf("# %s; boot %s; made by boot_reference.R", R.version.string,
               as.character(packageVersion("boot")))

set.seed(20240611)
n <- 30
temp <- round(runif(n, 12, 31), 1)
tickets <- round(180 + 9 * temp + rgamma(n, shape = 2, scale = 30) - 60)
d <- data.frame(temp = temp, tickets = tickets)
writeLines(c(hdr, "# invented data: open-air theatre evenings (see boot_reference.R)"), "boot_data.csv")
suppressWarnings(write.table(d, "boot_data.csv", sep = ",", row.names = FALSE,
                             quote = FALSE, append = TRUE))

stat <- function(d, i) {
  x <- d$temp[i]; y <- d$tickets[i]; m <- length(y)
  sxx <- sum((x - mean(x))^2)
  b <- sum((x - mean(x)) * (y - mean(y))) / sxx
  a <- mean(y) - b * mean(x)
  s2 <- sum((y - a - b * x)^2) / (m - 2)
  c(mean(y), var(y) / m, b, s2 / sxx)
}

set.seed(7)
B <- 999
bt <- boot(d, stat, R = B)
f <- boot.array(bt)

writeLines(c(hdr, sprintf("# boot.array: %d replicates (rows) x %d observations (columns), counts", B, n)), "boot_freq.csv")
write.table(f, "boot_freq.csv", sep = ",", row.names = FALSE, col.names = FALSE, append = TRUE)

fmt <- function(x) sprintf("%.17g", x)
tt <- apply(bt$t, 2, fmt)
writeLines(c(hdr, "# boot()$t: replicate values; first data line is t0",
             "mean,var_mean,slope,var_slope",
             paste(fmt(bt$t0), collapse = ","),
             apply(tt, 1, paste, collapse = ",")), "boot_t.csv")

L1 <- empinf(bt, index = 1, type = "jack")
L3 <- empinf(bt, index = 3, type = "jack")
writeLines(c(hdr, "# empinf(type = \"jack\") influence values per observation",
             "mean,slope", paste(fmt(L1), fmt(L3), sep = ",")), "boot_jack.csv")

out <- c(hdr, "# boot.ci intervals; acceleration a = sum(L^3)/(6 sum(L^2)^1.5)",
         "statistic,method,level,lower,upper")
for (s in list(list(name = "mean", idx = c(1, 2), L = L1),
               list(name = "slope", idx = c(3, 4), L = L3))) {
  for (conf in c(0.90, 0.95)) {
    ci <- boot.ci(bt, conf = conf, type = c("norm", "basic", "perc", "bca", "stud"),
                  index = s$idx, L = s$L)
    rows <- list(normal = ci$normal[2:3], basic = ci$basic[4:5],
                 percentile = ci$percent[4:5], BCa = ci$bca[4:5],
                 studentized = ci$student[4:5])
    for (m in names(rows)) {
      out <- c(out, paste(s$name, m, conf, fmt(rows[[m]][1]), fmt(rows[[m]][2]), sep = ","))
    }
  }
  out <- c(out, paste(s$name, "acceleration", "", fmt(sum(s$L^3) / (6 * sum(s$L^2)^1.5)), "", sep = ","))
}
writeLines(out, "boot_ci.csv")
