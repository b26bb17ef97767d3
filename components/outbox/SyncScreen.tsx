/**
 * The sync screen: every write kept on this phone with its state (waiting to send, sending, needs
 * attention; sent during this visit), the storage used, "Send now", and for a write the server
 * refused: its answer and what it holds now beside what was queued, with "Apply again on the new
 * version" and "Discard" (confirmed).
 */
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { FINDING_STATUS_LABELS, SEVERITY_LABELS } from '../../shared/words';
import { colors, radius, space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Screen } from '../ui/Screen';
import { EmptyState, LoadingState } from '../ui/States';
import { OutboxCountLink, useOnline } from './HeaderParts';
import { currentOutbox, useOutboxSnapshot, waitingWords } from './index';
import type { OutboxItem } from './storage';

const STATE_WORDS: Record<OutboxItem['state'], string> = { waiting: 'Waiting to send', sending: 'Sending', attention: 'Needs attention' };

/** "17:05": a time of day as the rest of the screen shows it. */
function clock(ms: number): string {
  return new Date(ms).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' });
}

function megabytes(bytes: number): string {
  if (bytes < 1_000_000) return `${Math.max(bytes ? 1 : 0, Math.round(bytes / 1000))} KB`;
  return `${(bytes / 1_000_000).toFixed(bytes < 10_000_000 ? 1 : 0)} MB`;
}

/** navigator.storage.estimate(): what this site uses on the phone, of what the browser allows it. */
function useStorageEstimate(deps: unknown) {
  const [est, setEst] = useState<{ usage: number; quota: number } | null>(null);
  useEffect(() => {
    const storage = (globalThis as { navigator?: { storage?: { estimate?: () => Promise<{ usage?: number; quota?: number }> } } }).navigator?.storage;
    if (!storage?.estimate) return;
    let live = true;
    storage
      .estimate()
      .then((e) => {
        if (live) setEst({ usage: e.usage ?? 0, quota: e.quota ?? 0 });
      })
      .catch(() => undefined);
    return () => {
      live = false;
    };
  }, [deps]);
  return est;
}

/** The queued write's fields in plain lines (the JSON sent, and how many photos go with it). */
function queuedLines(item: OutboxItem): string[] {
  const body = item.write.body;
  let json: unknown = null;
  let photos = 0;
  if (body.kind === 'json') json = body.value;
  if (body.kind === 'form') {
    photos = body.files.length;
    const data = body.fields.find((f) => f.name === 'data')?.value;
    try {
      json = data ? JSON.parse(data) : null;
    } catch {
      json = data ?? null;
    }
  }
  const lines = describe(json);
  if (photos) lines.push(`${photos} photo${photos === 1 ? '' : 's'} (${megabytes(item.bytes)})`);
  if (item.write.ifMatch) lines.push(`Made on version ${item.write.ifMatch.replace(/\D/g, '')}`);
  return lines;
}

function describe(value: unknown, prefix = ''): string[] {
  if (value === null || value === undefined) return [];
  if (typeof value !== 'object') return [`${prefix || 'Value'}: ${String(value)}`];
  const out: string[] = [];
  for (const [k, v] of Object.entries(value as Record<string, unknown>)) {
    if (k === 'id' || k.endsWith('Id')) continue;
    if (v && typeof v === 'object' && !Array.isArray(v)) out.push(...describe(v, prefix ? `${prefix} ${k}` : k));
    else if (Array.isArray(v)) out.push(`${prefix ? `${prefix} ` : ''}${k}: ${v.length} item${v.length === 1 ? '' : 's'}`);
    else if (v !== undefined && v !== null && v !== '') out.push(`${prefix ? `${prefix} ` : ''}${k}: ${String(v)}`);
  }
  return out;
}

/** What the server holds now, in the product's words where it is a finding. */
function serverLines(data: unknown): string[] {
  const f = data as Partial<Record<string, unknown>> | null;
  if (!f || typeof f !== 'object') return [];
  if (typeof f.status === 'string' && typeof f.label === 'string') {
    const status = FINDING_STATUS_LABELS[f.status as keyof typeof FINDING_STATUS_LABELS] ?? f.status;
    const severity = SEVERITY_LABELS[f.severity as keyof typeof SEVERITY_LABELS] ?? String(f.severity ?? '');
    return [
      `Finding ${f.label} · ${String(f.code ?? '')} ${String(f.title ?? '')}`.trim(),
      `Status: ${status}${f.voidedReason ? ` (${String(f.voidedReason)})` : ''}`,
      `Severity: ${severity}`,
      `Responsible company: ${String(f.companyName ?? '')}`,
      `Due: ${String(f.dueOn ?? '')}`,
      `Version ${String(f.version ?? '')}`,
    ];
  }
  return describe(data).slice(0, 8);
}

export function SyncScreen() {
  const snap = useOutboxSnapshot();
  const online = useOnline();
  const estimate = useStorageEstimate(snap.items.length);
  const kept = snap.items.reduce((n, i) => n + i.bytes, 0);
  const attention = snap.items.filter((i) => i.state === 'attention');
  const others = snap.items.filter((i) => i.state !== 'attention');
  const delayed = others.some((i) => i.state === 'waiting' && i.delay);
  const how = !online
    ? 'No signal: it is sent when the signal is back.'
    : snap.status === 'signed-out'
      ? 'Sign in again to send them.'
      : delayed
        ? 'Trimout asked to wait before taking more: they are tried again by themselves, in the order they were saved.'
        : 'Work is sent in the order it was saved.';
  const [sending, setSending] = useState(false);

  return (
    <Screen testID="sync-screen" maxWidth={720}>
      <View style={styles.head}>
        <AppText variant="display" role="heading">
          Waiting to send
        </AppText>
        <AppText muted testID="sync-summary">
          {snap.items.length === 0
            ? 'Everything saved on this phone has reached Trimout.'
            : `${[others.length ? waitingWords(others.length) : '', attention.length ? `${attention.length} need${attention.length === 1 ? 's' : ''} attention` : ''].filter(Boolean).join(', ')}. ${how}`}
        </AppText>
        <AppText variant="small" muted testID="sync-storage">
          {`Kept for sending: ${megabytes(kept)} of photos.`}
          {estimate ? ` This app uses ${megabytes(estimate.usage)} on this phone of ${megabytes(estimate.quota)} the browser allows.` : ''}
        </AppText>
        {snap.items.length ? (
          <Button
            label="Send now"
            testID="sync-send-now"
            busy={sending || snap.status === 'sending'}
            onPress={async () => {
              setSending(true);
              try {
                await currentOutbox()?.sync('asked');
              } finally {
                setSending(false);
              }
            }}
          />
        ) : null}
      </View>

      {!snap.loaded ? <LoadingState label="Reading what is kept on this phone…" /> : null}

      {attention.map((item) => (
        <AttentionCard key={item.id} item={item} />
      ))}

      {others.length ? (
        <View style={styles.list} testID="sync-waiting">
          {others.map((item) => (
            <Card key={item.id} testID={`sync-item-${item.state}`}>
              <AppText variant="heading">{item.label}</AppText>
              <AppText variant="small" muted>
                {STATE_WORDS[item.state]} · saved {new Date(item.createdAt).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}
                {item.attempts > 0 ? ` · tried ${item.attempts} time${item.attempts === 1 ? '' : 's'}` : ''}
                {item.bytes ? ` · ${megabytes(item.bytes)}` : ''}
              </AppText>
              {item.state === 'waiting' && item.delay ? (
                <AppText variant="small" testID="sync-item-delay">
                  {`Trimout asked to wait: ${item.delay.message} Tries again by itself at ${clock(item.notBefore)}.`}
                </AppText>
              ) : null}
            </Card>
          ))}
        </View>
      ) : null}

      {snap.loaded && snap.items.length === 0 && snap.sent.length === 0 ? (
        <EmptyState title="Nothing waiting" body="Unit checks, findings, fixes and photos you save with no signal wait here until they are sent." testID="sync-empty" />
      ) : null}

      {snap.sent.length ? (
        <View style={styles.list} testID="sync-sent">
          <AppText variant="heading" role="heading">
            Sent
          </AppText>
          {snap.sent.map((s) => (
            <AppText key={s.id} variant="small" testID="sync-item-sent">
              {s.label} · sent {new Date(s.sentAt).toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' })}
            </AppText>
          ))}
        </View>
      ) : null}
      <OutboxCountLink />
    </Screen>
  );
}

function AttentionCard({ item }: { item: OutboxItem }) {
  const [confirming, setConfirming] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const refusal = item.refusal;
  return (
    <Card testID="sync-item-attention" style={styles.attention}>
      <AppText variant="heading">{item.label}</AppText>
      <AppText variant="label" style={{ color: colors.danger }}>
        Needs attention: Trimout did not take it
      </AppText>
      {refusal ? <AppText testID="sync-refusal">{refusal.message}</AppText> : null}
      <View style={styles.versions}>
        <View style={styles.version} testID="sync-queued-version">
          <AppText variant="label">What was saved on this phone</AppText>
          {queuedLines(item).map((l) => (
            <AppText key={l} variant="small">
              {l}
            </AppText>
          ))}
        </View>
        <View style={styles.version} testID="sync-server-version">
          <AppText variant="label">What Trimout holds now</AppText>
          {item.serverNow === null ? (
            <AppText variant="small">Nothing you can see: it was removed, or is not yours to change.</AppText>
          ) : item.serverNow === undefined ? (
            <AppText variant="small">Could not be read.</AppText>
          ) : (
            serverLines(item.serverNow.data).map((l) => (
              <AppText key={l} variant="small">
                {l}
              </AppText>
            ))
          )}
        </View>
      </View>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {confirming ? (
        <View style={styles.actions}>
          <AppText>Discard this for good? It will never reach Trimout.</AppText>
          <Button
            label="Discard"
            tone="danger"
            testID="sync-discard-confirm"
            onPress={async () => {
              await currentOutbox()?.discard(item.id);
            }}
          />
          <Button label="Keep it" tone="secondary" testID="sync-discard-cancel" onPress={() => setConfirming(false)} />
        </View>
      ) : (
        <View style={styles.actions}>
          <Button
            label="Apply again on the new version"
            testID="sync-apply-again"
            busy={busy}
            onPress={async () => {
              setBusy(true);
              setError(null);
              try {
                await currentOutbox()?.applyAgain(item.id);
              } catch (e) {
                setError(e instanceof Error ? e.message : 'That did not work. Try again.');
              } finally {
                setBusy(false);
              }
            }}
          />
          <Button label="Discard…" tone="secondary" testID="sync-discard" onPress={() => setConfirming(true)} />
        </View>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  head: { gap: space.sm },
  list: { gap: space.sm },
  attention: { borderLeftWidth: 4, borderLeftColor: colors.danger, gap: space.sm },
  versions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  version: { flexGrow: 1, flexBasis: 240, gap: 2, padding: space.sm, borderRadius: radius.sm, backgroundColor: colors.paper },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center' },
});
