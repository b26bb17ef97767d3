/**
 * Working space and attic access.
 * - Working space in front of the control side: a level space at least 30 in deep and 30 in wide.
 *   Commercial work follows the IMC (Section 306.1, access and service space for appliances; from
 *   memory, confirm the section); one- and two-family dwellings and townhouses follow the IRC
 *   (M1305.1, from memory). NFPA 70 110.26 is working space about electrical equipment: another rule.
 * - Attic containing an appliance (IMC 306.3): passageway at least 30 in high and 22 in wide, not
 *   more than 20 ft long measured along its centre line from the opening to the appliance (50 ft
 *   where the passageway is unobstructed and at least 6 ft high throughout: exception, from memory);
 *   clear access opening at least 20 in by 30 in. The opening is checked without regard to
 *   orientation: its smaller dimension against 20 in and its larger against 30 in.
 * Each value is a minimum or maximum; values exactly at the limit pass.
 */
import type { EditionChoice, UnitSystem } from '../catalogue/types';
import type { CheckResult } from './rules';
import { checkAgainstCode, combineChecks } from './rules';

/** Which code's working space applies: the IMC (commercial) or the IRC (residential). */
export type WorkingSpaceCode = 'IMC' | 'IRC';

/**
 * The working-space code for a job. Trimout keeps no residential flag; the job's chosen code
 * editions say which code it works to: a job that names an IRC edition and no IMC edition is
 * residential work (IRC M1305.1), every other job follows the IMC (Section 306.1), the code for the
 * commercial VRF work Trimout is made for.
 */
export function workingSpaceCode(editions: EditionChoice | undefined): WorkingSpaceCode {
  return editions?.IRC && !editions.IMC ? 'IRC' : 'IMC';
}

export interface WorkingSpaceInput {
  /** IMC for commercial work (the default: Trimout's jobs are commercial VRF work); IRC on residential work. */
  code?: WorkingSpaceCode;
  /** mm, measured out from the control side */
  depth: number | null;
  /** mm */
  width: number | null;
  editions?: EditionChoice;
  system?: UnitSystem;
}

export function checkWorkingSpace(input: WorkingSpaceInput): CheckResult {
  const { editions, system } = input;
  const prefix = input.code === 'IRC' ? 'irc' : 'imc';
  return combineChecks(
    [
      checkAgainstCode(`${prefix}.working_space.min_depth`, 'Working space depth', input.depth, editions, system),
      checkAgainstCode(`${prefix}.working_space.min_width`, 'Working space width', input.width, editions, system),
    ],
    'Working space at the control side',
  );
}

export interface AtticAccessInput {
  /** mm; the lowest clear height along the passageway */
  passageHeight: number | null;
  /** mm; the narrowest clear width along the passageway */
  passageWidth: number | null;
  /** mm; along the centre line from the opening to the appliance */
  passageLength: number | null;
  /** mm; the clear access opening, either way round */
  openingWidth: number | null;
  openingHeight: number | null;
  /** The passageway is unobstructed and at least 6 ft high and 22 in wide for its whole length. */
  tallPassageway?: boolean;
  editions?: EditionChoice;
  system?: UnitSystem;
}

export function checkAtticAccess(input: AtticAccessInput): CheckResult {
  const { editions, system } = input;
  const a = input.openingWidth;
  const b = input.openingHeight;
  const small = a === null || b === null ? null : Math.min(a, b);
  const large = a === null || b === null ? null : Math.max(a, b);
  return combineChecks(
    [
      checkAgainstCode('imc.attic.passage_min_height', 'Attic passageway height', input.passageHeight, editions, system),
      checkAgainstCode('imc.attic.passage_min_width', 'Attic passageway width', input.passageWidth, editions, system),
      checkAgainstCode(
        input.tallPassageway ? 'imc.attic.passage_max_length_tall' : 'imc.attic.passage_max_length',
        'Attic passageway length',
        input.passageLength,
        editions,
        system,
      ),
      checkAgainstCode('imc.attic.opening_min_width', 'Attic opening, smaller dimension', small, editions, system),
      checkAgainstCode('imc.attic.opening_min_height', 'Attic opening, larger dimension', large, editions, system),
    ],
    'Attic access',
  );
}
