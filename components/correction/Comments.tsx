import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { COMMENT_LIMIT, commentSchema } from '../../shared/schemas/findings';
import { writeErrorMessage } from '../api/writeErrors';
import { formatWhen } from '../findings/due';
import { commentWrite, useAddCommentMutation, useCommentsQuery } from '../queries/correction';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { FormBanner } from '../ui/FormBanner';
import { FormText, setServerFieldErrors } from '../ui/FormFields';
import { ErrorState, LoadingState } from '../ui/States';
import { FINDING_WRITE_WORDS } from './rules';

/** Comments on a finding: everyone who can see it reads them and adds one. */
export function Comments({ jobId, findingId, timeZone }: { jobId: string; findingId: string; timeZone: string }) {
  const comments = useCommentsQuery(jobId, findingId);
  const add = useAddCommentMutation(jobId, findingId);
  const { control, handleSubmit, reset, setError } = useForm({
    resolver: zodResolver(commentSchema),
    defaultValues: { text: '' },
  });

  const send = handleSubmit((values) => {
    add.mutate(commentWrite(jobId, findingId, values), {
      onSuccess: () => reset({ text: '' }),
      onError: (e) => {
        setServerFieldErrors(e, setError, ['text']);
        setError('root', { message: writeErrorMessage(e, FINDING_WRITE_WORDS) });
      },
    });
  });

  return (
    <View style={styles.section} testID="finding-comments">
      <AppText variant="title" role="heading">
        Comments
      </AppText>
      {comments.isPending ? (
        <LoadingState label="Loading the comments…" testID="finding-comments-loading" />
      ) : comments.isError ? (
        <ErrorState message={comments.error.message} onRetry={() => comments.refetch()} testID="finding-comments-error" />
      ) : comments.data.length === 0 ? (
        <AppText muted testID="finding-comments-empty">
          No comments yet.
        </AppText>
      ) : (
        comments.data.map((c) => (
          <View key={c.id} style={styles.comment} testID={`finding-comment-${c.id}`}>
            <AppText variant="small" muted>
              {c.actor.name} · {formatWhen(c.at, timeZone)}
            </AppText>
            <AppText>{c.reason}</AppText>
          </View>
        ))
      )}
      <FormText
        control={control}
        name="text"
        label="Add a comment"
        multiline
        style={multilineStyle}
        limit={COMMENT_LIMIT}
        testID="finding-comment-text"
        compact
      />
      <FormBanner control={control} testID="finding-comment-send-error" />
      <Button label="Add comment" tone="secondary" busy={add.isPending} onPress={send} testID="finding-comment-send" />
    </View>
  );
}

/** Room for a few lines, text from the top. */
const multilineStyle = { minHeight: 96, paddingVertical: 10, textAlignVertical: 'top' as const };

const styles = StyleSheet.create({
  section: { gap: space.sm },
  comment: { backgroundColor: colors.surface, borderRadius: radius.md, borderWidth: 1, borderColor: colors.line, padding: space.md, gap: 2 },
});
