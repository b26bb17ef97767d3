import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { JobDetail, MemberDto } from '../../shared/schemas/setup';
import { ROLES, ROLE_LABELS, type Role } from '../../shared/words';
import { InvitationsPanel } from '../invitations/InvitationsPanel';
import { useMembersQuery, useRemoveMemberMutation, useUpdateMemberMutation } from '../queries/members';
import { useSessionQuery } from '../queries/session';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { RoleBadge } from '../ui/RoleBadge';
import { Select } from '../ui/Select';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { writeErrorMessage } from '../api/writeErrors';
import { SetupFrame, canEditSetup } from './SetupFrame';

export function MembersScreen({ jobId }: { jobId: string }) {
  return (
    <SetupFrame jobId={jobId} section="members" title="Members" intro="Who is on the job, for which company, and with which role." testID="members-screen">
      {(job) => <MembersBody job={job} />}
    </SetupFrame>
  );
}

function MembersBody({ job }: { job: JobDetail }) {
  const editor = canEditSetup(job);
  const members = useMembersQuery(job.id);
  const me = useSessionQuery().data?.user?.id;
  return (
    <View style={styles.body}>
      {editor ? <InvitationsPanel jobId={job.id} /> : null}
      <AppText variant="heading" role="heading" aria-level={2}>
        On the job
      </AppText>
      {members.isPending ? (
        <LoadingState label="Loading members…" />
      ) : members.isError ? (
        <ErrorState message={members.error.message} onRetry={() => members.refetch()} />
      ) : members.data.length === 0 ? (
        <EmptyState title="No members yet" testID="members-empty" />
      ) : (
        <View style={styles.list} testID="members-list">
          {members.data.map((m) => (
            <MemberRow key={m.id} job={job} member={m} editor={editor} isMe={m.userId === me} />
          ))}
        </View>
      )}
    </View>
  );
}

function MemberRow({ job, member, editor, isMe }: { job: JobDetail; member: MemberDto; editor: boolean; isMe: boolean }) {
  const update = useUpdateMemberMutation(job.id);
  const remove = useRemoveMemberMutation(job.id);
  const [error, setError] = useState<string | null>(null);
  return (
    <View style={styles.row} testID={`member-row-${member.id}`}>
      <View style={styles.grow}>
        <AppText variant="heading">
          {member.name}
          {isMe ? ' (you)' : ''}
        </AppText>
        <AppText variant="small" muted>
          {member.companyName}
          {member.email ? ` · ${member.email}` : ''}
        </AppText>
        {error ? (
          <AppText variant="small" style={{ color: colors.danger }} role="alert">
            {error}
          </AppText>
        ) : null}
      </View>
      {editor && !isMe ? (
        <View style={styles.actions}>
          <View style={styles.role}>
            <Select
              compact
              label="Role"
              testID={`member-role-${member.id}`}
              value={member.role}
              options={ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }))}
              disabled={update.isPending}
              onChange={(role) => {
                setError(null);
                update.mutate({ member, input: { role: role as Role } }, { onError: (err) => setError(writeErrorMessage(err)) });
              }}
            />
          </View>
          <Button
            label="Remove"
            aria-label={`Remove ${member.name} from the job`}
            tone="quiet"
            testID={`member-remove-${member.id}`}
            busy={remove.isPending}
            onPress={() => {
              setError(null);
              remove.mutate(member, { onError: (err) => setError(writeErrorMessage(err)) });
            }}
          />
        </View>
      ) : (
        <RoleBadge role={member.role} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: space.lg },
  list: { gap: space.sm },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: space.md,
    backgroundColor: colors.surface,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    padding: space.md,
  },
  grow: { flexGrow: 1, flexShrink: 1, flexBasis: 240, minWidth: 0, gap: 2 },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'flex-end' },
  role: { minWidth: 180 },
});
