/**
 * The fields that travel with a photo or force-trace upload, checked the same way on the
 * device and the server: which walk-through item it belongs to and the device's own id for it.
 */

/** A question key (`hingeGapMm`) or a walk-through tool's item (`forceTest.closing_edge`, `site`). */
export const ITEM_KEY_PATTERN = /^[a-z][a-zA-Z0-9]{0,63}(?:\.[a-z][a-zA-Z0-9_]{0,63})?$/;
export const CLIENT_REF_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
