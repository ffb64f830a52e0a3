/**
 * Units of measure for everything a technician enters on site.
 *
 * The product stores lengths in millimetres, forces in newtons, masses in kilograms and
 * speeds in metres per second; every entered value also keeps the unit it was entered in
 * (see `Measured`), so reports can show what was actually measured. Pure and framework-free:
 * islands, server and rules engine all use this module. Showing a value to people is the
 * vocabulary's job (src/lib/vocabulary/numbers.ts).
 */

/** Units a technician may enter a length in. */
export type LengthUnit = 'mm' | 'cm' | 'm' | 'in' | 'ft';
/** Units force meters and spring scales report in. */
export type ForceUnit = 'N' | 'lbf' | 'kgf';
/** Units a gate leaf's weight may be entered in. */
export type MassUnit = 'kg' | 'lb';
/** Units a gate's travel speed may be entered in. */
export type SpeedUnit = 'm/s' | 'ft/s';
/** The kinds of measurement the product converts. */
export type MeasureKind = 'length' | 'force' | 'mass' | 'speed';
/** An organisation's display system. */
export type UnitSystem = 'metric' | 'imperial';

/** The unit each kind of measurement may be entered in, so `measure()` can type-check the pair. */
export interface UnitOfKind {
  length: LengthUnit;
  force: ForceUnit;
  mass: MassUnit;
  speed: SpeedUnit;
}

/** A value as entered (value + unit) together with its canonical value (mm, N, kg or m/s). */
export interface Measured {
  value: number;
  unit: string;
  canonical: number;
}

/** 1 in = 25.4 mm exactly (NIST SP 811, Appendix B). */
export const MILLIMETRES_PER_INCH = 25.4;
/** 1 ft = 12 in = 304.8 mm exactly (NIST SP 811, Appendix B). */
export const MILLIMETRES_PER_FOOT = 304.8;
/** 1 lbf = 4.4482216152605 N (NIST SP 811, Appendix B; exact from lb and standard gravity). */
export const NEWTONS_PER_POUND_FORCE = 4.4482216152605;
/** 1 kgf = 9.80665 N exactly (standard acceleration of gravity; NIST SP 811, Appendix B). */
export const NEWTONS_PER_KILOGRAM_FORCE = 9.80665;
/** 1 lb (avoirdupois) = 0.45359237 kg exactly (NIST SP 811, Appendix B). */
export const KILOGRAMS_PER_POUND = 0.45359237;
/** 1 ft/s = 0.3048 m/s exactly (follows from the foot). */
export const METRES_PER_SECOND_PER_FOOT_PER_SECOND = 0.3048;

/** The canonical (stored) unit of each kind. */
export const CANONICAL_UNIT = Object.freeze({ length: 'mm', force: 'N', mass: 'kg', speed: 'm/s' } as const);

const MILLIMETRES_PER: Readonly<Record<LengthUnit, number>> = Object.freeze({
  mm: 1,
  cm: 10,
  m: 1000,
  in: MILLIMETRES_PER_INCH,
  ft: MILLIMETRES_PER_FOOT,
});
const NEWTONS_PER: Readonly<Record<ForceUnit, number>> = Object.freeze({
  N: 1,
  lbf: NEWTONS_PER_POUND_FORCE,
  kgf: NEWTONS_PER_KILOGRAM_FORCE,
});
const KILOGRAMS_PER: Readonly<Record<MassUnit, number>> = Object.freeze({ kg: 1, lb: KILOGRAMS_PER_POUND });
const METRES_PER_SECOND_PER: Readonly<Record<SpeedUnit, number>> = Object.freeze({
  'm/s': 1,
  'ft/s': METRES_PER_SECOND_PER_FOOT_PER_SECOND,
});

const FACTORS: { readonly [K in MeasureKind]: Readonly<Record<UnitOfKind[K], number>> } = {
  length: MILLIMETRES_PER,
  force: NEWTONS_PER,
  mass: KILOGRAMS_PER,
  speed: METRES_PER_SECOND_PER,
};

/** Values that arrive from forms or files are checked at runtime, so a typo never becomes NaN. */
export function isUnitOf<K extends MeasureKind>(kind: K, unit: string): unit is UnitOfKind[K] {
  return Object.prototype.hasOwnProperty.call(FACTORS[kind], unit);
}

function factorFor(kind: MeasureKind, unit: string): number {
  if (!isUnitOf(kind, unit)) throw new RangeError(`Unknown ${kind} unit "${unit}"`);
  return (FACTORS[kind] as Record<string, number>)[unit] as number;
}

function finite(value: number, what: string): number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new RangeError(`${what} must be a finite number`);
  return value;
}

/** Converts an entered length to the stored unit (mm). */
export function toMillimetres(value: number, unit: LengthUnit): number {
  return finite(value, 'Length') * factorFor('length', unit);
}

/** Converts a stored length (mm) to a display or entry unit. */
export function fromMillimetres(mm: number, unit: LengthUnit): number {
  return finite(mm, 'Length') / factorFor('length', unit);
}

/** Converts an entered force to the stored unit (N). */
export function toNewtons(value: number, unit: ForceUnit): number {
  return finite(value, 'Force') * factorFor('force', unit);
}

/** Converts a stored force (N) to a display or entry unit. */
export function fromNewtons(newtons: number, unit: ForceUnit): number {
  return finite(newtons, 'Force') / factorFor('force', unit);
}

/** Converts an entered mass (gate leaf weight) to the stored unit (kg). */
export function toKilograms(value: number, unit: MassUnit): number {
  return finite(value, 'Mass') * factorFor('mass', unit);
}

/** Converts a stored mass (kg) to a display or entry unit. */
export function fromKilograms(kg: number, unit: MassUnit): number {
  return finite(kg, 'Mass') / factorFor('mass', unit);
}

/** Converts an entered gate speed to the stored unit (m/s). */
export function toMetresPerSecond(value: number, unit: SpeedUnit): number {
  return finite(value, 'Speed') * factorFor('speed', unit);
}

/** Converts a stored speed (m/s) to a display or entry unit. */
export function fromMetresPerSecond(metresPerSecond: number, unit: SpeedUnit): number {
  return finite(metresPerSecond, 'Speed') / factorFor('speed', unit);
}

/** Canonical values keep 6 decimals: far below any site measurement, and free of float noise such as 2.5400000000000005. */
const CANONICAL_DECIMALS = 6;

/**
 * Records a value as entered together with its canonical value, so the stored measurement
 * can be judged in mm/N/kg/m/s and still shown in the unit the technician used.
 */
export function measure<K extends MeasureKind>(kind: K, value: number, unit: UnitOfKind[K]): Measured {
  const canonical = finite(value, 'Value') * factorFor(kind, unit);
  const scale = 10 ** CANONICAL_DECIMALS;
  return { value, unit, canonical: Math.round(Number((canonical * scale).toPrecision(15))) / scale + 0 };
}
