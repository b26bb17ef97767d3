import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { COMMENT_MAX, commentSchema } from '../../shared/schemas/findings';
import { formatWhen } from '../findings/due';
import { commentWrite, useAddCommentMutation, useCommentsQuery } from '../queries/correction';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { writeErrorMessage } from './rules';

/** Comments on a finding: everyone who can see it reads them and adds one. */
export function Comments({ jobId, findingId, timeZone }: { jobId: string; findingId: string; timeZone: string }) {
  const comments = useCommentsQuery(jobId, findingId);
  const add = useAddCommentMutation(jobId, findingId);
  const [text, setText] = useState('');
  const [error, setError] = useState<string | null>(null);

  function send() {
    const parsed = commentSchema.safeParse({ text });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message ?? 'Write a comment.');
      return;
    }
    setError(null);
    add.mutate(commentWrite(jobId, findingId, parsed.data), {
      onSuccess: () => setText(''),
      onError: (e) => setError(writeErrorMessage(e)),
    });
  }

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
      <TextField
        label="Add a comment"
        value={text}
        onChangeText={setText}
        multiline
        style={multilineStyle}
        maxLength={COMMENT_MAX}
        testID="finding-comment-text"
        error={error ?? undefined}
        compact
      />
      {add.isError && !error ? <Notice tone="error">{writeErrorMessage(add.error)}</Notice> : null}
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
