/**
 * An error caused by what the user gave us (a file, a value, a flag). The CLI prints its message as
 * one line and exits non-zero, without a stack trace. The message must name what is wrong and where
 * (file, JSON path, value, expected unit).
 */
export class UserError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UserError';
  }
}

/** A write refused because the disk is full (ENOSPC): a run that meets it stops and removes what it wrote. */
export class DiskFullError extends UserError {
  constructor(path: string) {
    super(`${path}: cannot write, the disk is full`);
    this.name = 'DiskFullError';
  }
}

/** Throws a UserError unless `value` is a finite number above zero (at least zero with `allowZero`). */
export function requirePositive(value: number, where: string, unit: string, allowZero = false): void {
  const ok = Number.isFinite(value) && (allowZero ? value >= 0 : value > 0);
  if (!ok) {
    throw new UserError(`${where}: expected ${allowZero ? 'zero or more' : 'a value above zero'} in ${unit}, got ${value}`);
  }
}
