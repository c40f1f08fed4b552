// Successive-difference counting shared by NN50 and pNN50.

/** Number of successive differences with |NN_{i+1} − NN_i| strictly greater than `thresholdMs`. */
export function countLargeDifferences(nn: Float64Array, thresholdMs: number): number {
  let count = 0;
  for (let i = 1; i < nn.length; i++) if (Math.abs(nn[i]! - nn[i - 1]!) > thresholdMs) count++;
  return count;
}
