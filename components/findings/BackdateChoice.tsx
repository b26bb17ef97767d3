import { BACKDATE_ROLES } from '../../shared/rules/pastDue';
import type { Role } from '../../shared/words';
import { Segmented } from '../ui/Segmented';
import { formatDay } from './due';

/**
 * A due date before today is refused (shared/rules/pastDue.ts) unless a GC manager back-dates it
 * on purpose: only they see this choice, and only while the date typed is before today on the
 * job's clock. Everyone else gets the field's message instead.
 */
export function BackdateChoice({
  dueOn,
  today,
  role,
  value,
  onChange,
  testID,
}: {
  dueOn: string | undefined;
  today: string;
  role: Role;
  value: boolean;
  onChange: (backdated: boolean) => void;
  testID: string;
}) {
  if (!BACKDATE_ROLES.includes(role) || !dueOn || !/^\d{4}-\d{2}-\d{2}$/.test(dueOn) || dueOn >= today) return null;
  return (
    <Segmented
      label={`${formatDay(dueOn)} is before today`}
      value={value ? 'yes' : 'no'}
      options={[
        { value: 'no', label: 'Choose another date' },
        { value: 'yes', label: 'Back-date on purpose' },
      ]}
      onChange={(v) => onChange(v === 'yes')}
      testID={testID}
    />
  );
}

/** Whether a body should carry `backdated: true`: chosen, and the date really is before today. */
export function backdatedFlag(chosen: boolean, dueOn: string | undefined, today: string): { backdated: true } | Record<string, never> {
  return chosen && dueOn !== undefined && dueOn < today ? { backdated: true } : {};
}
