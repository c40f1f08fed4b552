// Input guards: programming errors (wrong type, NaN, infinity) throw; short or degenerate data are not errors but
// give a null value with a reason in the method itself.

export function assertSeries(x: unknown, name = "series"): asserts x is Float64Array {
  if (!(x instanceof Float64Array)) throw new TypeError(`${name} must be a Float64Array`);
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i]!)) throw new RangeError(`${name}[${i}] is not a finite number`);
  }
}

export function assertInteger(v: number, name: string, min: number, max = Number.MAX_SAFE_INTEGER): void {
  if (!Number.isInteger(v) || v < min || v > max) throw new RangeError(`${name} must be an integer in [${min}, ${max}], got ${v}`);
}

export function assertPositive(v: number, name: string): void {
  if (!(Number.isFinite(v) && v > 0)) throw new RangeError(`${name} must be a finite number > 0, got ${v}`);
}
