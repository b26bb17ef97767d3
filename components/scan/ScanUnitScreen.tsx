import { useQueryClient } from '@tanstack/react-query';
import { Link, useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import type { UnitDto } from '../../shared/schemas/setup';
import { unitKindLabel } from '../../shared/words';
import { ApiError, apiGet } from '../api/client';
import { jobPath } from '../api/lists';
import { links } from '../links';
import { useJobQuery } from '../queries/jobs';
import { unitKeys, useUnitsQuery } from '../queries/units';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, ErrorState, LoadingState } from '../ui/States';
import { TextField } from '../ui/TextField';
import { ImageCodeInput } from './ImageCodeInput';
import { QrCamera } from './QrCamera';
import { SCAN_WORDS, scanOutcome } from './scanResult';

const TAG_MATCHES = 8;

/**
 * "Scan a unit": the camera (or a photo of the label) reads a unit label's QR code and opens that
 * unit's check. The code must name a unit of THIS job that the server still shows; anything else
 * gets one sentence and nothing opens. Typing the tag finds the unit the same way as before.
 */
export function ScanUnitScreen({ jobId }: { jobId: string }) {
  const job = useJobQuery(jobId);
  const router = useRouter();
  const client = useQueryClient();
  const [camera, setCamera] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [looking, setLooking] = useState(false);
  const [tag, setTag] = useState('');

  async function onCode(text: string | null) {
    setProblem(null);
    if (text === null) {
      setProblem(SCAN_WORDS.no_code);
      return;
    }
    const outcome = scanOutcome(text, jobId);
    if (outcome.kind !== 'unit') {
      setProblem(SCAN_WORDS[outcome.kind]);
      return;
    }
    setLooking(true);
    try {
      // Asked of the server: a unit removed since the label was printed, or not this person's to see, answers 404.
      await client.fetchQuery({
        queryKey: [...unitKeys.all(jobId), 'one', outcome.unitId],
        queryFn: () => apiGet<UnitDto>(jobPath(jobId, 'units', outcome.unitId)),
        staleTime: 30_000,
      });
      setCamera(false);
      router.push(links.unitCheck(jobId, outcome.unitId));
    } catch (err) {
      setProblem(err instanceof ApiError && err.status === 404 ? SCAN_WORDS.not_visible : err instanceof Error ? err.message : SCAN_WORDS.not_visible);
    } finally {
      setLooking(false);
    }
  }

  return (
    <Screen testID="scan-screen" maxWidth={720}>
      <Link href={links.walk(jobId)} style={styles.back} testID="scan-back">
        <AppText variant="label" style={{ color: colors.spruce }}>
          ← Walk a level
        </AppText>
      </Link>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Scan a unit
        </AppText>
        <AppText muted>Point the camera at the QR code on the unit’s label: its check opens.</AppText>
      </View>
      {job.isError ? (
        job.error instanceof ApiError && job.error.status === 404 ? (
          <EmptyState title="Job not found" body="This job does not exist, or you are not a member of it." testID="job-not-found" />
        ) : (
          <ErrorState message={job.error.message} onRetry={() => void job.refetch()} />
        )
      ) : job.isPending ? (
        <LoadingState label="Loading the job…" />
      ) : job.data.role === 'subcontractor' ? (
        <Notice tone="info" testID="scan-not-allowed">
          {SCAN_WORDS.checks_not_allowed}
        </Notice>
      ) : (
        <>
          {problem ? (
            <Notice tone="error" testID="scan-problem">
              {problem}
            </Notice>
          ) : null}
          {looking ? <LoadingState label="Opening the unit…" /> : null}
          {camera ? (
            <QrCamera onCode={(t) => void onCode(t)} onClose={() => setCamera(false)} />
          ) : (
            <Button label="Open the camera" testID="scan-camera-open" onPress={() => setCamera(true)} />
          )}
          <ImageCodeInput onResult={(t) => void onCode(t)} disabled={looking} />
          <TagSearch jobId={jobId} tag={tag} onTag={setTag} />
        </>
      )}
    </Screen>
  );
}

/** Typing the tag: units whose tag contains what was typed, each opening its check. */
function TagSearch({ jobId, tag, onTag }: { jobId: string; tag: string; onTag: (t: string) => void }) {
  const q = tag.trim();
  const units = useUnitsQuery(jobId, { q: q || undefined }, TAG_MATCHES);
  const items = units.data?.pages.flatMap((p) => p.items) ?? [];
  return (
    <View style={styles.tag} testID="scan-tag">
      <TextField label="Or type the tag" value={tag} onChangeText={onTag} autoCapitalize="characters" autoCorrect={false} testID="scan-tag-input" />
      {q === '' ? null : units.isPending ? (
        <LoadingState label="Finding units…" />
      ) : units.isError ? (
        <ErrorState message={units.error.message} onRetry={() => void units.refetch()} />
      ) : items.length === 0 ? (
        <AppText muted testID="scan-tag-none">
          No unit’s tag contains “{q}”.
        </AppText>
      ) : (
        items.map((u) => (
          <Link key={u.id} href={links.unitCheck(jobId, u.id)} asChild>
            <Pressable style={styles.match} accessibilityRole="link" testID={`scan-tag-${u.tag}`}>
              <AppText variant="heading">{u.tag}</AppText>
              <AppText variant="small" muted>
                {[unitKindLabel(u.kind), u.levelName, u.spaceName].filter(Boolean).join(' · ')}
              </AppText>
            </Pressable>
          </Link>
        ))
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  back: { alignSelf: 'flex-start', minHeight: touchTarget, justifyContent: 'center' },
  head: { gap: space.xs },
  tag: { gap: space.sm },
  match: {
    minHeight: touchTarget,
    padding: space.md,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.line,
    backgroundColor: colors.surface,
    gap: 2,
  },
});
