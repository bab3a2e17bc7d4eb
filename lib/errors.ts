/*
 * Domain errors: the only errors whose messages reach users. Anything else is logged and shown
 * as a generic message with a reference (lib/define-action.ts).
 */

export class DomainError extends Error {
  constructor(message: string) {
    super(message);
    this.name = new.target.name;
  }
}

export class NotFoundError extends DomainError {
  constructor(what = 'The record') {
    super(`${what} was not found, or you do not have access to it.`);
  }
}

export class ForbiddenError extends DomainError {}

export class UnauthenticatedError extends DomainError {
  constructor() {
    super('Your session has ended. Sign in again.');
  }
}

export class InvalidTransitionError extends DomainError {}

export class ConflictError extends DomainError {
  constructor(message = 'This record was changed by someone else since you opened it. Reload it and try again; nothing was overwritten.') {
    super(message);
  }
}

export class ValidationError extends DomainError {
  constructor(
    message: string,
    readonly fieldErrors: Record<string, string[]> = {},
  ) {
    super(message);
  }
}

/** A service the command needs (object storage) did not answer; nothing was saved. Routes answer 503. */
export class ServiceUnavailableError extends DomainError {}

export function isDomainError(err: unknown): err is DomainError {
  return err instanceof DomainError;
}

/** A refusal of one field's value, said beside that field (422). */
export function fieldError(field: string, message: string): ValidationError {
  return new ValidationError(message, { [field]: [message] });
}

/** Refuses, beside the field, a change that would leave the value as it is (nothing to record). */
export function assertChanged<T>(field: string, current: T, next: T, message: string): void {
  if (current === next) throw fieldError(field, message);
}
