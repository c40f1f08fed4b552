// What each index on the Window detail and the Research panel means, in plain words for a clinician reading at night,
// with its unit and the primary source of the method. The references are those of DOMAIN §2 (and, where DOMAIN names
// none, the one the engine's method file cites). Shared by server and client components: no server-only imports.

export interface IndexExplanation {
  /** Short label as shown beside the value. */
  label: string;
  /** Unit as shown after the value ("" for a dimensionless index). */
  unit: string;
  /** 1–3 plain sentences. */
  explanation: string;
  citation: string;
  /** Research-only indices never raise flags and are labelled so. */
  researchOnly: boolean;
}

const TASK_FORCE = "Task Force 1996, Circulation 93:1043; Eur Heart J 17:354";
const LOMB_SCARGLE = `${TASK_FORCE} (bands); Laguna, Moody & Mark, IEEE TBME 1998;45:698 (Lomb–Scargle on beat times)`;
const BRENNAN = "Brennan, Palaniswami & Kamen, IEEE TBME 2001;48:1342";
const COSTA = "Costa, Goldberger & Peng, Phys Rev Lett 2002;89:068102; Phys Rev E 2005;71:021906";
const PENG = "Peng, Havlin, Stanley & Goldberger, Chaos 1995;5:82";

const clinical = (label: string, unit: string, explanation: string, citation: string): IndexExplanation => ({ label, unit, explanation, citation, researchOnly: false });
const research = (label: string, unit: string, explanation: string, citation: string): IndexExplanation => ({ label, unit, explanation, citation, researchOnly: true });

export const INDEX_EXPLANATIONS: Readonly<Record<string, IndexExplanation>> = {
  // Time domain
  mean_nn: clinical("Mean NN", "ms", "The average time between normal beats in the window, after artefacts and isolated ectopic beats were cleaned.", TASK_FORCE),
  hr: clinical("Heart rate", "bpm", "Beats per minute worked out as 60,000 divided by the mean NN interval, so it matches the number of beats in the window.", TASK_FORCE),
  sdnn: clinical("SDNN", "ms", "How much the beat-to-beat intervals spread around their average over the window: overall variability. Compare it only with windows of the same length.", TASK_FORCE),
  rmssd: clinical("RMSSD", "ms", "The typical size of the change from one beat to the next. It mostly follows fast, breathing-linked (vagal) variation and is the most robust index on short windows.", TASK_FORCE),
  sdsd: clinical("SDSD", "ms", "The spread of the beat-to-beat changes; nearly the same information as RMSSD.", TASK_FORCE),
  nn50: clinical("NN50", "", "How many successive intervals differ by more than 50 ms in this window.", TASK_FORCE),
  pnn50: clinical("pNN50", "%", "The share of successive interval changes larger than 50 ms, out of all changes in the window (N − 1).", TASK_FORCE),
  // Poincaré
  sd1: clinical("SD1", "ms", "Width of the Poincaré cloud across the line of identity: short-term, beat-to-beat variability. It carries the same information as RMSSD (SD1 ≈ RMSSD/√2).", BRENNAN),
  sd2: clinical("SD2", "ms", "Length of the Poincaré cloud along the line of identity: slower, longer-term variability within the window.", BRENNAN),
  sd1_sd2: clinical("SD1/SD2", "", "The ratio of short-term to longer-term variability: the shape of the Poincaré cloud, round (high) or elongated (low).", BRENNAN),
  // Entropy and fractal, 5-min window
  sampen: clinical("SampEn", "", "Sample entropy: how unpredictable the rhythm is. Low values mean repeating, regular patterns; it depends on the settings (m = 2, r = 0.2 × SD) and on the number of beats.", "Richman & Moorman, Am J Physiol 2000;278:H2039"),
  dfa_alpha1: clinical("DFA α1", "", "Short-range fractal scaling over 4–16 beats. Around 1 in healthy rest; values towards 0.5 mean more random, uncorrelated beat-to-beat changes, values towards 1.5 a smoother, more rigid rhythm.", PENG),
  // Frequency domain
  vlf: clinical("VLF power", "ms²", "Variability power at 0.003–0.04 Hz, very slow swings over minutes. A 5-min window is the shortest that can hold it.", LOMB_SCARGLE),
  lf: clinical("LF power", "ms²", "Variability power at 0.04–0.15 Hz, including the roughly 10-second blood-pressure (baroreflex) rhythm.", LOMB_SCARGLE),
  hf: clinical("HF power", "ms²", "Variability power at 0.15–0.4 Hz, the breathing-linked rhythm. Ventilator settings and sedation move it; in neonates breathing is faster than this band.", LOMB_SCARGLE),
  lf_hf: clinical("LF/HF", "", "The ratio of LF to HF power. It does not reliably measure a 'sympathovagal balance'; read it as a description of the spectrum only.", TASK_FORCE),
  lf_nu: clinical("LF (n.u.)", "%", "LF power as a share of LF + HF power.", TASK_FORCE),
  hf_nu: clinical("HF (n.u.)", "%", "HF power as a share of LF + HF power.", TASK_FORCE),
  lf_peak_hz: clinical("LF peak", "Hz", "The frequency with the most power inside the LF band.", LOMB_SCARGLE),
  hf_peak_hz: clinical("HF peak", "Hz", "The frequency with the most power inside the HF band; usually the breathing (or ventilator) rate.", LOMB_SCARGLE),
  // The hour around the window
  mse_ci: clinical("MSE complexity index", "", "Sample entropy summed over time scales 1–10 of the hour: a summary of complexity across scales. Two very different curves can share one sum, so look at the curve.", COSTA),
  mse_slope_short: clinical("MSE slope, τ 1–5", "/scale", "How sample entropy changes across the short scales 1–5 of the hour; a fall suggests randomness rather than structured complexity.", COSTA),
  mse_slope_long: clinical("MSE slope, τ 6–20", "/scale", "How sample entropy changes across the long scales 6–20 of the hour.", COSTA),
  dfa_alpha2: clinical("DFA α2", "", "Longer-range fractal scaling over 16–64 beats, computed on the hour because a 5-min window is too short for it.", PENG),
  mfdfa_width: clinical("MF-DFA width", "", "How much the scaling differs between calm and turbulent stretches of the hour (multifractality); it narrows when the rhythm loses complexity.", "Kantelhardt et al., Physica A 2002;316:87"),
  apen: clinical("ApEn", "", "Approximate entropy of the hour, an older cousin of SampEn. It is biased low on short series, so always read it with its beat count and prefer SampEn.", "Pincus, PNAS 1991;88:2297"),
  // Research panel
  d2: research("Correlation dimension D2", "", "An estimate of how many independent variables would be needed to describe the rhythm. It only means something if its slope levels off as the embedding dimension grows; noise never levels off.", "Grassberger & Procaccia, Physica D 1983;9:189"),
  lyapunov: research("Largest Lyapunov exponent λ1", "/beat", "How fast two nearly identical stretches of rhythm drift apart. A positive value is not proof of chaos: coloured noise gives one too.", "Rosenstein, Collins & De Luca, Physica D 1993;65:117"),
  fnn: research("False nearest neighbours", "%", "The share of neighbouring points that separate when one more dimension is added; the embedding dimension is where that share first drops below 1 %.", "Kennel, Brown & Abarbanel, Phys Rev A 1992;45:3403"),
  surrogate: research("Surrogate test", "", "Compares the rhythm with shuffled copies that keep its spectrum and value distribution. Ranking first says there is structure beyond linear correlation, not that the rhythm is chaotic.", "Theiler et al., Physica D 1992;58:77; Schreiber & Schmitz, Phys Rev Lett 1996;77:635 (IAAFT)"),
  power_law: research("Power-law fit of run sizes", "", "Tests whether the sizes of runs of accelerations and decelerations follow a power law, and whether a lognormal fits as well. Short, noisy data rarely allow a verdict.", "Clauset, Shalizi & Newman, SIAM Rev 2009;51:661"),
};

/** The explanation of an index key; a plain fallback for a key this list does not know, so a new index never breaks a screen. */
export function explanationOf(key: string): IndexExplanation {
  return INDEX_EXPLANATIONS[key] ?? { label: key, unit: "", explanation: "No explanation recorded for this index yet.", citation: "", researchOnly: false };
}
