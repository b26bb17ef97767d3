/**
 * Deleting several units at once from the register: tick the units (of those shown, so the
 * register's filters choose them), then confirm. All or none: a unit with a unit check or a
 * finding is evidence and refuses the whole delete, and the server's sentence says which.
 */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import type { UnitDto } from '../../shared/schemas/setup';
import { writeErrorMessage } from '../api/writeErrors';
import type { Write } from '../api/mutations';
import { deleteUnitsWrite, useDeleteUnitsMutation } from '../queries/units';
import { space } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { Card } from '../ui/Card';
import { Notice } from '../ui/Notice';
import { Tick } from './ImportChoices';

export function UnitBulkDelete({ jobId, rows, onClose }: { jobId: string; rows: UnitDto[]; onClose: () => void }) {
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [confirming, setConfirming] = useState<Write | null>(null);
  const [message, setMessage] = useState<{ tone: 'success' | 'error'; text: string } | null>(null);
  const remove = useDeleteUnitsMutation(jobId);
  const shown = rows.filter((u) => chosen.has(u.id));
  const toggle = (id: string, on: boolean) => {
    setConfirming(null);
    setChosen((c) => {
      const next = new Set(c);
      if (on) next.add(id);
      else next.delete(id);
      return next;
    });
  };
  const count = `${shown.length} unit${shown.length === 1 ? '' : 's'}`;
  return (
    <Card testID="units-bulk-delete">
      <AppText variant="heading">Delete several units</AppText>
      <AppText variant="small" muted>
        Tick the units to delete (the filters above choose which are listed). A unit with a unit check or a finding is kept as evidence: if one is
        ticked, nothing is deleted.
      </AppText>
      {message ? (
        <Notice tone={message.tone} testID="units-bulk-result">
          {message.text}
        </Notice>
      ) : null}
      <View style={styles.row}>
        <Button
          testID="units-bulk-all"
          tone="secondary"
          label={`Tick all ${rows.length} shown`}
          onPress={() => {
            setConfirming(null);
            setChosen(new Set(rows.map((u) => u.id)));
          }}
        />
        <Button testID="units-bulk-none" tone="quiet" label="Untick all" onPress={() => setChosen(new Set())} />
      </View>
      <View style={styles.ticks} role="list">
        {rows.map((u) => (
          <View key={u.id} role="listitem">
            <Tick testID={`units-bulk-tick-${u.tag}`} label={u.tag} checked={chosen.has(u.id)} onChange={(on) => toggle(u.id, on)} />
          </View>
        ))}
      </View>
      <View style={styles.row}>
        {confirming ? (
          <Button
            testID="units-bulk-confirm"
            tone="danger"
            label={`Yes, delete ${count}`}
            busy={remove.isPending}
            onPress={() =>
              remove.mutate(confirming, {
                onSuccess: (r) => {
                  setMessage({ tone: 'success', text: `${r.deleted} unit${r.deleted === 1 ? '' : 's'} deleted.` });
                  setChosen(new Set());
                  setConfirming(null);
                },
                onError: (err) => {
                  setMessage({ tone: 'error', text: writeErrorMessage(err) });
                  setConfirming(null);
                },
              })
            }
          />
        ) : (
          <Button
            testID="units-bulk-delete-button"
            tone="danger"
            label={`Delete ${count}`}
            disabled={shown.length === 0}
            onPress={() => {
              setMessage(null);
              setConfirming(deleteUnitsWrite(jobId, shown.map((u) => u.id)));
            }}
          />
        )}
        <Button testID="units-bulk-close" tone="quiet" label="Close" onPress={onClose} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, alignItems: 'center' },
  ticks: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm },
});
