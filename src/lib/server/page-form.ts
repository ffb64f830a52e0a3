/**
 * What a server-rendered form shows after a refused post: a summary at the top (each line a
 * link to its field) and each field's message beside it, both from the one view of the error
 * (`pageErrorOf` in http/problem.ts). Field messages are phrases ("is not right"); a field's
 * label starts the sentence ("Current password is not right.").
 */
import type { DomainErrorView } from './http/problem';

export interface FormField {
  /** The id of the input the message belongs beside (the summary links to it). */
  id: string;
  /** What the sentence starts with, e.g. `Current password`. */
  label: string;
}

export interface FormErrors {
  /** Answered with the page. */
  status: number;
  /** The heading of the summary. */
  message: string;
  /** Summary lines, in the order of `fields`, then any message for no known field. */
  items: Array<{ text: string; target: string | null }>;
  /** The sentence to show beside each field at fault, by field name. */
  byField: Record<string, string>;
}

function sentence(label: string, message: string): string {
  return `${label} ${message.trim().replace(/\.$/, '')}.`;
}

/**
 * Turns an error view (or a page's own field errors) into what the form shows. A message for a
 * field the form does not have (or for the input as a whole) is a summary line without a link.
 */
export function formErrors(
  view: Pick<DomainErrorView, 'status' | 'message' | 'errors'>,
  fields: Record<string, FormField>,
  /** The summary's heading when the lines below name fields (what was not done), instead of the error's message. */
  heading?: string,
): FormErrors {
  const byField: Record<string, string> = {};
  const loose: string[] = [];
  for (const e of view.errors) {
    const field = fields[e.field];
    if (!field) loose.push(e.message);
    else byField[e.field] ??= sentence(field.label, e.message);
  }
  const items = [
    ...Object.entries(fields)
      .filter(([name]) => byField[name])
      .map(([name, f]) => ({ text: byField[name]!, target: f.id })),
    ...loose
      .filter((m) => m !== view.message)
      .map((m) => ({ text: /[.!?]$/.test(m) ? m : `${m}.`, target: null })),
  ];
  const message = heading && items.some((item) => item.target) ? heading : view.message;
  return { status: view.status, message, items, byField };
}

/** No errors: what a form shows before anything was posted. */
export const noFormErrors: FormErrors = { status: 200, message: '', items: [], byField: {} };

/**
 * The input's accessibility attributes: `aria-invalid` when its field is at fault and
 * `aria-describedby` naming its message (`<id>-error`, see FieldMessage.astro) and its hint.
 */
export function fieldAria(
  errors: FormErrors,
  name: string,
  id: string,
  hintId?: string,
): { 'aria-invalid': 'true' | undefined; 'aria-describedby': string | undefined } {
  const faulty = Boolean(errors.byField[name]);
  const describedBy = [faulty ? `${id}-error` : '', hintId ?? ''].filter(Boolean).join(' ');
  return { 'aria-invalid': faulty ? 'true' : undefined, 'aria-describedby': describedBy || undefined };
}
