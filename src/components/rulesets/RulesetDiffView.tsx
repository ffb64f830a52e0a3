/**
 * What changed between two ruleset versions, rule by rule and field by field (old → new).
 * Rendered on the server for the diff page and inside the amendment editor; no state of its own.
 */
import { fieldWords, plainValue } from '@/lib/vocabulary';
import type { FieldChange, ItemsDiff, RulesetDiff } from '@/lib/rules/diff';

interface Props {
  diff: RulesetDiff;
  /** Units of each rule's params (`paramUnits[ruleId][param]`), so thresholds read "406.4 mm → 300 mm". */
  paramUnits?: Record<string, Record<string, string | undefined>>;
  /** Links for rule ids, e.g. to the readable page of the newer version. */
  ruleHref?: string;
}

function Value({ value, unit, field }: { value: unknown; unit?: string; field: string }) {
  const text = plainValue(value, unit, field);
  if (text.length <= 140) return <span className="wrap-anywhere">{text}</span>;
  return (
    <details>
      <summary className="cursor-pointer wrap-anywhere">{text.slice(0, 100)}…</summary>
      <code className="block text-xs break-all whitespace-pre-wrap">{text}</code>
    </details>
  );
}

function Changes({ changes, units }: { changes: FieldChange[]; units?: Record<string, string | undefined> }) {
  return (
    <ul className="mt-2 grid gap-2 text-sm">
      {changes.map((c) => {
        const unit = c.field.startsWith('params.') && c.field.split('.').length === 2 ? units?.[c.field.slice('params.'.length)] : undefined;
        return (
          <li key={c.field} className="rounded-lg bg-iron-50 p-2">
            <span className="text-xs font-semibold text-iron-800">{fieldWords(c.field)}</span>
            <div className="mt-1 grid min-w-0 gap-1 sm:grid-cols-[auto_1fr]">
              <span className="text-xs font-semibold text-withdraw">was</span>
              <del className="decoration-withdraw">
                <Value value={c.from} unit={unit} field={c.field} />
              </del>
              <span className="text-xs font-semibold text-clear">now</span>
              <ins className="no-underline">
                <Value value={c.to} unit={unit} field={c.field} />
              </ins>
            </div>
          </li>
        );
      })}
    </ul>
  );
}

function Items({ title, items, paramUnits, href }: { title: string; items: ItemsDiff; paramUnits?: Props['paramUnits']; href?: (id: string) => string | undefined }) {
  const empty = items.added.length + items.removed.length + items.changed.length === 0;
  const link = (id: string, text: string) => {
    const target = href?.(id);
    return target ? <a href={target}>{text}</a> : <span>{text}</span>;
  };
  return (
    <section className="mt-4">
      <h3 className="text-lg font-bold">{title}</h3>
      {empty && <p className="text-sm text-iron-600">No changes.</p>}
      {items.added.length > 0 && (
        <div className="mt-2">
          <h4 className="font-semibold text-clear">Added ({items.added.length})</h4>
          <ul className="mt-1 grid gap-1">
            {items.added.map((a) => (
              <li key={a.id} className="card py-2">
                {link(a.id, a.title)}
              </li>
            ))}
          </ul>
        </div>
      )}
      {items.removed.length > 0 && (
        <div className="mt-2">
          <h4 className="font-semibold text-withdraw">Removed ({items.removed.length})</h4>
          <ul className="mt-1 grid gap-1">
            {items.removed.map((r) => (
              <li key={r.id} className="card py-2">
                <del>{r.title}</del>
              </li>
            ))}
          </ul>
        </div>
      )}
      {items.changed.length > 0 && (
        <div className="mt-2">
          <h4 className="font-semibold text-remedy">Changed ({items.changed.length})</h4>
          <ul className="mt-1 grid gap-2">
            {items.changed.map((c) => (
              <li key={c.id} className="card">
                {link(c.id, c.title)}
                <Changes changes={c.changes} units={paramUnits?.[c.id]} />
              </li>
            ))}
          </ul>
        </div>
      )}
    </section>
  );
}

export default function RulesetDiffView({ diff, paramUnits, ruleHref }: Props) {
  const count = (d: ItemsDiff) => d.added.length + d.removed.length + d.changed.length;
  const total = count(diff.rules) + count(diff.questions) + diff.version.length;
  return (
    <div className="min-w-0">
      <p className="text-sm text-iron-600">
        {total === 0
          ? 'No differences.'
          : `Rules: ${diff.rules.added.length} added, ${diff.rules.removed.length} removed, ${diff.rules.changed.length} changed. Questions: ${diff.questions.added.length} added, ${diff.questions.removed.length} removed, ${diff.questions.changed.length} changed.`}
      </p>
      {diff.version.length > 0 && (
        <section className="mt-4">
          <h3 className="text-lg font-bold">About the version</h3>
          <div className="card mt-2">
            <Changes changes={diff.version} />
          </div>
        </section>
      )}
      <Items title="Rules" items={diff.rules} paramUnits={paramUnits} href={ruleHref ? (id) => `${ruleHref}#rule-${id}` : undefined} />
      <Items title="Questions" items={diff.questions} href={ruleHref ? (id) => `${ruleHref}#question-${id}` : undefined} />
    </div>
  );
}

/** `paramUnits` for a version's rules. */
export function paramUnitsOf(rules: readonly { id: string; params: Record<string, object> }[]): Record<string, Record<string, string | undefined>> {
  const unitOf = (p: object) => ('unit' in p && typeof p.unit === 'string' ? p.unit : undefined);
  return Object.fromEntries(rules.map((r) => [r.id, Object.fromEntries(Object.entries(r.params).map(([k, p]) => [k, unitOf(p)]))]));
}
