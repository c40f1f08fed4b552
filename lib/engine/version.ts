/**
 * Version of the numeric engine as a whole. Recorded with every stored value, so a change to any method that can
 * alter a number must raise it (and say why in the commit): values computed by different versions are never mixed
 * silently.
 */
export const ALGORITHM_VERSION = "1.0.0";
