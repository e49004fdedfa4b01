// Strict FHIR R4 dateTime / instant parsing (src/snapshot/time.ts) against the examples and rules of the FHIR R4
// Datatypes page (https://hl7.org/fhir/R4/datatypes.html, "dateTime" and "instant"), and the snapshot's use of it.
import { describe, expect, it } from 'vitest';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import { fhirDateTime, isoInstant, parseTimeMs } from '../../src/snapshot/time.js';
import * as b from '../../examples/lib/fhir-builders.js';

describe('FHIR R4 dateTime grammar', () => {
  // The dateTime examples of the FHIR R4 Datatypes page: "2018, 1973-06, 1905-08-23, 2015-02-07T13:28:17-05:00 or
  // 2017-01-01T00:00:00.000Z".
  it.each([
    ['2018', 'year', '2018-01-01T00:00:00.000Z'],
    ['1973-06', 'month', '1973-06-01T00:00:00.000Z'],
    ['1905-08-23', 'day', '1905-08-23T00:00:00.000Z'],
    ['2015-02-07T13:28:17-05:00', 'second', '2015-02-07T18:28:17.000Z'],
    ['2017-01-01T00:00:00.000Z', 'second', '2017-01-01T00:00:00.000Z'],
  ])('FHIR R4 Datatypes example %s', (raw, precision, iso) => {
    expect(fhirDateTime(raw)).toEqual({ ms: Date.parse(iso), iso, precision });
  });

  // The instant examples of the same page: "2015-02-07T13:28:17.239+02:00 or 2017-01-01T00:00:00Z".
  it.each([
    ['2015-02-07T13:28:17.239+02:00', '2015-02-07T11:28:17.239Z'],
    ['2017-01-01T00:00:00Z', '2017-01-01T00:00:00.000Z'],
  ])('FHIR R4 Datatypes instant example %s', (raw, iso) => {
    expect(isoInstant(raw)).toEqual({ ms: Date.parse(iso), iso });
  });

  it.each([
    ['December 1, 2026', 'free text (Date.parse reads it)'],
    ['2026-12-01T14:05:00', 'a time without an offset ("a time zone SHALL be populated")'],
    ['2026-12-01T14:05Z', 'no seconds (the grammar requires them)'],
    ['2026-12-01 14:05:00Z', 'a space instead of T'],
    ['2026-02-30', 'not a valid date ("Dates SHALL be valid dates")'],
    ['2025-02-29T10:00:00Z', 'not a valid date (2025 is no leap year)'],
    ['2026-13-01', 'month 13'],
    ['2026-12-01T24:00:00Z', 'hour 24'],
    ['2026-12-01T10:00:00+15:00', 'offset beyond +14:00'],
    ['0000', 'year 0 (the grammar starts at 0001)'],
    ['20261201', 'basic format'],
    ['', 'empty'],
  ])('%s is not a FHIR dateTime: %s', (raw) => {
    expect(fhirDateTime(raw)).toBeUndefined();
    expect(isoInstant(raw)).toBeUndefined();
    expect(parseTimeMs(raw)).toBeNaN();
  });

  it('a leap year date and a +14:00 offset are valid', () => {
    expect(fhirDateTime('2024-02-29')?.precision).toBe('day');
    expect(isoInstant('2026-12-02T09:00:00+14:00')?.iso).toBe('2026-12-01T19:00:00.000Z');
  });

  it('does not depend on the process time zone (TZ=America/Denver in the tests)', () => {
    expect(new Date(2026, 0, 1).getTimezoneOffset()).not.toBe(0); // the check can fail: this process is not on UTC
    expect(fhirDateTime('2026-12-01')?.iso).toBe('2026-12-01T00:00:00.000Z');
  });

  it('a partial date is no instant', () => {
    expect(isoInstant('2026-12-01')).toBeUndefined();
    expect(parseTimeMs('2026-12')).toBe(Date.UTC(2026, 11, 1));
  });
});

describe('the snapshot uses the strict grammar', () => {
  const NOW = new Date('2026-12-02T14:00:00Z');
  const P = 'tm-pat-time-1';
  const snap = (resources: unknown[]) => buildSnapshot(resources as never, { patientId: P }, NOW);

  it('an offset-less or free-text time leaves the Observation out with its reason', () => {
    const a = b.numeric('hr-local', P, 'heartRate', 90, '2026-12-02T13:00:00');
    const c = b.numeric('hr-text', P, 'heartRate', 91, 'December 1, 2026');
    const s = snap([a, c]);
    expect(s.measurements).toEqual([]);
    expect(s.excluded.map((e) => [e.ref, e.reason])).toEqual([
      ['Observation/hr-local', 'no-time'],
      ['Observation/hr-text', 'no-time'],
    ]);
    expect(s.excluded[0]?.detail).toMatch(/not a FHIR date-time .*offset Z or ±hh:mm/);
    expect(s.excluded[1]?.detail).toMatch(/not a FHIR date-time/);
  });

  it('a date-only weight is kept with its time assumed; a date-only heart rate is left out', () => {
    const w = b.numeric('wt-day', P, 'bodyWeight', 72, '2026-12-01');
    const hr = b.numeric('hr-day', P, 'heartRate', 88, '2026-12-01');
    const s = snap([w, hr]);
    expect(s.measurements.map((m) => [m.kind, m.effective, m.timeAssumed])).toEqual([
      ['bodyWeight', '2026-12-01T00:00:00.000Z', 'date-only'],
    ]);
    expect(s.excluded.map((e) => e.ref)).toEqual(['Observation/hr-day']);
  });

  it('a full time carries no assumption', () => {
    const s = snap([b.numeric('wt-t', P, 'bodyWeight', 72, '2026-12-01T08:00:00+01:00')]);
    expect(s.measurements[0]?.effective).toBe('2026-12-01T07:00:00.000Z');
    expect(s.measurements[0]?.timeAssumed).toBeUndefined();
  });
});
