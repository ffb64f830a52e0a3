/**
 * The device's edit queue: its copy of unsent work, in IndexedDB (through `idb`): every edit the walk-through
 * makes is written here first and only removed once the server has taken it, so a dropped
 * signal, a closed tab or a reload while offline loses nothing. Edits are kept in the order
 * they were made and sent in that order.
 */
import { openDB, type DBSchema, type IDBPDatabase } from 'idb';
import type { JsonObject } from './merge-patch';

/** An edit of the draft (answers, measurements, observations), as a JSON merge patch. */
export interface PatchOp {
  kind: 'patch';
  patch: JsonObject;
}

/** A photo taken or picked for one item; its bytes wait in the `blobs` store. */
export interface PhotoOp {
  kind: 'photo';
  clientRef: string;
  itemKey: string;
  fileName: string;
  /** When the photo was taken: the camera's EXIF time read on the device, else the file's time. */
  takenAt: string | null;
  /** The camera file's SHA-256, size and EXIF orientation, when the queued bytes are a reduced copy of it. */
  source?: PhotoSource | null;
}

export interface PhotoSource {
  sha256: string;
  bytes: number;
  orientation: number | null;
}

/** A force-meter CSV for one measuring point. */
export interface TraceOp {
  kind: 'trace';
  clientRef: string;
  itemKey: string;
  fileName: string;
  csv: string;
  location: string;
  direction: 'closing' | 'opening';
  gapMm: number;
}

/** Removes an uploaded photo or trace (by server id) or one still waiting (by its device ref). */
export interface RemoveOp {
  kind: 'removePhoto' | 'removeTrace';
  clientRef: string;
  serverId: string | null;
}

export type QueuedEditBody = PatchOp | PhotoOp | TraceOp | RemoveOp;
export type QueuedEdit = QueuedEditBody & { seq: number; assessmentId: string; createdAt: string };

/** The last state the server confirmed: the base that queued edits apply to and conflicts are judged against. */
export interface ServerSnapshot {
  assessmentId: string;
  rowVersion: number;
  /** The draft as the server confirmed it (stored under this name on devices: keep it). */
  documents: JsonObject;
  savedAt: string;
}

interface WalkDb extends DBSchema {
  ops: { key: number; value: QueuedEdit; indexes: { byAssessment: string } };
  blobs: { key: string; value: { clientRef: string; assessmentId: string; blob: Blob } };
  snapshots: { key: string; value: ServerSnapshot };
}

const DB_NAME = 'latchwell-walk';
const DB_VERSION = 1;

let opening: Promise<IDBPDatabase<WalkDb>> | undefined;

function database(): Promise<IDBPDatabase<WalkDb>> {
  opening ??= openDB<WalkDb>(DB_NAME, DB_VERSION, {
    upgrade(db) {
      const ops = db.createObjectStore('ops', { keyPath: 'seq', autoIncrement: true });
      ops.createIndex('byAssessment', 'assessmentId');
      db.createObjectStore('blobs', { keyPath: 'clientRef' });
      db.createObjectStore('snapshots', { keyPath: 'assessmentId' });
    },
  });
  return opening;
}

/** Appends an edit; a photo's bytes are stored in the same transaction, so neither exists without the other. */
export async function enqueue(assessmentId: string, body: QueuedEditBody, blob?: Blob): Promise<QueuedEdit> {
  const db = await database();
  const tx = db.transaction(['ops', 'blobs'], 'readwrite');
  const op = { ...body, assessmentId, createdAt: new Date().toISOString() } as Omit<QueuedEdit, 'seq'>;
  const seq = await tx.objectStore('ops').add(op as QueuedEdit);
  if (blob && body.kind === 'photo')
    await tx.objectStore('blobs').put({ clientRef: body.clientRef, assessmentId, blob });
  await tx.done;
  return { ...op, seq } as QueuedEdit;
}

/** Replaces a queued edit in place (used to fold a quick run of keystrokes into one edit). */
export async function replaceOp(op: QueuedEdit): Promise<void> {
  const db = await database();
  await db.put('ops', op);
}

/** The assessment's waiting edits, oldest first. */
export async function pendingOps(assessmentId: string): Promise<QueuedEdit[]> {
  const db = await database();
  const ops = await db.getAllFromIndex('ops', 'byAssessment', assessmentId);
  return ops.sort((a, b) => a.seq - b.seq);
}

/** Drops edits the server has taken, and any photo bytes they carried. */
export async function removeOps(ops: readonly QueuedEdit[]): Promise<void> {
  const db = await database();
  const tx = db.transaction(['ops', 'blobs'], 'readwrite');
  for (const op of ops) {
    await tx.objectStore('ops').delete(op.seq);
    if (op.kind === 'photo') await tx.objectStore('blobs').delete(op.clientRef);
  }
  await tx.done;
}

export async function photoBlob(clientRef: string): Promise<Blob | null> {
  const db = await database();
  return (await db.get('blobs', clientRef))?.blob ?? null;
}

export async function loadSnapshot(assessmentId: string): Promise<ServerSnapshot | null> {
  const db = await database();
  return (await db.get('snapshots', assessmentId)) ?? null;
}

export async function saveSnapshot(snapshot: ServerSnapshot): Promise<void> {
  const db = await database();
  await db.put('snapshots', snapshot);
}
