/** Edits the server refused (with its reason), so the auditor can redo them; dismissable. */
import type { RefusedEdit } from '@/lib/walk/sync';

export function RefusedNotices({
  refused,
  onDismiss,
}: {
  refused: RefusedEdit[];
  onDismiss(id: number): void;
}) {
  if (!refused.length) return null;
  return (
    <div role="alert" className="grid gap-2">
      {refused.map((r) => (
        <div
          key={r.id}
          className="flex items-start justify-between gap-3 rounded-lg border border-withdraw bg-white p-3"
        >
          <p className="text-iron-900">
            <span className="font-semibold text-withdraw">Not saved: {r.what}. </span>
            {r.message}
          </p>
          <button type="button" className="btn-secondary shrink-0" onClick={() => onDismiss(r.id)}>
            Dismiss
          </button>
        </div>
      ))}
    </div>
  );
}
