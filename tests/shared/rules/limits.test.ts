import { limitResolverFor as clientResolver } from '../../../components/walk/measure';
import { DEFAULT_EDITIONS } from '../../../shared/calc/limits';
import { listLimit, unitLimitResolver } from '../../../shared/rules/limits';
import { LIST_LIMIT_DEFAULT, LIST_LIMIT_MAX, type StatedLimitDto } from '../../../shared/schemas/setup';

const inches = (n: number, source: string): StatedLimitDto => ({ value: n * 25.4, stated: n, unit: 'in', text: `${n} in`, source });

describe('listLimit', () => {
  it.each([
    [{}, LIST_LIMIT_DEFAULT],
    [{ requested: 10 }, 10],
    [{ requested: null }, LIST_LIMIT_DEFAULT],
    [{ fallback: 50 }, 50],
    [{ requested: 500 }, LIST_LIMIT_MAX],
    [{ fallback: 1000 }, LIST_LIMIT_MAX],
  ])('%j → %i', (input, expected) => {
    expect(listLimit(input)).toBe(expected);
  });
});

describe('unitLimitResolver', () => {
  const model = { name: 'Cassette 24k', limits: { max_pump_lift: inches(20, 'Cassette manual p. 12') } };
  const job = { settings: { max_drain_support_spacing: inches(48, 'Job specification') }, codeEditions: { ...DEFAULT_EDITIONS } };

  it("takes the model's limit in base units, named by its source", () => {
    const found = unitLimitResolver({ model, job })({ from: 'model', key: 'max_pump_lift' });
    expect(found).toMatchObject({ value: 20 * 25.4, quantity: 'length' });
  });

  it("takes the job's setting", () => {
    const found = unitLimitResolver({ model: null, job })({ from: 'job', key: 'max_drain_support_spacing' });
    expect(found).toMatchObject({ value: 48 * 25.4, quantity: 'length' });
  });

  it('says what is missing when the unit has no model', () => {
    const found = unitLimitResolver({ model: null, job })({ from: 'model', key: 'max_pump_lift' });
    expect(found === undefined || 'missing' in found).toBe(true);
  });

  it("resolves exactly as the phone's resolver does", () => {
    const refs = [
      { from: 'model', key: 'max_pump_lift' },
      { from: 'job', key: 'max_drain_support_spacing' },
      { from: 'model', key: 'min_clearance_top' },
    ] as const;
    const shared = unitLimitResolver({ model, job });
    const phone = clientResolver(model, job);
    for (const ref of refs) expect(shared(ref)).toEqual(phone(ref));
  });
});
