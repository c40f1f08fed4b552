// Caveat texts carried in the value of every research-only result (DOMAIN §2.7, §2.8, §5.6), so a screen or an
// export can never show one of these numbers without its warning. None of these measures may drive a flag.

const RESEARCH_ONLY =
  "Research index only: never used for flags or alerts, not validated for diagnosis or prognosis. " +
  "Unreliable on short, noisy or non-stationary data; heart rate is non-stationary and shifted by drugs, " +
  "ventilation, sleep stage and activity.";

export const EMBEDDING_CAVEAT =
  `${RESEARCH_ONLY} The delay and embedding dimension describe how the series is unfolded for the chaos measures; ` +
  "they are not physiological quantities, and noise alone can push the dimension to its maximum.";

export const CORRELATION_DIMENSION_CAVEAT =
  `${RESEARCH_ONLY} A finite D2 needs a plateau that saturates as the embedding dimension grows; noise does not ` +
  "saturate (for white noise the slope keeps rising with m). A series of N points cannot show D2 above " +
  "2·log10 N (Eckmann & Ruelle 1992), so 300 beats cannot show D2 > 5. Check against surrogate data.";

export const LYAPUNOV_CAVEAT =
  `${RESEARCH_ONLY} A positive divergence rate is not proof of chaos: coloured noise also gives finite positive ` +
  "rates. The value depends on the embedding (m, τ), the Theiler window and the fitted range. Check against " +
  "surrogate data.";

export const SURROGATE_CAVEAT =
  `${RESEARCH_ONLY} Rejecting the null hypothesis (a static monotone transform of a linear Gaussian process) shows ` +
  "structure beyond linear correlations; it does not show chaos. Non-stationarity alone can reject it.";

export const POWER_LAW_CAVEAT =
  `${RESEARCH_ONLY} Under independent noise, run lengths decay factorially, not as a power law; run lengths span ` +
  "less than one decade (k = 1–8), so power-law claims on them are not testable. A fit needs at least 50 values " +
  "in the tail spanning one to two decades, and a plausible power law may still be beaten by a lognormal.";
