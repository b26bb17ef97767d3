/**
 * The words for a mistake no schema words itself. Every field a person fills in carries its own
 * message ("Choose the severity."); this map only catches what is left (a wrong kind of value,
 * a number out of range, a key a form never sends), so that nothing a person meets reads like
 * "Invalid input: expected string, received undefined". A schema's own message always wins
 * (zod asks this map only when the schema gives none).
 *
 * Installed once for the zod the app and the server share, by every schema module's building
 * blocks (fields.ts, session.ts, board.ts, exports.ts import this file).
 */
import { z } from 'zod';

type Issue = z.core.$ZodRawIssue;

function count(n: number | bigint, one: string, many = `${one}s`): string {
  return `${n.toLocaleString('en-US')} ${Number(n) === 1 ? one : many}`;
}

export function plainWords(issue: Issue): string {
  switch (issue.code) {
    case 'invalid_type': {
      if (issue.input === undefined || issue.input === null) return 'Fill this in.';
      switch (issue.expected) {
        case 'string':
          return 'Type this as text.';
        case 'number':
          return typeof issue.input === 'number' ? 'Type a number.' : 'Type a number here.';
        case 'int':
          return 'Type a whole number.';
        case 'boolean':
          return 'Choose yes or no.';
        case 'array':
        case 'set':
          return 'Choose from the list.';
        default:
          return 'Fill in this part of the form again.';
      }
    }
    case 'invalid_value':
      return issue.values.length === 1 ? `Use ${String(issue.values[0])} here.` : 'Choose one from the list.';
    case 'too_big': {
      const max = issue.maximum;
      if (issue.origin === 'string') return `Shorten this to at most ${count(max, 'character')}.`;
      if (issue.origin === 'array' || issue.origin === 'set') return `Choose at most ${max.toLocaleString('en-US')}.`;
      return issue.inclusive === false ? `Type a number under ${max.toLocaleString('en-US')}.` : `Type a number up to ${max.toLocaleString('en-US')}.`;
    }
    case 'too_small': {
      const min = issue.minimum;
      if (issue.origin === 'string') return Number(min) <= 1 ? 'Fill this in.' : `Type at least ${count(min, 'character')}.`;
      if (issue.origin === 'array' || issue.origin === 'set') return `Choose at least ${min.toLocaleString('en-US')}.`;
      return issue.inclusive === false ? `Type a number over ${min.toLocaleString('en-US')}.` : `Type a number of at least ${min.toLocaleString('en-US')}.`;
    }
    case 'invalid_format':
      if (issue.format === 'uuid' || issue.format === 'guid') return 'Choose one from the list.';
      if (issue.format === 'email') return 'Type an e-mail address, like name@example.com.';
      return 'Check how this is written.';
    case 'not_multiple_of':
      return `Type a multiple of ${String(issue.divisor)}.`;
    case 'unrecognized_keys':
      return `Leave out ${issue.keys.join(', ')}: this form does not take ${issue.keys.length === 1 ? 'it' : 'them'}.`;
    case 'invalid_union':
      return 'Choose one of the kinds offered.';
    default:
      return 'Check this value.';
  }
}

z.config({ customError: plainWords });
