/**
 * Force traces of an assessment: the CSV a force meter exported, kept as uploaded (storage,
 * by SHA-256), its samples and the force-trace calculator's judgement (`force_traces`). A file
 * the calculator cannot use is refused with its own message, naming the line at fault.
 */
import type { Knex } from 'knex';
import {
  evaluateForceTrace,
  ForceTraceError,
  parseForceTraceCsv,
  type ForceTraceResult,
} from '@/lib/rules/calculators/force-trace';
import type { TraceLocation, TraceRecord } from '@/lib/api/uploads';
import { assertEditable, getAssessment } from './assessments';
import { db } from './db';
import { InvalidInputError, NotFoundError } from './errors';
import { iso, pgErrorCode } from './listing';
import type { SessionUser } from './session-user';
import { storage } from './storage';

const UNIQUE_VIOLATION = '23505';

interface TraceRow {
  id: string;
  assessment_id: string;
  client_ref: string | null;
  item_key: string;
  label: string | null;
  location: TraceLocation;
  direction: 'closing' | 'opening';
  gap_mm: number;
  samples: [number, number][];
  evaluation: ForceTraceResult | null;
  created_at: Date;
}

const columns = [
  'id',
  'assessment_id',
  'client_ref',
  'item_key',
  'label',
  'location',
  'direction',
  'gap_mm',
  'samples',
  'evaluation',
  'created_at',
];

function toRecord(row: TraceRow): TraceRecord {
  return {
    id: row.id,
    clientRef: row.client_ref,
    itemKey: row.item_key,
    label: row.label,
    location: row.location,
    direction: row.direction,
    gapMm: Number(row.gap_mm),
    samples: row.samples,
    evaluation: row.evaluation,
    createdAt: iso(row.created_at),
  };
}

async function visibleAssessment(viewer: SessionUser, assessmentId: string) {
  const assessment = await getAssessment(viewer, assessmentId);
  if (!assessment) throw new NotFoundError('That assessment');
  return assessment;
}

export async function listTraces(
  viewer: SessionUser,
  assessmentId: string,
  knex: Knex = db(),
): Promise<TraceRecord[]> {
  await visibleAssessment(viewer, assessmentId);
  const rows = await knex('force_traces')
    .where({ assessment_id: assessmentId, organisation_id: viewer.organisationId })
    .orderBy('created_at')
    .select<TraceRow[]>(columns);
  return rows.map(toRecord);
}

export interface NewTrace {
  clientRef: string | null;
  itemKey: string;
  fileName: string | null;
  location: TraceLocation;
  direction: 'closing' | 'opening';
  gapMm: number;
  csv: string;
}

/** Parses and judges a force-meter CSV; the problem names the line (CSV) or the reason (trace). */
export function judgeTrace(
  csv: string,
  gateKind: Parameters<typeof evaluateForceTrace>[1]['gateKind'],
  gapMm: number,
) {
  try {
    const samples = parseForceTraceCsv(csv);
    return { samples, evaluation: evaluateForceTrace(samples, { gateKind, gapMm }) };
  } catch (error) {
    if (!(error instanceof ForceTraceError)) throw error;
    throw new InvalidInputError(
      error.message,
      [{ field: error.line ? `csv.line${error.line}` : 'csv', message: error.message }],
      { code: error.code, line: error.line },
    );
  }
}

/** Stores a trace for a draft the viewer may edit; `created` is false when the device had already sent it. */
export async function addTrace(
  viewer: SessionUser,
  assessmentId: string,
  trace: NewTrace,
): Promise<{ trace: TraceRecord; created: boolean }> {
  const assessment = await visibleAssessment(viewer, assessmentId);
  assertEditable(viewer, assessment, undefined);
  const knex = db();
  const existing = () =>
    knex('force_traces')
      .where({ assessment_id: assessmentId, client_ref: trace.clientRef })
      .first<TraceRow | undefined>(columns);
  if (trace.clientRef) {
    const again = await existing();
    if (again) return { trace: toRecord(again), created: false };
  }
  const { samples, evaluation } = judgeTrace(
    trace.csv,
    assessment.gate.kind as Parameters<typeof judgeTrace>[1],
    trace.gapMm,
  );
  const stored = await storage().put(Buffer.from(trace.csv, 'utf8'), 'text/csv');
  try {
    const [row] = await knex('force_traces')
      .insert({
        organisation_id: viewer.organisationId,
        assessment_id: assessmentId,
        item_key: trace.itemKey,
        label: trace.fileName,
        original_filename: trace.fileName,
        client_ref: trace.clientRef,
        location: trace.location,
        direction: trace.direction,
        gap_mm: trace.gapMm,
        csv_sha256: stored.key,
        samples: JSON.stringify(samples.map((s) => [s.t, s.f])),
        evaluation: JSON.stringify(evaluation),
        uploaded_by: viewer.id,
      })
      .returning<TraceRow[]>(columns);
    return { trace: toRecord(row as TraceRow), created: true };
  } catch (error) {
    if (pgErrorCode(error) !== UNIQUE_VIOLATION || !trace.clientRef) throw error;
    return { trace: toRecord((await existing()) as TraceRow), created: false };
  }
}

export async function removeTrace(
  viewer: SessionUser,
  assessmentId: string,
  traceId: string,
): Promise<boolean> {
  const assessment = await visibleAssessment(viewer, assessmentId);
  assertEditable(viewer, assessment, undefined);
  const deleted = await db()('force_traces')
    .where({ id: traceId, assessment_id: assessmentId, organisation_id: viewer.organisationId })
    .delete();
  return deleted > 0;
}
