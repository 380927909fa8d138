/** Why the leveling engine refused its input. */
export type LevelingErrorCode =
  | 'not-finite'
  | 'too-few-screws'
  | 'collinear-screws'
  | 'duplicate-screw'
  | 'unknown-screw'
  | 'bad-pitch'
  | 'bad-sensitivity'
  | 'bad-diameter'
  | 'bad-tolerance'
  | 'empty-travel';

/** The one error the leveling engine throws on bad input; `code` is stable, `message` names the value. */
export class LevelingError extends Error {
  readonly code: LevelingErrorCode;

  constructor(code: LevelingErrorCode, message: string) {
    super(message);
    this.name = 'LevelingError';
    this.code = code;
  }
}

/** Returns `value` when it is a finite number, otherwise throws `not-finite` naming `name`. */
export function requireFinite(name: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new LevelingError('not-finite', `${name} must be a finite number, got ${String(value)}`);
  }
  return value;
}

/** Returns `value` when it is finite and above zero, otherwise throws with `code`. */
export function requirePositive(name: string, value: number, code: LevelingErrorCode): number {
  requireFinite(name, value);
  if (value <= 0) throw new LevelingError(code, `${name} must be greater than zero, got ${value}`);
  return value;
}
