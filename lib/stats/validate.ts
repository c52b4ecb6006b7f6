/** The single invalid-input contract of lib/stats: throw a StatsDomainError naming the rule. */
export class StatsDomainError extends RangeError {
  constructor(
    public readonly argument: string,
    public readonly value: unknown,
    public readonly rule: string,
  ) {
    super(`${argument} ${rule} (got ${String(value)})`);
    this.name = "StatsDomainError";
  }
}

export function requireFinite(name: string, v: number): void {
  if (typeof v !== "number" || !Number.isFinite(v)) throw new StatsDomainError(name, v, "must be a finite number");
}

export function requirePositive(name: string, v: number): void {
  requireFinite(name, v);
  if (!(v > 0)) throw new StatsDomainError(name, v, "must be greater than 0");
}

export function requireCount(name: string, v: number): void {
  requireFinite(name, v);
  if (!Number.isInteger(v) || v < 0) throw new StatsDomainError(name, v, "must be a non-negative integer");
}

/** Probability in the open interval (0, 1), or the closed one when asked. */
export function requireProbability(name: string, v: number, opts: { closed?: boolean } = {}): void {
  requireFinite(name, v);
  if (opts.closed ? v < 0 || v > 1 : v <= 0 || v >= 1)
    throw new StatsDomainError(name, v, opts.closed ? "must lie in [0, 1]" : "must lie strictly between 0 and 1");
}

/** x responders of n evaluable patients. */
export function requireData(x: number, n: number): void {
  requireCount("n", n);
  requireCount("x", x);
  if (x > n) throw new StatsDomainError("x", x, `must not exceed n = ${n}`);
}
