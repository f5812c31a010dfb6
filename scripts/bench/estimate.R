# The work of `bellwether estimate FILE --outliers none --transform box-cox` done in base R 4.x,
# for scripts/bench-cli.ts to time the two side by side:
#   Rscript scripts/bench/estimate.R FILE
# read.csv, the type-6 nonparametric limits, the Box-Cox lambda by optimize() on the profile
# log-likelihood (with the Jacobian) on [-3, 3], the Gaussian limits on that scale carried back,
# and the Anderson-Darling A^2 on that scale. Base R has no Anderson-Darling test, so A^2 and
# its D'Agostino-Stephens p-value are written out here in a few lines of base R.
args <- commandArgs(trailingOnly = TRUE)
x <- read.csv(args[1])$value
n <- length(x)
np <- quantile(x, c(0.025, 0.975), type = 6, names = FALSE)
lx <- log(x)
slx <- sum(lx)
bc <- function(l) if (l == 0) lx else (exp(l * lx) - 1) / l
ll <- function(l) {
  y <- bc(l)
  -n / 2 * log(mean((y - mean(y))^2)) + (l - 1) * slx
}
lambda <- optimize(ll, c(-3, 3), maximum = TRUE)$maximum
y <- bc(lambda)
m <- mean(y)
s <- sd(y)
back <- function(v) if (lambda == 0) exp(v) else (1 + lambda * v)^(1 / lambda)
limits <- back(m + c(-1, 1) * qnorm(0.975) * s)
z <- sort((y - m) / s)
i <- seq_len(n)
a2 <- -n - mean((2 * i - 1) * (pnorm(z, log.p = TRUE) + pnorm(rev(z), lower.tail = FALSE, log.p = TRUE)))
astar <- a2 * (1 + 0.75 / n + 2.25 / n^2)
p <- if (astar >= 0.6) exp(1.2937 - 5.709 * astar + 0.0186 * astar^2) else
  if (astar >= 0.34) exp(0.9177 - 4.279 * astar - 1.38 * astar^2) else
  if (astar >= 0.2) 1 - exp(-8.318 + 42.796 * astar - 59.938 * astar^2) else
  1 - exp(-13.436 + 101.14 * astar - 223.73 * astar^2)
cat(sprintf('{"n": %d, "nonparametric": [%.10g, %.10g], "lambda": %.10g, "parametric": [%.10g, %.10g], "a2": %.10g, "p": %.6g}\n',
            n, np[1], np[2], lambda, limits[1], limits[2], a2, p))
