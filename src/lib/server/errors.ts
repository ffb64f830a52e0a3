/**
 * Domain errors: what the server's modules throw when a request cannot be carried out. They
 * say what is wrong in words a person can act on and know nothing of HTTP; the edge maps them
 * to RFC 9457 problems in one place (http/domain-problem.ts) and pages to their own messages.
 */
export interface FieldIssue {
  /** Dotted path of the field at fault, e.g. `gate.widthMm`; `''` for the input as a whole. */
  field: string;
  message: string;
}

export abstract class DomainError extends Error {
  abstract readonly kind: 'not_found' | 'conflict' | 'invalid_input' | 'forbidden' | 'corrupt_record';
  /** Extra facts for the caller (e.g. the current state after a conflict); shown to the client. */
  readonly details: Record<string, unknown>;
  constructor(message: string, details: Record<string, unknown> = {}) {
    super(message);
    this.name = new.target.name;
    this.details = details;
  }
}

/** The thing does not exist for this viewer (another organisation's rows included). */
export class NotFoundError extends DomainError {
  readonly kind = 'not_found' as const;
  constructor(what = 'That record') {
    super(`${what} was not found.`);
  }
}

/** The thing exists but its state does not allow this (already signed, changed meanwhile…). */
export class ConflictError extends DomainError {
  readonly kind = 'conflict' as const;
}

/** The input is wrong, field by field. */
export class InvalidInputError extends DomainError {
  readonly kind = 'invalid_input' as const;
  constructor(
    message: string,
    readonly errors: FieldIssue[],
    details: Record<string, unknown> = {},
  ) {
    super(message, details);
  }
  static field(field: string, message: string): InvalidInputError {
    return new InvalidInputError('Some fields are missing or invalid.', [{ field, message }]);
  }
}

/** The viewer may see the thing but not do this to it. */
export class ForbiddenError extends DomainError {
  readonly kind = 'forbidden' as const;
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
