/** What an unsubscribe link shows before and after it is used: the list, and a masked address. */
import type { UnsubscribeList, UnsubscribePreview } from '../../shared/schemas/preferences';
import type { EffectivePreferences } from '../digests/preferences';

const LIST_WORDS: Record<UnsubscribeList, string> = {
  digest: 'Your Trimout digest mails (daily or weekly)',
  critical: 'Mails about critical findings assigned to your company',
};

/** "a••••@example.test": enough for the owner to recognise, too little for anyone else. */
export function maskAddress(email: string): string {
  const [local = '', domain = ''] = email.split('@');
  return `${local.slice(0, 1)}${'•'.repeat(Math.max(2, Math.min(6, local.length - 1)))}@${domain}`;
}

export function presentUnsubscribePreview(claim: { list: UnsubscribeList; expiresAt: Date }, prefs: EffectivePreferences): UnsubscribePreview {
  return {
    list: claim.list,
    description: LIST_WORDS[claim.list],
    address: maskAddress(prefs.email),
    alreadyOff: claim.list === 'digest' ? prefs.digestFrequency === 'off' : !prefs.criticalAssignmentMail,
    expiresAt: claim.expiresAt.toISOString(),
  };
}
