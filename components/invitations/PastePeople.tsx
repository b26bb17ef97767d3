/**
 * Several people invited at once: pasted one per line ("e-mail, role, company", or a spreadsheet's
 * cells), each line previewed as it will be sent with its own problems, sent as one all-or-none
 * write. A refusal from the server that names a line (`people.2.email`) is shown on that line
 * until the line is changed. The box itself follows PasteNames (components/setup).
 */
import { zodResolver } from '@hookform/resolvers/zod';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import {
  parsePastedPeople,
  pastedPeopleForm,
  problemsByLine,
  type CompanyOnJob,
  type PastedPersonLine,
  type PastedPersonProblem,
} from '../../shared/rules/pastedPeople';
import { INVITATIONS_BULK_MAX, type InvitationBulkInput } from '../../shared/schemas/auth';
import { ROLE_LABELS } from '../../shared/words';
import { ApiError } from '../api/client';
import { writeErrorMessage } from '../api/writeErrors';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { FormBanner } from '../ui/FormBanner';
import { FormText } from '../ui/FormFields';
import { Notice } from '../ui/Notice';

const NO_COMPANIES: readonly CompanyOnJob[] = [];

/** A refusal's line messages, kept with the line texts that were sent: a changed line drops its own. */
interface Refusal {
  sent: string[];
  byLine: Map<number, PastedPersonProblem[]>;
}

const people = (n: number) => `${n} ${n === 1 ? 'person' : 'people'}`;

export function PastePeople({
  companies,
  companiesError,
  send,
  testID = 'invite-paste',
}: {
  /** The companies listed for the job; undefined while they load. */
  companies: readonly CompanyOnJob[] | undefined;
  companiesError?: boolean;
  send: (people: InvitationBulkInput['people']) => Promise<unknown>;
  testID?: string;
}) {
  const listed = companies ?? NO_COMPANIES;
  const schema = useMemo(() => pastedPeopleForm(listed), [listed]);
  const { control, handleSubmit, reset, setError, watch } = useForm({ resolver: zodResolver(schema), defaultValues: { text: '' } });
  // Said until the next list is typed (the box is emptied once they are sent).
  const [sent, setSent] = useState<number | null>(null);
  const [refusal, setRefusal] = useState<Refusal | null>(null);
  const [busy, setBusy] = useState(false);
  const text = watch('text');
  const preview = useMemo(() => parsePastedPeople(text, listed), [text, listed]);
  const count = preview.lines.length;

  const submit = handleSubmit(async () => {
    if (!preview.people) return; // the resolver has already said which lines
    setSent(null);
    setRefusal(null);
    setBusy(true);
    try {
      await send(preview.people);
      reset({ text: '' });
      setSent(preview.people.length);
    } catch (err) {
      const byLine = err instanceof ApiError ? problemsByLine(err.fields) : new Map<number, PastedPersonProblem[]>();
      if (byLine.size > 0) {
        setRefusal({ sent: preview.lines.map((l) => l.text), byLine });
        // The server's sentence names the line and says that nobody was invited.
        setError('text', { message: (err as ApiError).message }, { shouldFocus: true });
      } else {
        setError('root', { message: writeErrorMessage(err) });
      }
    } finally {
      setBusy(false);
    }
  });

  const lineProblems = (line: PastedPersonLine): PastedPersonProblem[] => {
    const fromServer = refusal && refusal.sent[line.line - 1] === line.text ? (refusal.byLine.get(line.line) ?? []) : [];
    return [...line.problems, ...fromServer];
  };

  return (
    <Card testID={testID}>
      <AppText variant="heading" role="heading" aria-level={2}>
        Invite several people
      </AppText>
      <AppText variant="small" muted>
        {`One person per line: e-mail, role, company (the company as the Companies page lists it; none for your own). Cells copied from a spreadsheet work too. At most ${INVITATIONS_BULK_MAX} at once; either all are invited or none.`}
      </AppText>
      {sent !== null && text === '' ? (
        <Notice tone="success" testID={`${testID}-sent`}>
          {`Invitations sent to ${people(sent)}.`}
        </Notice>
      ) : null}
      <FormBanner control={control} testID={`${testID}-error`} />
      <FormText
        control={control}
        name="text"
        label="People, one per line"
        testID={`${testID}-input`}
        multiline
        autoCapitalize="none"
        placeholder={'ana@pinecrest.example, subcontractor, Pinecrest Mechanical\nlio@example.com, inspector'}
        hint={companiesError ? 'The companies on this job did not load: company names cannot be checked yet.' : undefined}
        style={styles.box}
      />
      {count > 0 ? (
        <View style={styles.preview} testID={`${testID}-preview`}>
          <AppText variant="label">{preview.headerSkipped ? `${people(count)} to invite (the heading row is left out)` : `${people(count)} to invite`}</AppText>
          {preview.lines.map((line) => (
            <PreviewLine key={`${line.line}:${line.text}`} line={line} problems={lineProblems(line)} testID={`${testID}-line-${line.line}`} />
          ))}
          {preview.listProblems.map((p) => (
            <AppText key={p} variant="small" style={styles.problem}>
              {p}
            </AppText>
          ))}
        </View>
      ) : null}
      <View style={styles.row}>
        <Button
          testID={`${testID}-submit`}
          label={count > 0 ? `Invite ${people(count)}` : 'Invite people'}
          disabled={count === 0 || companies === undefined}
          busy={busy}
          onPress={submit}
        />
      </View>
    </Card>
  );
}

const FIELD_WORDS: Record<PastedPersonProblem['field'], string> = { email: 'E-mail', role: 'Role', companyId: 'Company', name: 'Name', line: 'Line' };

function PreviewLine({ line, problems, testID }: { line: PastedPersonLine; problems: PastedPersonProblem[]; testID: string }) {
  const bad = problems.length > 0;
  const company = line.companyListed ?? (line.companyName === '' ? 'your own company' : line.companyName);
  return (
    <View style={[styles.line, bad && styles.lineBad]} testID={testID}>
      <View style={styles.head}>
        <AppText variant="label">{`Line ${line.line}`}</AppText>
        <AppText variant="small" style={bad ? styles.problem : styles.ok}>
          {bad ? 'Needs a change' : 'Ready'}
        </AppText>
      </View>
      <View style={styles.grow}>
        <AppText style={styles.email}>{line.email || '(no e-mail)'}</AppText>
        <AppText variant="small" muted>
          {[line.role ? ROLE_LABELS[line.role] : null, company].filter(Boolean).join(' · ')}
        </AppText>
        {problems.map((p) => (
          <AppText key={`${p.field}:${p.message}`} variant="small" style={styles.problem} testID={`${testID}-problem`}>
            {`${FIELD_WORDS[p.field]}: ${p.message}`}
          </AppText>
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { minHeight: 140, paddingTop: space.sm, textAlignVertical: 'top' },
  preview: { gap: space.xs },
  line: {
    gap: 2,
    borderWidth: 1,
    borderColor: colors.line,
    borderRadius: radius.md,
    padding: space.sm,
  },
  lineBad: { borderColor: colors.danger, backgroundColor: colors.dangerSoft },
  head: { flexDirection: 'row', justifyContent: 'space-between', gap: space.md },
  grow: { minWidth: 0, gap: 2 },
  // a long address breaks where it must rather than pushing the phone's screen sideways
  email: { overflowWrap: 'anywhere' } as object,
  problem: { color: colors.danger },
  ok: { color: colors.good },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
});
