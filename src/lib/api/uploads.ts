/**
 * Photo and force-trace uploads in the API's contract: the records the API returns, the fields
 * that travel with an upload, and the limits the device checks before sending (the server
 * checks them again). Types and constants only: shared by the island and the server without
 * pulling either's code into the other.
 */

/** The largest photo accepted. Phone cameras write 2–8 MB; 15 MB leaves room for 48 MP shots. */
export const MAX_PHOTO_BYTES = 15 * 1024 * 1024;
/** The largest force-meter CSV accepted: 10 s at 1 kHz is about 200 kB. */
export const MAX_TRACE_CSV_BYTES = 2 * 1024 * 1024;

/** Longest side, px, of the copy the phone uploads (the report prints at most 1600 px). */
export const UPLOAD_LONG_SIDE_PX = 2048;
/** JPEG quality of that copy. */
export const UPLOAD_JPEG_QUALITY = 0.8;

export function megabytes(bytes: number): string {
  return `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
}

/** A photo as the server keeps it; URLs serve the thumbnail and display sizes. */
export interface PhotoRecord {
  id: string;
  clientRef: string | null;
  itemKey: string;
  caption: string | null;
  width: number;
  height: number;
  displayBytes: number;
  /** Size of the file the server received (the phone's reduced copy, or the camera's file). */
  originalBytes: number;
  /** SHA-256 and size of the camera's file before the phone reduced it. */
  sourceSha256: string;
  sourceBytes: number;
  takenAt: string | null;
  createdAt: string;
  thumbUrl: string;
  displayUrl: string;
}

export const TRACE_LOCATIONS = ['closing_edge', 'opening_edge', 'hinge_side', 'post_gap', 'other'] as const;
export type TraceLocation = (typeof TRACE_LOCATIONS)[number];

/** A force trace as the server keeps it: the samples (for the plot) and the calculator's judgement. */
export interface TraceRecord {
  id: string;
  clientRef: string | null;
  itemKey: string;
  label: string | null;
  location: TraceLocation;
  direction: 'closing' | 'opening';
  gapMm: number;
  /** [time s, force N] pairs as parsed. */
  samples: [number, number][];
  evaluation: unknown;
  createdAt: string;
}

// The fields that travel with an upload, checked the same way on the device and the server.

/** A question key (`hingeGapMm`) or a walk-through tool's item (`forceTest.closing_edge`, `site`). */
export const ITEM_KEY_PATTERN = /^[a-z][a-zA-Z0-9]{0,63}(?:\.[a-z][a-zA-Z0-9_]{0,63})?$/;
export const CLIENT_REF_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
