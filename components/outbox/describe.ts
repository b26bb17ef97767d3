/**
 * What a write is, read from its address and body, so the outbox takes any Write made with newWrite:
 * its job, its kind (the words on the sync screen), the record it changes (writes on one record go
 * in order) and where that record can be read again (to show what the server holds now).
 */
import type { Write } from '../api/mutations';
import type { WriteMeta } from './engine';
import type { OutboxKind } from './storage';

export const KIND_WORDS: Record<OutboxKind, string> = {
  check: 'Unit check',
  finding: 'New finding',
  fix: 'Fix',
  reinspection: 'Re-inspection',
  change: 'Change to a finding',
  comment: 'Comment',
  pin: 'Pin on the plan',
  photos: 'Photos',
  walk: 'Walk',
  test: 'Test record',
  other: 'Change',
};

const FINDING_CHANGES: Record<string, string> = {
  void: 'Void',
  reopen: 'Reopen',
  close: 'Close',
  reassign: 'Reassign',
  severity: 'Severity',
  dueOn: 'Due date',
};

/**
 * The words of a write on a finding, naming it where its label is known ("#12"): what waits on the
 * sync screen says which finding it is about, not only what kind of write it is.
 */
function findingWords(kind: OutboxKind, body: Record<string, unknown> | null, finding: string | undefined): string {
  const of = finding ? ` of finding ${finding}` : '';
  const on = finding ? ` on finding ${finding}` : '';
  switch (kind) {
    case 'fix':
      return `Fix${of}`;
    case 'photos':
      return `Photos${of}`;
    case 'comment':
      return `Comment${on}`;
    case 'pin':
      return finding ? `Pin of finding ${finding} on the plan` : KIND_WORDS.pin;
    case 'reinspection':
      if (body?.verdict === 'accept') return finding ? `Fix accepted, finding ${finding}` : 'Fix accepted';
      if (body?.verdict === 'return') return finding ? `Return of finding ${finding}` : 'Fix returned';
      return `${KIND_WORDS.reinspection}${of}`;
    case 'change': {
      const change = Object.keys(body ?? {}).find((k) => FINDING_CHANGES[k]);
      return `${change ? FINDING_CHANGES[change]! : KIND_WORDS.change}${of}`;
    }
    default:
      return `${KIND_WORDS[kind]}${of}`;
  }
}

/** The JSON of a write's body: the body itself, or the `data` field of a multipart form. */
export function bodyJson(write: Write): Record<string, unknown> | null {
  const b = write.body;
  if (typeof FormData !== 'undefined' && b instanceof FormData) {
    const data = b.get('data');
    if (typeof data !== 'string') return null;
    try {
      return JSON.parse(data) as Record<string, unknown>;
    } catch {
      return null;
    }
  }
  return b && typeof b === 'object' ? (b as Record<string, unknown>) : null;
}

const enc = encodeURIComponent;

export function describeWrite(write: Write, label?: string): WriteMeta {
  const parts = write.path.split('?')[0]!.split('/').filter(Boolean).map(decodeURIComponent);
  // ['api', 'jobs', jobId, resource, id?, sub?]
  const jobId = parts[0] === 'api' && parts[1] === 'jobs' ? (parts[2] ?? '') : '';
  const [resource, id, sub] = [parts[3], parts[4], parts[5]];
  const job = `/api/jobs/${enc(jobId)}`;
  const findingMeta = (findingId: string, kind: OutboxKind, words: string): WriteMeta => ({
    jobId,
    kind,
    label: label ? `${words} · ${label}` : words,
    record: `finding:${findingId}`,
    readPath: `${job}/findings/${enc(findingId)}`,
  });
  if (resource === 'findings' && !id && write.method === 'POST') {
    const made = bodyJson(write)?.id;
    if (typeof made === 'string') return findingMeta(made, 'finding', KIND_WORDS.finding);
    return { jobId, kind: 'finding', label: label ? `${KIND_WORDS.finding} · ${label}` : KIND_WORDS.finding, record: null, readPath: null };
  }
  if (resource === 'findings' && id === 'batch' && write.method === 'POST') {
    // One defect on many units: one write, several new findings; nothing to read back as one record.
    const count = Array.isArray(bodyJson(write)?.units) ? (bodyJson(write)!.units as unknown[]).length : 0;
    const words = count > 0 ? `Same defect on ${count} unit${count === 1 ? '' : 's'}` : KIND_WORDS.finding;
    return { jobId, kind: 'finding', label: label ? `${words} · ${label}` : words, record: null, readPath: null };
  }
  if (resource === 'findings' && id && id !== 'bulk') {
    const body = bodyJson(write);
    const kind: OutboxKind =
      !sub && write.method === 'PATCH'
        ? body && 'pin' in body
          ? 'pin'
          : 'change'
        : sub === 'fixes'
          ? 'fix'
          : sub === 'reinspections'
            ? 'reinspection'
            : sub === 'comments'
              ? 'comment'
              : sub === 'photos'
                ? 'photos'
                : 'other';
    // The label given with a write on a finding is the finding's own ("#12"): the words name it.
    return { jobId, kind, label: findingWords(kind, body, label), record: `finding:${id}`, readPath: `${job}/findings/${enc(id)}` };
  }
  if (resource === 'units' && id && sub === 'checks') {
    return {
      jobId,
      kind: 'check',
      label: label ? `${KIND_WORDS.check} · ${label}` : KIND_WORDS.check,
      record: `unit:${id}`,
      readPath: `${job}/units/${enc(id)}/checks`,
    };
  }
  if (resource === 'walks') {
    // A walk's start and its end are writes on one record: the end waits behind the start.
    const walkId = id ?? (typeof bodyJson(write)?.id === 'string' ? (bodyJson(write)!.id as string) : null);
    const words = sub === 'finish' ? 'End of a walk' : id ? KIND_WORDS.walk : 'Start of a walk';
    return {
      jobId,
      kind: 'walk',
      label: label ? `${words} · ${label}` : words,
      record: walkId ? `walk:${walkId}` : write.path,
      readPath: walkId ? `${job}/walks/${enc(walkId)}` : null,
    };
  }
  if (resource === 'test-records' && write.method === 'POST' && (!id || sub === 'witness')) {
    // A record and its witness are writes on one record: the witness waits behind the record.
    const recordId = id ?? (typeof bodyJson(write)?.id === 'string' ? (bodyJson(write)!.id as string) : null);
    const words = sub === 'witness' ? 'Witness of a test record' : KIND_WORDS.test;
    return {
      jobId,
      kind: 'test',
      label: label ? `${words} · ${label}` : words,
      record: recordId ? `test:${recordId}` : write.path,
      readPath: recordId ? `${job}/test-records/${enc(recordId)}` : null,
    };
  }
  return { jobId, kind: 'other', label: label ?? KIND_WORDS.other, record: write.path, readPath: null };
}
