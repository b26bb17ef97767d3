/**
 * Disconnecting means within sight of the equipment it serves: visible from the equipment AND not
 * more than 50 ft (15 m) away (NFPA 70 Article 100, "In Sight From (Within Sight From, Within
 * Sight)"; required for air-conditioning equipment by 440.14). Both conditions must hold.
 * The distance limit is 50 ft = 15,240 mm exactly; a value at exactly 50 ft passes.
 */
import type { EditionChoice, UnitSystem } from '../catalogue/types';
import { DEFAULT_EDITIONS } from './limits';
import type { CheckResult } from './rules';
import { checkAgainstCode, combineChecks, evaluateRule } from './rules';

export interface DisconnectInput {
  /** Is the disconnect visible from the unit? null = not answered. */
  visible: boolean | null;
  /** Measured distance from the unit to the disconnect, mm. null = not measured. */
  distance: number | null;
  editions?: EditionChoice;
  system?: UnitSystem;
}

export function checkDisconnect(input: DisconnectInput): CheckResult {
  const edition = input.editions?.['NFPA 70'] ?? DEFAULT_EDITIONS['NFPA 70'];
  const source = `NFPA 70 ${edition} Article 100, "In Sight From"; 440.14`;
  const measure = 'Disconnect visible from the unit';
  const visible = evaluateRule(
    { measure, quantity: 'boolean', comparison: 'yes_no', expected: true },
    input.visible,
    () => undefined,
    { source, system: input.system },
  );
  const distance = checkAgainstCode(
    'nec.disconnect.max_distance',
    'Distance from the unit to the disconnect',
    input.distance,
    input.editions,
    input.system,
  );
  return combineChecks(
    [{ ...visible, key: 'disconnect_visible', label: measure }, { ...distance }],
    'Disconnect within sight',
  );
}
