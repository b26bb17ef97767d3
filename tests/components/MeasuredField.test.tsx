/**
 * The unit check's measured item: as the inspector types, the verdict (pass / fail), the limit,
 * the margin and where the limit comes from show at once; a malformed value shows the parser's
 * message under the field; a missing model limit is never a pass; a failed measurement proposes
 * the defect (CheckItemRow switches the mark).
 *
 * Check values: the model's pump-lift rating of 30 in is an invented demo figure (common
 * practice puts a cassette's pump lift at about 30 in, no published source). 1 in = 25.4 mm exactly
 * (NIST SP 811 (2008) B.8), so 30 in = 762 mm and 34 in is 4 in (101.6 mm) over.
 */
import { fireEvent, render, screen } from '@testing-library/react-native';
import { useState } from 'react';
import type { MeasuredRule } from '../../shared/catalogue/types';
import type { CatalogueItemDto, JobDetail, UnitModelDto } from '../../shared/schemas/setup';
import type { CheckMark } from '../../shared/words';
import { CheckItemRow } from '../../components/walk/CheckItemRow';
import { MeasuredField } from '../../components/walk/MeasuredField';
import { limitResolverFor, measure, type MeasurementView } from '../../components/walk/measure';

const pumpLift: MeasuredRule = {
  measure: 'Height of the lift above the unit',
  quantity: 'length',
  comparison: 'at_most',
  limit: { from: 'model', key: 'max_pump_lift' },
};
const drainSlope: MeasuredRule = {
  measure: 'Drain slope',
  quantity: 'slope',
  comparison: 'at_least',
  limit: { from: 'code', key: 'imc.condensate.min_slope' },
};

const model: Pick<UnitModelDto, 'name' | 'limits'> = {
  name: 'CX-24',
  limits: { max_pump_lift: { value: 762, stated: 30, unit: 'in', text: '30 in', source: 'installation manual p. 14' } },
};
const job: Pick<JobDetail, 'settings' | 'codeEditions'> = {
  settings: {},
  codeEditions: { IMC: '2018', IRC: '2018', 'NFPA 70': '2023', 'ASHRAE 34': '2019', 'IEC 60335-2-40': '2018' },
};
const resolve = limitResolverFor(model, job);

function Field({ rule, onView, resolver = resolve }: { rule: MeasuredRule; onView?: (v: MeasurementView) => void; resolver?: typeof resolve }) {
  const [text, setText] = useState('');
  return (
    <MeasuredField
      rule={rule}
      text={text}
      onChangeText={(t, view) => {
        setText(t);
        onView?.(view);
      }}
      resolve={resolver}
      system="imperial"
      testID="m"
    />
  );
}

const type = (text: string) => fireEvent.changeText(screen.getByTestId('m-input'), text);
const textOf = (id: string) => screen.getByTestId(id).props.children as unknown;
const flat = (id: string) => ([] as unknown[]).concat(textOf(id)).join('');

describe('MeasuredField', () => {
  it('shows the limit and its source before anything is typed', () => {
    render(<Field rule={pumpLift} />);
    expect(flat('m-limit')).toBe(`Limit: at most 2' 6" · Model CX-24 installation manual p. 14`);
    expect(screen.queryByTestId('m-status')).toBeNull();
  });

  it.each([
    // [typed, verdict, shown value, margin]
    [`2' 4"`, '✓ PASS', `2' 4"`, `Margin: 2" to spare`],
    ['58.5 in', '✗ FAIL', `4' 10-1/2"`, `Margin: 2' 4-1/2" outside the limit`],
    ['762 mm', '✓ PASS', `2' 6"`, 'Margin: exactly at the limit (limits are inclusive)'],
    ['34 in', '✗ FAIL', `2' 10"`, `Margin: 4" outside the limit`],
  ])('%s → %s with the limit, margin and source at once', (typed, verdict, shown, margin) => {
    render(<Field rule={pumpLift} />);
    type(typed);
    expect(flat('m-status')).toBe(verdict);
    expect(flat('m-measured')).toBe(shown);
    expect(flat('m-limit')).toBe(`Limit: at most 2' 6"`);
    expect(flat('m-margin')).toBe(margin);
    expect(flat('m-source')).toBe('Source: Model CX-24 installation manual p. 14');
  });

  it.each([
    [`4''`, 'two apostrophes'],
    ['--3 in', 'more than one sign'],
    ['1/0 in', 'Zero denominator'],
    ['34', 'in'],
  ])('a malformed value (%s) shows the parser’s message under the field, and no verdict', (typed, says) => {
    render(<Field rule={pumpLift} />);
    type(typed);
    expect(flat('m-input-error')).toContain(says);
    expect(screen.queryByTestId('m-status')).toBeNull();
    expect(flat('m-limit')).toContain('Limit: at most');
  });

  it('reports each change with its evaluation (the caller proposes the defect on a fail)', () => {
    const onView = jest.fn();
    render(<Field rule={pumpLift} onView={onView} />);
    type('34 in');
    const view = onView.mock.calls.at(-1)![0] as MeasurementView;
    expect(view.kind).toBe('result');
    expect(view.result.status).toBe('fail');
    expect(view.result.margin).toBeCloseTo(-101.6, 9);
  });

  it('a built-in code limit names its document, edition and section (IMC 2018 Section 307.2.2: 1/8 in per ft)', () => {
    render(<Field rule={drainSlope} />);
    type('1/4 in/ft');
    expect(flat('m-status')).toBe('✓ PASS');
    expect(flat('m-source')).toBe('Source: IMC 2018 Section 307.2.2');
    type('1/16 in/ft');
    expect(flat('m-status')).toBe('✗ FAIL');
  });

  it('without the model’s limit it says “limit not set”, never pass', () => {
    render(<Field rule={pumpLift} resolver={limitResolverFor(null, job)} />);
    type('34 in');
    expect(flat('m-status')).toBe('? Limit not set');
    expect(screen.queryByText('✓ PASS')).toBeNull();
  });

  it('a yes/no item is answered with two big buttons', () => {
    const rule: MeasuredRule = { measure: 'Trap or check valve fitted', quantity: 'boolean', comparison: 'yes_no', expected: true };
    render(<Field rule={rule} />);
    fireEvent.press(screen.getByTestId('m-no'));
    expect(flat('m-status')).toBe('✗ FAIL');
    fireEvent.press(screen.getByTestId('m-yes'));
    expect(flat('m-status')).toBe('✓ PASS');
  });
});

describe('measure()', () => {
  it('parses the trade’s ways of writing one length to the same verdict', () => {
    for (const t of [`4' 10-1/2"`, '58.5 in', '1485.9 mm', '4 ft 10.5 in']) {
      const v = measure(pumpLift, t, resolve, 'imperial');
      expect(v.kind).toBe('result');
      expect(v.result.status).toBe('fail');
      expect(v.result.margin).toBeCloseTo(762 - 1485.9, 9);
    }
  });
});

describe('CheckItemRow', () => {
  const item: CatalogueItemDto = {
    id: '00000000-0000-4000-8000-000000000003',
    code: 'DR-03',
    group: 'drainage',
    title: 'Pump lift too high',
    description: 'The drain rises higher than the pump can lift.',
    unitKinds: ['cassette_4way'],
    defaultSeverity: 'major',
    trade: 'mechanical',
    measuredRule: pumpLift,
    fixGuidance: 'Bring the lift down.',
    caution: 'Overhead work: use a rated ladder or lift. The manufacturer’s installation manual, local codes and licensed practice govern.',
    needsCeilingAccess: true,
    builtin: true,
    retiredAt: null,
    version: 1,
  };

  function Card({ onLog }: { onLog: () => void }) {
    const [mark, setMark] = useState<CheckMark | undefined>(undefined);
    const [text, setText] = useState('');
    return (
      <CheckItemRow
        item={item}
        mark={mark}
        onMark={setMark}
        measuredText={text}
        onMeasured={(t, view) => {
          setText(t);
          if (view.kind === 'result' && view.result.status === 'fail') setMark('defect');
        }}
        resolve={resolve}
        system="imperial"
        logged={[]}
        unresolved={[]}
        onLogFinding={onLog}
      />
    );
  }

  it('a failed measurement switches the item to Defect and offers “Log finding”', () => {
    const onLog = jest.fn();
    render(<Card onLog={onLog} />);
    expect(screen.queryByTestId('check-item-DR-03-log')).toBeNull();
    fireEvent.changeText(screen.getByTestId('check-item-DR-03-measured-input'), '34 in');
    expect(screen.getByTestId('check-item-DR-03-mark-defect').props.accessibilityState).toMatchObject({ checked: true });
    fireEvent.press(screen.getByTestId('check-item-DR-03-log'));
    expect(onLog).toHaveBeenCalledTimes(1);
  });

  it('keeps the guidance and the caution one tap away, read in full when opened', () => {
    render(<Card onLog={jest.fn()} />);
    expect(screen.queryByTestId('check-item-DR-03-caution')).toBeNull();
    fireEvent.press(screen.getByTestId('check-item-DR-03-expand'));
    expect(screen.getByText('⚠ Caution: Overhead work')).toBeTruthy();
    expect(flat('check-item-DR-03-caution-text')).toContain('licensed practice govern');
    expect(screen.getByText('The drain rises higher than the pump can lift.')).toBeTruthy();
  });

  it('names the item in the accessible name of each one-tap mark', () => {
    render(<Card onLog={jest.fn()} />);
    expect(screen.getByLabelText('OK: DR-03 Pump lift too high').props.testID).toBe('check-item-DR-03-mark-ok');
    expect(screen.getByLabelText('Defect: DR-03 Pump lift too high').props.testID).toBe('check-item-DR-03-mark-defect');
    fireEvent.press(screen.getByTestId('check-item-DR-03-mark-ok'));
    expect(screen.getByTestId('check-item-DR-03-mark-ok').props.accessibilityState).toMatchObject({ checked: true });
    // a second tap takes the mark back
    fireEvent.press(screen.getByTestId('check-item-DR-03-mark-ok'));
    expect(screen.getByTestId('check-item-DR-03-mark-ok').props.accessibilityState).toMatchObject({ checked: false });
  });
});
