/**
 * What the client, site and gate forms share: a labelled field with its error, a JSON submit
 * to /api that maps the server's per-field problems back onto the form, and a resolver that
 * drops empty optional fields before the API's own zod schema checks the body.
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useId, type InputHTMLAttributes, type ReactNode } from 'react';
import type { FieldValues, Path, Resolver, UseFormRegisterReturn, UseFormSetError } from 'react-hook-form';
import type { z } from 'zod';
import { send } from '@/lib/api/client';
import { problemMessage } from '@/lib/api/problem';
import { createKey } from '@/lib/create-key';

/** Empty strings and NaN become "not given", so optional fields stay optional. */
export function withoutBlanks(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(withoutBlanks);
  if (value && typeof value === 'object') {
    const out: Record<string, unknown> = {};
    for (const [key, inner] of Object.entries(value)) {
      const cleaned = withoutBlanks(inner);
      if (cleaned === undefined) continue;
      if (
        cleaned &&
        typeof cleaned === 'object' &&
        !Array.isArray(cleaned) &&
        Object.keys(cleaned).length === 0
      )
        continue;
      out[key] = cleaned;
    }
    return out;
  }
  if (value === '' || (typeof value === 'number' && Number.isNaN(value))) return undefined;
  return value;
}

/** The API's schema as a react-hook-form resolver, checking the body the form will send. */
export function apiResolver<T extends FieldValues>(
  schema: z.ZodType,
  shape: (values: T) => unknown = withoutBlanks as (v: T) => unknown,
): Resolver<T> {
  const inner = zodResolver(schema as never, undefined, { raw: true }) as unknown as Resolver<FieldValues>;
  const resolver = async (values: T, context: unknown, options: unknown) => {
    const result = await inner(shape(values) as FieldValues, context, options as never);
    return result.errors && Object.keys(result.errors).length
      ? { values: {}, errors: result.errors }
      : { values, errors: {} };
  };
  return resolver as unknown as Resolver<T>;
}

export interface SendResult<T> {
  ok: boolean;
  body: T | null;
  message: string | null;
}

/** Sends JSON (a POST with an Idempotency-Key); a 422 puts each field's message on the form (and returns ok: false). */
export async function sendJson<T, F extends FieldValues>(
  method: string,
  url: string,
  body: unknown,
  setError: UseFormSetError<F>,
): Promise<SendResult<T>> {
  const create = method === 'POST' ? createKey(url, JSON.stringify(body)) : null;
  const answer = await send<T>(method, url, {
    body,
    headers: create ? { 'idempotency-key': create.key } : {},
  });
  if (answer.ok) {
    create?.done();
    return { ok: true, body: answer.value, message: null };
  }
  for (const error of answer.problem.errors) {
    if (error.field) setError(error.field as Path<F>, { type: 'server', message: error.message });
  }
  return { ok: false, body: null, message: problemMessage(answer.problem) };
}

interface FieldProps {
  label: string;
  error?: string | undefined;
  hint?: string;
  children: (id: string, describedBy: string | undefined) => ReactNode;
  className?: string;
}

export function Field({ label, error, hint, children, className }: FieldProps) {
  const id = useId();
  const describedBy =
    [hint ? `${id}-hint` : '', error ? `${id}-error` : ''].filter(Boolean).join(' ') || undefined;
  return (
    <div className={className}>
      <label htmlFor={id} className="label">
        {label}
      </label>
      {children(id, describedBy)}
      {hint && (
        <p id={`${id}-hint`} className="mt-1 text-sm text-iron-600">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1 text-sm font-semibold text-withdraw">
          {error}
        </p>
      )}
    </div>
  );
}

type LabelledProps = Omit<FieldProps, 'children'> & { registration: UseFormRegisterReturn };

/**
 * A labelled input registered with the form (`register('city')`): text by default, any other
 * type through `input`; `input.className` adds to the shared `field` look.
 */
export function InputField({
  registration,
  input = {},
  ...field
}: LabelledProps & { input?: InputHTMLAttributes<HTMLInputElement> }) {
  const { className, ...attributes } = input;
  return (
    <Field {...field}>
      {(id, describedBy) => (
        <input
          id={id}
          aria-describedby={describedBy}
          className={className ? `field ${className}` : 'field'}
          autoComplete="off"
          {...attributes}
          {...registration}
        />
      )}
    </Field>
  );
}

/** A labelled select registered with the form, offering `options` in order. */
export function SelectField({
  registration,
  options,
  ...field
}: LabelledProps & { options: readonly { value: string; label: string }[] }) {
  return (
    <Field {...field}>
      {(id, describedBy) => (
        <select id={id} aria-describedby={describedBy} className="field" {...registration}>
          {options.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      )}
    </Field>
  );
}

export function FormMessage({ message }: { message: string | null }) {
  if (!message) return null;
  return (
    <p role="alert" className="rounded-md bg-withdraw/10 px-3 py-2 font-semibold text-withdraw">
      {message}
    </p>
  );
}
