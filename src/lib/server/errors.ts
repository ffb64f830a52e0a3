/**
 * Domain errors: what the server's modules throw when a request cannot be carried out. They
 * say what is wrong in words a person can act on and know nothing of HTTP; the edge maps them
 * to RFC 9457 problems in one place (`domainErrorView` in http/problem.ts) and pages show the
 * same view (`pageErrorOf`), each field's message beside its field.
 */
export interface FieldIssue {
  /** Dotted path of the field at fault, e.g. `gate.widthMm`; `''` for the input as a whole. */
  field: string;
  message: string;
}

export type DomainErrorKind =
  | 'not_found'
  | 'conflict'
  | 'invalid_input'
  | 'invalid_query'
  | 'forbidden'
  | 'sign_in_required'
  | 'gone'
  | 'too_large'
  | 'unsupported_type'
  | 'rate_limited'
  | 'corrupt_record';

export abstract class DomainError extends Error {
  abstract readonly kind: DomainErrorKind;
  /** Extra facts for the caller (e.g. the current state after a conflict); shown to the client. */
  readonly details: Record<string, unknown>;
  /** The fields at fault, each with its message (empty when the fault is not in one field). */
  readonly errors: FieldIssue[];
  constructor(message: string, details: Record<string, unknown> = {}, errors: FieldIssue[] = []) {
    super(message);
    this.name = new.target.name;
    this.details = details;
    this.errors = errors;
  }
}

/**
 * The thing does not exist for this viewer (another organisation's rows included). Give what
 * it is (`'That assessment'` → "That assessment was not found.") or the whole sentence.
 */
export class NotFoundError extends DomainError {
  readonly kind = 'not_found' as const;
  constructor(what: string | { message: string } = 'That record', details: Record<string, unknown> = {}) {
    super(typeof what === 'string' ? `${what} was not found.` : what.message, details);
  }
}

/**
 * The thing exists but its state does not allow this (already signed, changed meanwhile, an
 * address another account holds…); `errors` names the field when one is the cause.
 */
export class ConflictError extends DomainError {
  readonly kind = 'conflict' as const;
}

/** The input is wrong, field by field. */
export class InvalidInputError extends DomainError {
  readonly kind = 'invalid_input' as const;
  constructor(message: string, errors: FieldIssue[], details: Record<string, unknown> = {}) {
    super(message, details, errors);
  }
  static field(field: string, message: string): InvalidInputError {
    return new InvalidInputError('Some fields are missing or invalid.', [{ field, message }]);
  }
}

/** What was asked for (a list's filter, a page cursor) is wrong, parameter by parameter. */
export class InvalidQueryError extends DomainError {
  readonly kind = 'invalid_query' as const;
  constructor(message: string, errors: FieldIssue[]) {
    super(message, {}, errors);
  }
}

/** The viewer may see the thing but not do this to it. */
export class ForbiddenError extends DomainError {
  readonly kind = 'forbidden' as const;
}

/** Nobody (or nobody any more: an account switched off meanwhile) is signed in for this. */
export class SignInRequiredError extends DomainError {
  readonly kind = 'sign_in_required' as const;
}

/** The thing existed and is over for good (an expired or replaced link); a new one is needed. */
export class GoneError extends DomainError {
  readonly kind = 'gone' as const;
}

/** What was sent is larger than this kind of thing may be. */
export class TooLargeError extends DomainError {
  readonly kind = 'too_large' as const;
  constructor(message: string, errors: FieldIssue[] = [], details: Record<string, unknown> = {}) {
    super(message, details, errors);
  }
}

/** What was sent is not a kind of file this accepts (checked from its bytes). */
export class UnsupportedTypeError extends DomainError {
  readonly kind = 'unsupported_type' as const;
  constructor(message: string, errors: FieldIssue[] = []) {
    super(message, {}, errors);
  }
}

/** Too many attempts: try again after `retryAfterSeconds` (never shown in the body). */
export class RateLimitedError extends DomainError {
  readonly kind = 'rate_limited' as const;
  constructor(
    message: string,
    readonly retryAfterSeconds: number,
  ) {
    super(message);
  }
}

/**
 * Something stored is not what it must be (a frozen record that does not parse). Never shown
 * as a default: the request fails and the reason is logged for whoever keeps the server.
 */
export class CorruptRecordError extends DomainError {
  readonly kind = 'corrupt_record' as const;
  constructor(
    message: string,
    /** For the log only: never sent to the client. */
    readonly reason: string,
  ) {
    super(message);
  }
}
