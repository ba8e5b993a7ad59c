# Reference values for the arrhenius package's external checks, computed
# with R's lm/anova (weighted least squares). Run: Rscript r_check.R
# Inputs: lots.csv (simulated ln D points, see README.md).
R <- 8.314462618
d <- read.csv("lots.csv")
d$x <- 1 / (R * d$temperature_K)
d$w <- 1 / d$var_lnD
d$lot <- factor(d$lot)
show <- function(label, v) cat(sprintf("%s %.10g\n", label, v))

for (sub in list(list("all", d), list("L1", d[d$lot == "L1", ]))) {
  name <- sub[[1]]; s <- sub[[2]]
  m <- lm(lnD ~ x, data = s, weights = w)
  ci <- confint(m, level = 0.95)
  show(paste(name, "lnD0"), coef(m)[1])
  show(paste(name, "Q"), -coef(m)[2])
  show(paste(name, "birge"), summary(m)$sigma)
  show(paste(name, "var_lnD0"), vcov(m)[1, 1])
  show(paste(name, "var_Q"), vcov(m)[2, 2])
  show(paste(name, "cov_lnD0_Q"), -vcov(m)[1, 2])
  show(paste(name, "Q_lo"), -ci[2, 2])
  show(paste(name, "Q_hi"), -ci[2, 1])
}

m0 <- lm(lnD ~ x, data = d, weights = w)
m1 <- lm(lnD ~ lot + x, data = d, weights = w)
m2 <- lm(lnD ~ lot * x, data = d, weights = w)
a <- anova(m0, m1, m2)
show("F common-Q-vs-common", a$F[2]); show("p common-Q-vs-common", a$`Pr(>F)`[2])
show("F separate-vs-common-Q", a$F[3]); show("p separate-vs-common-Q", a$`Pr(>F)`[3])
b <- anova(m0, m2)
show("F separate-vs-common", b$F[2]); show("p separate-vs-common", b$`Pr(>F)`[2])

xref <- 1 / (R * 1198.15)
cc <- c(0, 1, 0, xref)                 # (Intercept, lotL2, x, lotL2:x)
est <- sum(cc * coef(m2)); se <- sqrt(drop(t(cc) %*% vcov(m2) %*% cc))
tq <- qt(0.975, df.residual(m2))
show("ratio", exp(est)); show("ratio_lo", exp(est - tq * se)); show("ratio_hi", exp(est + tq * se))
show("full birge", summary(m2)$sigma)
