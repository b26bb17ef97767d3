/**
 * A unit's address: what a label's QR code holds and what "Scan a unit" reads back. The printed
 * address parses back to its job and unit on any origin; anything else is not a unit address;
 * the scan screen tells this job's unit from another job's.
 */
import { parseUnitAddress, unitAddress, unitAddressPath } from '../../../shared/rules/unitAddress';
import { scanOutcome } from '../../../components/scan/scanResult';

const JOB = '3f0c2a4e-8a57-4c1e-9d7b-2f6a0b1c9e11';
const UNIT = 'a1b2c3d4-e5f6-4a7b-8c9d-0e1f2a3b4c5d';
const OTHER_JOB = '0d9e8f7a-6b5c-4d3e-8f1a-2b3c4d5e6f70';

describe('unit address', () => {
  it('is the unit check path on the public origin', () => {
    expect(unitAddress('https://punch.example.org/', JOB, UNIT)).toBe(`https://punch.example.org/jobs/${JOB}/units/${UNIT}/check`);
    expect(unitAddressPath(JOB, UNIT)).toBe(`/jobs/${JOB}/units/${UNIT}/check`);
  });

  it.each([
    [`https://punch.example.org/jobs/${JOB}/units/${UNIT}/check`],
    [`http://127.0.0.1:8080/jobs/${JOB}/units/${UNIT}/check/`],
    [`/jobs/${JOB}/units/${UNIT}/check`],
    [`  https://punch.example.org/jobs/${JOB.toUpperCase()}/units/${UNIT}/check?saved=IU-1  `],
  ])('reads %s back to its job and unit', (text) => {
    expect(parseUnitAddress(text)).toEqual({ jobId: JOB, unitId: UNIT });
  });

  it.each([
    ['some other site', 'https://example.org/menu'],
    ['plain text', 'IU-3-01'],
    ['a finding address', `https://punch.example.org/jobs/${JOB}/findings/${UNIT}`],
    ['an id that is not one', `https://punch.example.org/jobs/${JOB}/units/IU-3-01/check`],
    ['a path with more after it', `https://punch.example.org/jobs/${JOB}/units/${UNIT}/check/extra`],
    ['empty', ''],
  ])('is not a unit address: %s', (_name, text) => {
    expect(parseUnitAddress(text)).toBeNull();
  });

  it('on the scan screen: this job’s unit, another job’s, or not a label', () => {
    expect(scanOutcome(unitAddress('https://a.example', JOB, UNIT), JOB)).toEqual({ kind: 'unit', unitId: UNIT });
    expect(scanOutcome(unitAddress('https://a.example', OTHER_JOB, UNIT), JOB)).toEqual({ kind: 'other_job' });
    expect(scanOutcome('https://example.org/menu', JOB)).toEqual({ kind: 'not_a_unit' });
  });
});
