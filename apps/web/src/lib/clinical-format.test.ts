import { describe, expect, it } from 'vitest';
import { enGB, enUS } from 'date-fns/locale';
import {
  echoAmount,
  echoDoseMg,
  echoHours,
  echoRegimen,
  formatDateTime,
  formatNumber,
  formatRelativeHour,
} from './clinical-format';

describe('formatNumber', () => {
  it('formatNumber(1.0) has no trailing zero and 0.5 keeps its leading zero', () => {
    // Source: ISMP list of error-prone abbreviations and dose designations (trailing and naked zeros).
    expect(formatNumber(1.0)).toBe('1');
    expect(formatNumber(0.5)).toBe('0.5');
    expect(formatNumber(-0.0001)).toBe('0');
    expect(formatNumber(Number.NaN)).toBe('—');
  });
});

describe('dose echo', () => {
  it('echoDoseMg(1500) reads "1.5 g (1500 mg)" and echoDoseMg(750) "750 mg (0.75 g)"', () => {
    expect(echoDoseMg(1500)).toBe('1.5 g (1500 mg)');
    expect(echoDoseMg(1000)).toBe('1 g (1000 mg)');
    expect(echoDoseMg(750)).toBe('750 mg (0.75 g)');
  });
  it('echoAmount(1, "g") and echoAmount(1000, "mg") agree', () => {
    expect(echoAmount(1, 'g')).toBe('1 g (1000 mg)');
    expect(echoAmount(1000, 'mg')).toBe('1 g (1000 mg)');
  });
  it('echoHours gives minutes below an hour and "bolus" for 0', () => {
    expect(echoHours(1.5)).toBe('1.5 h');
    expect(echoHours(0.75)).toBe('45 min (0.75 h)');
    expect(echoHours(0)).toBe('bolus');
  });
  it('echoRegimen reads as a nurse would', () => {
    expect(echoRegimen({ doseMg: 1500, infusionH: 1.5, intervalH: 12 })).toBe(
      '1.5 g (1500 mg) over 1.5 h every 12 h',
    );
    expect(echoRegimen({ doseMg: 80, infusionH: 0, intervalH: 8 })).toBe(
      '80 mg (0.08 g) as a bolus every 8 h',
    );
  });
});

describe('formatRelativeHour (teaching cases)', () => {
  it('hour 0 is "day 1 00:00", hour 32 "day 2 08:00", hour 36.5 "day 2 12:30"', () => {
    expect(formatRelativeHour(0)).toBe('day 1 00:00');
    expect(formatRelativeHour(32)).toBe('day 2 08:00');
    expect(formatRelativeHour(36.5)).toBe('day 2 12:30');
  });
  it('negative hours fall on day 0 (before the first dose)', () => {
    expect(formatRelativeHour(-4)).toBe('day 0 20:00');
    expect(formatRelativeHour(-24)).toBe('day 0 00:00');
    expect(formatRelativeHour(-25)).toBe('day -1 23:00');
  });
  it('rounds to the minute without reaching 24:00', () => {
    expect(formatRelativeHour(23.9999)).toBe('day 2 00:00');
  });
});

describe('formatDateTime', () => {
  it('uses the locale order of day and month', () => {
    const iso = new Date(2026, 11, 1, 8, 5).toISOString();
    expect(formatDateTime(iso, enGB)).toBe('01/12/2026, 08:05');
    expect(formatDateTime(iso, enUS)).toBe('12/01/2026, 08:05');
  });
});
