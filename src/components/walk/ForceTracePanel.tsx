/**
 * The force test: for each measuring point, the CSV the force meter exported is read on the
 * phone with the engine's own parser (a malformed file is refused at once, naming the line),
 * judged against the EN 12453 limits, plotted with its limits, and queued for upload. The
 * meter's figures go into the assessment's force tests, so the live result uses them.
 */
import { useId, useMemo, useState } from 'react';
import {
  evaluateForceTrace,
  ForceTraceError,
  HEADERLESS_TRACE_UNITS,
  parseForceTraceCsv,
  type ForceTraceResult,
} from '@/lib/rules/calculators/force-trace';
import type { GateKind } from '@/lib/rules/vocabulary';
import type { UnitSystem } from '@/lib/units';
import { formatLength, DIRECTION_LABEL, TRACE_LOCATION_LABEL } from '@/lib/vocabulary';
import { newClientRef, parseEntered, toMeasurement, unitsFor } from '@/lib/walk/entry';
import type { Json } from '@/lib/walk/merge-patch';
import type { QueuedEdit, TraceOp } from '@/lib/walk/edit-queue';
import {
  MAX_TRACE_CSV_BYTES,
  megabytes,
  TRACE_LOCATIONS,
  type TraceLocation,
  type TraceRecord,
} from '@/lib/api/uploads';
import { useWalkActions } from './context';
import { TraceChart } from './TraceChart';

interface Props {
  gateKind: GateKind;
  traces: readonly TraceRecord[];
  pending: readonly QueuedEdit[];
  needed: boolean;
}

interface ShownTrace {
  key: string;
  clientRef: string;
  serverId: string | null;
  label: string;
  location: TraceLocation;
  direction: 'closing' | 'opening';
  gapMm: number;
  samples: [number, number][];
  evaluation: ForceTraceResult | null;
  waiting: boolean;
}

/** The engine's force test for one trace: the figures the meter's trace gives (never negative noise). */
function toForceTest(trace: ShownTrace): Json | null {
  const e = trace.evaluation;
  if (!e) return null;
  return {
    location: trace.location,
    direction: trace.direction,
    gapMm: trace.gapMm,
    summary: {
      peakN: Math.max(0, e.peak),
      durationAbove150S: Math.max(0, e.durationAbove150),
      staticN: Math.max(0, e.staticForce),
      residualAt5sN: Math.max(0, e.residualAt5s),
    },
    note: `Trace ${trace.label}`.slice(0, 2000),
  };
}

function Row({ label, value, limit, pass }: { label: string; value: string; limit: string; pass: boolean }) {
  return (
    <tr className="border-t border-iron-100">
      <th scope="row" className="py-1.5 pr-2 text-left font-normal text-iron-700">
        {label}
      </th>
      <td className="py-1.5 pr-2 text-right font-semibold whitespace-nowrap tabular-nums">{value}</td>
      <td className="py-1.5 pr-2 text-right whitespace-nowrap text-iron-600 tabular-nums">{limit}</td>
      <td className={`py-1.5 text-right font-bold ${pass ? 'text-clear' : 'text-withdraw'}`}>
        {pass ? 'Pass' : 'Fail'}
      </td>
    </tr>
  );
}

function Evaluation({ e }: { e: ForceTraceResult }) {
  return (
    <div>
      <p
        className={`mb-2 inline-block rounded-md px-2 py-1 font-bold text-white ${e.overallPass ? 'bg-clear' : 'bg-withdraw'}`}
      >
        {e.overallPass ? 'Within the limits' : 'Over a limit'}
      </p>
      <table className="w-full text-sm">
        <thead>
          <tr className="text-xs text-iron-600">
            <th scope="col" className="text-left font-semibold">
              Measure
            </th>
            <th scope="col" className="text-right font-semibold">
              Found
            </th>
            <th scope="col" className="text-right font-semibold">
              Limit
            </th>
            <th scope="col" className="text-right font-semibold">
              <span className="sr-only">Outcome</span>
            </th>
          </tr>
        </thead>
        <tbody>
          <Row label="Peak force" value={`${e.peak} N`} limit={`${e.limits.peakN} N`} pass={e.pass.peak} />
          <Row
            label="Time above 150 N"
            value={`${e.durationAbove150} s`}
            limit={`${e.limits.maxDurationS} s`}
            pass={e.pass.durationAbove150}
          />
          <Row
            label="Static force"
            value={`${e.staticForce} N`}
            limit={`${e.limits.maxStaticN} N`}
            pass={e.pass.staticForce}
          />
          <Row
            label="Force 5 s after contact"
            value={`${e.residualAt5s} N`}
            limit={`${e.limits.maxResidualN} N`}
            pass={e.pass.residualAt5s}
          />
        </tbody>
      </table>
      <p className="mt-2 text-xs text-iron-600">
        {e.sampleCount} samples at {e.sampleRateHz} Hz; first contact at {e.firstContactAt} s.
      </p>
    </div>
  );
}

export default function ForceTracePanel({ gateKind, traces, pending, needed }: Props) {
  const { sync, units, editable } = useWalkActions();
  const [location, setLocation] = useState<TraceLocation>('closing_edge');
  const [direction, setDirection] = useState<'closing' | 'opening'>('closing');
  const lengthUnits = unitsFor('length', units);
  const [gapUnit, setGapUnit] = useState(lengthUnits[0] as string);
  const [gapText, setGapText] = useState('');
  const [error, setError] = useState<string | null>(null);
  const ids = { location: useId(), direction: useId(), gap: useId(), file: useId(), error: useId() };

  const shown: ShownTrace[] = useMemo(() => {
    const waiting = pending.filter((op): op is QueuedEdit & TraceOp => op.kind === 'trace');
    const local = waiting.map((op) => {
      let samples: [number, number][] = [];
      let evaluation: ForceTraceResult | null = null;
      try {
        const parsed = parseForceTraceCsv(op.csv);
        samples = parsed.map((s) => [s.t, s.f]);
        evaluation = evaluateForceTrace(parsed, { gateKind, gapMm: op.gapMm });
      } catch {
        // Checked before queueing; a file that no longer parses shows without a plot.
      }
      return {
        key: op.clientRef,
        clientRef: op.clientRef,
        serverId: null,
        label: op.fileName,
        location: op.location as TraceLocation,
        direction: op.direction,
        gapMm: op.gapMm,
        samples,
        evaluation,
        waiting: true,
      };
    });
    const uploaded = traces
      .filter((t) => !waiting.some((op) => op.clientRef === t.clientRef))
      .map((t) => ({
        key: t.id,
        clientRef: t.clientRef ?? t.id,
        serverId: t.id,
        label: t.label ?? 'trace',
        location: t.location,
        direction: t.direction,
        gapMm: t.gapMm,
        samples: t.samples,
        evaluation: t.evaluation as ForceTraceResult | null,
        waiting: false,
      }));
    return [...uploaded, ...local];
  }, [traces, pending, gateKind]);

  const saveForceTests = (list: ShownTrace[]) =>
    void sync.edit({
      observations: { forceTests: list.map(toForceTest).filter((t): t is Json => t !== null) },
    });

  const upload = async (file: File | undefined) => {
    if (!file) return;
    setError(null);
    const gap = parseEntered(gapText);
    if (gap === null || gap < 0) {
      setError('First enter the gap left at the measuring point.');
      return;
    }
    if (file.size > MAX_TRACE_CSV_BYTES) {
      setError(
        `This file is ${megabytes(file.size)}; the limit is ${megabytes(MAX_TRACE_CSV_BYTES)}. Export one measuring point per file.`,
      );
      return;
    }
    const gapMm = toMeasurement('length', gap, gapUnit).canonical;
    const csv = await file.text();
    let evaluation: ForceTraceResult;
    let samples: [number, number][];
    try {
      const parsed = parseForceTraceCsv(csv);
      samples = parsed.map((s) => [s.t, s.f]);
      evaluation = evaluateForceTrace(parsed, { gateKind, gapMm });
    } catch (e) {
      if (e instanceof ForceTraceError || e instanceof RangeError) {
        setError(`${file.name}: ${e.message}.`);
        return;
      }
      throw e;
    }
    const clientRef = newClientRef();
    const op: TraceOp = {
      kind: 'trace',
      clientRef,
      itemKey: `forceTest.${location}`,
      fileName: file.name.slice(0, 200),
      csv,
      location,
      direction,
      gapMm,
    };
    await sync.addTrace(op);
    saveForceTests([
      ...shown,
      {
        key: clientRef,
        clientRef,
        serverId: null,
        label: op.fileName,
        location,
        direction,
        gapMm,
        samples,
        evaluation,
        waiting: true,
      },
    ]);
  };

  const remove = (trace: ShownTrace) => {
    void sync.remove('removeTrace', trace.clientRef, trace.serverId);
    saveForceTests(shown.filter((t) => t.key !== trace.key));
  };

  return (
    <section
      id="item-force"
      tabIndex={-1}
      aria-labelledby="force-title"
      className={`card scroll-mt-32 border-l-4 ${needed ? 'border-l-brass-500' : 'border-l-iron-200'}`}
    >
      <h3 id="force-title" className="text-lg font-semibold text-iron-900">
        Force traces
      </h3>
      <p className="mt-1 text-sm text-iron-600">
        Upload the CSV your force meter exported at each measuring point (time and force; comma or semicolon;
        header optional). The trace is judged against the limits for the gap left at that point.
      </p>
      <p className="mt-1 text-sm text-iron-700" data-headerless-units>
        A file without a header is read as time in{' '}
        {HEADERLESS_TRACE_UNITS.time === 's' ? 'seconds' : 'milliseconds'} and force in{' '}
        {HEADERLESS_TRACE_UNITS.force === 'N' ? 'newtons (N)' : HEADERLESS_TRACE_UNITS.force}. If your meter
        records pounds-force or milliseconds, keep its header line (e.g. <code>time [ms];force [lbf]</code>).
      </p>
      {editable && (
        <div className="mt-3 grid gap-3 sm:grid-cols-3">
          <div>
            <label htmlFor={ids.location} className="label">
              Measuring point
            </label>
            <select
              id={ids.location}
              className="field"
              value={location}
              onChange={(e) => setLocation(e.target.value as TraceLocation)}
            >
              {TRACE_LOCATIONS.map((l) => (
                <option key={l} value={l}>
                  {TRACE_LOCATION_LABEL[l]}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor={ids.direction} className="label">
              Gate moving
            </label>
            <select
              id={ids.direction}
              className="field"
              value={direction}
              onChange={(e) => setDirection(e.target.value as 'closing' | 'opening')}
            >
              <option value="closing">{DIRECTION_LABEL.closing}</option>
              <option value="opening">{DIRECTION_LABEL.opening}</option>
            </select>
          </div>
          <div>
            <label htmlFor={ids.gap} className="label">
              Gap left at the point
            </label>
            <div className="flex gap-2">
              <input
                id={ids.gap}
                className="field"
                inputMode="decimal"
                value={gapText}
                onChange={(e) => setGapText(e.target.value)}
              />
              <select
                aria-label="Gap unit"
                className="field w-24"
                value={gapUnit}
                onChange={(e) => setGapUnit(e.target.value)}
              >
                {lengthUnits.map((u) => (
                  <option key={u} value={u}>
                    {u}
                  </option>
                ))}
              </select>
            </div>
          </div>
          <label className="btn sm:col-span-3 cursor-pointer focus-within:outline-3 focus-within:outline-offset-2 focus-within:outline-brass-500">
            Choose the meter’s CSV file
            <input
              id={ids.file}
              type="file"
              accept=".csv,.txt,text/csv,text/plain"
              className="sr-only"
              aria-describedby={error ? ids.error : undefined}
              onChange={(e) => {
                void upload(e.target.files?.[0]);
                e.target.value = '';
              }}
            />
          </label>
        </div>
      )}
      {error && (
        <p
          id={ids.error}
          role="alert"
          className="mt-3 rounded-md bg-withdraw/10 px-3 py-2 font-semibold text-withdraw"
        >
          {error}
        </p>
      )}
      <ul className="mt-4 grid gap-4">
        {shown.map((trace) => (
          <li key={trace.key} className="rounded-lg border border-iron-100 p-3">
            <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
              <h4 className="font-semibold text-iron-900">
                {TRACE_LOCATION_LABEL[trace.location]}, {DIRECTION_LABEL[trace.direction].toLowerCase()},{' '}
                {formatLength(trace.gapMm, units)} gap
                {trace.waiting && (
                  <span className="ml-2 rounded-full bg-brass-100 px-2 py-0.5 text-xs font-semibold text-iron-900">
                    waiting to upload
                  </span>
                )}
              </h4>
              {editable && (
                <button type="button" className="btn-secondary" onClick={() => remove(trace)}>
                  Remove
                </button>
              )}
            </div>
            <p className="mb-2 text-xs break-all text-iron-600">{trace.label}</p>
            {trace.evaluation ? (
              <div className="grid gap-4 lg:grid-cols-[3fr_2fr]">
                <TraceChart
                  samples={trace.samples}
                  evaluation={trace.evaluation}
                  label={`${TRACE_LOCATION_LABEL[trace.location]} trace`}
                />
                <Evaluation e={trace.evaluation} />
              </div>
            ) : (
              <p className="text-sm text-remedy">This trace could not be judged.</p>
            )}
          </li>
        ))}
      </ul>
    </section>
  );
}
