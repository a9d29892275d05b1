/** Base of the errors stemwise raises on purpose: a stable code and a message for people. */
export class StemwiseError extends Error {
  constructor(
    readonly code: string,
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = new.target.name;
  }
}

/** A configuration value is missing or malformed; `setting` names the environment variable. */
export class ConfigError extends StemwiseError {
  constructor(
    readonly setting: string,
    message: string,
  ) {
    super('config_invalid', `${setting}: ${message}`);
  }
}

/** A service the command needs (PostgreSQL, Redis) does not answer; `setting` names where it is configured. */
export class ServiceUnavailableError extends StemwiseError {
  constructor(
    readonly setting: string,
    message: string,
    options?: { cause?: unknown },
  ) {
    super('service_unavailable', `${setting}: ${message}`, options);
  }
}

/** Input that will never succeed however often it is retried (a job sends it to the failed state at once). */
export class PermanentError extends StemwiseError {}

/** Turns anything thrown into an Error, keeping the original as `cause`. */
export function toError(value: unknown): Error {
  if (value instanceof Error) return value;
  return new Error(typeof value === 'string' ? value : JSON.stringify(value), { cause: value });
}

/** One line for a person: the message of a StemwiseError, or the first line of any other error. */
export function oneLine(value: unknown): string {
  const err = toError(value);
  const first = (err.message || err.name).split('\n')[0];
  return err instanceof StemwiseError ? first : `${err.name}: ${first}`;
}

/**
 * An error of the machinery rather than of the data: a PostgreSQL error (a five-character SQLSTATE
 * code) or a system error (ECONNRESET …). A job retries these; a computation error (anything else) is
 * recorded against the one plot, forest type or region it concerns, and the others go on.
 */
export function isInfrastructureError(err: unknown): boolean {
  const code = err && typeof err === 'object' && 'code' in err ? (err as { code: unknown }).code : undefined;
  return (typeof code === 'string' && (/^[0-9A-Z]{5}$/.test(code) || /^E[A-Z_]+$/.test(code))) || err instanceof ServiceUnavailableError;
}
