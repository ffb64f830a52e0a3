/**
 * Low-voltage power to the operator: voltage drop on the run from transformer or solar
 * charger (NEC Chapter 9 Table 8 resistances). The installation limits (box heights, distance
 * from mains, charging sources) are rule params of the ruleset, judged by its conditions.
 */
import { requireNonNegative, requirePositive, roundTo } from './numbers';

/** Wire gauges with a resistance in the default table. */
export type Awg = 18 | 16 | 14 | 12 | 10;

/**
 * DC resistance of uncoated copper at 75 °C, Ω per 1000 ft, solid / stranded.
 * NEC Chapter 9 Table 8 (as listed in our reference notes); verify against the current edition.
 */
export const NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT: Readonly<
  Record<Awg, { solid: number; stranded: number }>
> = Object.freeze({
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
    (input.oneWayLengthM === null || input.oneWayLengthM === undefined
      ? null
      : input.oneWayLengthM / METRES_PER_FOOT);
  if (lengthFt === null) throw new RangeError('Give the one-way run length in metres or feet');
  requireNonNegative('oneWayLength', lengthFt);
  const current = requireNonNegative('currentA', input.currentA);
  const supply = requirePositive('supplyVoltage', input.supplyVoltage);

  let ohms = input.ohmsPer1000Ft ?? null;
  if (ohms === null) {
    const row =
      input.awg === null || input.awg === undefined
        ? undefined
        : NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT[input.awg];
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
