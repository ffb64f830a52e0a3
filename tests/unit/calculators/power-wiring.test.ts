import { describe, expect, it } from 'vitest';
import { NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT, voltageDrop } from '@/lib/rules/calculators/power-wiring';

describe('voltageDrop', () => {
  it('reproduces the worked example: 100 ft of 1.02 Ω/1000 ft at 10 A drops 2.04 V', () => {
    // Engineering ToolBox, voltage drop worked example: 200 ft of conductor → 0.204 Ω, 2.04 V
    const result = voltageDrop({ oneWayLengthFt: 100, ohmsPer1000Ft: 1.02, currentA: 10, supplyVoltage: 24 });
    expect(result.loopResistanceOhm).toBe(0.204);
    expect(result.dropV).toBe(2.04);
    // 2.04 / 24 = 8.5 %
    expect(result.dropPercent).toBe(8.5);
    expect(result.voltageAtOperatorV).toBe(21.96);
  });

  it('looks up the resistance of stranded and solid copper', () => {
    // NEC Chapter 9 Table 8, uncoated copper 75 °C (as in REFERENCES.md)
    expect(NEC_CH9_TABLE8_COPPER_OHMS_PER_1000FT[14]).toEqual({ solid: 3.07, stranded: 3.14 });
    // AWG 14 stranded, 50 ft, 5 A: 2·5·50·3.14/1000 = 1.57 V; 1.57/24 = 6.54 %
    const stranded = voltageDrop({
      awg: 14,
      stranded: true,
      oneWayLengthFt: 50,
      currentA: 5,
      supplyVoltage: 24,
    });
    expect(stranded.dropV).toBe(1.57);
    expect(stranded.dropPercent).toBe(6.54);
    // AWG 10 solid, same run: 2·5·50·1.21/1000 = 0.605 V
    expect(voltageDrop({ awg: 10, oneWayLengthFt: 50, currentA: 5, supplyVoltage: 24 }).dropV).toBe(0.605);
  });

  it('takes the run length in metres', () => {
    // 30.48 m = 100 ft exactly; AWG 16 solid 4.89 Ω/1000 ft, 2 A: 2·2·100·4.89/1000 = 1.956 V
    const result = voltageDrop({ awg: 16, oneWayLengthM: 30.48, currentA: 2, supplyVoltage: 12 });
    expect(result.oneWayLengthFt).toBe(100);
    expect(result.dropV).toBe(1.956);
    expect(result.dropPercent).toBe(16.3);
  });

  it('refuses a gauge it has no resistance for unless one is given', () => {
    expect(() =>
      voltageDrop({ awg: 8 as never, oneWayLengthFt: 10, currentA: 1, supplyVoltage: 24 }),
    ).toThrow(RangeError);
    expect(
      voltageDrop({
        awg: 8 as never,
        ohmsPer1000Ft: 0.764,
        oneWayLengthFt: 10,
        currentA: 1,
        supplyVoltage: 24,
      }).dropV,
    ).toBe(0.015);
  });

  it('refuses a run without a length', () => {
    expect(() => voltageDrop({ awg: 12, currentA: 1, supplyVoltage: 24 })).toThrow(/length/);
  });
});
