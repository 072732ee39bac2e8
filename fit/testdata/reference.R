# reference.R: reference numbers for fit's tests, computed with base R's
# stats (lm, glm, solve) only. Run from fit/testdata after make_data.R:
#   Rscript reference.R
# Writes ref_r.csv: one row per number, columns case,quantity,term,value,
# values printed with 17 significant digits.
rd <- function(f) read.csv(f, comment.char = "#")
out <- list()
put <- function(case, quantity, term, value) {
  out[[length(out) + 1]] <<- data.frame(case = case, quantity = quantity,
    term = term, value = sprintf("%.17g", value))
}
terms_of <- function(b) sub("^\\(Intercept\\)$", "intercept", names(b))

# ---- linear models: classical and HC0-HC3 covariances -------------------
# HC formulas (Long & Ervin 2000) on the weighted scale: with
# Xw = sqrt(w) X and ew = sqrt(w) e, bread = (Xw'Xw)^-1,
# HCk = bread Xw' diag(omega) Xw bread with omega = ew^2 (HC0),
# ew^2 n/(n-p) (HC1), ew^2/(1-h) (HC2), ew^2/(1-h)^2 (HC3), h the
# diagonal of Xw bread Xw'.
lin <- function(case, fit, X, w) {
  s <- summary(fit)
  b <- coef(fit); tn <- terms_of(b)
  co <- s$coefficients
  put(case, "coef", tn, co[, 1]); put(case, "se", tn, co[, 2])
  put(case, "t", tn, co[, 3]);    put(case, "p", tn, co[, 4])
  put(case, "sigma", "", s$sigma); put(case, "df", "", fit$df.residual)
  put(case, "r2", "", s$r.squared); put(case, "adjr2", "", s$adj.r.squared)
  put(case, "F", "", s$fstatistic[1])
  put(case, "Fp", "", pf(s$fstatistic[1], s$fstatistic[2], s$fstatistic[3], lower.tail = FALSE))
  put(case, "loglik", "", as.numeric(logLik(fit)))
  put(case, "aic", "", AIC(fit)); put(case, "bic", "", BIC(fit))
  put(case, "rss", "", sum(w * residuals(fit)^2))
  n <- nrow(X); p <- ncol(X)
  Xw <- sqrt(w) * X; ew <- sqrt(w) * residuals(fit)
  bread <- solve(crossprod(Xw))
  h <- rowSums((Xw %*% bread) * Xw)
  om <- list(HC0 = ew^2, HC1 = ew^2 * n / (n - p), HC2 = ew^2 / (1 - h), HC3 = ew^2 / (1 - h)^2)
  for (k in names(om)) {
    V <- bread %*% crossprod(Xw * om[[k]], Xw) %*% bread
    put(case, paste0("se_", k), tn, sqrt(diag(V)))
  }
}
d <- rd("wls.csv")
X <- cbind(1, d$lamp, d$drift, d$fest)
lin("ols", lm(y ~ lamp + drift + fest, data = d), X, rep(1, nrow(d)))
lin("wls", lm(y ~ lamp + drift + fest, data = d, weights = w), X, d$w)
cnt <- rd("counts.csv")$count
e <- d[rep(seq_len(nrow(d)), cnt), ]
lin("ols_expanded", lm(y ~ lamp + drift + fest, data = e), cbind(1, e$lamp, e$drift, e$fest), rep(1, nrow(e)))

# ---- ridge: closed form on the standardised scale -----------------------
# Columns centred by their weighted mean (when there is an intercept) and
# divided by their weighted standard deviation with divisor sum(w);
# b = (Z1' W Z1 + lambda D)^-1 Z1' W y with Z1 = [1 Z] and D = diag(0, 1, ..., 1)
# (no leading 1 and D = I without intercept); coefficients mapped back to
# the original scale.
ridge <- function(case, X, y, w, lambda, intercept = TRUE) {
  sw <- sum(w)
  m <- if (intercept) colSums(w * X) / sw else rep(0, ncol(X))
  Xc <- sweep(X, 2, m)
  s <- sqrt(colSums(w * Xc^2) / sw)
  Z <- sweep(Xc, 2, s, "/")
  if (intercept) { Z1 <- cbind(1, Z); D <- diag(c(0, rep(1, ncol(Z)))) }
  else { Z1 <- Z; D <- diag(ncol(Z)) }
  G <- crossprod(Z1, w * Z1)
  b <- drop(solve(G + lambda * D, crossprod(Z1, w * y)))
  # effective degrees of freedom: trace of the hat matrix
  put(case, "edf", "", sum(diag(solve(G + lambda * D, G))))
  if (intercept) {
    beta <- b[-1] / s
    beta <- c(b[1] - sum(beta * m), beta)
    tn <- c("intercept", colnames(X))
  } else { beta <- b / s; tn <- colnames(X) }
  put(case, "coef_std", tn, b)
  put(case, "coef", tn, beta)
  put(case, "lambda", "", lambda)
}
r <- rd("ridge.csv")
RX <- as.matrix(r[, c("a", "b", "c", "d")])
for (lam in c(0, 0.5, 3, 25)) ridge(paste0("ridge_w_", lam), RX, r$y, r$w, lam)
ridge("ridge_unw_3", RX, r$y, rep(1, nrow(r)), 3)
ridge("ridge_noint_3", RX, r$y, r$w, 3, intercept = FALSE)

# ---- GLMs ---------------------------------------------------------------
gl <- function(case, fit) {
  s <- summary(fit)
  b <- coef(fit); tn <- terms_of(b)
  co <- matrix(NA_real_, length(b), 4, dimnames = list(names(b), NULL))
  co[rownames(s$coefficients), ] <- s$coefficients
  put(case, "coef", tn, b); put(case, "se", tn, co[, 2])
  put(case, "stat", tn, co[, 3]); put(case, "p", tn, co[, 4])
  # 95% Wald intervals: confint.default (normal quantile) where the
  # dispersion is fixed, Student t with the residual df where it is estimated
  if (fit$family$family %in% c("poisson", "binomial")) {
    ci <- confint.default(fit)
  } else {
    q <- qt(0.975, fit$df.residual)
    ci <- cbind(b - q * co[, 2], b + q * co[, 2])
  }
  put(case, "ci_lo", tn, ci[, 1]); put(case, "ci_hi", tn, ci[, 2])
  put(case, "deviance", "", fit$deviance); put(case, "null_deviance", "", fit$null.deviance)
  put(case, "df", "", fit$df.residual); put(case, "df_null", "", fit$df.null)
  put(case, "dispersion", "", s$dispersion)
  put(case, "aic", "", fit$aic); put(case, "loglik", "", as.numeric(logLik(fit)))
  put(case, "bic", "", BIC(fit)); put(case, "iter", "", fit$iter)
  put(case, "rank", "", fit$rank)
}
p <- rd("poisson.csv")
gl("poisson", glm(tally ~ warmth + late + gap, family = poisson(), data = p, weights = w))
gl("poisson_unw", glm(tally ~ warmth + late + gap, family = poisson(), data = p))
p$both <- p$warmth + p$late
gl("poisson_alias", glm(tally ~ warmth + late + both + gap, family = poisson(), data = p))
bn <- rd("binomial.csv"); bn$share <- bn$wins / bn$trials
gl("binomial", glm(share ~ chill + spring, family = binomial(), data = bn, weights = trials))
be <- rd("bernoulli.csv")
gl("bernoulli", glm(seen ~ tempo + dusk, family = binomial(), data = be))
g <- rd("gamma.csv")
gl("gamma", glm(spend ~ reach + quiet, family = Gamma(link = "log"), data = g, weights = w))
gl("gamma_unw", glm(spend ~ reach + quiet, family = Gamma(link = "log"), data = g))

res <- do.call(rbind, out)
con <- file("ref_r.csv", "w")
writeLines(c(paste0("# tool: ", R.version.string, " (base stats: lm, glm, solve)"),
             "# made by reference.R from the CSV files beside it"), con)
write.csv(res, con, row.names = FALSE, quote = FALSE)
close(con)
