# Reference values for SampEn and ApEn from R pracma (sample_entropy, approx_entropy), run live on inputs generated
# here with fixed seeds. Usage: Rscript --vanilla pracma_entropy.R OUT.json
#
# What pracma computes (read from its source, pracma 2.4.2):
#   sample_entropy(ts, edim, r): the same N - edim templates for lengths edim and edim + 1 (as Richman & Moorman), no
#     self-matches, but a STRICT test (distance < r), and at length edim + 1 its loop stops one template early, so the
#     last pair of (edim+1)-templates is never compared. Its `tau` argument downsamples (ts[seq(1, N, by = tau)]) — it
#     is not MSE's coarse-graining, so coarse-graining is done below and sample_entropy is called with tau = 1.
#   approx_entropy(ts, edim, r): Pincus's definition, self-matches included, a template matching when no coordinate
#     differs by MORE than r (so distance <= r) — the same convention as ours.
# So pracma's SampEn equals Richman & Moorman's exactly when no template distance equals r (ties) and the dropped
# pair does not match. Each case records both facts, computed here by brute force, together with the Richman &
# Moorman pair counts A and B (<= r and < r) evaluated here directly from the definition, so the test can say which
# comparison applies.
#
# Inputs are rounded to 6 decimals before use, so the JSON text (15 significant digits) parses back to the very
# doubles R used.
suppressPackageStartupMessages({
  library(pracma)
  library(jsonlite)
})

args <- commandArgs(trailingOnly = TRUE)
if (length(args) != 1) stop("usage: Rscript pracma_entropy.R OUT.json")

# Chebyshev distances between the first n = N - m templates at lengths m and m + 1 (upper triangle only).
template_distances <- function(y, m) {
  n <- length(y) - m
  dm <- matrix(0, n, n)
  for (k in 0:(m - 1)) dm <- pmax(dm, abs(outer(y[(1:n) + k], y[(1:n) + k], "-")))
  dm1 <- pmax(dm, abs(outer(y[(1:n) + m], y[(1:n) + m], "-")))
  up <- upper.tri(dm)
  list(n = n, dm = dm, dm1 = dm1, up = up)
}

# Richman & Moorman counts (<= and <), ties at r, and whether pracma's dropped (m+1)-pair matches under < r.
definition_facts <- function(y, m, r) {
  d <- template_distances(y, m)
  list(
    rm_b_le = sum(d$dm[d$up] <= r), rm_a_le = sum(d$dm1[d$up] <= r),
    rm_b_lt = sum(d$dm[d$up] < r), rm_a_lt = sum(d$dm1[d$up] < r),
    ties_at_r = any(d$dm[d$up] == r) || any(d$dm1[d$up] == r),
    dropped_pair_matches = d$dm1[d$n - 1, d$n] < r
  )
}

# JSON cannot hold Inf: pracma's infinite SampEn (A = 0 after its dropped pair) is written as the string "Inf".
json_number <- function(v) if (is.finite(v)) v else as.character(v)

single_case <- function(id, description, x, m, r, r_fraction, apen = TRUE) {
  c(
    list(
      kind = "single", id = id, description = description, x = x, m = m, r = r, r_fraction = r_fraction,
      pracma_sampen = json_number(sample_entropy(x, edim = m, r = r)),
      pracma_apen = if (apen) approx_entropy(x, edim = m, r = r) else NULL
    ),
    definition_facts(x, m, r)
  )
}

# Non-overlapping means, summed left to right in double precision (as the TypeScript code does, so the coarse series
# are the same doubles; R's mean() would accumulate in extended precision).
coarse_grain <- function(x, tau) {
  k <- floor(length(x) / tau)
  y <- x[seq(1, by = tau, length.out = k)]
  if (tau > 1) for (j in 2:tau) y <- y + x[seq(j, by = tau, length.out = k)]
  y / tau
}

mse_case <- function(id, description, x, m, r_fraction, scales) {
  r <- r_fraction * sd(x)
  list(
    kind = "mse", id = id, description = description, x = x, m = m, r = r, r_fraction = r_fraction,
    scales = lapply(scales, function(tau) {
      y <- coarse_grain(x, tau)
      c(list(scale = tau, points = length(y), pracma_sampen = json_number(sample_entropy(y, edim = m, r = r))),
        definition_facts(y, m, r))
    })
  )
}

# A beat-interval-like series (ms): AR(1) fluctuation plus a respiratory sine at 0.25 Hz of the running beat time.
rr_series <- function(n, phi, noise_sd, seed) {
  set.seed(seed)
  e <- rnorm(n, 0, noise_sd)
  x <- numeric(n)
  v <- 0
  t <- 0
  for (i in 1:n) {
    v <- phi * v + e[i]
    x[i] <- 850 + v + 20 * sin(2 * pi * 0.25 * t)
    t <- t + x[i] / 1000
  }
  round(x, 6)
}

cases <- list()

x <- rr_series(300, 0.75, 18, 20250301)
cases[[length(cases) + 1]] <- single_case("rr_ar1_300", "300-beat AR(1)-like RR series (ms), r = 0.2 SD", x, 2, 0.2 * sd(x), 0.2)

set.seed(20250302)
x <- round(rnorm(1000), 6)
cases[[length(cases) + 1]] <- single_case("white_1000", "Gaussian white noise, N = 1000, r = 0.2 SD", x, 2, 0.2 * sd(x), 0.2)

x <- round(rr_series(400, 0.6, 15, 20250303))
cases[[length(cases) + 1]] <- single_case(
  "integer_ms_400_r10", "400 integer-ms intervals, r = 10 ms absolute: many distances equal r", x, 2, 10, NULL)
cases[[length(cases) + 1]] <- single_case(
  "integer_ms_400_sd", "the same integer-ms intervals, r = 0.2 SD (not an integer: no ties)", x, 2, 0.2 * sd(x), 0.2)

x <- rr_series(200, 0.7, 20, 20250304)
x[197:200] <- 800
cases[[length(cases) + 1]] <- single_case(
  "last_pair_match_200", "200-beat series ending in four equal intervals: the pair pracma drops is a match", x, 2,
  0.2 * sd(x), 0.2, apen = FALSE)

x <- c(1, 5, 2, 8, 3, 3, 3, 3)
cases[[length(cases) + 1]] <- single_case("W3", "DOMAIN W3, r = 0.5", x, 2, 0.5, NULL, apen = FALSE)
cases[[length(cases) + 1]] <- single_case("W3_plus_9", "DOMAIN W3 with 9 appended, r = 0.5", c(x, 9), 2, 0.5, NULL, apen = FALSE)
cases[[length(cases) + 1]] <- single_case("A10_period3", "DOMAIN A10: [1,2,3] x 4, r = 0.5", rep(c(1, 2, 3), 4), 2, 0.5, NULL)

x <- rr_series(1200, 0.6, 20, 20250305)
cases[[length(cases) + 1]] <- mse_case(
  "mse_ar1_1200", "1200-beat AR(1)-like series coarse-grained at tau = 1, 2, 3, 5; r = 0.15 SD of the original",
  x, 2, 0.15, c(1, 2, 3, 5))

out <- list(
  source = "R pracma::sample_entropy and pracma::approx_entropy; A and B counts from the Richman & Moorman definition evaluated by brute force in this script",
  generated_by = "tests/reference/pracma_entropy.R",
  tool_versions = list(
    R = paste(R.version$major, R.version$minor, sep = "."),
    pracma = as.character(packageVersion("pracma")),
    jsonlite = as.character(packageVersion("jsonlite"))
  ),
  cases = cases
)
writeLines(toJSON(out, auto_unbox = TRUE, digits = NA, null = "null"), args[1])
