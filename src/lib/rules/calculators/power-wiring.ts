/**
 * Low-voltage power to the operator: voltage drop on the run from transformer or solar
 * charger (NEC Chapter 9 Table 8 resistances) and the installation practices that keep the
 * battery and wiring safe.
 */
import { checkAtLeast, combinePasses, type LimitCheck } from './limit-check';
import { optionalBoolean, optionalNonNegative, requireNonNegative, requirePositive, roundTo } from './numbers';

/** Wire gauges with a resistance in the default table. */
export type Awg = 18 | 16 | 14 | 12 | 10;

/**
 * DC resistance of uncoated copper at 75 °C, Ω per 1000 ft, solid / stranded.
 * NEC Chapter 9 Table 8 (as listed in our reference notes); verify against the current edition.
 */
export const NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT: Readonly<Record<Awg, { solid: number; stranded: number }>> =
  Object.freeze({
    18: { solid: 7.77, stranded: 7.95 },
    16: { solid: 4.89, stranded: 4.99 },
    14: { solid: 3.07, stranded: 3.14 },
    12: { solid: 1.93, stranded: 1.98 },
    10: { solid: 1.21, stranded: 1.24 },
  });

/** 1 ft = 0.3048 m exactly (NIST SP 811). */
const METRES_PER_FOOT = 0.3048;

/** One low-voltage run from the power source to the operator. */
export interface VoltageDropInput {
  awg?: Awg | null;
  stranded?: boolean;
  /** One-way run length in metres (give this or `oneWayLengthFt`). */
  oneWayLengthM?: number | null;
  oneWayLengthFt?: number | null;
  currentA: number;
  supplyVoltage: number;
  /** Conductor resistance to use instead of the table (other gauge, aluminium, other temperature). */
  ohmsPer1000Ft?: number | null;
}

/** The run's resistance and drop, rounded for the report. */
export interface VoltageDropResult {
  ohmsPer1000Ft: number;
  oneWayLengthFt: number;
  /** Resistance of both conductors (out and back), Ω. */
  loopResistanceOhm: number;
  dropV: number;
  dropPercent: number;
  voltageAtOperatorV: number;
}

/**
 * Voltage drop on a two-wire run: VD = 2 · I · L · R / 1000, with L the one-way length in ft
 * and R in Ω per 1000 ft. Tells whether the operator still gets enough voltage at the far end.
 */
export function voltageDrop(input: VoltageDropInput): VoltageDropResult {
  const lengthFt =
    input.oneWayLengthFt ??
    (input.oneWayLengthM === null || input.oneWayLengthM === undefined ? null : input.oneWayLengthM / METRES_PER_FOOT);
  if (lengthFt === null) throw new RangeError('Give the one-way run length in metres or feet');
  requireNonNegative('oneWayLength', lengthFt);
  const current = requireNonNegative('currentA', input.currentA);
  const supply = requirePositive('supplyVoltage', input.supplyVoltage);

  let ohms = input.ohmsPer1000Ft ?? null;
  if (ohms === null) {
    const row =
      input.awg === null || input.awg === undefined ? undefined : NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT[input.awg];
    if (!row) throw new RangeError(`No resistance for AWG ${input.awg}; pass ohmsPer1000Ft`);
    ohms = input.stranded ? row.stranded : row.solid;
  }
  requirePositive('ohmsPer1000Ft', ohms);

  const loop = (2 * lengthFt * ohms) / 1000;
  const drop = current * loop;
  return {
    ohmsPer1000Ft: ohms,
    oneWayLengthFt: roundTo(lengthFt, 1),
    loopResistanceOhm: roundTo(loop, 4),
    dropV: roundTo(drop, 3),
    dropPercent: roundTo((drop / supply) * 100, 2),
    voltageAtOperatorV: roundTo(supply - drop, 3),
  };
}

/** Control and battery boxes at least 3 ft (914.4 mm) above ground, clear of water and splash. */
export const BOX_MIN_HEIGHT_ABOVE_GROUND_MM = 914.4; // 3 ft — common practice, no source
/** Low-voltage boxes at least 3 ft (914.4 mm) from an AC source. */
export const LOW_VOLTAGE_MIN_DISTANCE_FROM_AC_MM = 914.4; // 3 ft — common practice, no source
/** Only one charging source connected at a time (not transformer and solar together). */
export const MAX_CHARGING_SOURCES = 1; // common practice, no source

/** What charges the operator's battery. */
export type ChargerSource = 'transformer' | 'solar';

/** What the auditor records about the power installation. */
export interface PowerInstallationInput {
  chargerSources: readonly ChargerSource[];
  controlBoxHeightMm?: number | null;
  batteryBoxHeightMm?: number | null;
  distanceToAcSourceMm?: number | null;
  lowVoltageWireDirectBurial?: boolean | null;
  conduitWhereLeavingGround?: boolean | null;
}

/** Each installation check, for findings and the report. */
export interface PowerInstallationResult {
  /** Distinct kinds of charging source; several panels on one solar charger count once. Null check when none (no battery to charge). */
  chargingSources: { count: number; pass: boolean | null };
  controlBoxHeight: LimitCheck;
  batteryBoxHeight: LimitCheck;
  distanceToAcSource: LimitCheck;
  directBurialWire: { pass: boolean | null };
  conduitLeavingGround: { pass: boolean | null };
  pass: boolean | null;
}

/** Judges the power installation against common installer practice (no published source). */
export function assessPowerInstallation(
  input: PowerInstallationInput,
  limits: Partial<{ boxMinHeightMm: number; minDistanceFromAcMm: number; maxChargingSources: number }> = {},
): PowerInstallationResult {
  const count = new Set(input.chargerSources).size;
  const maxSources = limits.maxChargingSources ?? MAX_CHARGING_SOURCES;
  const boxHeight = limits.boxMinHeightMm ?? BOX_MIN_HEIGHT_ABOVE_GROUND_MM;
  const result = {
    chargingSources: { count, pass: count === 0 ? null : count <= maxSources },
    controlBoxHeight: checkAtLeast(optionalNonNegative('controlBoxHeightMm', input.controlBoxHeightMm), boxHeight),
    batteryBoxHeight: checkAtLeast(optionalNonNegative('batteryBoxHeightMm', input.batteryBoxHeightMm), boxHeight),
    distanceToAcSource: checkAtLeast(
      optionalNonNegative('distanceToAcSourceMm', input.distanceToAcSourceMm),
      limits.minDistanceFromAcMm ?? LOW_VOLTAGE_MIN_DISTANCE_FROM_AC_MM,
    ),
    // low-voltage wire rated for direct burial — common practice, no source
    directBurialWire: { pass: optionalBoolean(input.lowVoltageWireDirectBurial) },
    // conduit where the wire leaves the ground — common practice, no source
    conduitLeavingGround: { pass: optionalBoolean(input.conduitWhereLeavingGround) },
  };
  return {
    ...result,
    pass: combinePasses(
      result.chargingSources.pass ?? true,
      result.controlBoxHeight.pass,
      result.batteryBoxHeight.pass,
      result.distanceToAcSource.pass,
      result.directBurialWire.pass,
      result.conduitLeavingGround.pass,
    ),
  };
}
